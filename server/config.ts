/**
 * Configuration, read once from the environment and validated (see DEVELOPERS.md, "Configuration").
 * `loadConfig(process.env)` in main.ts; tests build their own with `loadConfig({ ... })`.
 */
import { randomBytes } from 'node:crypto';
import { availableParallelism, tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { z } from 'zod';

export interface Config {
  env: 'development' | 'production' | 'test';
  /** Everything but production: demo hints, the captured-mail page. */
  devMode: boolean;
  port: number;
  host: string;
  publicUrl: string;
  /** False when PUBLIC_URL was not given: startServer then derives it from the address it listens on. */
  publicUrlSet: boolean;
  databasePath: string;
  jwtSecret: string;
  /** Lifetime of a sign-in token. */
  jwtTtlSeconds: number;
  bcryptCost: number;
  smtp: { host: string; port: number; user?: string; pass?: string; secure: boolean };
  mailFrom: string;
  /** Start the local SMTP stand-in (on smtp.host:smtp.port; port 0 picks a free one). */
  mailCapture: boolean;
  /** JSON-lines file the stand-in appends captured mail to; empty string = memory only.
   *  Default: `captured-mail.jsonl` beside the database file (none for `:memory:`). */
  mailCaptureFile: string;
  seedDemo: boolean;
  demoEmail: string;
  demoPassword: string;
  maxUploadBytes: number;
  /** Where an upload is written while it is read (one directory per request, removed after the answer). */
  uploadTempDir: string;
  /** Largest checkpoint file accepted (upload and import); larger ones get 413. */
  maxCheckpointBytes: number;
  jsonBodyLimitBytes: number;
  /** Attempts per window per client address on sign-in, sign-up, password reset and invitation acceptance. */
  authRateLimit: { max: number; windowMs: number };
  /** The built Angular app; served with an index.html fallback when it exists. */
  staticDir: string;
  /** Reverse proxies in front of the server (0 = none); the rate limit then keys on the client address they forward. */
  trustProxyHops: number;
  /** Redis URL of the BullMQ queue of runner runs; null = the embedded queue (rows in SQLite). */
  queueUrl: string | null;
  /** Runner threads the server starts itself (0 = none). Default: cores − 1, at least 1 (0 under NODE_ENV=test). */
  runnerThreads: number;
  /** Production: the account signing up with this address becomes the first admin ('' = use the setup code). */
  adminEmail: string;
  /** Invitations per window: per sender, per bench, and to one address of a bench. */
  inviteRateLimit: { perSender: number; perBench: number; perAddress: number; windowMs: number };
  /** Worker threads for bcrypt and corpus parsing (default: the number of cores) and the queue before 503. */
  workerThreads: number;
  workerQueueLimit: number;
  /** API requests worked on at once (the rest wait in line; health and config skip the line). */
  apiConcurrency: number;
  /** pino level of the server log (request lines are `info`); `silent` in tests unless LOG_LEVEL is set. */
  logLevel: 'fatal' | 'error' | 'warn' | 'info' | 'debug' | 'trace' | 'silent';
  /** Log every SQL statement (placeholders only, never values) at debug level; off unless DEBUG_SQL. */
  debugSql: boolean;
}

export class ConfigError extends Error {
  override name = 'ConfigError';
}

const bool = (fallback: boolean) =>
  z
    .enum(['true', 'false', '1', '0', 'yes', 'no', ''], { error: 'use true or false' })
    .optional()
    .transform((v) => (v === undefined || v === '' ? fallback : v === 'true' || v === '1' || v === 'yes'));

const int = (fallback: number, min: number, max: number) =>
  z
    .string()
    .optional()
    .transform((v, ctx) => {
      if (v === undefined || v.trim() === '') return fallback;
      const n = Number(v);
      if (!Number.isInteger(n) || n < min || n > max) {
        ctx.addIssue({ code: 'custom', message: `use a whole number from ${min} to ${max}` });
        return z.NEVER;
      }
      return n;
    });

const str = (fallback: string) =>
  z
    .string()
    .optional()
    .transform((v) => (v === undefined || v.trim() === '' ? fallback : v.trim()));

function mailCaptureFile(setting: string, databasePath: string): string {
  if (setting === 'none' || setting === 'off') return '';
  if (setting !== '') return setting;
  if (databasePath === ':memory:') return '';
  return join(dirname(databasePath), 'captured-mail.jsonl');
}

const DEFAULT_DEMO_PASSWORD = 'workbench-demo';

/** Reads and validates the configuration. Throws `ConfigError` with one line per bad variable. */
export function loadConfig(env: Record<string, string | undefined>): Config {
  const nodeEnvRaw = (env['NODE_ENV'] ?? '').trim() || 'development';
  if (!['development', 'production', 'test'].includes(nodeEnvRaw)) {
    throw new ConfigError(`NODE_ENV must be development, production or test (got "${nodeEnvRaw}").`);
  }
  const nodeEnv = nodeEnvRaw as Config['env'];
  const production = nodeEnv === 'production';

  const schema = z.object({
    PORT: int(4300, 0, 65535),
    HOST: str('127.0.0.1'),
    PUBLIC_URL: str('').pipe(z.union([z.literal(''), z.url({ error: 'use an absolute http(s) URL' })])),
    DATABASE_PATH: str('data/noisewright.sqlite'),
    JWT_SECRET: str(''),
    JWT_TTL_SECONDS: int(7 * 24 * 3600, 60, 365 * 24 * 3600),
    BCRYPT_COST: int(10, production ? 10 : 4, 15),
    SMTP_HOST: str('127.0.0.1'),
    SMTP_PORT: int(2526, 0, 65535),
    SMTP_USER: str(''),
    SMTP_PASS: str(''),
    SMTP_SECURE: bool(false),
    MAIL_FROM: str('Noisewright <no-reply@noisewright.local>'),
    MAIL_CAPTURE: bool(!production),
    MAIL_CAPTURE_FILE: str(''),
    SEED_DEMO: bool(!production),
    DEMO_PASSWORD: str(DEFAULT_DEMO_PASSWORD),
    MAX_UPLOAD_BYTES: int(5 * 1024 * 1024, 1024, 1024 * 1024 * 1024),
    UPLOAD_TEMP_DIR: str(''),
    MAX_CHECKPOINT_BYTES: int(20 * 1024 * 1024, 1024, 1024 * 1024 * 1024),
    JSON_BODY_LIMIT_BYTES: int(2 * 1024 * 1024, 1024, 1024 * 1024 * 1024),
    AUTH_RATE_LIMIT: int(20, 1, 1_000_000),
    AUTH_RATE_WINDOW_MS: int(15 * 60 * 1000, 1, 24 * 3600 * 1000),
    STATIC_DIR: str('dist/noisewright/browser'),
    TRUST_PROXY_HOPS: int(0, 0, 10),
    QUEUE_URL: str('').pipe(z.union([z.literal(''), z.string().regex(/^rediss?:\/\/\S+$/, 'use a Redis URL such as redis://127.0.0.1:6379')])),
    RUNNER_THREADS: int(nodeEnv === 'test' ? 0 : Math.max(1, availableParallelism() - 1), 0, 256),
    ADMIN_EMAIL: str('').pipe(z.union([z.literal(''), z.email({ error: 'use an e-mail address' })])),
    INVITE_RATE_LIMIT: int(20, 1, 1_000_000),
    INVITE_BENCH_RATE_LIMIT: int(50, 1, 1_000_000),
    INVITE_ADDRESS_RATE_LIMIT: int(3, 1, 1_000_000),
    INVITE_RATE_WINDOW_MS: int(3600 * 1000, 1, 24 * 3600 * 1000),
    WORKER_THREADS: int(0, 0, 256),
    WORKER_QUEUE_LIMIT: int(200, 1, 100_000),
    API_CONCURRENCY: int(8, 1, 10_000),
    LOG_LEVEL: z
      .enum(['', 'fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'], { error: 'use fatal, error, warn, info, debug, trace or silent' })
      .optional()
      .transform((v) => (v ? v : nodeEnv === 'test' ? 'silent' : 'info')),
    DEBUG_SQL: bool(false),
  });
  const parsed = schema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => `${issue.path.join('.')}: ${issue.message}`);
    throw new ConfigError(`Invalid configuration:\n  ${lines.join('\n  ')}`);
  }
  const e = parsed.data;

  if (production && e.JWT_SECRET.length < 32) {
    throw new ConfigError(
      'JWT_SECRET is required in production: set it to a random string of at least 32 characters ' +
        '(for example the output of `openssl rand -hex 32`).',
    );
  }
  if (production && e.MAIL_CAPTURE) {
    throw new ConfigError('MAIL_CAPTURE must be false in production: point SMTP_HOST/SMTP_PORT at a real mail host.');
  }
  if (production && e.SEED_DEMO && e.DEMO_PASSWORD === DEFAULT_DEMO_PASSWORD) {
    throw new ConfigError('SEED_DEMO in production needs its own DEMO_PASSWORD (the default one is public).');
  }

  return {
    env: nodeEnv,
    devMode: !production,
    port: e.PORT,
    host: e.HOST,
    publicUrl: (e.PUBLIC_URL || `http://localhost:${e.PORT || 4300}`).replace(/\/+$/, ''),
    publicUrlSet: e.PUBLIC_URL !== '',
    databasePath: e.DATABASE_PATH,
    jwtSecret: e.JWT_SECRET || randomBytes(32).toString('hex'),
    jwtTtlSeconds: e.JWT_TTL_SECONDS,
    bcryptCost: e.BCRYPT_COST,
    smtp: {
      host: e.SMTP_HOST,
      port: e.SMTP_PORT,
      user: e.SMTP_USER || undefined,
      pass: e.SMTP_PASS || undefined,
      secure: e.SMTP_SECURE,
    },
    mailFrom: e.MAIL_FROM,
    mailCapture: e.MAIL_CAPTURE,
    mailCaptureFile: mailCaptureFile(e.MAIL_CAPTURE_FILE, e.DATABASE_PATH),
    seedDemo: e.SEED_DEMO,
    demoEmail: 'demo@noisewright.local',
    demoPassword: e.DEMO_PASSWORD,
    maxUploadBytes: e.MAX_UPLOAD_BYTES,
    uploadTempDir: e.UPLOAD_TEMP_DIR || tmpdir(),
    maxCheckpointBytes: e.MAX_CHECKPOINT_BYTES,
    jsonBodyLimitBytes: e.JSON_BODY_LIMIT_BYTES,
    authRateLimit: { max: e.AUTH_RATE_LIMIT, windowMs: e.AUTH_RATE_WINDOW_MS },
    staticDir: e.STATIC_DIR,
    trustProxyHops: e.TRUST_PROXY_HOPS,
    queueUrl: e.QUEUE_URL || null,
    runnerThreads: e.RUNNER_THREADS,
    adminEmail: e.ADMIN_EMAIL.toLowerCase(),
    inviteRateLimit: {
      perSender: e.INVITE_RATE_LIMIT,
      perBench: e.INVITE_BENCH_RATE_LIMIT,
      perAddress: e.INVITE_ADDRESS_RATE_LIMIT,
      windowMs: e.INVITE_RATE_WINDOW_MS,
    },
    // One core stays free for the event loop.
    workerThreads: e.WORKER_THREADS || Math.max(1, availableParallelism() - 1),
    workerQueueLimit: e.WORKER_QUEUE_LIMIT,
    apiConcurrency: e.API_CONCURRENCY,
    logLevel: e.LOG_LEVEL as Config['logLevel'],
    debugSql: e.DEBUG_SQL,
  };
}
