/**
 * The runner-facing routes (`/api/runner/...`): what a runner program (or an embedded runner thread of the
 * server) sends and gets back. Runners authenticate with a runner token (`Authorization: Bearer nwr_...`) and
 * may touch only the run(s) they hold under a lease. Framework-free: shared by the server and the runner.
 *
 * Queue: name `noisewright-runs`, job name `train`, job data `RunnerQueueJobData`, job id = run id.
 */
import { z } from 'zod';
import { runSummarySchema, metricPointSchema, checkpointUploadQuerySchema, type RunFamily, type RunSettings } from './runs';

/** Runner tokens: `nwr_` + 43 url-safe base64 characters (32 random bytes). */
export const RUNNER_TOKEN_PREFIX = 'nwr_';
export const RUNNER_TOKEN_PATTERN = /^nwr_[A-Za-z0-9_-]{43}$/;

/** BullMQ queue and job names, and the job options the server adds jobs with. */
export const RUNNER_QUEUE_NAME = 'noisewright-runs';
export const RUNNER_JOB_NAME = 'train';
export const RUNNER_JOB_ATTEMPTS = 20;
export const RUNNER_JOB_BACKOFF_MS = 2000;
/** Worker options the runner uses with BullMQ. */
export const RUNNER_WORKER_LOCK_MS = 30_000;
export const RUNNER_WORKER_STALLED_INTERVAL_MS = 15_000;
export const RUNNER_WORKER_MAX_STALLED = 10;

/** A claim holds a run for this long; every heartbeat and progress call renews it. */
export const RUNNER_LEASE_SECONDS = 45;
/** A runner reports progress at least this often (controls reach it through the answer). */
export const RUNNER_PROGRESS_EVERY_SECONDS = 2;
/** A runner sends a heartbeat at least this often. */
export const RUNNER_HEARTBEAT_EVERY_SECONDS = 10;
/** A runner counts as online when its last heartbeat is at most this old. */
export const RUNNER_ONLINE_SECONDS = 30;

/** Error codes of the runner routes (besides the common ones of errors.ts). */
export const RunnerErrorCode = {
  /** 401: the runner token was revoked by an admin. */
  RunnerRevoked: 'RUNNER_REVOKED',
  /** 409: the run is held by another runner (or by none): this runner may not read or write it. */
  RunNotHeld: 'RUN_NOT_HELD',
  /** 409 on claim: another runner's lease on the run is fresh; the body's `error.retryAfterSeconds` says when to retry. */
  RunHeld: 'RUN_HELD',
  /** 409 on claim: the run no longer waits for a runner (paused, stopped, finished, deleted or placed in a tab). */
  RunNotQueued: 'RUN_NOT_QUEUED',
} as const;
export type RunnerErrorCode = (typeof RunnerErrorCode)[keyof typeof RunnerErrorCode];

/** Data of a BullMQ job (`jobId` = `runId`). */
export interface RunnerQueueJobData {
  runId: string;
  benchId: string;
}

const whole = (name: string, min: number, max: number) =>
  z
    .number({ error: `Give ${name} as a number.` })
    .int(`Give ${name} as a whole number.`)
    .min(min, `Give ${name} of at least ${min}.`)
    .max(max, `Give ${name} of at most ${max}.`);

const rate = z
  .number({ error: 'Give steps per second as a number or null.' })
  .min(0, 'Give steps per second of 0 or more.')
  .max(1e9, 'Give steps per second of at most 1000000000.')
  .refine(Number.isFinite, 'Give steps per second as a finite number.')
  .nullable();

const runId = z.string({ error: 'Give the run id.' }).uuid('Give the id of a run.');

/** `POST /api/runner/heartbeat` (every ≤ 10 s): renews the leases of the listed runs. */
export const runnerHeartbeatSchema = z
  .object({
    name: z.string().trim().min(1, 'Give a runner name of at least 1 character.').max(80, 'Use a runner name of at most 80 characters.').optional(),
    threads: whole('the number of threads', 0, 256),
    jobs: z
      .array(z.object({ runId, step: whole('the step', 0, 1e9), stepsPerSecond: rate }).strict(), { error: 'Send jobs as a list (empty when idle).' })
      .max(256, 'Send at most 256 jobs.'),
  })
  .strict();
export type RunnerHeartbeatRequest = z.input<typeof runnerHeartbeatSchema>;

/** A control the runner must act on (saving a checkpoint first). */
export interface RunnerControl {
  runId: string;
  action: 'pause' | 'stop';
}
export interface RunnerHeartbeatAnswer {
  controls: RunnerControl[];
}

/** The longest a claim may wait for work (`waitSeconds`); a runner's HTTP timeout for the claim must exceed its wait. */
export const RUNNER_CLAIM_MAX_WAIT_SECONDS = 25;

