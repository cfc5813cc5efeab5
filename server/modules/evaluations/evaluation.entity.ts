import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import type { EvaluationHeadline, EvaluationResults, StoredEvaluationSettings } from '../../../shared/api/evaluations';
import { Bench } from '../benches/bench.entity';
import { Checkpoint } from '../runs/checkpoint.entity';
import { Run } from '../runs/run.entity';
import { User } from '../users/user.entity';

/**
 * The stored figures of one evaluation of a checkpoint (computed in the browser's evaluation worker or by
 * `npm run evaluate`). `settingsKey` is the canonical JSON of the settings: one evaluation per checkpoint
 * and settings. When an automatic checkpoint is pruned the evaluation stays (checkpoint null, step kept).
 */
export class Evaluation {
  [OptionalProps]?: 'id' | 'createdAt';
  id: string = randomUUID();
  bench!: Bench;
  run!: Run;
  checkpoint!: Checkpoint | null;
  checkpointStep!: number;
  createdBy!: User | null;
  settings!: StoredEvaluationSettings;
  settingsKey!: string;
  results!: EvaluationResults;
  /** Copied from the results at save time so lists need not load them. */
  headline!: EvaluationHeadline;
  createdAt: Date = new Date();
}

export const EvaluationSchema = new EntitySchema<Evaluation>({
  class: Evaluation,
  tableName: 'evaluations',
  indexes: [{ properties: ['bench', 'createdAt'] }, { properties: ['checkpoint', 'settingsKey'] }],
  properties: {
    id: { type: 'uuid', primary: true },
    bench: { kind: 'm:1', entity: () => Bench, deleteRule: 'cascade' },
    run: { kind: 'm:1', entity: () => Run, deleteRule: 'cascade' },
    checkpoint: { kind: 'm:1', entity: () => Checkpoint, nullable: true, deleteRule: 'set null' },
    checkpointStep: { type: 'integer' },
    createdBy: { kind: 'm:1', entity: () => User, nullable: true, deleteRule: 'set null' },
    settings: { type: 'json' },
    settingsKey: { type: 'text' },
    results: { type: 'json', lazy: true },
    headline: { type: 'json' },
    createdAt: { type: 'datetime' },
  },
});
