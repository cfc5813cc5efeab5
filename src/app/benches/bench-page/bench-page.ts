import { ChangeDetectionStrategy, Component, computed, effect, inject, input, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTabsModule } from '@angular/material/tabs';
import { RouterLink } from '@angular/router';
import { roleAtLeast } from '../../core/api-types';
import { RoleLabelPipe } from '../../ui/role-label';
import { BenchActivity } from '../bench-activity/bench-activity';
import { BenchInvitations } from '../bench-invitations/bench-invitations';
import { BenchMembers } from '../bench-members/bench-members';
import { BenchOverview } from '../bench-overview/bench-overview';
import { CurrentBench } from '../current-bench';

/** `/benches/:benchId`: overview, members, invitations and activity of one bench. */
@Component({
  selector: 'nw-bench-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    RouterLink, MatTabsModule, MatButtonModule, MatIconModule, MatProgressBarModule, RoleLabelPipe,
    BenchOverview, BenchMembers, BenchInvitations, BenchActivity,
  ],
  template: `
    <section class="nw-page">
      @if (store.loading() && !store.current()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading the bench" />
      }
      @if (store.problem(); as message) {
        <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div>
        <a mat-stroked-button routerLink="/benches">Back to my benches</a>
      }
      @if (bench(); as b) {
        <h1 class="nw-page-title" data-testid="bench-name">{{ b.name }}</h1>
        <p class="nw-page-lead">Your role here: <strong>{{ b.role | roleLabel }}</strong></p>
        <mat-tab-group animationDuration="0ms" mat-stretch-tabs="false" mat-align-tabs="start">
          <mat-tab label="Overview"><nw-bench-overview [bench]="b" /></mat-tab>
          <mat-tab label="Members"><nw-bench-members [bench]="b" /></mat-tab>
          @if (canManage()) {
            <mat-tab label="Invitations"><nw-bench-invitations [bench]="b" /></mat-tab>
            <mat-tab label="Activity"><ng-template matTabContent><nw-bench-activity [bench]="b" /></ng-template></mat-tab>
          }
        </mat-tab-group>
      }
    </section>
  `,
})
export class BenchPage {
  readonly benchId = input.required<string>();
  protected readonly store = inject(CurrentBench);
  protected readonly bench = computed(() => {
    const current = this.store.current();
    return current?.id === this.benchId() ? current : null;
  });
  protected readonly canManage = computed(() => {
    const b = this.bench();
    return b !== null && roleAtLeast(b.role, 'coach');
  });

  constructor() {
    effect(() => {
      const id = this.benchId();
      untracked(() => void this.store.open(id));
    });
  }
}
