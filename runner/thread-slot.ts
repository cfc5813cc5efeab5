/**
 * One worker thread of the runner (runner/job-thread.ts) and the job it trains, seen from the main thread.
 * A thread that dies mid-job resolves the job as `lost` (the runner hands the run back) and is started again.
 */
import { Worker } from 'node:worker_threads';
import type { RunnerEvaluationJob } from '../shared/api/evaluation-jobs';
import type { RunnerJob } from '../shared/api/runner-jobs';
import type { FromThread, ToThread } from './job-thread';
import type { JobCommand, JobProgress, JobResult } from './train-job';

const ENTRY = new URL('./job-thread-entry.mjs', import.meta.url);

export class ThreadSlot {
  private worker!: Worker;
  private ready!: Promise<void>;
  private pending: { job: { runId: string; stepsDone: number }; kind: 'train' | 'evaluate'; resolve: (r: JobResult) => void } | null = null;
  private closing = false;
  private started = false;
  private early: JobCommand | null = null;
  /** The latest progress of the current job (null when idle). */
  progress: JobProgress | null = null;

  constructor(readonly index: number, private readonly onProgress: (slot: ThreadSlot) => void) {
    this.spawn();
  }

  /** Resolves when the thread has loaded TF.js and the WASM backend. */
  whenReady(): Promise<void> {
    return this.ready;
  }

  get busy(): boolean {
    return this.pending !== null;
  }

  get runId(): string | null {
    return this.pending?.job.runId ?? null;
  }

  /** What the current job is (null when idle): training a run, or an evaluation (its id is the request's). */
  get kind(): 'train' | 'evaluate' | null {
    return this.pending?.kind ?? null;
  }

  /** Computes an evaluation in this thread; resolves when its figures were stored, or it failed, was given back or lost. */
  async evaluate(job: RunnerEvaluationJob, serverUrl: string, token: string): Promise<JobResult> {
    if (this.pending) throw new Error(`Thread ${this.index} is busy with ${this.pending.job.runId}.`);
    const result = new Promise<JobResult>((resolve) => { this.pending = { job: { runId: job.requestId, stepsDone: 0 }, kind: 'evaluate', resolve }; });
    this.started = false;
    this.early = null;
    this.progress = { runId: job.requestId, runName: `evaluation of ${job.runName}`, step: 0, steps: 1, stepsPerSecond: null, bitsPerChar: null, isBound: null };
    await this.ready;
    this.started = true;
    this.post({ type: 'evaluate', job, serverUrl, token });
    return result;
  }

  /** Trains `job` in this thread; resolves when it ended (finished, paused, stopped, failed, handed back or lost). */
  async run(job: RunnerJob, serverUrl: string, token: string): Promise<JobResult> {
    if (this.pending) throw new Error(`Thread ${this.index} is busy with run ${this.pending.job.runId}.`);
    const result = new Promise<JobResult>((resolve) => { this.pending = { job, kind: 'train', resolve }; });
    this.started = false;
    this.early = null;
    this.progress = { runId: job.runId, runName: job.runName, step: job.stepsDone, steps: 0, stepsPerSecond: null, bitsPerChar: null, isBound: null };
    await this.ready;
    this.started = true;
    this.post({ type: 'job', job, serverUrl, token, command: this.early });
    return result;
  }

  /** A command for the current job; one that comes while the thread still starts goes along with the job. */
  command(command: JobCommand): void {
    if (!this.pending) return;
    if (!this.started) {
      if (this.early !== 'shutdown') this.early = command;
      return;
    }
    this.post({ type: 'command', command });
  }

  /** Ends the current job as handed back (`queued`) without waiting for its thread (which is closed next). */
  giveBack(): void {
    const p = this.pending;
    if (p) this.settleWith({ runId: p.job.runId, status: 'queued', step: p.job.stepsDone, reason: 'The runner is shutting down.' });
  }

  async close(): Promise<void> {
    this.closing = true;
    await this.worker.terminate();
  }

  private post(m: ToThread): void {
    this.worker.postMessage(m);
  }

  private spawn(): void {
    const worker = new Worker(ENTRY);
    this.worker = worker;
    this.ready = new Promise<void>((resolve, reject) => {
      worker.on('message', (m: FromThread) => {
        if (m.type === 'ready') resolve();
        else if (m.type === 'progress') {
          this.progress = m.progress;
          this.onProgress(this);
        } else if (m.type === 'done') this.settle(m.result);
      });
      worker.once('error', (e) => reject(e));
    });
    this.ready.catch(() => undefined);
    worker.on('error', (e) => this.settle(null, e.message));
    worker.on('exit', () => {
      if (this.closing) return;
      this.settle(null, 'the worker thread ended');
      this.spawn();
    });
  }

  private settleWith(result: JobResult): void {
    const p = this.pending;
    if (!p) return;
    this.pending = null;
    this.progress = null;
    p.resolve(result);
  }

  private settle(result: JobResult | null, problem = 'unknown'): void {
    const p = this.pending;
    if (!p) return;
    this.pending = null;
    this.progress = null;
    p.resolve(result ?? { runId: p.job.runId, status: 'lost', step: p.job.stepsDone, reason: `Thread ${this.index} failed: ${problem}.` });
  }
}
