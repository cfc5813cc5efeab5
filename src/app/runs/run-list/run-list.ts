import { DatePipe, DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatSelectModule } from '@angular/material/select';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import type { CorpusSummary } from '../../../../shared/api/corpora';
import { BITS_PER_CHAR, figureKind } from '../../../../shared/api/figure-names';
import { RUN_FAMILIES, RUN_SORT_FIELDS, RUN_STATUSES, type RunDto, type RunFamily, type RunStatus } from '../../../../shared/api/runs';
import { messageOf } from '../../core/api-error';
import { roleAtLeast } from '../../core/api-types';
import { CurrentBench } from '../../benches/current-bench';
import { LiveEvents } from '../../runners/live-events';
import { CheckpointImport } from '../checkpoint-import/checkpoint-import';
import { FAMILY_SHORT, STATUS_LABELS } from '../run-labels';
import { LIVE_STATE_LABELS } from '../live-run';
import { RunScheduler } from '../run-scheduler';
import { RunsApi } from '../runs-api';

type SortField = (typeof RUN_SORT_FIELDS)[number];

/** The runs of a bench: filters, sorting and paging on the server, plus what trains in this tab. */
@Component({
  selector: 'nw-run-list',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    DatePipe, DecimalPipe, RouterLink, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatPaginatorModule,
    MatSelectModule, MatSortModule, MatTableModule, CheckpointImport,
  ],
  templateUrl: './run-list.html',
  styleUrl: './run-list.scss',
})
export class RunList {
  readonly benchId = input.required<string>();
  protected readonly bench = inject(CurrentBench);
  protected readonly scheduler = inject(RunScheduler);
  private readonly api = inject(RunsApi);
  private readonly liveEvents = inject(LiveEvents);

  protected readonly families = RUN_FAMILIES;
  protected readonly bitsPerChar = BITS_PER_CHAR;
  protected readonly figureKind = figureKind;
  protected readonly statuses = RUN_STATUSES;
  protected readonly familyShort = FAMILY_SHORT;
  protected readonly statusLabels = STATUS_LABELS;
  protected readonly liveLabels = LIVE_STATE_LABELS;
  protected readonly columns = ['name', 'family', 'corpus', 'status', 'stepsDone', 'bestBound', 'createdAt'];

  protected readonly corpora = signal<CorpusSummary[]>([]);
  protected readonly corpusId = signal('');
  protected readonly family = signal<RunFamily | ''>('');
  protected readonly status = signal<RunStatus | ''>('');
  protected readonly search = signal('');
  protected readonly sort = signal<{ field: SortField; dir: 'asc' | 'desc' }>({ field: 'createdAt', dir: 'desc' });
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(25);
  protected readonly items = signal<RunDto[]>([]);
  protected readonly total = signal(0);
  protected readonly loading = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly showImport = signal(false);
  /** Viewers look; members and up start and import runs. */
  protected readonly canStart = computed(() => roleAtLeast(this.bench.current()?.role ?? 'viewer', 'member'));
  private request = 0;

  constructor() {
    effect(() => {
      const id = this.benchId();
      untracked(() => {
        void this.api.corpora(id).then((c) => this.corpora.set(c)).catch(() => this.corpora.set([]));
      });
    });
    // Runs that change elsewhere (runners, other tabs) update in place from the bench's event stream.
    effect((onCleanup) => {
      const id = this.benchId();
      const stream = untracked(() => this.liveEvents.watchBench(id, (runs) => this.patch(runs), {
        poll: () => this.reload(),
        // A run deleted elsewhere leaves the page (and the count and pages change): load the page again.
        onDeleted: (gone) => { if (this.items().some((r) => r.id === gone.id)) this.reload(); },
      }));
      onCleanup(() => stream.close());
    });
    effect(() => {
      const query = {
        corpusId: this.corpusId() || undefined, family: this.family() || undefined, status: this.status() || undefined,
        q: this.search().trim() || undefined, sort: this.sort().field, dir: this.sort().dir,
        limit: this.pageSize(), offset: this.pageIndex() * this.pageSize(),
      };
      const benchId = this.benchId();
      untracked(() => void this.load(benchId, query));
    });
  }

  private async load(benchId: string, query: Parameters<RunsApi['list']>[1]): Promise<void> {
    const mine = ++this.request;
    this.loading.set(true);
    try {
      const page = await this.api.list(benchId, query);
      if (mine !== this.request) return;
      this.items.set(page.items);
      this.total.set(page.total);
      this.problem.set(null);
    } catch (error) {
      if (mine === this.request) this.problem.set(messageOf(error));
    } finally {
      if (mine === this.request) this.loading.set(false);
    }
  }

  protected reload(): void {
    void this.load(this.benchId(), {
      corpusId: this.corpusId() || undefined, family: this.family() || undefined, status: this.status() || undefined,
      q: this.search().trim() || undefined, sort: this.sort().field, dir: this.sort().dir,
      limit: this.pageSize(), offset: this.pageIndex() * this.pageSize(),
    });
  }

  /** Replaces listed runs by their newer state (runs not on this page are left to the next load). */
  private patch(runs: RunDto[]): void {
    const latest = new Map(runs.map((r) => [r.id, r]));
    if (!this.items().some((r) => latest.has(r.id))) return;
    this.items.update((list) => list.map((r) => latest.get(r.id) ?? r));
  }

  protected setFilter<T>(target: { set(v: T): void }, value: T): void {
    target.set(value);
    this.pageIndex.set(0);
  }

  protected onSort(s: Sort): void {
    const field = (RUN_SORT_FIELDS as readonly string[]).includes(s.active) ? (s.active as SortField) : 'createdAt';
    this.sort.set({ field, dir: s.direction === 'asc' ? 'asc' : 'desc' });
    this.pageIndex.set(0);
  }

  protected onPage(e: PageEvent): void {
    this.pageSize.set(e.pageSize);
    this.pageIndex.set(e.pageIndex);
  }

  protected familyOf(run: RunDto): string { return FAMILY_SHORT[run.family]; }
  protected statusOf(run: RunDto): string { return STATUS_LABELS[run.status]; }

  protected totalSteps(run: RunDto): number | null {
    return run.family === 'ngram' ? null : run.settings.training?.steps ?? null;
  }
}
