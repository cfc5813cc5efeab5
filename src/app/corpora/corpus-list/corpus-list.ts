import { DatePipe, DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { CurrentBench } from '../../benches/current-bench';
import { messageOf } from '../../core/api-error';
import { roleAtLeast } from '../../core/api-types';
import { CorporaApi, type CorpusSummary } from '../corpora-api';

/** `/benches/:benchId/corpora`: the corpora of a bench with their main figures. */
@Component({
  selector: 'nw-corpus-list',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, DecimalPipe, RouterLink, MatTableModule, MatButtonModule, MatIconModule, MatProgressBarModule],
  templateUrl: './corpus-list.html',
  styles: `.title-row { display: flex; align-items: baseline; justify-content: space-between; gap: 16px; flex-wrap: wrap; }
    .mat-column-name a { font-weight: 500; } .nw-file { display: block; font-size: 0.85em; }`,
})
export class CorpusList {
  readonly benchId = input.required<string>();
  protected readonly store = inject(CurrentBench);
  private readonly api = inject(CorporaApi);
  protected readonly corpora = signal<CorpusSummary[]>([]);
  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);
  protected readonly columns = ['name', 'types', 'tokens', 'alphabetSize', 'entropy', 'uploadedBy', 'createdAt'];
  protected readonly canUpload = computed(() => {
    const bench = this.store.current();
    return bench !== null && bench.id === this.benchId() && roleAtLeast(bench.role, 'member');
  });

  constructor() {
    effect(() => {
      const id = this.benchId();
      untracked(() => {
        void this.load(id);
      });
    });
  }

  private async load(benchId: string): Promise<void> {
    this.loading.set(true);
    try {
      this.corpora.set(await this.api.list(benchId));
      this.problem.set(null);
    } catch (error) {
      this.problem.set(`Could not load the corpora. ${messageOf(error)}`);
    } finally {
      this.loading.set(false);
    }
  }
}
