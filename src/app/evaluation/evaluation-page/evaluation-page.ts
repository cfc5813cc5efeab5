import { DatePipe, DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { HttpClient } from '@angular/common/http';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import {
  evaluationSettingsKey, evaluationSettingsSchema, type EvaluationDto, type EvaluationSettingsInput, type EvaluationSummaryDto,
} from '../../../../shared/api/evaluations';
import type { EvaluationRequestDto } from '../../../../shared/api/evaluation-jobs';
import type { ReportDto } from '../../../../shared/api/reports';
import type { RunPlacement } from '../../../../shared/api/runners';
import type { CheckpointDto, RunDto, SsmRunSettings } from '../../../../shared/api/runs';
import { ApiError } from '../../core/api-error';
import { CurrentBench } from '../../benches/current-bench';
import { FAMILY_LABELS } from '../../runs/run-labels';
import { PlacementChoice } from '../../runners/placement-choice/placement-choice';
import { RunsApi } from '../../runs/runs-api';
import { askReportTitle } from '../../ui/report-title-dialog/report-title-dialog';
import type { EvaluationProgress } from '../../workers/evaluator-api';
import { CompletionPanel } from '../completion-panel/completion-panel';
import { EvaluationCharts } from '../evaluation-charts/evaluation-charts';
import { EvaluationFigures } from '../evaluation-figures/evaluation-figures';
import { EvaluationSamples } from '../evaluation-samples/evaluation-samples';
import { EvaluationSettingsForm, type BaselineChoice } from '../evaluation-settings/evaluation-settings';
import { EvaluationCancelled, EvaluationWorker } from '../evaluation-worker';
import { EvaluationsApi } from '../evaluations-api';
import { NoiseMapPanel } from '../noise-map-panel/noise-map-panel';
import { runAndStore } from './evaluation-runner';

/** One checkpoint's evaluation: settings, progress, the stored figures and charts, completion and the noise map. */
@Component({
  selector: 'nw-evaluation-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, DecimalPipe, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, CompletionPanel, EvaluationCharts,
    EvaluationFigures, EvaluationSamples, EvaluationSettingsForm, NoiseMapPanel, PlacementChoice],
  providers: [EvaluationWorker],
  templateUrl: './evaluation-page.html',
  styleUrl: './evaluation-page.scss',
})
export class EvaluationPage {
  readonly benchId = input.required<string>();
  readonly runId = input.required<string>();
  readonly checkpointId = input.required<string>();
  private readonly bench = inject(CurrentBench);
  private readonly runs = inject(RunsApi);
  private readonly evaluations = inject(EvaluationsApi);
  private readonly worker = inject(EvaluationWorker);
  private readonly http = inject(HttpClient);
  private readonly router = inject(Router);
  private readonly dialog = inject(MatDialog);

  protected readonly run = signal<RunDto | null>(null);
  protected readonly checkpoint = signal<CheckpointDto | null>(null);
  protected readonly stored = signal<EvaluationSummaryDto[]>([]);
  protected readonly shown = signal<EvaluationDto | null>(null);
  protected readonly baselines = signal<BaselineChoice[]>([]);
  protected readonly progress = signal<EvaluationProgress | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly reportBusy = signal(false);
  protected readonly notice = signal<string | null>(null);
  protected readonly familyLabels = FAMILY_LABELS;
  /** Where "Evaluate" computes: this tab's worker, or the runners (the default when one is online). */
  protected readonly placement = signal<RunPlacement>('tab');
  /** The evaluation sent to runners that this page follows (waiting, running, or the last one that failed). */
  protected readonly remote = signal<EvaluationRequestDto | null>(null);
  private pollTimer: ReturnType<typeof setTimeout> | null = null;

