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
import type { AnalysedCorpus, CpuTask } from './cpu-tasks';
import type { PasswordStrength } from '../modules/auth/password-strength-check';

export const RETRY_AFTER_SECONDS = 5;

export interface CpuPoolSettings {
  threads: number;
  queueLimit: number;
}

export function defaultPoolSettings(): CpuPoolSettings {
  return { threads: Math.max(1, availableParallelism()), queueLimit: 200 };
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
  resolve: (value: unknown) => void;
  reject: (error: unknown) => void;
}

/**
 * Our own queue in front of piscina: at most `threads` tasks are handed to the pool at once, the rest wait
 * here, and a task whose client has gone is dropped when its turn comes (a task already running is never
 * cut off: that would cost a thread restart).
 */
const waiting: Waiting[] = [];
let inPool = 0;

function pump(): void {
  while (inPool < settings.threads && waiting.length > 0) {
    const next = waiting.shift()!;
    if (next.signal?.aborted) {
      next.reject(new ClientGoneError());
      continue;
    }
    inPool++;
    thePool()
      .run(next.task, next.transfer ? { transferList: next.transfer } : undefined)
      .then(next.resolve, next.reject)
      .finally(() => {
        inPool--;
        pump();
      });
  }
}

function run<T>(task: CpuTask, transfer?: ArrayBuffer[]): Promise<T> {
  if (waiting.length >= settings.queueLimit) return Promise.reject(new ServerBusyError());
  return new Promise<T>((resolve, reject) => {
    waiting.push({ task, transfer, signal: currentRequestSignal(), resolve: resolve as (v: unknown) => void, reject });
    pump();
  });
}

export const cpuPool = {
  hash: (password: string, cost: number) => run<string>({ kind: 'hash', password, cost }),
  compare: (password: string, hash: string) => run<boolean>({ kind: 'compare', password, hash }),
  /** Parses and analyses an upload in a worker thread; `rows` = also return the rows to store. */
  analyse: (bytes: Uint8Array, fileName: string, options: CorpusOptions, rows: boolean) =>
    run<AnalysedCorpus>({ kind: 'analyse', bytes, fileName, options, rows }),
  /** zxcvbn's score (0–4) and whether the password is on the common-password list. */
  strength: (password: string, userInputs: string[]) => run<PasswordStrength>({ kind: 'strength', password, userInputs }),
  /** Threads and queue in use (for tests and the load benchmark). */
  stats: () => ({ ...settings, running: pool?.threads.length ?? 0, queued: waiting.length }),
  async close(): Promise<void> {
    const p = pool;
    pool = null;
    if (p) await p.destroy();
  },
};
