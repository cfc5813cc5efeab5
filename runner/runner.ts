/**
 * The runner: `threads` worker threads, each training one job at a time, fed either by claiming from the server
 * (`POST /api/runner/claim` without a run id and with `waitSeconds`, so the server answers as soon as work is
 * queued; an older server that refuses the field gets polls backing off 0.5 → 5 s instead: the embedded back-end)
 * or by a BullMQ `Worker` on the queue `noisewright-runs` (each job = claim that run, train it, return). A
 * heartbeat every 5 s renews the leases and brings pause/stop controls. `stop()` hands every job back as
 * `queued` after saving a checkpoint. The server starts its embedded runner threads with `startRunnerThreads`.
 */
import { hostname } from 'node:os';
import { DelayedError, Worker as QueueWorker, type Job } from 'bullmq';
import { Redis } from 'ioredis';
import {
  RUNNER_QUEUE_NAME, RUNNER_WORKER_LOCK_MS, RUNNER_WORKER_MAX_STALLED, RUNNER_WORKER_STALLED_INTERVAL_MS, type RunnerJob, type RunnerQueueJobData,
} from '../shared/api/runner-jobs';
import { EVALUATION_JOB_NAME, type EvaluationQueueJobData, type RunnerEvaluationJob } from '../shared/api/evaluation-jobs';
import { ProgressDisplay, type ProgressOutput } from './progress-display';
import { RunnerApi, RunnerApiError } from './runner-api';
import { ThreadSlot } from './thread-slot';
import type { JobResult } from './train-job';

export interface RunnerOptions {
  serverUrl: string;
  token: string;
  threads: number;
  name?: string;
  /** `redis://host:port`: take jobs from BullMQ; absent: claim from the server (embedded back-end). */
  queueUrl?: string;
  /** Where progress lines go (default: standard error; a multibar when it is a terminal). */
  output?: ProgressOutput;
}

export interface RunnerHandle {
  /** Saves a checkpoint of every job, hands them back as `queued`, and ends the threads. */
  stop(): Promise<void>;
  /** Resolves when every thread has loaded TF.js and the WASM backend (rejects when a thread cannot start). */
  ready(): Promise<void>;
  /**
   * Resolves when the runner ended on its own because the server refused its token (revoked, or unknown here),
   * with the server's sentence; never resolves otherwise. The threads are closed by then.
   */
  readonly refused: Promise<string>;
}

/** A 401 from the server: the token is revoked or unknown, and asking again cannot help. */
const isRefusal = (e: unknown): e is RunnerApiError => e instanceof RunnerApiError && e.status === 401;

const HEARTBEAT_EVERY_MS = 5000;
const IDLE_FIRST_MS = 500;
const IDLE_MAX_MS = 5000;
/** How long a claim waits on the server for work (the server allows up to RUNNER_CLAIM_MAX_WAIT_SECONDS). */
const CLAIM_WAIT_SECONDS = 20;
/** A waiting claim answered 204 sooner than this came back without waiting (a wake for another thread's work, or a server shutting down). */
const QUICK_ANSWER_MS = 1000;
/** How long `stop()` waits for jobs to save and hand back before ending the threads anyway. */
const STOP_WAIT_MS = 60_000;

class HandedBack extends Error {
  override readonly name = 'HandedBack';
}