  protected readonly remoteActive = computed(() => {
    const r = this.remote();
    return r !== null && (r.status === 'waiting' || r.status === 'running');
  });
  protected readonly remotePercent = computed(() => {
    const s = this.remote()?.stage;
    return s && s.total > 0 ? (100 * s.done) / s.total : 0;
  });
  protected readonly busy = computed(() => this.progress() !== null || this.remoteActive());
  protected readonly percent = computed(() => {
    const p = this.progress();
    return p && p.total > 0 ? (100 * p.done) / p.total : 0;
  });
  protected readonly ssm = computed(() => {
    const r = this.shown()?.results;
    return r && r.family === 'ssm' ? r : null;
  });
  /** K, repeats, S and M apply to the stochastic model's estimates only; an exact model's figures ignore them. */
  protected readonly estimated = computed(() => this.run()?.family === 'ssm');
  protected readonly stateSize = computed(() => {
    const r = this.run();
    return r?.family === 'ssm' ? (r.settings as SsmRunSettings).model.stateSize : 0;
  });
  protected readonly canReport = computed(() => (this.bench.current()?.role ?? 'viewer') !== 'viewer');
  /** Loads this checkpoint into the worker for completion and the noise map (once per page). */
  protected readonly loadModel = () => this.worker.open(() => this.runs.downloadCheckpoint(this.benchId(), this.runId(), this.checkpointId()));

  constructor() {
    inject(DestroyRef).onDestroy(() => this.stopPolling());
    effect(() => {
      const [benchId, runId, checkpointId] = [this.benchId(), this.runId(), this.checkpointId()];
      untracked(() => {
        void this.load(benchId, runId, checkpointId);
      });
    });
  }

  private async load(benchId: string, runId: string, checkpointId: string): Promise<void> {
    try {
      const [run, checkpoints, stored] = await Promise.all([
        this.runs.get(benchId, runId), this.runs.checkpoints(benchId, runId), this.evaluations.list(benchId, runId, checkpointId),
      ]);
      const checkpoint = checkpoints.find((c) => c.id === checkpointId) ?? null;
      if (!checkpoint) throw new Error('This checkpoint no longer exists (only the newest autosaves are kept); open another one from the run page.');
      this.run.set(run);
      this.checkpoint.set(checkpoint);
      this.stored.set(stored);
      this.problem.set(null);
      if (stored[0]) await this.show(stored[0].id);
      // An evaluation sent to runners earlier that is still on its way (or failed since) is followed again.
      const requests = await this.evaluations.requests(benchId, runId, checkpointId);
      const open = requests.find((r) => r.status === 'waiting' || r.status === 'running') ?? (requests[0]?.status === 'failed' ? requests[0] : null);
      if (open) this.follow(open);
      if (run.family === 'ssm' && run.corpus) {
        const grus = await this.runs.list(benchId, { corpusId: run.corpus.id, family: 'gru', archived: 'all', limit: 100 });
        this.baselines.set(grus.items.filter((g) => g.checkpointCount > 0).map((g) => ({ runId: g.id, label: `${g.name} (state size ${(g.settings as { model: { stateSize: number } }).model.stateSize})` })));
      }
    } catch (error) {
      this.problem.set(problemText(error));
    }
  }

  protected async show(evaluationId: string): Promise<void> {
    try {
      this.shown.set(await this.evaluations.get(this.benchId(), evaluationId));
    } catch (error) {
      this.problem.set(problemText(error));
    }
  }

  protected async evaluate(settings: EvaluationSettingsInput): Promise<void> {
    const run = this.run();
    if (!run || this.busy()) return;
    this.problem.set(null);
    this.notice.set(null);
    if (this.remote()?.status === 'failed') this.remote.set(null);
    const key = evaluationSettingsKey(evaluationSettingsSchema.parse(settings));
    const same = this.stored().find((e) => evaluationSettingsKey(e.settings) === key);
    if (same) {
      await this.show(same.id);
      this.notice.set('An evaluation with exactly these settings is stored already; it is shown without computing it again.');
      return;
    }
    if (this.placement() === 'runners') {
      await this.sendToRunners(run, settings);
      return;
    }
    this.progress.set({ done: 0, total: 1, next: 'starting the worker' });
    try {
      const saved = await runAndStore({ runs: this.runs, evaluations: this.evaluations, worker: this.worker }, this.benchId(), run,
        this.checkpointId(), settings, (p) => this.progress.set(p));
      this.shown.set(saved);
      this.stored.set(await this.evaluations.list(this.benchId(), run.id, this.checkpointId()));
    } catch (error) {
      if (error instanceof EvaluationCancelled) this.notice.set(error.message);
      else this.problem.set(problemText(error));
    } finally {
      this.worker.forgetCancel();
      this.progress.set(null);
    }
  }

