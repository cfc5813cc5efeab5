/** What route factories receive: configuration and the services the app was built with. */
import type { Clock } from './clock';
import type { Request } from 'express';
import type { Config } from './config';
import type { Logger } from './logging';
import type { AdminSetup } from './modules/auth/admin-setup';
import type { Orm } from './db/orm';
import type { Mailbox } from './modules/mail/mailbox';
import type { Mailer } from './modules/mail/mailer';
import type { RunQueue } from './modules/runners/queue/run-queue';
import type { RunEventBus } from './modules/runners/run-events';
import type { RunnerWakeup } from './modules/runners/runner-wakeup';

export interface AppDeps {
  orm: Orm;
  mailer: Mailer;
  /** Captured mail (development); `GET /api/admin/mail` reads it. Null when nothing is captured. */
  mailbox?: Mailbox | null;
  clock?: Clock;
  /** The server log (pino); defaults to one on stdout at `config.logLevel`. */
  logger?: Logger;
  /** Who becomes the first admin (start.ts shares it so the code it prints is the one that works). */
  adminSetup?: AdminSetup;
  /** Where server faults are reported besides the log (tests collect them); the log gets only `safeError(error)`. */
  logError?: (error: unknown, req?: Request) => void;
  /** The queue of runner runs; defaults to the embedded one (required when QUEUE_URL is set). */
  runQueue?: RunQueue;
  /** The bus run changes are published on (server-sent events); defaults to a new one. */
  runEvents?: RunEventBus;
  /** Wakes runner claims that wait for work; defaults to a new one (pass the same one wherever the deps are reused). */
  runnerWakeup?: RunnerWakeup;
}

export interface AppContext {
  config: Config;
  orm: Orm;
  mailer: Mailer;
  mailbox: Mailbox | null;
  clock: Clock;
  logger: Logger;
  adminSetup: AdminSetup;
  /** Reports a server fault: to the log as `safeError(error)` with the request id, and to `AppDeps.logError`. */
  logError: (error: unknown, req?: Request) => void;
  runQueue: RunQueue;
  runEvents: RunEventBus;
  /** Wakes runner claims that wait for work (runs queued for runners, evaluation requests waiting); closed at shutdown. */
  runnerWakeup: RunnerWakeup;
}
