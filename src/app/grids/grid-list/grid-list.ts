import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import type { GridSummaryDto } from '../../../../shared/api/grids';
import { CurrentBench } from '../../benches/current-bench';
import { roleAtLeast } from '../../core/api-types';
import { messageOf } from '../../core/api-error';
import { axisChoice } from '../grid-axes';
import { GridsApi } from '../grids-api';

/** The grids and learnability checks of a bench, newest first. */
@Component({
  selector: 'nw-grid-list',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, RouterLink, MatButtonModule, MatIconModule],
  template: `
    <section class="nw-page">
      <div class="head">
        <div>
          <h1 class="nw-page-title">Grids</h1>
          <p class="nw-page-lead">Runs over combinations of settings, trained as a queue, with a heat map of the result. Learnability checks are listed here too.</p>
        </div>
        <div class="nw-actions">
          <a mat-stroked-button [routerLink]="['/benches', benchId(), 'compare']"><mat-icon>compare_arrows</mat-icon> Compare runs</a>
          @if (canCreate()) { <a mat-flat-button routerLink="new"><mat-icon>add</mat-icon> New grid</a> }
        </div>
      </div>
      @if (problem(); as message) { <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div> }
      <div class="nw-table-wrap">
        <table aria-label="Grids of the bench">
          <thead><tr><th>Name</th><th>Kind</th><th>Axes</th><th>Corpus</th><th class="nw-num">Finished</th><th class="nw-num">Created</th></tr></thead>
          <tbody>
            @for (g of grids(); track g.id) {
              <tr>
                <td><a [routerLink]="[g.id]">{{ g.name }}</a></td>
                <td>{{ g.kind === 'learnability' ? 'Learnability check' : 'Grid' }}@if (g.placement === 'runners') {<span class="nw-unit">on runners</span>}</td>
                <td>{{ axesOf(g) }}</td>
                <td>{{ g.corpus?.name ?? '(deleted)' }}</td>
                <td class="nw-num">{{ g.progress.finished ?? 0 }} / {{ g.cellCount }}</td>
                <td class="nw-num">{{ g.createdAt | date: 'yyyy-MM-dd HH:mm' }}</td>
              </tr>
            }
          </tbody>
        </table>
        @if (loaded() && grids().length === 0) { <div class="nw-empty">No grids yet. Start one with “New grid”, or a learnability check from a corpus page.</div> }
      </div>
    </section>
  `,
  styles: `
    .head { display: flex; justify-content: space-between; align-items: flex-start; gap: 16px; flex-wrap: wrap; }
    table { width: 100%; border-collapse: collapse; background: var(--mat-sys-surface-container-lowest); }
    th, td { padding: 8px 12px; border-bottom: 1px solid var(--mat-sys-outline-variant); text-align: left; }
    th.nw-num, td.nw-num { text-align: right; }
  `,
})
export class GridList {
  readonly benchId = input.required<string>();
  private readonly api = inject(GridsApi);
  protected readonly bench = inject(CurrentBench);
  protected readonly grids = signal<GridSummaryDto[]>([]);
  protected readonly loaded = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly canCreate = computed(() => roleAtLeast(this.bench.current()?.role ?? 'viewer', 'member'));

  constructor() {
    effect(() => {
      const id = this.benchId();
      untracked(() => {
        this.api.list(id)
          .then((g) => { this.grids.set(g); this.problem.set(null); })
          .catch((e) => this.problem.set(messageOf(e)))
          .finally(() => this.loaded.set(true));
      });
    });
  }

  protected axesOf(g: GridSummaryDto): string {
    return g.axes.map((a) => `${axisChoice(a.key)?.label ?? a.key} (${a.values.length})`).join(' × ');
  }
}
