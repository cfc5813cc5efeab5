/**
 * Test harness: an app on a fresh SQLite file (under the OS temp folder), a manual clock, and mail
 * delivered straight into a Mailbox. One per spec file (or per test where state must not leak).
 */
import type { Express } from 'express';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import type { AuthResponse, Role } from '../../shared/api/types';
import { appContext, createApp } from '../app';
import type { AppContext, AppDeps } from '../app-context';
import { ManualClock } from '../clock';
import { loadConfig, type Config } from '../config';
import { openDatabase, type Orm } from '../db/orm';
import { BenchRepository } from '../modules/benches/bench.repository';
import { MembershipRepository } from '../modules/benches/membership.repository';
import { Mailbox } from '../modules/mail/mailbox';
import { mailboxMailer } from '../modules/mail/mailer';
import { UserRepository } from '../modules/users/user.repository';
import { createRunQueue } from '../modules/runners/queue/create-run-queue';
import type { RunQueue } from '../modules/runners/queue/run-queue';
import { RunEventBus } from '../modules/runners/run-events';
import { RunnerWakeup } from '../modules/runners/runner-wakeup';

export const TEST_PASSWORD = 'correct horse 42';

export interface TestApp {
  app: Express;
  orm: Orm;
  config: Config;
  clock: ManualClock;
  mailbox: Mailbox;
  dir: string;
  /** The run queue (embedded, or BullMQ when the env sets QUEUE_URL) and the event bus of server-sent events. */
  runQueue: RunQueue;
  runEvents: RunEventBus;
  /** A context with the app's services, for code the server runs outside requests (background checks). */
  ctx: AppContext;
  /** Errors the app logged (unexpected 500s and failed background sends), oldest first. */
  readonly serverErrors: unknown[];
  /** Returns the logged server errors and forgets them: call it in a test that provokes a 500 on purpose. */
  takeServerErrors(): unknown[];
  /** Closes the database and removes the folder; fails when server errors were logged that no test took. */
  close(): Promise<void>;
}

const describeError = (e: unknown) => (e instanceof Error ? e.stack ?? e.message : JSON.stringify(e));

export function testConfig(dir: string, env: Record<string, string> = {}): Config {
  return loadConfig({
    NODE_ENV: 'test',
    DATABASE_PATH: join(dir, 'test.sqlite'),
    BCRYPT_COST: '4',
    JWT_SECRET: 'test-secret-that-is-long-enough-0123456789',
    MAIL_CAPTURE: 'false',
    MAIL_CAPTURE_FILE: 'none',
    SEED_DEMO: 'false',
    AUTH_RATE_LIMIT: '10000',
    PUBLIC_URL: 'http://workbench.test',
    STATIC_DIR: join(dir, 'no-client-build'),
    UPLOAD_TEMP_DIR: join(dir, 'uploads'),
    LOG_LEVEL: 'silent',
    ...env,
  });
}

export async function createTestApp(env: Record<string, string> = {}): Promise<TestApp> {
  const dir = mkdtempSync(join(tmpdir(), 'noisewright-test-'));
  const config = testConfig(dir, env);
  const orm = await openDatabase(config.databasePath);
  const clock = new ManualClock('2026-03-01T09:00:00Z');
  const mailbox = new Mailbox();
  const errors: unknown[] = [];
  const runQueue = createRunQueue(config);
  const runEvents = new RunEventBus();
  const runnerWakeup = new RunnerWakeup();
  const deps: AppDeps = {
    orm,
    mailer: mailboxMailer(mailbox, config.mailFrom),
    mailbox,
    clock,
    logError: (error) => errors.push(error),
    runQueue,
    runEvents,
    runnerWakeup,
  };
  const app = createApp(config, deps);
  return {
    app,
    ctx: appContext(config, deps),
    orm,
    config,
    clock,
    mailbox,
    dir,
    runQueue,
    runEvents,
    serverErrors: errors,
    takeServerErrors() {
      return errors.splice(0, errors.length);
    },
    async close() {
      runnerWakeup.close();
      await runQueue.close();
      await orm.close(true);
      rmSync(dir, { recursive: true, force: true });
      if (errors.length > 0) {
        throw new Error(`${errors.length} unexpected server error(s) were logged (answered 500 or failed in the background); ` +
          `a test that expects one must call takeServerErrors(). First:\n${describeError(errors[0])}`);
      }
    },
  };
}

export async function signUp(t: TestApp, email: string, displayName = email.split('@')[0]!): Promise<AuthResponse> {
  const res = await request(t.app).post('/api/auth/signup').send({ email, password: TEST_PASSWORD, displayName });
  if (res.status !== 201) throw new Error(`sign-up of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as AuthResponse;
}

/** Counts rows of a table straight from SQLite (to prove a refused request wrote nothing). */
export async function countRows(t: TestApp, table: string): Promise<number> {
  const rows: { n: number }[] = await t.orm.em.fork().getConnection().execute(`select count(*) as n from \`${table}\``);
  return Number(rows[0]!.n);
}

export const DATA_TABLES = ['users', 'benches', 'memberships', 'invitations', 'password_reset_tokens', 'activity_events', 'runs', 'metric_points', 'checkpoints', 'grids', 'evaluations', 'reports', 'runners', 'evaluation_requests'];

export async function countAllRows(t: TestApp): Promise<Record<string, number>> {
  const counts: Record<string, number> = {};
  for (const table of DATA_TABLES) counts[table] = await countRows(t, table);
  return counts;
}

export interface BenchFixture {
  benchId: string;
  /** Tokens by person: admin (instance admin, not a member), owner, coach, member, viewer, outsider. */
  tokens: Record<'admin' | 'owner' | 'coach' | 'member' | 'viewer' | 'outsider', string>;
  userIds: Record<'admin' | 'owner' | 'coach' | 'member' | 'viewer' | 'outsider', string>;
}

/**
 * Call on an empty database: the admin signs up first (the first account becomes the instance admin), then one person per role
 * and an outsider; the bench and memberships are written straight through the repositories.
 */
export async function createBenchFixture(t: TestApp, name = 'Tide pool'): Promise<BenchFixture> {
  const people = ['admin', 'owner', 'coach', 'member', 'viewer', 'outsider'] as const;
  const tokens = {} as BenchFixture['tokens'];
  const userIds = {} as BenchFixture['userIds'];
  const suffix = Math.random().toString(36).slice(2, 8);
  for (const who of people) {
    const auth = await signUp(t, `${who}.${suffix}@example.org`, `${who[0]!.toUpperCase()}${who.slice(1)} ${suffix}`);
    tokens[who] = auth.token;
    userIds[who] = auth.user.id;
  }
  const em = t.orm.em.fork();
  const users = new UserRepository(em);
  const owner = (await users.findById(userIds.owner))!;
  const { bench } = new BenchRepository(em).create({ name, description: '', owner, at: t.clock.now() });
  const members = new MembershipRepository(em);
  for (const role of ['coach', 'member', 'viewer'] as Role[]) {
    members.add(bench, (await users.findById(userIds[role as 'coach']))!, role, t.clock.now());
  }
  await em.flush();
  return { benchId: bench.id, tokens, userIds };
}

export const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });
