/**
 * One pool of worker threads (piscina) for CPU-heavy work, shared by the whole process: sized to the machine
 * (`WORKER_THREADS`, default the number of cores) with a bounded queue (`WORKER_QUEUE_LIMIT`). When the queue
 * is full the request gets 503 with `Retry-After` instead of waiting without end; the event loop stays free
 * for every other request meanwhile.
 */
import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import type { CorpusOptions } from '../../shared/api/corpora';
import { ErrorCode } from '../../shared/api/errors';
import { HttpError } from '../http-error';
import { ClientGoneError, currentRequestSignal } from '../middleware/client-gone';
import type { AnalysedCorpus, CpuTask, UploadSource } from './cpu-tasks';
import type { PasswordStrength } from '../modules/auth/password-strength-check';

export const RETRY_AFTER_SECONDS = 5;

/**
 * A running analysis is cut off when its client goes only for a file at least this large: starting a fresh
 * thread costs 0.7–1.2 s of CPU (measured at load average 5), about what analysing 1 MB costs.
 */
export const CUT_OFF_MIN_BYTES = 1024 * 1024;

export interface CpuPoolSettings {
  threads: number;
  queueLimit: number;
}

/** Before `configureCpuPool` (scripts and tests that use the pool directly): the server's defaults, cores − 1 threads. */
export function defaultPoolSettings(): CpuPoolSettings {
  return { threads: Math.max(1, availableParallelism() - 1), queueLimit: 200 };
}

let settings: CpuPoolSettings = defaultPoolSettings();
let pool: Piscina | null = null;

/** Sets the pool size before its first use (server start reads WORKER_THREADS / WORKER_QUEUE_LIMIT). */
export function configureCpuPool(next: CpuPoolSettings): void {
  if (pool && pool.options.maxThreads !== next.threads) {
    const old = pool;
    pool = null;
    void old.destroy();
  }
  settings = next;
}

function thePool(): Piscina {
  pool ??= new Piscina({
    filename: new URL('./cpu-worker.mjs', import.meta.url).href,
    minThreads: 1,
    maxThreads: settings.threads,
    maxQueue: 'auto',
    idleTimeout: 60_000,
  });
  return pool;
}

export class ServerBusyError extends HttpError {
  override name = 'ServerBusyError';
  readonly retryAfterSeconds = RETRY_AFTER_SECONDS;
  constructor() {
    super(503, ErrorCode.ServerBusy, `The server is busy with other requests; try again in ${RETRY_AFTER_SECONDS} seconds.`);
  }
}

interface Waiting {
  task: CpuTask;
  transfer?: ArrayBuffer[];
  signal?: AbortSignal;
  /** Cut the task off when the signal aborts while it runs (costs a thread restart; for long tasks only). */
  cancellable: boolean;
  resolve: (value: unknown) => void;
  reject: (error: unknown) => void;
}

/**
 * Our own queue in front of piscina: at most `threads` tasks are handed to the pool at once, the rest wait
 * here, and a task whose client has gone is dropped when its turn comes. A running corpus analysis is cut
 * off when its client goes (piscina's `signal`: the thread is stopped and a fresh one takes its place) if
 * its file is at least CUT_OFF_MIN_BYTES; shorter tasks are left to finish, as a thread restart costs more.
 */
const waiting: Waiting[] = [];
let inPool = 0;
const counters = { completed: 0, dropped: 0, cancelled: 0 };

function pump(): void {
  while (inPool < settings.threads && waiting.length > 0) {
    const next = waiting.shift()!;
    if (next.signal?.aborted) {
      counters.dropped++;
      next.reject(new ClientGoneError());
      continue;
    }
    inPool++;
    const signal = next.cancellable ? next.signal : undefined;
    thePool()
      .run(next.task, { ...(next.transfer ? { transferList: next.transfer } : {}), ...(signal ? { signal } : {}) })
      .then(
        (value) => {
          counters.completed++;
          next.resolve(value);
        },
        (error: unknown) => {
          if (signal?.aborted) {
            counters.cancelled++;
            next.reject(new ClientGoneError());
          } else next.reject(error);
        },
      )
      .finally(() => {
        inPool--;
        pump();
      });
  }
}

function run<T>(task: CpuTask, opts: { transfer?: ArrayBuffer[]; cancellable?: boolean } = {}): Promise<T> {
  if (waiting.length >= settings.queueLimit) return Promise.reject(new ServerBusyError());
  return new Promise<T>((resolve, reject) => {
    const signal = currentRequestSignal();
    waiting.push({ task, transfer: opts.transfer, signal, cancellable: opts.cancellable ?? false, resolve: resolve as (v: unknown) => void, reject });
    pump();
  });
}

export const cpuPool = {
  hash: (password: string, cost: number) => run<string>({ kind: 'hash', password, cost }),
  compare: (password: string, hash: string) => run<boolean>({ kind: 'compare', password, hash }),
  /**
   * Parses and analyses an upload in a worker thread, reading a file as a stream; `rows` = also return the rows
   * to store. Cut off (ClientGoneError) when the request's client goes away and the file is large enough.
   */
  analyse: (source: UploadSource, fileName: string, options: CorpusOptions, rows: boolean) =>
    run<AnalysedCorpus>({ kind: 'analyse', source, fileName, options, rows }, {
      cancellable: ('size' in source ? source.size : source.bytes.length) >= CUT_OFF_MIN_BYTES,
    }),
  /** zxcvbn's score (0–4) and whether the password is on the common-password list. */
  strength: (password: string, userInputs: string[]) => run<PasswordStrength>({ kind: 'strength', password, userInputs }),
  /**
   * Threads started (`running`), tasks in them (`active`) and waiting (`queued`); `completed` tasks, queued
   * tasks `dropped` because their client had gone, running tasks `cancelled` when it went (since the start).
   */
  stats: () => ({ ...settings, running: pool?.threads.length ?? 0, active: inPool, queued: waiting.length, ...counters }),
  async close(): Promise<void> {
    const p = pool;
    pool = null;
    if (p) await p.destroy();
  },
};
