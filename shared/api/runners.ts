/**
 * Runners: headless Node processes (or threads of the server) that train and evaluate runs off the tab.
 * This file is the contract between the server, the runner program and the app. The member- and admin-facing
 * parts are fixed; the runner-facing routes (`/api/runner/...`) are owned by the server module and the runner
 * program together and documented in DEVELOPERS.md.
 *
 * Where a run trains is its `placement`:
 *  - `tab`: a web worker of a browser tab trains it (the scheduler of that tab), as before;
 *  - `runners`: the server queues it and a runner trains it; the tab only watches (server-sent events).
 */
import { z } from 'zod';
import type { EvaluationStage } from './evaluation-jobs';
import { safeText } from './safe-text';

export const RUN_PLACEMENTS = ['tab', 'runners'] as const;
export type RunPlacement = (typeof RUN_PLACEMENTS)[number];
export const runPlacementSchema = z.enum(RUN_PLACEMENTS, { error: 'Choose where the run trains: tab (this browser tab) or runners.' });

/** Queue back-end in force on the server: SQLite rows + runner threads in the server (`embedded`) or BullMQ on Redis. */
export type QueueBackend = 'embedded' | 'bullmq';

/** Asks a runner's job to change course; the runner sees it within one progress interval. */
export const RUN_CONTROL_ACTIONS = ['pause', 'resume', 'stop'] as const;
export type RunControlAction = (typeof RUN_CONTROL_ACTIONS)[number];
/** `POST /api/benches/:benchId/runs/:runId/control` (creator or coach+) → `RunDto`. Works for both placements:
 *  for a runner run the server records the request and the runner acts on it (pause/stop save a checkpoint first);
 *  `resume` of a paused or stopped runner run queues it again from its latest checkpoint. */
export const runControlSchema = z
  .object({ action: z.enum(RUN_CONTROL_ACTIONS, { error: 'Choose pause, resume or stop.' }) })
  .strict();
export type RunControlRequest = z.input<typeof runControlSchema>;

/** `POST /api/runners` (admin): a new runner token; the token is in the answer once and stored only hashed. */
export const createRunnerSchema = z
  .object({
    name: safeText('Name the runner, e.g. the machine it runs on.')
      .trim()
      .min(1, 'Name the runner, e.g. the machine it runs on.')
      .max(80, 'Use a runner name of at most 80 characters.'),
  })
  .strict();
export type CreateRunnerRequest = z.input<typeof createRunnerSchema>;

/** A runner as the Runners page shows it (`GET /api/runners`, admin). */
export interface RunnerDto {
  id: string;
  name: string;
  /** `embedded`: threads of this server (no token to manage); `remote`: an `npm run runner` process with a token. */
  kind: 'embedded' | 'remote';
  createdAt: string;
  revokedAt: string | null;
  lastHeartbeatAt: string | null;
  /** Heartbeat within the last 30 s and not revoked. */
  online: boolean;
  /** Threads the runner reported (one job per thread). */
  threads: number | null;
  /** Jobs it holds now. */
  currentJobs: { runId: string; runName: string; benchId: string; benchName: string; step: number; steps: number; stepsPerSecond: number | null }[];
  /** Evaluations it computes now (sent to runners from the evaluation page), with the stage it reported last. */
  currentEvaluations: { requestId: string; runId: string; runName: string; benchId: string; benchName: string; checkpointStep: number; stage: EvaluationStage | null }[];
  /** Training steps per second summed over its current jobs (last heartbeat). */
  stepsPerSecond: number | null;
  jobsDone: number;
}

/** `GET /api/runners` (admin). */
export interface RunnersOverview {
  backend: QueueBackend;
  runners: RunnerDto[];
  /**
   * Runs waiting for a runner / held by one, over all benches; `evaluationsWaiting`: evaluation requests waiting for
   * a runner (sent from the evaluation page, not yet claimed).
   */
  queue: { waiting: number; active: number; evaluationsWaiting: number };
}

/** `POST /api/runners` answer: the token is shown this once. */
export interface CreatedRunner {
  runner: RunnerDto;
  token: string;
}

/** `GET /api/benches/:benchId/runner-status` (viewer+): what the forms need to offer "send to runners". */
export interface RunnerAvailability {
  backend: QueueBackend;
  /** Runners (or embedded threads) online now. */
  onlineRunners: number;
  /** Runner threads online now. */
  onlineThreads: number;
  /** Runs of this bench waiting for a runner / being trained by one. */
  waiting: number;
  active: number;
  /** Whether the caller's role may send runs to runners (member and up). */
  canSend: boolean;
}

/**
 * Live progress of a run trained by a runner, as carried by server-sent events and stored on the run
 * (`RunDto.live`). Figures are costs (bits/char with the end-of-word symbol counted; lower is better).
 */
export interface RunLiveProgress {
  step: number;
  steps: number;
  stepsPerSecond: number | null;
  etaSeconds: number | null;
  bitsPerChar: number | null;
  /** False for a warm-up figure that is not a bound; true for a bound; null for exact figures (GRU, n-gram). */
  isBound: boolean | null;
  runnerName: string | null;
  updatedAt: string;
}

/**
 * Server-sent events.
 *  - `GET /api/benches/:benchId/runs/:runId/events` (viewer+): events `run` (data: RunDto, on every status or
 *    summary change), `progress` (data: RunLiveProgress), `metrics` (data: { points: {series, step, value}[] }).
 *  - `GET /api/benches/:benchId/events` (viewer+): event `run` (data: RunDto) for every run of the bench whose
 *    status, steps or summary changed (grid and run-list pages).
 *  - both: event `deleted` (data: RunDeletedEvent) when a person deletes a run of the bench.
 * Both send a comment line `: keep-alive` every 15 s. They take the usual `Authorization: Bearer` header, so the
 * app reads them with `fetch` and a stream reader (EventSource cannot send headers); polling is the fallback.
 */
export type RunEventName = 'run' | 'progress' | 'metrics' | 'deleted';

/**
 * Event `deleted` (both streams): the run is gone (its points and checkpoints with it). Sent once, when a person
 * deletes it; open pages drop it from their lists, and its own page says so.
 */
export interface RunDeletedEvent {
  id: string;
  benchId: string;
  name: string;
  /** Display name of who deleted it. */
  deletedBy: string;
}
