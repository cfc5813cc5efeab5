import type { EntityManager } from '@mikro-orm/core';
import {
  evaluationHeadline,
  evaluationSettingsKey,
  type EvaluationDto,
  type EvaluationPage,
  type EvaluationResults,
  type EvaluationSummaryDto,
  type StoredEvaluationSettings,
} from '../../../shared/api/evaluations';
import type { Bench } from '../benches/bench.entity';
import type { Checkpoint } from '../runs/checkpoint.entity';
import type { Run } from '../runs/run.entity';
import type { User } from '../users/user.entity';
import { Evaluation } from './evaluation.entity';

export function toEvaluationSummary(e: Evaluation): EvaluationSummaryDto {
  return {
    id: e.id,
    benchId: e.bench.id,
    run: { id: e.run.id, name: e.run.name, family: e.run.family },
    checkpoint: { id: e.checkpoint?.id ?? '', step: e.checkpointStep },
    createdBy: e.createdBy ? { id: e.createdBy.id, displayName: e.createdBy.displayName } : null,
    settings: e.settings,
    headline: e.headline,
    createdAt: e.createdAt.toISOString(),
  };
}

export function toEvaluationDto(e: Evaluation): EvaluationDto {
  return { ...toEvaluationSummary(e), results: e.results };
}

const populate = ['run', 'createdBy', 'checkpoint'] as const;

export class EvaluationRepository {
  constructor(private readonly em: EntityManager) {}

  forCheckpoint(checkpoint: Checkpoint): Promise<Evaluation[]> {
    return this.em.find(Evaluation, { checkpoint }, { orderBy: { createdAt: 'desc', id: 'asc' }, populate: [...populate] });
  }

  /** One evaluation of the bench with its results (optionally only under one checkpoint). */
  find(bench: Bench, id: string, checkpoint?: Checkpoint): Promise<Evaluation | null> {
    return this.em.findOne(Evaluation, { id, bench, ...(checkpoint ? { checkpoint } : {}) }, { populate: [...populate, 'results'] });
  }

  findSame(checkpoint: Checkpoint, settings: StoredEvaluationSettings): Promise<Evaluation | null> {
    return this.em.findOne(Evaluation, { checkpoint, settingsKey: evaluationSettingsKey(settings) }, { populate: [...populate, 'results'] });
  }

  async page(bench: Bench, q: { runId?: string; limit: number; offset: number }): Promise<EvaluationPage> {
    const [items, total] = await this.em.findAndCount(Evaluation, { bench, ...(q.runId ? { run: q.runId } : {}) }, {
      orderBy: { createdAt: 'desc', id: 'asc' }, limit: q.limit, offset: q.offset, populate: [...populate],
    });
    return { items: items.map(toEvaluationSummary), total };
  }

  create(data: { bench: Bench; run: Run; checkpoint: Checkpoint; createdBy: User | null; settings: StoredEvaluationSettings; results: EvaluationResults; at: Date }): Evaluation {
    return this.em.create(Evaluation, {
      bench: data.bench,
      run: data.run,
      checkpoint: data.checkpoint,
      checkpointStep: data.checkpoint.step,
      createdBy: data.createdBy,
      settings: data.settings,
      settingsKey: evaluationSettingsKey(data.settings),
      results: data.results,
      headline: evaluationHeadline(data.results),
      createdAt: data.at,
    });
  }
}