  private async sendToRunners(run: RunDto, settings: EvaluationSettingsInput): Promise<void> {
    try {
      this.follow(await this.evaluations.request(this.benchId(), run.id, this.checkpointId(), settings));
    } catch (error) {
      if (error instanceof ApiError && error.code === 'EVALUATION_EXISTS') {
        this.stored.set(await this.evaluations.list(this.benchId(), run.id, this.checkpointId()));
        const key = evaluationSettingsKey(evaluationSettingsSchema.parse(settings));
        const same = this.stored().find((e) => evaluationSettingsKey(e.settings) === key);
        if (same) await this.show(same.id);
      }
      this.problem.set(problemText(error));
    }
  }

  /** Shows a runner evaluation's state and asks for it every 2 s until its figures land or it failed. */
  private follow(request: EvaluationRequestDto): void {
    this.remote.set(request);
    this.stopPolling();
    if (request.status === 'finished') {
      void this.landed(request);
      return;
    }
    if (request.status === 'failed') return;
    this.pollTimer = setTimeout(() => {
      this.pollTimer = null;
      this.evaluations.requestState(this.benchId(), request.id).then((next) => this.follow(next), (error: unknown) => {
        if (error instanceof ApiError && error.status === 404) {
          // Withdrawn meanwhile (on another page): nothing to follow.
          this.remote.set(null);
          this.notice.set('The evaluation request was withdrawn; no runner will compute it.');
          return;
        }
        this.problem.set(problemText(error));
        this.pollTimer = setTimeout(() => this.follow(request), 5000);
      });
    }, 2000);
  }

  /** Withdraws the request shown (waiting, or failed and kept for its reason). */
  protected async withdraw(): Promise<void> {
    const q = this.remote();
    if (!q) return;
    this.stopPolling();
    try {
      await this.evaluations.withdrawRequest(this.benchId(), q.id);
      this.remote.set(null);
      this.notice.set(q.status === 'failed' ? 'The failed runner evaluation was removed.' : 'The evaluation request was withdrawn; no runner will compute it.');
    } catch (error) {
      this.problem.set(problemText(error));
      this.follow(q);
    }
  }

  private async landed(request: EvaluationRequestDto): Promise<void> {
    this.remote.set(null);
    this.stored.set(await this.evaluations.list(this.benchId(), request.runId, this.checkpointId()));
    if (request.evaluationId) await this.show(request.evaluationId);
    this.notice.set(`A runner stored these figures${request.runnerName ? ` (${request.runnerName})` : ''}.`);
  }

  private stopPolling(): void {
    if (this.pollTimer !== null) clearTimeout(this.pollTimer);
    this.pollTimer = null;
  }

  /** Ends the evaluation under way: its worker is terminated and nothing is stored. */
  protected cancel(): void {
    if (this.busy()) this.worker.cancel();
  }

  protected async createReport(): Promise<void> {
    const e = this.shown();
    const run = this.run();
    if (!e || !run) return;
    const title = await askReportTitle(this.dialog,
      `${run.name}, step ${e.checkpoint.step}: evaluation (${e.settings.heldOutSplit} split, order ${e.settings.ngramOrder}, K = ${e.settings.K}, seed ${e.settings.seed})`);
    if (title === null) return;
    this.reportBusy.set(true);
    try {
      const report = await firstValueFrom(this.http.post<ReportDto>(`/api/benches/${encodeURIComponent(this.benchId())}/reports`, {
        kind: 'evaluation', title, sourceIds: [e.id],
      }));
      await this.router.navigateByUrl(report.link);
    } catch (error) {
      this.problem.set(problemText(error));
    } finally {
      this.reportBusy.set(false);
    }
  }

  protected downloadJson(): void {
    const e = this.shown();
    if (!e) return;
    const url = URL.createObjectURL(new Blob([JSON.stringify(e, null, 1)], { type: 'application/json' }));
    const a = document.createElement('a');
    a.href = url;
    a.download = `${(e.run.name || 'run').replace(/[^\w.-]+/g, '-')}-step-${e.checkpoint.step}-evaluation.json`;
    a.click();
    setTimeout(() => URL.revokeObjectURL(url), 10_000);
  }
}

/** A sentence for the person: the server's message, the worker's message, or a generic fallback. */
function problemText(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error && error.message) return error.message;
  return 'Something went wrong. Try again; if it keeps happening, reload the page.';
}
