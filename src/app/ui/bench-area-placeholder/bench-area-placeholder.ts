import { ChangeDetectionStrategy, Component, effect, inject, input, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { CurrentBench } from '../../benches/current-bench';

/**
 * Honest landing page of a bench area that this build does not provide yet: it names the bench,
 * says what the area will hold, and says plainly that it is not available yet. It shows no data.
 */
@Component({
  selector: 'nw-bench-area-placeholder',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [RouterLink, MatButtonModule, MatIconModule],
  template: `
    <section class="nw-page">
      @if (store.problem(); as message) {
        <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div>
        <a mat-stroked-button routerLink="/benches">Back to my benches</a>
      } @else {
        <h1 class="nw-page-title">{{ title() }}</h1>
        <p class="nw-page-lead" data-testid="area-bench">Bench: <strong>{{ store.current()?.name ?? '…' }}</strong></p>
        <div class="nw-card">
          <h2><mat-icon class="nw-inline-icon">construction</mat-icon> Not available yet in this build</h2>
          <p>{{ purpose() }}</p>
          <ul>
            @for (item of upcoming(); track item) { <li>{{ item }}</li> }
          </ul>
          <p class="nw-muted">Nothing on this page is stored or computed yet; it will fill in when this area ships.</p>
          <a mat-stroked-button [routerLink]="['/benches', benchId()]">Back to the bench overview</a>
        </div>
      }
    </section>
  `,
  styles: `.nw-inline-icon { vertical-align: -5px; color: var(--nw-live); } ul { margin: 0 0 12px; padding-left: 20px; }`,
})
export class BenchAreaPlaceholder {
  readonly benchId = input.required<string>();
  readonly title = input.required<string>();
  readonly purpose = input.required<string>();
  readonly upcoming = input<string[]>([]);
  protected readonly store = inject(CurrentBench);

  constructor() {
    effect(() => {
      const id = this.benchId();
      untracked(() => {
        if (this.store.current()?.id !== id) void this.store.open(id);
      });
    });
  }
}
