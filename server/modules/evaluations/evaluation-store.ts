/**
 * The checks and the write behind every stored evaluation, whether its figures were computed in a tab (or by
 * `npm run evaluate`, `POST .../evaluations`) or by a runner (`POST /api/runner/evaluations/:id/result`): the
 * figures are of the run's family, the baseline run is of the bench, and one evaluation per checkpoint and
 * settings (the stored one is returned instead). Nothing is written when a check fails.
 */
import type { EntityManager } from '@mikro-orm/core';
import { ErrorCode } from '../../../shared/api/errors';
import type { EvaluationExistsBody, EvaluationResults, StoredEvaluationSettings } from '../../../shared/api/evaluations';
import { validationFailed } from '../../http-error';
import { ActivityRepository } from '../activity/activity.repository';
import type { Bench } from '../benches/bench.entity';
import type { Checkpoint } from '../runs/checkpoint.entity';
import { Run } from '../runs/run.entity';
import type { User } from '../users/user.entity';
import type { Evaluation } from './evaluation.entity';
import { EvaluationRepository, toEvaluationDto } from './evaluation.repository';

export interface EvaluationToStore {
  bench: Bench;
  run: Run;
  checkpoint: Checkpoint;
  by: User | null;
  settings: StoredEvaluationSettings;
  results: EvaluationResults;
  at: Date;
  /** Said after "stored an evaluation ..." in the bench's activity (e.g. who computed it). */
  note?: string;
}

/** 422 when the settings name a baseline run of another bench (or none that exists). */
export async function checkBaselineRun(em: EntityManager, bench: Bench, settings: StoredEvaluationSettings): Promise<void> {
  if (!settings.baselineRunId) return;
  const baseline = await em.findOne(Run, { id: settings.baselineRunId, bench });
  if (!baseline) throw validationFailed({ 'settings.baselineRunId': 'Choose a baseline run of this bench; this one does not exist here.' });
}

/**
 * Checks and stores (flushing); `existing` when the checkpoint was evaluated with the same settings already
 * (then nothing is written). 422 with the field to fix otherwise.
 */
export async function storeEvaluation(em: EntityManager, e: EvaluationToStore): Promise<{ evaluation: Evaluation; existing: boolean }> {
  const family = e.results.family;
  if (family !== e.run.family) {
    throw validationFailed({ 'results.family': `These figures are of a ${family} model, but "${e.run.name}" is a ${e.run.family} run; evaluate this run's checkpoint.` });
  }
  await checkBaselineRun(em, e.bench, e.settings);
  const evaluations = new EvaluationRepository(em);
  const found = await evaluations.findSame(e.checkpoint, e.settings);
  if (found) return { evaluation: found, existing: true };
  const evaluation = evaluations.create({ bench: e.bench, run: e.run, checkpoint: e.checkpoint, createdBy: e.by, settings: e.settings, results: e.results, at: e.at });
  const who = e.by?.displayName ?? 'Someone';
  new ActivityRepository(em).record(e.bench, e.by, 'evaluation.stored',
    `${who} stored an evaluation of "${e.run.name}" at step ${e.checkpoint.step} (K = ${e.settings.K})${e.note ? ` ${e.note}` : ''}.`, e.at);
  await em.flush();
  return { evaluation, existing: false };
}

/** The 409 answer when the checkpoint was already evaluated with the same settings: the stored figures in `existing`. */
export function evaluationExistsBody(checkpointStep: number, stored: Evaluation): EvaluationExistsBody {
  return {
    error: {
      code: ErrorCode.EvaluationExists as 'EVALUATION_EXISTS',
      message: `This checkpoint was already evaluated with the same settings (step ${checkpointStep}); the stored figures are in "existing".`,
      existing: toEvaluationDto(stored),
    },
  };
}
