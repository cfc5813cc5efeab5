import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import { unitNote, unitText } from '../../../../shared/api/figure-names';
import { GRID_FIGURE_LABELS, GRID_FIGURES, gridAxisLabel, type GridDto, type GridFigure, type LearnabilityVerdict } from '../../../../shared/api/grids';
import { MAX_COMPARED_RUNS } from '../../../../shared/api/reports';
import { CurrentBench } from '../../benches/current-bench';
import { roleAtLeast } from '../../core/api-types';
import { messageOf } from '../../core/api-error';
import { ReportsApi } from '../../reports/reports-api';
import { STATUS_LABELS } from '../../runs/run-labels';
import { askReportTitle } from '../../ui/report-title-dialog/report-title-dialog';
import { RunScheduler } from '../../runs/run-scheduler';
import { GridHeatmap } from '../grid-heatmap/grid-heatmap';
import { cellFigure, heatmapData } from '../grid-heatmap/heatmap-data';
import { GridQueue } from '../grid-queue';
import { GridsApi } from '../grids-api';
import { LearnabilityVerdictTable } from '../learnability-verdict/learnability-verdict';
import type { RunDto } from '../../../../shared/api/runs';
import { LiveEvents } from '../../runners/live-events';

const POLL_MS = 3000;
/** While the bench's event stream is open, the grid is reloaded when a run's status changes; this slow poll is a safety net. */
const POLL_WITH_STREAM_MS = 20_000;

/** One grid: progress of its runs, the heat map that fills in as cells finish, and (for a learnability check) the verdict. */
@Component({
  selector: 'nw-grid-view',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DecimalPipe, RouterLink, MatButtonModule, MatFormFieldModule, MatIconModule, MatProgressBarModule, MatSelectModule,
    GridHeatmap, LearnabilityVerdictTable],
  templateUrl: './grid-view.html',
  styleUrl: './grid-view.scss',
})
export class GridView {
  readonly benchId = input.required<string>();
  readonly gridId = input.required<string>();
  private readonly api = inject(GridsApi);
  private readonly queue = inject(GridQueue);
  private readonly reports = inject(ReportsApi);
  private readonly router = inject(Router);
  private readonly dialog = inject(MatDialog);
  protected readonly scheduler = inject(RunScheduler);
  protected readonly bench = inject(CurrentBench);
  protected readonly figures = GRID_FIGURES;
  protected readonly figureLabels = GRID_FIGURE_LABELS;
  protected readonly unitText = unitText;
  protected readonly unitNote = unitNote;
  protected readonly statusLabels = STATUS_LABELS;

  protected readonly grid = signal<GridDto | null>(null);
  protected readonly verdict = signal<LearnabilityVerdict | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly figure = signal<GridFigure>('bestValidationBitsPerChar');
  protected readonly xAxis = signal(0);
  protected readonly yAxis = signal<number | null>(null);
  protected readonly saving = signal(false);
  protected readonly canTrain = computed(() => roleAtLeast(this.bench.current()?.role ?? 'viewer', 'member'));
  protected readonly orphans = computed(() => { this.scheduler.runs(); const g = this.grid(); return g ? this.queue.orphans(g) : []; });
  protected readonly heat = computed(() => {
    const g = this.grid();
    return g ? heatmapData(g, this.figure(), this.xAxis(), this.yAxis(), (k) => this.axisLabel(k)) : null;
  });
  protected readonly finished = computed(() => this.grid()?.progress.finished ?? 0);
  protected readonly statusLine = computed(() => {
    const p = this.grid()?.progress ?? {};
    return (Object.keys(p) as (keyof typeof p)[]).filter((s) => s !== 'finished' && (p[s] ?? 0) > 0).map((s) => `${p[s]} ${STATUS_LABELS[s].toLowerCase()}`).join(' · ');
  });
  protected readonly compareLink = computed(() => (this.grid()?.cells ?? []).map((c) => c.run?.id).filter(Boolean).slice(0, MAX_COMPARED_RUNS).join(','));
  private pickedUp = false;
  private readonly liveEvents = inject(LiveEvents);
  /** The latest state of the grid's runs from the bench's event stream (runner runs report their steps there). */
  private readonly streamed = signal<ReadonlyMap<string, RunDto>>(new Map());
  private streamOpen = false;

