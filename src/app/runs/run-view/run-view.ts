import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { Subscription } from 'rxjs';
import { figureKind, trainingFigureName } from '../../../../shared/api/figure-names';
import type { RunControlAction } from '../../../../shared/api/runners';
import { KNOWN_METRIC_SERIES, type CheckpointDto, type MetricSeriesPage, type RunDto } from '../../../../shared/api/runs';
import { messageOf } from '../../core/api-error';
import { CurrentBench } from '../../benches/current-bench';
import { LiveEvents, type RunnerWatch } from '../../runners/live-events';
import { RunnerProgress } from '../../runners/runner-progress/runner-progress';
import { RunnersApi } from '../../runners/runners-api';
import { withSavedCheckpoint } from '../run-checkpoints/checkpoint-list';
import { RunCheckpoints } from '../run-checkpoints/run-checkpoints';
import { RunCurves } from '../run-curves/run-curves';
import { FAMILY_LABELS, STATUS_LABELS, formatDuration } from '../run-labels';
import { LIVE_STATE_LABELS } from '../live-run';
import { LIVE_VALIDATION_WORDS } from '../../../../shared/eval/held-out-subset';
import { RunScheduler } from '../run-scheduler';
import { RunsApi } from '../runs-api';

/** One run: live progress and curves while it trains in this tab, its checkpoints, and resume / export. */
@Component({
  selector: 'nw-run-view',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DecimalPipe, RouterLink, MatButtonModule, MatIconModule, MatProgressBarModule, RunCheckpoints, RunCurves, RunnerProgress],
  templateUrl: './run-view.html',
  styleUrl: './run-view.scss',
})
export class RunView {
  readonly benchId = input.required<string>();
  readonly runId = input.required<string>();
  protected readonly bench = inject(CurrentBench);
  protected readonly scheduler = inject(RunScheduler);
  private readonly api = inject(RunsApi);
  private readonly runners = inject(RunnersApi);
  private readonly liveEvents = inject(LiveEvents);
  private readonly curves = viewChild(RunCurves);
  /** A run trained by the server's runners, followed through its event stream (null for tab runs). */
  protected readonly runnerWatch = signal<RunnerWatch | null>(null);
  protected readonly controlling = signal(false);
  protected readonly controlNote = signal<string | null>(null);

  protected readonly run = signal<RunDto | null>(null);
  protected readonly checkpoints = signal<CheckpointDto[]>([]);
  protected readonly history = signal<MetricSeriesPage['series']>({});
  protected readonly problem = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly saving = signal(false);
  /** What the last "Save checkpoint now" did (a plain line beside the button: no overlay to build mid-training). */
  protected readonly saveNote = signal<{ ok: boolean; text: string } | null>(null);
  protected readonly familyLabels = FAMILY_LABELS;
  protected readonly figureKind = figureKind;
  protected readonly trainingFigureName = trainingFigureName;
  protected readonly validationNote = `Validation figures while training score a hash-random subset of at most ${LIVE_VALIDATION_WORDS} ` +
    'held-out words (the same for every run of the corpus); bits/char count the end-of-word symbol. An evaluation scores more.';
  protected readonly statusLabels = STATUS_LABELS;
  protected readonly duration = formatDuration;

