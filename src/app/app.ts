import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, effect, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDividerModule } from '@angular/material/divider';
import { MatIconModule } from '@angular/material/icon';
import { MatListModule } from '@angular/material/list';
import { MatMenuModule } from '@angular/material/menu';
import { MatSidenavModule } from '@angular/material/sidenav';
import { MatToolbarModule } from '@angular/material/toolbar';
import { NavigationEnd, Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { filter, map } from 'rxjs';
import { CurrentBench } from './benches/current-bench';
import { AuthStore } from './core/auth-store';
import { RoleLabelPipe } from './ui/role-label';

/** The shell: top bar with the bench switcher, navigation on the left, pages on the right. */
@Component({
  selector: 'nw-root',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    RouterOutlet, RouterLink, RouterLinkActive, MatToolbarModule, MatButtonModule, MatIconModule, MatMenuModule,
    MatSidenavModule, MatListModule, MatDividerModule, RoleLabelPipe,
  ],
  templateUrl: './app.html',
  styleUrl: './app.scss',
})
export class App {
  protected readonly auth = inject(AuthStore);
  protected readonly bench = inject(CurrentBench);
  private readonly router = inject(Router);
  /** On narrow screens the navigation slides over the page and closes after each navigation. */
  protected readonly narrow = toSignal(
    inject(BreakpointObserver).observe('(max-width: 760px)').pipe(map((state) => state.matches)),
    { initialValue: false },
  );
  protected readonly navOpen = signal(false);

  constructor() {
    this.router.events
      .pipe(filter((event) => event instanceof NavigationEnd), takeUntilDestroyed())
      .subscribe(() => this.navOpen.set(false));
    effect(() => {
      if (this.auth.signedIn()) {
        this.bench.refreshList().catch(() => undefined); // the benches page shows its own problem
      } else {
        this.bench.forget();
      }
    });
  }

  protected async signOut(): Promise<void> {
    await this.auth.signOut();
    await this.router.navigate(['/sign-in']);
  }
}
