/**
 * One claimed job, trained to its end (or until paused, stopped or handed back) with the shared training loop
 * (shared/training/training-loop.ts). Everything goes through the runner routes: training set and latest
 * checkpoint in; progress (every second), metric points (every step of the training bound, plus the validation
 * figures), checkpoints (every `checkpointEvery` steps and on pause/stop/end) and the final status out. Metric
 * points are sent before each checkpoint, so a runner killed at any moment leaves no gap in the curves once
 * another runner resumes from that checkpoint. Runs in a worker thread (runner/job-thread.ts) or in-process.
 */
import type { RunnerFinishStatus, RunnerJob, RunnerProgressRequest } from '../shared/api/runner-jobs';
import type { RunSummary } from '../shared/api/runs';
import { decodeCheckpoint, encodeCheckpoint, type Checkpoint } from '../shared/model/checkpoint';
import { toTrainerError } from '../shared/model/trainer-errors';
import { SERIES, metricPointsOf, type CurvePoint } from '../shared/training/metric-points';
import { createEngine, type RunEngine } from '../shared/training/run-engines';
import { trainerSettingsOf, trainingSetOf } from '../shared/training/run-settings';
import { runTrainingLoop, type CheckpointReason, type LoopControl, type LoopOutcome } from '../shared/training/training-loop';
import type { TrainingProgress } from '../shared/training/training-types';
import { RunnerApiError, type RunnerApi } from './runner-api';

/** What the runner asks of a job: pause or stop (from the server), or shutdown (hand it back as `queued`). */
export type JobCommand = 'pause' | 'stop' | 'shutdown';

/** What the runner shows on its progress line and sends in its heartbeat. */
export interface JobProgress {
  runId: string;
  runName: string;
  step: number;
  steps: number;
  stepsPerSecond: number | null;
  bitsPerChar: number | null;
  isBound: boolean | null;
  /** An evaluation's next stage (its step and steps count stages). */
  stage?: string;
}

/** `lost`: the server gave the run to another runner (or revoked the token); nothing more was sent. */
export interface JobResult { runId: string; status: RunnerFinishStatus | 'lost'; step: number; reason: string | null }

export interface JobIo {
  /** The latest command of the runner for this job (polled before every step). */
  command(): JobCommand | null;
  onProgress(p: JobProgress): void;
  backend: { backend: string; simd: boolean; threads: number };
  /** Least time between progress calls to the server (the contract asks for at least one every 2 s). */
  progressEveryMs?: number;
}

const METRICS_EVERY_MS = 2000;
/** Points per metrics call (the server takes up to MAX_METRIC_POINTS_PER_REQUEST). */
const POINTS_PER_BATCH = 2000;
/** Codes after which this runner must leave the run alone at once. */
const LOST_CODES = new Set(['RUN_NOT_HELD', 'RUNNER_REVOKED', 'UNAUTHORIZED']);
const isLost = (e: unknown) => e instanceof RunnerApiError && (LOST_CODES.has(e.code) || e.status === 401 || e.status === 404);