  protected readonly live = computed(() => this.scheduler.live(this.runId()));
  protected readonly progress = computed(() => this.live()?.progress() ?? null);
  /** Steps reached and planned: live while this tab trains, otherwise as the server stored them. */
  protected readonly stepLine = computed(() => {
    const p = this.progress();
    if (p) return { step: p.step, total: p.totalSteps };
    const r = this.run();
    return r ? { step: r.stepsDone, total: r.settings.training?.steps ?? 0 } : null;
  });
  protected readonly percent = computed(() => {
    const s = this.stepLine();
    return s && s.total > 0 ? Math.min(100, (100 * s.step) / s.total) : 0;
  });
  /** At the last step the run is finishing: there is nothing left to pause. */
  protected readonly atLastStep = computed(() => {
    const p = this.progress();
    return !!p && p.totalSteps > 0 && p.step >= p.totalSteps;
  });
  /** Live speed, or the last one the run stored. */
  protected readonly speed = computed(() => this.progress()?.wordsPerSecond ?? this.run()?.summary.wordsPerSecond ?? null);
  /** Time left only while the worker trains: a paused or ended run has none to show. */
  protected readonly eta = computed(() => (this.live()?.state() === 'training' ? this.progress()?.etaSeconds ?? null : null));
  /** One wording for the compute, live or (after a reload) from the run's stored summary. */
  protected readonly engineText = computed(() => {
    const e = this.live()?.engine();
    const s = this.run()?.summary;
    const backend = e?.backend ?? s?.backend;
    if (!backend) return null;
    const threads = e?.threads ?? s?.threads ?? 1;
    const params = e?.parameterCount ?? s?.parameterCount;
    return `${backend === 'wasm' ? 'WebAssembly' : backend}${(e?.simd ?? s?.simd) ? ' + SIMD' : ''}, ${threads} thread${threads === 1 ? '' : 's'}`
      + (params !== undefined ? `, ${params.toLocaleString('en')} parameters` : '') + (e ? '' : ' (last session)');
  });
  /** Fresh samples of this session, or the last ones the run stored. */
  protected readonly samples = computed(() => {
    const live = this.live()?.samples() ?? [];
    return live.length > 0 ? live : (this.run()?.summary.lastSamples ?? []);
  });
  /** The training figure: live, or the last one stored. */
  protected readonly trainBound = computed(() => {
    const p = this.progress();
    if (p && p.trainBitsPerChar !== null) return { bits: p.trainBitsPerChar, isBound: p.isBound };
    const s = this.run()?.summary;
    return s?.lastBoundBitsPerChar != null ? { bits: s.lastBoundBitsPerChar, isBound: s.lastIsBound ?? true } : null;
  });
  protected readonly stateLabel = computed(() => {
    const l = this.live();
    if (l) return LIVE_STATE_LABELS[l.state()];
    const r = this.run();
    return r ? STATUS_LABELS[r.status].toLowerCase() : '';
  });
  /** The server says it trains, but no worker in this tab has it (e.g. the tab that trained it was closed). */
  protected readonly orphaned = computed(() => {
    const r = this.run();
    const state = this.live()?.state();
    // A run that ended in this tab is not orphaned, whatever a late status update left on the server.
    if (state === 'finished' || state === 'stopped' || state === 'failed') return false;
    return !!r && !this.live()?.isActive && state !== 'waiting' && ['training', 'paused', 'queued'].includes(r.status);
  });
  protected readonly latestCheckpoint = computed(() => this.checkpoints().reduce<CheckpointDto | null>((a, c) => (!a || c.step > a.step ? c : a), null));
  private liveSubs: Subscription[] = [];

  constructor() {
    effect(() => {
      const benchId = this.benchId();
      const runId = this.runId();
      untracked(() => {
        void this.load(benchId, runId);
      });
    });
    // Follow the run's live stream (curves, checkpoint list, end of training) whenever this tab trains it,
    // or the runners' event stream when the runners train it.
    effect(() => {
      const live = this.live();
      const watch = this.runnerWatch();
      untracked(() => {
        this.liveSubs.forEach((s) => s.unsubscribe());
        this.liveSubs = [];
        // Before the chart exists it takes the stream from its `live` input instead.
        this.curves()?.follow(live?.points ?? watch?.points ?? null);
        if (live) this.liveSubs.push(live.checkpointSaved.subscribe((ck) => this.checkpoints.update((list) => withSavedCheckpoint(list, ck))));
        if (watch) {
          this.liveSubs.push(watch.statusChanged.subscribe(() => { this.controlNote.set(null); void this.refreshCheckpoints(); }));
          this.liveSubs.push(watch.reopened.subscribe(() => void this.reloadHistory()));
        }
      });
    });
    // The watched runner run is the page's run (updated at most once a second).
    effect(() => {
      const run = this.runnerWatch()?.run();
      if (run && run.id === untracked(() => this.runId())) untracked(() => this.run.set(run));
    });
    // Someone deleted this run while the page was open: say so (its curves and checkpoints are gone).
    effect(() => {
      const gone = this.runnerWatch()?.deleted();
      if (gone && gone.id === untracked(() => this.runId())) untracked(() => this.problem.set(`${gone.deletedBy} deleted the run "${gone.name}"; it and its checkpoints are gone.`));
    });
    effect(() => {
      const state = this.live()?.state();
      if (state === 'finished' || state === 'stopped' || state === 'failed') untracked(() => void this.refreshRun());
    });
    inject(DestroyRef).onDestroy(() => {
      this.liveSubs.forEach((s) => s.unsubscribe());
      this.runnerWatch()?.close();
    });
  }

  /** Starts (or ends) following the runners' event stream as the loaded run's placement says. */
  private followRunners(benchId: string, run: RunDto): void {
    const current = this.runnerWatch();
    if (current && current.run().id === run.id && run.placement === 'runners') return;
    current?.close();
    this.runnerWatch.set(run.placement === 'runners' ? this.liveEvents.watchRun(benchId, run) : null);
  }

