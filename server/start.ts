/**
 * Starts everything: database + migrations, demo seed, the local SMTP stand-in, the run queue (embedded or
 * BullMQ), the HTTP server, then the embedded runner threads (RUNNER_THREADS; 0 = none).
 * Port 0 (HTTP or SMTP) picks a free port; end-to-end tests rely on that.
 */
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { appContext, createApp } from './app';
import { systemClock, type Clock } from './clock';
import type { Config } from './config';
import { openDatabase, type Orm } from './db/orm';
import { startMailCapture, type MailCapture } from './modules/mail/mail-capture-server';
import { Mailbox } from './modules/mail/mailbox';
import { smtpMailer, type Mailer } from './modules/mail/mailer';
import { startEmbeddedRunnerThreads } from './modules/runners/embedded-threads';
import { createRunQueue } from './modules/runners/queue/create-run-queue';
import { watchLeases } from './modules/runners/lease-expiry';
import { RunEventBus } from './modules/runners/run-events';
import { RunnerWakeup } from './modules/runners/runner-wakeup';
import { ensureQueuedJobs, prepareEmbeddedRunner, releaseEmbeddedRuns } from './modules/runners/runner-startup';
import { seedDemoIfEmpty } from './seeders/demo-seed';
import { createLogger } from './logging';
import { cpuPool } from './workers/cpu-pool';
import { AdminSetup } from './modules/auth/admin-setup';
import { removeStaleUploads } from './modules/corpora/corpus-upload';
import { UserRepository } from './modules/users/user.repository';

export interface RunningServer {
  /** Base URL of the running server, e.g. `http://127.0.0.1:43117`. */
  url: string;
  port: number;
  /** The configuration in effect (ports and PUBLIC_URL filled in). */
  config: Config;
  /** Captured mail, or null when MAIL_CAPTURE is off. */
  mailbox: Mailbox | null;
  orm: Orm;
  /** Whether this start created the demo data. */
  seeded: boolean;
  /** Embedded runner threads started (0 when RUNNER_THREADS=0 or the runner program is missing). */
  runnerThreads: number;
  close(): Promise<void>;
}

/** How often the BullMQ back-end checks that every waiting runner run has a job. */
const QUEUE_CHECK_MS = 30_000;

export async function startServer(input: Config, options: { clock?: Clock } = {}): Promise<RunningServer> {
  const clock = options.clock ?? systemClock;
  let config: Config = { ...input, smtp: { ...input.smtp } };
  const cleanups: (() => Promise<void> | void)[] = [];
  const close = async () => {
    for (const cleanup of cleanups.reverse()) await cleanup();
    cleanups.length = 0;
  };

  try {
    const logger = createLogger(config.logLevel);
    cleanups.push(() => cpuPool.close());
    await removeStaleUploads(config.uploadTempDir);
    const orm = await openDatabase(config.databasePath, { debugSql: config.debugSql, logger: (message) => logger.debug({ sql: message }, 'sql') });
    cleanups.push(() => orm.close(true));
    const seeded = config.seedDemo ? await seedDemoIfEmpty(orm, config, clock) : false;

    let mailbox: Mailbox | null = null;
    let capture: MailCapture | null = null;
    if (config.mailCapture) {
      mailbox = new Mailbox({ file: config.mailCaptureFile });
      capture = await startMailCapture({ host: config.smtp.host, port: config.smtp.port, mailbox });
      cleanups.push(() => capture!.close());
      config = { ...config, smtp: { ...config.smtp, port: capture.port } };
    }
    const mailer: Mailer = smtpMailer({
      host: config.smtp.host,
      port: config.smtp.port,
      secure: config.smtp.secure,
      user: config.smtp.user,
      pass: config.smtp.pass,
      from: config.mailFrom,
      ignoreTLS: capture !== null,
    });
    cleanups.push(() => mailer.close());

    const runQueue = createRunQueue(config);
    cleanups.push(() => runQueue.close());
    const runEvents = new RunEventBus();
    const runnerWakeup = new RunnerWakeup();
    // The runs the previous start's threads held go back to the queue (they resume from their latest checkpoint).
    const embedded = config.runnerThreads > 0 ? await prepareEmbeddedRunner(orm, clock) : null;
    if (!embedded) await releaseEmbeddedRuns(orm);
    if (runQueue.backend === 'bullmq') {
      await ensureQueuedJobs(orm, runQueue);
      const timer = setInterval(() => void ensureQueuedJobs(orm, runQueue).catch((error: unknown) => console.error(error)), QUEUE_CHECK_MS);
      timer.unref();
      cleanups.push(() => clearInterval(timer));
    }

    const server: Server = createServer();
    await new Promise<void>((done, fail) => {
      server.once('error', fail);
      server.listen(config.port, config.host, () => {
        server.off('error', fail);
        done();
      });
    });
    cleanups.push(
      () =>
        new Promise<void>((done) => {
          server.close(() => done());
          server.closeAllConnections();
        }),
    );
    // Runs before the server closes (cleanups run last first): claims that wait for work answer 204 at once, and
    // their answers are written (one turn of the event loop) before the connections are closed.
    cleanups.push(async () => {
      runnerWakeup.close();
      await new Promise((done) => setImmediate(done));
    });
    const port = (server.address() as AddressInfo).port;
    const hostForUrl = config.host === '0.0.0.0' || config.host === '::' ? '127.0.0.1' : config.host;
    const url = `http://${hostForUrl.includes(':') ? `[${hostForUrl}]` : hostForUrl}:${port}`;
    if (!config.publicUrlSet && config.port === 0) config = { ...config, publicUrl: url };
    config = { ...config, port };

    const adminSetup = new AdminSetup(config);
    adminSetup.announce(logger, await new UserRepository(orm.em.fork()).countAdmins());
    const deps = { orm, mailer, mailbox, clock, logger, adminSetup, runQueue, runEvents, runnerWakeup };
    server.on('request', createApp(config, deps));
    // Runner runs whose runner stopped answering go back to waiting as soon as their lease runs out.
    cleanups.push(watchLeases(appContext(config, deps)));

    let runnerThreads = 0;
    if (embedded) {
      const threads = await startEmbeddedRunnerThreads({
        serverUrl: url, token: embedded.token, threads: config.runnerThreads, name: 'This server', ...(config.queueUrl ? { queueUrl: config.queueUrl } : {}),
      });
      if (threads) {
        cleanups.push(() => threads.stop());
        runnerThreads = config.runnerThreads;
      }
    }
    return { url, port, config, mailbox, orm, seeded, runnerThreads, close };
  } catch (error) {
    await close();
    throw error;
  }
}