/**
 * `POST /api/runner/claim`: BullMQ mode sends the job's run id; embedded mode sends none (the server picks fairly).
 * `waitSeconds` (whole number 0–25, only without `runId`): when nothing can be claimed, the server holds the answer
 * until a run becomes queued for runners or an evaluation request starts waiting (then it claims again and answers
 * with what that gives: 200 with the job, or 204 — e.g. when the new work was an evaluation, which the runner
 * claims through `/evaluations/claim`), until the wait ends (204), or until the server shuts down (204). Without it
 * (or 0) the claim answers at once, as before.
 */
export const runnerClaimSchema = z
  .object({
    runId: runId.optional(),
    waitSeconds: z
      .number({ error: 'Give waitSeconds as a number of seconds.' })
      .int('Give waitSeconds as a whole number of seconds.')
      .min(0, 'Give waitSeconds of 0 or more.')
      .max(RUNNER_CLAIM_MAX_WAIT_SECONDS, `Give waitSeconds of at most ${RUNNER_CLAIM_MAX_WAIT_SECONDS}.`)
      .optional(),
  })
  .strict()
  .refine((b) => b.runId === undefined || b.waitSeconds === undefined, {
    path: ['waitSeconds'],
    error: 'Send waitSeconds only without a runId: a claim of a named run answers at once.',
  });
export type RunnerClaimRequest = z.input<typeof runnerClaimSchema>;

/** `POST /api/runner/claim` → 200: the job to train (204 when there is nothing to do). */
export interface RunnerJob {
  runId: string;
  benchId: string;
  runName: string;
  family: RunFamily;
  settings: RunSettings;
  /** Characters without the end-of-word symbol (id i = alphabet[i-1]). */
  alphabet: string[];
  stepsDone: number;
  /** Latest checkpoint to resume from (fetch with `GET /jobs/:runId/checkpoint`); metric points after its step were removed. */
  checkpoint: { id: string; step: number } | null;
  leaseSeconds: number;
  progressEverySeconds: number;
}

/** 409 `RUN_HELD` body: `{ error: { code, message, retryAfterSeconds } }`. */
export interface RunHeldErrorBody {
  error: { code: 'RUN_HELD'; message: string; retryAfterSeconds: number };
}

/** `POST /api/runner/jobs/:runId/progress`: sets status `training` on the first call; renews the lease. */
export const runnerProgressSchema = z
  .object({
    step: whole('the step', 0, 1e9),
    steps: whole('the number of steps', 0, 1e9),
    stepsPerSecond: rate,
    bitsPerChar: z.number({ error: 'Give bits per character as a number or null.' }).refine(Number.isFinite, 'Give a finite bits per character.').nullable(),
    /** False for a warm-up figure that is not a bound; true for a bound; null for exact figures (GRU, n-gram). */
    isBound: z.boolean({ error: 'Give isBound as true, false or null.' }).nullable(),
    summary: runSummarySchema.optional(),
  })
  .strict();
export type RunnerProgressRequest = z.input<typeof runnerProgressSchema>;
export interface RunnerProgressAnswer {
  action: 'continue' | 'pause' | 'stop';
}

/** `POST /api/runner/jobs/:runId/metrics` → 201 `{ stored }` (idempotent by run, series and step). */
export const runnerMetricsSchema = z.object({ points: z.array(metricPointSchema, { error: 'Send points as a list.' }).min(1, 'Send at least one point.') }).strict();
export type RunnerMetricsRequest = z.input<typeof runnerMetricsSchema>;
export interface RunnerMetricsAnswer {
  stored: number;
}

/** `POST /api/runner/jobs/:runId/checkpoints?reason=&boundBitsPerChar=` (octet-stream body) → 201 CheckpointDto. */
export const runnerCheckpointQuerySchema = checkpointUploadQuerySchema;

export const RUNNER_FINISH_STATUSES = ['finished', 'paused', 'stopped', 'failed', 'queued'] as const;
export type RunnerFinishStatus = (typeof RUNNER_FINISH_STATUSES)[number];

/**
 * `POST /api/runner/jobs/:runId/finish` → `{ ok: true }`; releases the lease. `queued` = the runner shuts down
 * and gives the run back (another runner resumes it from the latest checkpoint).
 */
export const runnerFinishSchema = z
  .object({
    status: z.enum(RUNNER_FINISH_STATUSES, { error: `Choose a status: ${RUNNER_FINISH_STATUSES.join(', ')}.` }),
    statusReason: z.string().trim().max(500, 'Keep the reason to 500 characters.').nullable().optional(),
    stepsDone: whole('the steps done', 0, 1e9),
    summary: runSummarySchema.optional(),
  })
  .strict()
  .refine((b) => b.status !== 'failed' || (b.statusReason ?? '').trim().length > 0, {
    message: 'Say why the run failed in statusReason (one sentence).',
    path: ['statusReason'],
  });
export type RunnerFinishRequest = z.input<typeof runnerFinishSchema>;
export interface RunnerFinishAnswer {
  ok: true;
}