export function startRunnerThreads(o: RunnerOptions): RunnerHandle {
  if (!Number.isInteger(o.threads) || o.threads < 1) throw new Error(`Give at least one runner thread (got ${o.threads}).`);
  const api = new RunnerApi(o.serverUrl, o.token);
  const name = o.name ?? hostname();
  const display = new ProgressDisplay(o.output ?? process.stderr);
  const slots = Array.from({ length: o.threads }, (_, i) => new ThreadSlot(i, (slot) => { if (slot.progress) display.update(slot.progress); }));
  let stopping = false;
  let refuse: (reason: string) => void = () => {};
  const refused = new Promise<string>((resolve) => { refuse = resolve; });
  let wake: () => void = () => {};
  const stopped = new Promise<void>((resolve) => { wake = resolve; });
  /** Aborts claims that wait on the server when the runner stops. */
  const stopCalls = new AbortController();
  /** Whether claims wait on the server for work; false once a server refused `waitSeconds` (an older version). */
  let waitForWork = true;
  /** A run to train: a claim that waits for work, or (older servers) one that answers at once. */
  const claimRun = async (): Promise<{ job: RunnerJob | null; waited: boolean; quick: boolean }> => {
    if (waitForWork) {
      try {
        const began = Date.now();
        const job = await api.claim(undefined, { waitSeconds: CLAIM_WAIT_SECONDS, signal: stopCalls.signal });
        return { job, waited: true, quick: Date.now() - began < QUICK_ANSWER_MS };
      } catch (e) {
        if (!(e instanceof RunnerApiError && (e.status === 400 || e.status === 422) && e.code.startsWith('VALIDATION'))) throw e;
        waitForWork = false;
        display.note(`claim: the server does not wait for work (${e.message}); asking every 0.5–5 s instead`);
      }
    }
    return { job: await api.claim(), waited: false, quick: false };
  };
  const sleep = (ms: number) => Promise.race([new Promise<void>((r) => setTimeout(r, ms).unref()), stopped]);

  const heartbeat = async () => {
    const jobs = slots.filter((s) => s.progress && s.kind === 'train').map((s) => ({ runId: s.progress!.runId, step: s.progress!.step, stepsPerSecond: s.progress!.stepsPerSecond }));
    try {
      const answer = await api.heartbeat({ name, threads: o.threads, jobs });
      for (const c of answer.controls) slots.find((s) => s.runId === c.runId)?.command(c.action);
    } catch (e) {
      if (isRefusal(e)) void giveUp(e);
      else display.note(`heartbeat: ${(e as Error).message}`);
    }
  };
  const timer = setInterval(() => void heartbeat(), HEARTBEAT_EVERY_MS);
  void heartbeat();
  display.note(`runner "${name}": ${o.threads} thread(s), server ${o.serverUrl}, ${o.queueUrl ? `queue ${o.queueUrl}` : 'claiming from the server'}`);

  const train = async (slot: ThreadSlot, job: RunnerJob): Promise<JobResult> => {
    display.note(`${job.runName}: claimed (run ${job.runId}, from step ${job.stepsDone})`);
    const result = await slot.run(job, o.serverUrl, o.token);
    if (result.status === 'lost' && result.reason?.startsWith('Thread')) {
      // The thread died: give the run back so it resumes from its latest checkpoint.
      await api.finish(job.runId, { status: 'queued', stepsDone: result.step, statusReason: result.reason.slice(0, 500) }).catch(() => undefined);
    }
    display.done(job.runName, result);
    return result;
  };

  const evaluate = async (slot: ThreadSlot, job: RunnerEvaluationJob): Promise<JobResult> => {
    const label = `evaluation of ${job.runName} at step ${job.checkpoint.step}`;
    display.note(`${label}: claimed (request ${job.requestId})`);
    // The computation blocks its thread: this thread reports its stage and so keeps the lease.
    const ping = setInterval(() => {
      const p = slot.progress;
      if (p?.runId !== job.requestId) return;
      void api.evaluationProgress(job.requestId, { done: p.step, total: Math.max(1, p.steps), next: (p.stage ?? '').slice(0, 120) })
        .catch((e: unknown) => { if (isRefusal(e)) void giveUp(e); });
    }, job.progressEverySeconds * 1000);
    try {
      const result = await slot.evaluate(job, o.serverUrl, o.token);
      if ((result.status === 'lost' && result.reason?.startsWith('Thread')) || result.status === 'queued') {
        await api.endEvaluation(job.requestId, { status: 'waiting' }).catch(() => undefined);
      }
      display.done(label, result);
      return result;
    } finally {
      clearInterval(ping);
    }
  };

  let loops: Promise<void>[] = [];
  let queueWorker: QueueWorker<RunnerQueueJobData> | null = null;
  let connection: Redis | null = null;
  if (o.queueUrl) {
    const free = [...slots];
    /**
     * A claim for a queue job (a run or an evaluation request): a refused token ends the runner; while another
     * runner's lease is still fresh (a killed runner's lease runs out), the job waits until it has, without holding a
     * thread meanwhile or using up an attempt.
     */
    const claimOrDelay = async <T>(job: Job, lockToken: string | undefined, claim: () => Promise<T>): Promise<T> => {
      try {
        return await claim();
      } catch (e) {
        if (isRefusal(e)) void giveUp(e);
        if (e instanceof RunnerApiError && e.code === 'RUN_HELD') {
          await job.moveToDelayed(Date.now() + Math.max(1, e.retryAfterSeconds ?? 5) * 1000, lockToken);
          throw new DelayedError();
        }
        throw e;
      }
    };
    connection = new Redis(o.queueUrl, { maxRetriesPerRequest: null });
    queueWorker = new QueueWorker<RunnerQueueJobData>(RUNNER_QUEUE_NAME, async (job: Job<RunnerQueueJobData>, lockToken?: string) => {
      if (stopping) throw new HandedBack('The runner is shutting down.');
      if (job.name === EVALUATION_JOB_NAME) return evaluateQueued(job as Job<EvaluationQueueJobData>, lockToken);
      let claimed: RunnerJob | null;
      try {
        claimed = await claimOrDelay(job, lockToken, () => api.claim(job.data.runId));
      } catch (e) {
        if (e instanceof RunnerApiError && e.code === 'RUN_NOT_QUEUED') return 'not queued';
        throw e;
      }
      if (!claimed) return 'nothing to do';
      const slot = free.shift();
      if (!slot) {
        await api.finish(claimed.runId, { status: 'queued', stepsDone: claimed.stepsDone }).catch(() => undefined);
        throw new HandedBack('No free runner thread (more jobs than threads).');
      }
      try {
        const result = await train(slot, claimed);
        // Handed back on shutdown: fail this attempt so BullMQ gives the job to another runner after the backoff.
        if (result.status === 'queued') throw new HandedBack(`Run ${claimed.runId} was handed back at step ${result.step}.`);
        return result.status;
      } finally {
        free.push(slot);
      }
    }, {
      connection, concurrency: o.threads, lockDuration: RUNNER_WORKER_LOCK_MS,
      stalledInterval: RUNNER_WORKER_STALLED_INTERVAL_MS, maxStalledCount: RUNNER_WORKER_MAX_STALLED,
    });
    /** An `evaluate` job: claim its request by id, compute it in a free thread, return. */
    const evaluateQueued = async (job: Job<EvaluationQueueJobData>, lockToken?: string): Promise<string> => {
      const claimed = await claimOrDelay(job, lockToken, () => api.claimEvaluation(job.data.requestId));
      if (!claimed) return 'not waiting';
      const slot = free.shift();
      if (!slot) {
        await api.endEvaluation(claimed.requestId, { status: 'waiting' }).catch(() => undefined);
        throw new HandedBack('No free runner thread (more jobs than threads).');
      }
      try {
        const result = await evaluate(slot, claimed);
        if (result.status === 'queued' || result.status === 'lost') throw new HandedBack(`Evaluation ${claimed.requestId} was given back (${result.reason ?? result.status}).`);
        return result.status;
      } finally {
        free.push(slot);
      }
    };
    queueWorker.on('error', (e) => display.note(`queue: ${e.message}`));
  } else {
    loops = slots.map(async (slot) => {
      // A job is claimed only once its thread can train it (loading TF.js takes seconds): a run claimed earlier
      // would wait in this runner while another one could train it.
      await Promise.race([slot.whenReady().catch(() => undefined), stopped]);
      let idle = IDLE_FIRST_MS;
      /** Waiting claims in a row that came back empty at once: two of them and the thread backs off as when polling. */
      let quickEmpty = 0;
      while (!stopping) {
        let job: RunnerJob | null = null;
        let evaluation: RunnerEvaluationJob | null = null;
        let waited = false;
        let quick = false;
        try {
          // Evaluations first: someone waits at the page for them, and they are short beside a training run.
          // A server without evaluation routes (404) or a passing fault here must not keep runs from training.
          evaluation = await api.claimEvaluation().catch((e: unknown) => {
            if (isRefusal(e)) throw e;
            return null;
          });
          if (!evaluation) ({ job, waited, quick } = await claimRun());
        } catch (e) {
          if (isRefusal(e)) {
            void giveUp(e);
            break;
          }
          if (!stopping) display.note(`claim: ${(e as Error).message}`);
        }
        if (stopping && (job || evaluation)) {
          if (job) await api.finish(job.runId, { status: 'queued', stepsDone: job.stepsDone }).catch(() => undefined);
          if (evaluation) await api.endEvaluation(evaluation.requestId, { status: 'waiting' }).catch(() => undefined);
          break;
        }
        if (evaluation) {
          idle = IDLE_FIRST_MS;
          quickEmpty = 0;
          await evaluate(slot, evaluation);
          continue;
        }
        if (!job) {
          // A claim that waited on the server asks again at once (it answered because work came, or its wait ended).
          quickEmpty = quick ? quickEmpty + 1 : 0;
          if (waited && quickEmpty < 2) {
            if (!quick) idle = IDLE_FIRST_MS;
            continue;
          }
          await sleep(idle);
          idle = Math.min(IDLE_MAX_MS, idle * 2);
          continue;
        }
        idle = IDLE_FIRST_MS;
        quickEmpty = 0;
        await train(slot, job);
      }
    });
  }

  const handle: RunnerHandle = {
    refused,
    async ready() {
      await Promise.all(slots.map((s) => s.whenReady()));
    },
    async stop() {
      if (stopping) return;
      stopping = true;
      wake();
      stopCalls.abort();
      for (const s of slots) s.command('shutdown');
      // An evaluation cannot save its work half-way: give it back now (another runner starts it again).
      await Promise.all(slots.filter((s) => s.kind === 'evaluate').map((s) => s.giveBack()));
      const closing = Promise.all([...loops, queueWorker ? queueWorker.close() : Promise.resolve()]);
      await Promise.race([closing, new Promise((r) => setTimeout(r, STOP_WAIT_MS).unref())]);
      clearInterval(timer);
      await api.heartbeat({ name, threads: 0, jobs: [] }).catch(() => undefined);
      await Promise.all(slots.map((s) => s.close()));
      await connection?.quit().catch(() => undefined);
      display.stop();
    },
  };
  /** The token was refused: stop (jobs end as lost; the server already gave their runs back) and say why. */
  let givingUp = false;
  const giveUp = async (e: RunnerApiError) => {
    if (givingUp) return;
    givingUp = true;
    display.note(`runner "${name}": the server refused this runner's token: ${e.message}`);
    await handle.stop();
    refuse(e.message);
  };
  return handle;
}
