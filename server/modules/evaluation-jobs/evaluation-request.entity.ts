import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import type { EvaluationRequestStatus, EvaluationStage } from '../../../shared/api/evaluation-jobs';
import type { StoredEvaluationSettings } from '../../../shared/api/evaluations';
import { Bench } from '../benches/bench.entity';
import { Evaluation } from '../evaluations/evaluation.entity';
import { Checkpoint } from '../runs/checkpoint.entity';
import { Run } from '../runs/run.entity';
import { Runner } from '../runners/runner.entity';
import { User } from '../users/user.entity';

/**
 * An evaluation sent to runners: waits as this row (so a server restart keeps it), is held by one runner under a
 * lease while it computes, and points at the stored evaluation once its figures landed. A pruned checkpoint
 * leaves the row (checkpoint null, step kept); a waiting one then fails at its next claim.
 */
export class EvaluationRequest {
  [OptionalProps]?: 'id' | 'status' | 'statusReason' | 'runner' | 'leaseExpiresAt' | 'stage' | 'evaluation' | 'createdAt' | 'updatedAt';
  id: string = randomUUID();
  bench!: Bench;
  run!: Run;
  checkpoint!: Checkpoint | null;
  checkpointStep!: number;
  createdBy!: User | null;
  settings!: StoredEvaluationSettings;
  settingsKey!: string;
  status: EvaluationRequestStatus = 'waiting';
  statusReason: string | null = null;
  runner: Runner | null = null;
  leaseExpiresAt: Date | null = null;
  stage: EvaluationStage | null = null;
  evaluation: Evaluation | null = null;
  createdAt: Date = new Date();
  updatedAt: Date = new Date();
}

export const EvaluationRequestSchema = new EntitySchema<EvaluationRequest>({
  class: EvaluationRequest,
  tableName: 'evaluation_requests',
  indexes: [{ properties: ['status', 'createdAt'] }, { properties: ['checkpoint', 'settingsKey'] }, { properties: ['runner'] }],
  properties: {
    id: { type: 'uuid', primary: true },
    bench: { kind: 'm:1', entity: () => Bench, deleteRule: 'cascade' },
    run: { kind: 'm:1', entity: () => Run, deleteRule: 'cascade' },
    checkpoint: { kind: 'm:1', entity: () => Checkpoint, nullable: true, deleteRule: 'set null' },
    checkpointStep: { type: 'integer' },
    createdBy: { kind: 'm:1', entity: () => User, nullable: true, deleteRule: 'set null' },
    settings: { type: 'json' },
    settingsKey: { type: 'text' },
    status: { type: 'string', length: 8 },
    statusReason: { type: 'text', nullable: true },
    runner: { kind: 'm:1', entity: () => Runner, nullable: true, deleteRule: 'set null' },
    leaseExpiresAt: { type: 'datetime', nullable: true },
    stage: { type: 'json', nullable: true },
    evaluation: { kind: 'm:1', entity: () => Evaluation, nullable: true, deleteRule: 'set null' },
    createdAt: { type: 'datetime' },
    updatedAt: { type: 'datetime' },
  },
});
