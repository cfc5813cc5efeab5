/**
 * One claimed evaluation, computed as the tab computes it: the checkpoint, the corpus (as the tab's training set)
 * and the GRU baseline's newest checkpoint come through the runner routes, the figures from `runEvaluationJob`
 * (shared/training/evaluation-job.ts, the evaluation worker's own job) with the request's settings, and go back
 * through `POST /evaluations/:id/result`, where the tab's checks apply. Stages go to `onStage` (the runner's main
 * thread reports them and so keeps the lease: the computation itself blocks this thread). Runs in a worker thread.
 */
import type { EvaluationStage, RunnerEvaluationJob } from '../shared/api/evaluation-jobs';
import { toReportSettings } from '../shared/api/evaluations';
import { runEvaluationJob } from '../shared/training/evaluation-job';
import { RunnerApiError, type RunnerApi } from './runner-api';
import type { JobResult } from './train-job';

/** Codes after which this runner must leave the request alone. */
const LOST_CODES = new Set(['RUN_NOT_HELD', 'RUNNER_REVOKED', 'UNAUTHORIZED', 'NOT_SIGNED_IN']);
const isLost = (e: unknown) => e instanceof RunnerApiError && (LOST_CODES.has(e.code) || e.status === 401);

export async function evaluateJob(job: RunnerEvaluationJob, api: RunnerApi, onStage: (stage: EvaluationStage) => void): Promise<JobResult> {
  const id = job.requestId;
  const ended = (status: JobResult['status'], reason: string | null): JobResult => ({ runId: id, status, step: 0, reason });
  let results;
  try {
    onStage({ done: 0, total: 1, next: 'loading the checkpoint and the corpus' });
    const [checkpoint, corpus, gruCheckpoint] = await Promise.all([
      api.evaluationCheckpoint(id),
      api.evaluationTrainingSet(id),
      job.settings.baselineRunId ? api.evaluationBaseline(id) : Promise.resolve(null),
    ]);
    results = runEvaluationJob({
      checkpoint, corpus, split: job.split, heldOutSplit: job.settings.heldOutSplit, ngramOrder: job.settings.ngramOrder,
      settings: toReportSettings(job.settings), gruCheckpoint,
    }, (done, total, next) => onStage({ done, total, next }));
  } catch (e) {
    if (isLost(e)) return ended('lost', (e as Error).message);
    // A network failure gives the request back (another runner starts it again); a 404 (the checkpoint or the
    // baseline's is gone) and anything the computation throws (a corpus character the model never saw, an empty
    // split) fail it with the sentence that says why.
    const network = e instanceof RunnerApiError && (e.status === 0 || e.status >= 500);
    const reason = ((e as Error).message || 'The evaluation failed without a message.').slice(0, 500);
    await api.endEvaluation(id, network ? { status: 'waiting' } : { status: 'failed', reason }).catch(() => undefined);
    return ended(network ? 'queued' : 'failed', reason);
  }
  onStage({ done: 1, total: 1, next: 'saving the figures' });
  try {
    await api.evaluationResult(id, { results });
    return ended('finished', null);
  } catch (e) {
    if (isLost(e)) return ended('lost', (e as Error).message);
    const network = e instanceof RunnerApiError && (e.status === 0 || e.status >= 500);
    const reason = `The server did not take the figures: ${(e as Error).message}`.slice(0, 500);
    await api.endEvaluation(id, network ? { status: 'waiting' } : { status: 'failed', reason }).catch(() => undefined);
    return ended(network ? 'queued' : 'failed', reason);
  }
}