export async function trainJob(job: RunnerJob, api: RunnerApi, io: JobIo): Promise<JobResult> {
  const { runId } = job;
  let step = job.stepsDone;
  let engine: RunEngine | null = null;
  try {
    const settings = trainerSettingsOf({ family: job.family, settings: job.settings });
    const corpus = await api.trainingSet(runId);
    const set = trainingSetOf({ settings: job.settings, alphabet: job.alphabet }, corpus);
    const stored = job.checkpoint ? await api.latestCheckpoint(runId) : null;
    const ck: Checkpoint | null = stored ? decodeCheckpoint(stored.bytes) : null;
    engine = createEngine(settings, set, ck);
    step = engine.stepCount;
    const session = new JobSession(job, api, io, engine, settings.steps, settings.batchSize);
    await session.report(null);
    let outcome: LoopOutcome;
    try {
      outcome = await runTrainingLoop(engine, settings, {
        progressEveryMs: io.progressEveryMs ?? Math.min(1000, job.progressEverySeconds * 500),
        checkpointEvery: job.settings.training?.checkpointEvery ?? 0,
        poll: () => session.poll(),
        onStep: (s, f) => session.onStep(s, f.bitsPerChar),
        onProgress: (p) => session.onProgress(p),
        saveCheckpoint: (reason) => session.save(reason),
      });
    } catch (e) {
      if (session.lost || isLost(e)) return { runId, status: 'lost', step: engine.stepCount, reason: (e as Error).message };
      throw e;
    }
    step = outcome.step;
    await session.drain();
    if (session.lost) return { runId, status: 'lost', step, reason: 'The server gave the run to another runner.' };
    const status: RunnerFinishStatus = outcome.kind === 'completed' ? 'finished' : outcome.kind === 'stopped' ? 'stopped'
      : outcome.kind === 'failed' ? 'failed' : session.shuttingDown ? 'queued' : 'paused';
    const reason = outcome.kind === 'failed' ? outcome.error.message.slice(0, 500) : null;
    await api.finish(runId, { status, stepsDone: step, summary: session.summary(), ...(reason ? { statusReason: reason } : {}) });
    return { runId, status, step, reason };
  } catch (e) {
    if (isLost(e)) return { runId, status: 'lost', step, reason: (e as Error).message };
    const reason = e instanceof RunnerApiError ? e.message : toTrainerError(e).message;
    // A network failure hands the run back (another runner resumes it from its latest checkpoint); anything
    // else (bad settings, a damaged checkpoint) fails the run with the sentence that says why.
    const status: RunnerFinishStatus = e instanceof RunnerApiError ? 'queued' : 'failed';
    await api.finish(runId, { status, stepsDone: step, statusReason: reason.slice(0, 500) }).catch(() => undefined);
    return { runId, status, step, reason };
  } finally {
    engine?.dispose();
  }
}

/** The state of one job between the loop's hooks and the server. */
class JobSession {
  lost = false;
  /** The step of the last checkpoint the server took (a pause or stop right after an autosave saves nothing new). */
  private savedStep: number | null = null;
  shuttingDown = false;
  private serverAction: LoopControl = 'continue';
  private points: CurvePoint[] = [];
  private lastFlush = 0;
  private chain: Promise<unknown> = Promise.resolve();
  private last: TrainingProgress | null = null;
  private best: { bits: number; bitsPerWord: number; step: number } | null = null;

  constructor(
    private readonly job: RunnerJob,
    private readonly api: RunnerApi,
    private readonly io: JobIo,
    private readonly engine: RunEngine,
    private readonly steps: number,
    private readonly batchSize: number,
  ) {}

  poll(): LoopControl {
    if (this.lost) return 'stop';
    const c = this.io.command();
    if (c === 'shutdown') {
      this.shuttingDown = true;
      return 'pause';
    }
    if (c === 'stop' || this.serverAction === 'stop') return 'stop';
    if (c === 'pause' || this.serverAction === 'pause') return 'pause';
    return 'continue';
  }

  onStep(step: number, bitsPerChar: number): void {
    if (Number.isFinite(bitsPerChar)) this.points.push({ series: SERIES.train, step, value: bitsPerChar });
  }

  onProgress(p: TrainingProgress): void {
    this.last = p;
    const e = p.evaluation;
    if (e && Number.isFinite(e.validationBitsPerChar) && (!this.best || e.validationBitsPerChar < this.best.bits)) {
      this.best = { bits: e.validationBitsPerChar, bitsPerWord: e.validationBitsPerWord, step: e.step };
    }
    // The per-step training points come from onStep; a report adds speed and validation figures.
    this.points.push(...metricPointsOf(p).filter((pt) => pt.series !== SERIES.train));
    void this.report(p);
    if (performance.now() - this.lastFlush >= METRICS_EVERY_MS) {
      this.lastFlush = performance.now(); // one flush in the queue at a time, even when the network lags
      void this.enqueue(() => this.flushNow());
    }
  }

