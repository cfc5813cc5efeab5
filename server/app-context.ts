/** What route factories receive: configuration and the services the app was built with. */
import type { Clock } from './clock';
import type { Config } from './config';
import type { Orm } from './db/orm';
import type { Mailbox } from './modules/mail/mailbox';
import type { Mailer } from './modules/mail/mailer';

export interface AppDeps {
  orm: Orm;
  mailer: Mailer;
  /** Captured mail (development); `GET /api/admin/mail` reads it. Null when nothing is captured. */
  mailbox?: Mailbox | null;
  clock?: Clock;
  /** Where server faults are reported; defaults to console.error. */
  logError?: (error: unknown) => void;
}

export interface AppContext {
  config: Config;
  orm: Orm;
  mailer: Mailer;
  mailbox: Mailbox | null;
  clock: Clock;
  logError: (error: unknown) => void;
}
