/**
 * The BullMQ back-end (QUEUE_URL=redis://...): one job per run waiting for a runner, in the queue
 * `noisewright-runs`, job name `train`, job id = run id (so adding a run twice adds one job), 20 attempts with
 * exponential back-off from 2 s, removed when done. Fairness: the job's priority is 1 + the bench's runner runs
 * already waiting, so a bench's single run goes before the 2nd..100th cell of another bench's grid.
 */
import { Queue } from 'bullmq';
import { Redis } from 'ioredis';
import {
  RUNNER_JOB_ATTEMPTS,
  RUNNER_JOB_BACKOFF_MS,
  RUNNER_JOB_NAME,
  RUNNER_QUEUE_NAME,
  type RunnerQueueJobData,
} from '../../../../shared/api/runner-jobs';
import { EVALUATION_JOB_NAME, type EvaluationQueueJobData } from '../../../../shared/api/evaluation-jobs';
import type { QueuedRun, RunQueue } from './run-queue';

/** BullMQ's largest priority. */
const MAX_PRIORITY = 2_097_151;

export class BullmqRunQueue implements RunQueue {
  readonly backend = 'bullmq' as const;
  private readonly connection: Redis;
  readonly queue: Queue<RunnerQueueJobData>;

  constructor(url: string) {
    // BullMQ needs maxRetriesPerRequest: null on the connections it blocks on; the queue side fails fast instead.
    this.connection = new Redis(url, { maxRetriesPerRequest: 3, lazyConnect: false });
    this.queue = new Queue<RunnerQueueJobData>(RUNNER_QUEUE_NAME, { connection: this.connection });
  }

  async enqueue(runs: readonly QueuedRun[]): Promise<void> {
    if (runs.length === 0) return;
    await this.queue.addBulk(
      runs.map((r) => ({
        name: RUNNER_JOB_NAME,
        data: { runId: r.runId, benchId: r.benchId },
        opts: {
          jobId: r.runId,
          priority: Math.min(MAX_PRIORITY, Math.max(1, r.priority)),
          attempts: RUNNER_JOB_ATTEMPTS,
          backoff: { type: 'exponential', delay: RUNNER_JOB_BACKOFF_MS },
          removeOnComplete: true,
          removeOnFail: true,
        },
      })),
    );
  }

  /** Evaluation jobs beside the training jobs (job name `evaluate`, job id = request id, priority 1: they are short). */
  async enqueueEvaluations(requests: readonly EvaluationQueueJobData[]): Promise<void> {
    if (requests.length === 0) return;
    await this.queue.addBulk(
      requests.map((r) => ({
        name: EVALUATION_JOB_NAME,
        data: { runId: r.runId, benchId: r.benchId, requestId: r.requestId },
        opts: {
          jobId: r.requestId, priority: 1, attempts: RUNNER_JOB_ATTEMPTS, backoff: { type: 'exponential', delay: RUNNER_JOB_BACKOFF_MS },
          removeOnComplete: true, removeOnFail: true,
        },
      })),
    );
  }

  evaluationJobsFor(requestIds: readonly string[]): Promise<Set<string>> {
    return this.jobsWaitingFor(requestIds);
  }

  async withdraw(runId: string): Promise<void> {
    const job = await this.queue.getJob(runId);
    if (!job) return;
    const state = await job.getState();
    // An active job is locked by its runner; the runner's next claim or progress call learns the run is gone.
    if (state === 'waiting' || state === 'prioritized' || state === 'delayed' || state === 'completed' || state === 'failed') {
      await job.remove().catch(() => undefined);
    }
  }

  async jobsWaitingFor(runIds: readonly string[]): Promise<Set<string>> {
    const found = new Set<string>();
    for (const id of runIds) {
      const job = await this.queue.getJob(id);
      if (!job) continue;
      const state = await job.getState();
      if (state !== 'completed' && state !== 'failed' && state !== 'unknown') found.add(id);
    }
    return found;
  }

  async close(): Promise<void> {
    await this.queue.close();
    await this.connection.quit().catch(() => this.connection.disconnect());
  }
}