  /** Sends a progress call (queued behind earlier calls, so the server sees them in order). */
  report(p: TrainingProgress | null): Promise<unknown> {
    const stepsPerSecond = p && p.wordsPerSecond > 0 ? p.wordsPerSecond / this.batchSize : null;
    const body: RunnerProgressRequest = {
      step: p?.step ?? this.engine.stepCount, steps: this.steps, stepsPerSecond,
      bitsPerChar: p && p.totalSteps > 0 && Number.isFinite(p.trainBitsPerChar) ? p.trainBitsPerChar : null,
      isBound: this.job.family === 'ssm' && p ? p.isBound : null,
      summary: this.summary(),
    };
    this.io.onProgress({ runId: this.job.runId, runName: this.job.runName, step: body.step, steps: this.steps, stepsPerSecond, bitsPerChar: body.bitsPerChar ?? null, isBound: body.isBound ?? null });
    return this.enqueue(async () => {
      const answer = await this.api.progress(this.job.runId, body);
      if (answer.action === 'pause' || answer.action === 'stop') this.serverAction = answer.action;
    });
  }

  async save(reason: CheckpointReason): Promise<void> {
    if (this.lost) throw new RunnerApiError(409, 'RUN_NOT_HELD', 'The server gave the run to another runner.');
    await this.drain(); // every point up to this step is stored before the checkpoint exists
    if (this.lost) throw new RunnerApiError(409, 'RUN_NOT_HELD', 'The server gave the run to another runner.');
    // A pause, stop or end right after an autosave of this very step stores no second copy of these weights (as the tab).
    if ((reason === 'pause' || reason === 'stop' || reason === 'end') && this.savedStep === this.engine.stepCount) return;
    const bytes = encodeCheckpoint(this.engine.checkpoint());
    const bound = this.last?.evaluation?.validationBitsPerChar ?? (this.last && this.last.totalSteps > 0 ? this.last.trainBitsPerChar : null);
    try {
      await this.api.uploadCheckpoint(this.job.runId, bytes, reason === 'auto' ? 'auto' : 'stop', bound ?? null);
      this.savedStep = this.engine.stepCount;
    } catch (e) {
      if (isLost(e)) this.lost = true;
      if (reason !== 'auto' || this.lost) throw e;
      // A missed autosave is not fatal: the next one (or the final save) carries the weights.
    }
  }

  /** Waits for every queued call and sends the remaining points. */
  async drain(): Promise<void> {
    await this.enqueue(() => this.flushNow());
  }

  summary(): RunSummary {
    const p = this.last;
    return {
      backend: this.io.backend.backend, simd: this.io.backend.simd, threads: Math.max(1, this.io.backend.threads),
      parameterCount: this.engine.parameterCount,
      ...(p && p.totalSteps > 0 && Number.isFinite(p.trainBitsPerChar)
        ? { lastBoundBitsPerChar: p.trainBitsPerChar, lastIsBound: p.isBound, wordsPerSecond: Math.max(0, p.wordsPerSecond) } : {}),
      ...(this.best ? { bestValidationBitsPerChar: this.best.bits, bestValidationStep: this.best.step } : {}),
      ...(this.best && Number.isFinite(this.best.bitsPerWord) ? { bestValidationBitsPerWord: this.best.bitsPerWord } : {}),
    };
  }

  /**
   * Sends the points gathered so far (in batches of at most POINTS_PER_BATCH). Points that the loop adds while
   * a batch is on its way wait for the next flush: a loop that outruns the network must not turn one flush into
   * a stream of small posts (each costs the server a token check, a run lookup and a transaction).
   */
  private async flushNow(): Promise<void> {
    this.lastFlush = performance.now();
    let due = this.points.length;
    while (due > 0 && !this.lost) {
      const batch = this.points.splice(0, Math.min(due, POINTS_PER_BATCH));
      try {
        await this.api.metrics(this.job.runId, batch);
      } catch (e) {
        this.points.unshift(...batch); // sent again with the next flush
        throw e;
      }
      due -= batch.length;
    }
  }

  /** Runs network calls one after another; a lost lease is remembered, other failures are retried by later calls. */
  private enqueue(call: () => Promise<void>): Promise<unknown> {
    this.chain = this.chain.then(() => (this.lost ? undefined : call())).catch((e: unknown) => {
      if (isLost(e)) this.lost = true;
    });
    return this.chain;
  }
}
