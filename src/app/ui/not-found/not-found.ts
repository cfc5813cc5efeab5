import { ChangeDetectionStrategy, Component } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { RouterLink } from '@angular/router';

@Component({
  selector: 'nw-not-found',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatButtonModule],
  template: `
    <section class="nw-page">
      <h1 class="nw-page-title">There is no such page</h1>
      <p class="nw-page-lead">Check the address, or start again from your benches.</p>
      <a mat-flat-button routerLink="/benches">Go to my benches</a>
    </section>
  `,
})
export class NotFound {}
