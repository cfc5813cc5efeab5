/**
 * Evaluations sent to runners instead of computed in the tab. A person asks for one (`POST .../checkpoints/
 * :checkpointId/evaluation-requests` with the settings of the evaluation form); the request waits as a row until a
 * runner claims it (`POST /api/runner/evaluations/claim`), reads the checkpoint and the corpus through the runner
 * routes, computes the figures with shared/training/evaluation-job.ts (as the tab does) and posts them
 * (`POST /api/runner/evaluations/:requestId/result`), where they go through the same checks as a tab's figures
 * and are stored as an ordinary evaluation. Leases, tokens and the BullMQ queue are the training runners' own
 * (shared/api/runner-jobs.ts): job name `evaluate`, job id = request id, job data `EvaluationQueueJobData`.
 * Framework-free: shared by the server, the runner and the page.
 */
import { z } from 'zod';
import { evaluationResultsSchema, evaluationSettingsSchema, type StoredEvaluationSettings } from './evaluations';
import type { RunFamily } from './runs';

/** BullMQ job name of an evaluation (in the queue of runner runs, beside `train`). */
export const EVALUATION_JOB_NAME = 'evaluate';

/** Data of a BullMQ `evaluate` job (`jobId` = `requestId`; `runId` is the evaluated run). */
export interface EvaluationQueueJobData {
  runId: string;
  benchId: string;
  requestId: string;
}

/** `waiting` for a runner (also after a runner stopped answering), `running` under a lease, then `finished` or `failed`. */
export const EVALUATION_REQUEST_STATUSES = ['waiting', 'running', 'finished', 'failed'] as const;
export type EvaluationRequestStatus = (typeof EVALUATION_REQUEST_STATUSES)[number];

/** How far the runner got: stages done of the stages of the evaluation, and the next one's name. */
export interface EvaluationStage {
  done: number;
  total: number;
  next: string;
}

/** `POST /api/benches/:benchId/runs/:runId/checkpoints/:checkpointId/evaluation-requests`. */
export const createEvaluationRequestSchema = z.object({ settings: evaluationSettingsSchema }).strict();
export type CreateEvaluationRequest = z.input<typeof createEvaluationRequestSchema>;

/** One evaluation request as the page sees it; `evaluationId` is set once the figures are stored. */
export interface EvaluationRequestDto {
  id: string;
  benchId: string;
  runId: string;
  checkpoint: { id: string | null; step: number };
  settings: StoredEvaluationSettings;
  status: EvaluationRequestStatus;
  /** Why it failed, or why it waits again (its runner stopped answering). */
  statusReason: string | null;
  runnerName: string | null;
  stage: EvaluationStage | null;
  evaluationId: string | null;
  createdBy: { id: string; displayName: string } | null;
  createdAt: string;
  updatedAt: string;
}

const requestId = z.string({ error: 'Give the evaluation request id.' }).uuid('Give the id of an evaluation request.');

/** `POST /api/runner/evaluations/claim`: BullMQ mode sends the job's request id; embedded mode sends none (oldest first). */
export const runnerEvaluationClaimSchema = z.object({ requestId: requestId.optional() }).strict();
export type RunnerEvaluationClaimRequest = z.input<typeof runnerEvaluationClaimSchema>;

/** `POST /api/runner/evaluations/claim` → 200: the evaluation to compute (204 when none waits). */
export interface RunnerEvaluationJob {
  requestId: string;
  benchId: string;
  runId: string;
  runName: string;
  family: RunFamily;
  checkpoint: { id: string; step: number };
  settings: StoredEvaluationSettings;
  /** The run's own split (the tab passes the same); null = the corpus's stored split. */
  split: { seed: number; shares: { train: number; validation: number; test: number } } | null;
  leaseSeconds: number;
  progressEverySeconds: number;
}

/** `POST /api/runner/evaluations/:requestId/progress` → `{ ok: true }`: renews the lease, shows the stage on the page. */
export const runnerEvaluationProgressSchema = z
  .object({
    done: z.number({ error: 'Give the stages done as a number.' }).int('Give the stages done as a whole number.').min(0, 'Give 0 or more stages done.').max(1000, 'Give at most 1000 stages done.'),
    total: z.number({ error: 'Give the number of stages.' }).int('Give the number of stages as a whole number.').min(1, 'Give at least 1 stage.').max(1000, 'Give at most 1000 stages.'),
    next: z.string({ error: 'Name the next stage.' }).trim().max(120, 'Keep the stage name to 120 characters.'),
  })
  .strict();
export type RunnerEvaluationProgressRequest = z.input<typeof runnerEvaluationProgressSchema>;

/** `POST /api/runner/evaluations/:requestId/result` → 201 `{ evaluationId }`; the checks of a tab's figures apply (422 otherwise, nothing stored). */
export const runnerEvaluationResultSchema = z.object({ results: evaluationResultsSchema }).strict();
export type RunnerEvaluationResultRequest = z.input<typeof runnerEvaluationResultSchema>;
export interface RunnerEvaluationResultAnswer {
  evaluationId: string;
}

/**
 * `POST /api/runner/evaluations/:requestId/end` → `{ ok: true }`: `failed` with the reason (the figures cannot be
 * computed: say why in one sentence), or `waiting` = the runner shuts down and gives the request back.
 */
export const runnerEvaluationEndSchema = z
  .object({
    status: z.enum(['failed', 'waiting'], { error: 'Choose a status: failed or waiting.' }),
    reason: z.string({ error: 'Give the reason as text.' }).trim().max(500, 'Keep the reason to 500 characters.').optional(),
  })
  .strict()
  .refine((b) => b.status !== 'failed' || (b.reason ?? '').length > 0, { message: 'Say why the evaluation failed in reason (one sentence).', path: ['reason'] });
export type RunnerEvaluationEndRequest = z.input<typeof runnerEvaluationEndSchema>;
