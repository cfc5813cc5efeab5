/**
 * The queue of runs waiting for a runner, behind one small interface with two back-ends chosen by
 * configuration (server/modules/runners/queue/create-run-queue.ts):
 *  - `embedded` (no QUEUE_URL): the waiting runs are rows of SQLite (`runs.placement = 'runners'`, status
 *    `queued`); runners claim without a run id and the server picks fairly (runner-claims.ts). Nothing to add.
 *  - `bullmq` (QUEUE_URL=redis://...): one BullMQ job per waiting run (job id = run id), consumed by any number
 *    of runner processes, which claim the job's run by id.
 */
import type { EvaluationQueueJobData } from '../../../../shared/api/evaluation-jobs';
import type { QueueBackend } from '../../../../shared/api/runners';

export interface QueuedRun {
  runId: string;
  benchId: string;
  /** 1 + the bench's runner runs already waiting (BullMQ runs lower priorities first). */
  priority: number;
}

export interface RunQueue {
  readonly backend: QueueBackend;
  /** Runs that became `queued` for runners (create, resume, requeue), after their rows are written. */
  enqueue(runs: readonly QueuedRun[]): Promise<void>;
  /** A run that no longer waits (paused, stopped, deleted): drop its job if it is still waiting. */
  withdraw(runId: string): Promise<void>;
  /** Jobs the queue holds for these run ids (BullMQ), or null when the rows are the queue (embedded). */
  jobsWaitingFor(runIds: readonly string[]): Promise<Set<string> | null>;
  close(): Promise<void>;
  /** Evaluation requests that wait for a runner (created, or given back): BullMQ `evaluate` jobs, job id = request id. */
  enqueueEvaluations(requests: readonly EvaluationQueueJobData[]): Promise<void>;
  /** Evaluation jobs the queue holds for these request ids (BullMQ), or null when the rows are the queue (embedded). */
  evaluationJobsFor(requestIds: readonly string[]): Promise<Set<string> | null>;
}

/** The embedded back-end: the rows are the queue, so adding and withdrawing are no-ops. */
export class EmbeddedRunQueue implements RunQueue {
  readonly backend = 'embedded' as const;
  async enqueue(): Promise<void> {}
  async withdraw(): Promise<void> {}
  async jobsWaitingFor(): Promise<null> {
    return null;
  }
  async close(): Promise<void> {}
  async enqueueEvaluations(): Promise<void> {}
  async evaluationJobsFor(): Promise<null> {
    return null;
  }
}