  constructor() {
    const destroyRef = inject(DestroyRef);
    let timer: ReturnType<typeof setTimeout> | null = null;
    let stream: { close(): void } | null = null;
    const poll = async () => {
      await this.load();
      if (!this.grid()?.done) timer = setTimeout(() => void poll(), this.streamOpen ? POLL_WITH_STREAM_MS : POLL_MS);
    };
    effect(() => {
      const benchId = this.benchId();
      this.gridId();
      untracked(() => {
        this.pickedUp = false;
        this.grid.set(null);
        this.streamed.set(new Map());
        if (timer) clearTimeout(timer);
        void poll();
        stream?.close();
        stream = this.liveEvents.watchBench(benchId, (runs) => this.onRuns(runs), { onState: (s) => { this.streamOpen = s === 'open'; } });
      });
    });
    // Learners first: once the bench (and so the role) is known, unfinished runs go into this tab's queue.
    effect(() => {
      const g = this.grid();
      if (g && this.canTrain() && !this.pickedUp) untracked(() => void this.trainHere());
    });
    destroyRef.onDestroy(() => { if (timer) clearTimeout(timer); stream?.close(); });
  }

  /** Runs of the bench that changed (at most one batch a second): keep this grid's, reload it when a status changed. */
  private onRuns(runs: RunDto[]): void {
    const g = this.grid();
    if (!g) return;
    const cells = new Map(g.cells.filter((c) => c.run).map((c) => [c.run!.id, c.run!]));
    const mine = runs.filter((r) => cells.has(r.id));
    if (mine.length === 0) return;
    this.streamed.update((old) => { const next = new Map(old); for (const r of mine) next.set(r.id, r); return next; });
    if (mine.some((r) => r.status !== cells.get(r.id)!.status)) void this.load();
  }

  private async load(): Promise<void> {
    try {
      const grid = await this.api.get(this.benchId(), this.gridId());
      if (grid.id !== this.gridId()) return;
      if (!this.grid()) {
        this.figure.set(grid.figure);
        this.xAxis.set(grid.axes.length > 1 ? 1 : 0);
        this.yAxis.set(grid.axes.length > 1 ? 0 : null);
      }
      this.grid.set(grid);
      if (grid.kind === 'learnability') this.verdict.set(await this.api.verdict(this.benchId(), grid.id));
      this.problem.set(null);
    } catch (error) {
      this.problem.set(`The grid could not be loaded: ${messageOf(error)}`);
    }
  }

  protected async trainHere(): Promise<void> {
    const g = this.grid();
    if (!g) return;
    this.pickedUp = true;
    try {
      await this.queue.pickUp(this.benchId(), g);
    } catch (error) {
      this.problem.set(`Some runs could not be queued in this tab: ${messageOf(error)}`);
    }
  }

  protected axisLabel(key: string): string { return gridAxisLabel(key); }
  protected cellValue(cell: GridDto['cells'][number]): number | null { return cellFigure(cell, this.figure()); }
  protected liveStep(runId: string | undefined): number | null {
    if (!runId) return null;
    const tab = this.scheduler.live(runId)?.progress()?.step;
    if (tab !== undefined) return tab;
    const r = this.streamed().get(runId);
    return r ? Math.max(r.stepsDone, r.live?.step ?? 0) : null;
  }
  protected setY(v: number | 'none'): void { this.yAxis.set(v === 'none' ? null : v); }

  protected async saveReport(): Promise<void> {
    const g = this.grid();
    if (!g) return;
    const title = await askReportTitle(this.dialog, g.name);
    if (title === null) return;
    this.saving.set(true);
    try {
      const report = await this.reports.create(this.benchId(), { kind: 'grid', title, sourceIds: [g.id] });
      await this.router.navigate(['/benches', this.benchId(), 'reports', report.id]);
    } catch (error) {
      this.problem.set(`The report could not be saved: ${messageOf(error)}`);
    } finally {
      this.saving.set(false);
    }
  }
}
