/**
 * Runs one evaluation for the page: fetches the checkpoint, the corpus's training set and the baseline's newest
 * checkpoint, computes every figure in the worker (progress via callback), and stores the result on the server.
 * The held-out split and the n-gram baseline order come from the chosen settings and are stored with them.
 */
import { evaluationSettingsSchema, toReportSettings, type EvaluationDto, type EvaluationSettingsInput } from '../../../../shared/api/evaluations';
import type { RunDto } from '../../../../shared/api/runs';
import type { RunsApi } from '../../runs/runs-api';
import type { EvaluationProgress } from '../../workers/evaluator-api';
import type { EvaluationWorker } from '../evaluation-worker';
import type { EvaluationsApi } from '../evaluations-api';

export interface RunnerDeps { runs: RunsApi; evaluations: EvaluationsApi; worker: EvaluationWorker }

export async function runAndStore(deps: RunnerDeps, benchId: string, run: RunDto, checkpointId: string, input: EvaluationSettingsInput,
                                  onProgress: (p: EvaluationProgress) => void): Promise<EvaluationDto> {
  const settings = evaluationSettingsSchema.parse(input);
  if (!run.corpus) throw new Error('The corpus of this run was deleted; the figures need its words and counts.');
  onProgress({ done: 0, total: 1, next: 'loading the checkpoint and the corpus' });
  const [checkpoint, corpus, gruCheckpoint] = await Promise.all([
    deps.runs.downloadCheckpoint(benchId, run.id, checkpointId),
    deps.runs.trainingSet(benchId, run.corpus.id),
    settings.baselineRunId ? newestCheckpoint(deps.runs, benchId, settings.baselineRunId) : Promise.resolve(null),
  ]);
  const results = await deps.worker.evaluate({
    checkpoint, corpus, split: run.settings.split ?? null, heldOutSplit: settings.heldOutSplit, ngramOrder: settings.ngramOrder,
    settings: toReportSettings(settings), gruCheckpoint,
  }, onProgress);
  onProgress({ done: 1, total: 1, next: 'saving the figures' });
  return deps.evaluations.create(benchId, run.id, checkpointId, { settings, results });
}

async function newestCheckpoint(runs: RunsApi, benchId: string, runId: string): Promise<Uint8Array> {
  const list = await runs.checkpoints(benchId, runId);
  const newest = list.reduce<(typeof list)[number] | null>((a, c) => (!a || c.step > a.step ? c : a), null);
  if (!newest) throw new Error('The chosen GRU baseline has no checkpoint yet; train it first or choose no baseline.');
  return runs.downloadCheckpoint(benchId, runId, newest.id);
}
