/** What route factories receive: configuration and the services the app was built with. */
import type { Clock } from './clock';
import type { Config } from './config';
import type { Orm } from './db/orm';
import type { Mailbox } from './modules/mail/mailbox';
import type { Mailer } from './modules/mail/mailer';
import type { RunQueue } from './modules/runners/queue/run-queue';
import type { RunEventBus } from './modules/runners/run-events';

export interface AppDeps {
  orm: Orm;
  mailer: Mailer;
  /** Captured mail (development); `GET /api/admin/mail` reads it. Null when nothing is captured. */
  mailbox?: Mailbox | null;
  clock?: Clock;
  /** Where server faults are reported; defaults to console.error. */
  logError?: (error: unknown) => void;
  /** The queue of runner runs; defaults to the embedded one (required when QUEUE_URL is set). */
  runQueue?: RunQueue;
  /** The bus run changes are published on (server-sent events); defaults to a new one. */
  runEvents?: RunEventBus;
}

export interface AppContext {
  config: Config;
  orm: Orm;
  mailer: Mailer;
  mailbox: Mailbox | null;
  clock: Clock;
  logError: (error: unknown) => void;
  runQueue: RunQueue;
  runEvents: RunEventBus;
}