  private async reloadHistory(): Promise<void> {
    try {
      const metrics = await this.api.metrics(this.benchId(), this.runId(), [...KNOWN_METRIC_SERIES]);
      this.history.set(metrics.series);
      this.curves()?.reset(metrics.series);
    } catch (error) {
      this.problem.set(messageOf(error));
    }
  }

  /** Pause, resume or stop a runner run (through the server; the runner sees it within one progress interval). */
  protected async control(action: RunControlAction): Promise<void> {
    this.controlling.set(true);
    try {
      const run = await this.runners.control(this.benchId(), this.runId(), action);
      const watch = this.runnerWatch();
      if (watch) watch.setRun(run);
      else this.run.set(run);
      // The server's sentence about the request (what the runner does next, or why nothing changed); it stays
      // until the run's status changes again.
      const note = (run as { message?: unknown }).message;
      this.controlNote.set(typeof note === 'string' ? note : null);
      this.problem.set(null);
    } catch (error) {
      this.problem.set(messageOf(error));
    } finally {
      this.controlling.set(false);
    }
  }

  private async load(benchId: string, runId: string): Promise<void> {
    try {
      const [run, checkpoints, metrics] = await Promise.all([
        this.api.get(benchId, runId), this.api.checkpoints(benchId, runId), this.api.metrics(benchId, runId, [...KNOWN_METRIC_SERIES]),
      ]);
      this.run.set(run);
      this.followRunners(benchId, run);
      this.checkpoints.set(checkpoints);
      if (!this.live()?.isActive) {
        this.history.set(metrics.series);
        this.curves()?.reset(metrics.series);
      }
      this.problem.set(null);
    } catch (error) {
      this.problem.set(messageOf(error));
    }
  }

  private async refreshRun(): Promise<void> {
    try {
      this.run.set(await this.api.get(this.benchId(), this.runId()));
      await this.refreshCheckpoints();
    } catch (error) {
      this.problem.set(messageOf(error));
    }
  }

  private async refreshCheckpoints(): Promise<void> {
    try {
      this.checkpoints.set(await this.api.checkpoints(this.benchId(), this.runId()));
    } catch (error) {
      this.problem.set(messageOf(error));
    }
  }

  protected pause(): void { void this.scheduler.pause(this.runId()).catch((e: unknown) => this.problem.set(messageOf(e))); }
  protected resume(): void { void this.scheduler.resume(this.runId()).catch((e: unknown) => this.problem.set(messageOf(e))); }
  /** A checkpoint now, besides the autosaves (listed as "saved by hand"); the outcome shows beside the button. */
  protected async saveNow(): Promise<void> {
    this.saving.set(true);
    this.saveNote.set(null);
    try {
      const step = await this.scheduler.saveNow(this.runId());
      this.saveNote.set({ ok: true, text: `Saved step ${step.toLocaleString('en')}.` });
    } catch (error) {
      this.saveNote.set({ ok: false, text: error instanceof Error ? error.message : String(error) });
    } finally {
      this.saving.set(false);
    }
  }

  protected stop(): void { void this.scheduler.stop(this.runId()).catch((e: unknown) => this.problem.set(messageOf(e))); }

  /** Trains the run in this tab: from a checkpoint, or from the latest one, or fresh when there is none. */
  protected async trainFrom(ck: CheckpointDto | null): Promise<void> {
    const run = this.run();
    if (!run) return;
    this.busy.set(true);
    try {
      const from = ck ?? this.latestCheckpoint();
      const keep = from?.step ?? 0;
      const trimmed = Object.fromEntries(Object.entries(this.history()).map(([k, s]) => {
        const n = s.steps.findIndex((x) => x > keep);
        return [k, n < 0 ? s : { steps: s.steps.slice(0, n), values: s.values.slice(0, n) }];
      }));
      this.history.set(trimmed);
      this.curves()?.reset(trimmed);
      await this.scheduler.enqueue(this.benchId(), run, from?.id ?? null);
    } catch (error) {
      this.problem.set(messageOf(error));
    } finally {
      this.busy.set(false);
    }
  }

  protected async download(ck: CheckpointDto): Promise<void> {
    try {
      const bytes = await this.api.downloadCheckpoint(this.benchId(), this.runId(), ck.id);
      const url = URL.createObjectURL(new Blob([bytes as BlobPart], { type: 'application/octet-stream' }));
      const a = document.createElement('a');
      a.href = url;
      a.download = `${(this.run()?.name ?? 'run').replace(/[^\w.-]+/g, '-')}-step-${ck.step}.nwck`;
      a.click();
      setTimeout(() => URL.revokeObjectURL(url), 10_000);
    } catch (error) {
      this.problem.set(messageOf(error));
    }
  }
}
