import { EntitySchema, OptionalProps } from '@mikro-orm/core';
import { randomUUID } from 'node:crypto';
import type { CheckpointReason } from '../../../shared/api/runs';
import { Run } from './run.entity';

/**
 * A saved model state of a run: the exact bytes of a checkpoint file (shared/model/checkpoint.ts),
 * validated before it is stored. `bytes` is lazy: lists never load it, downloads populate it.
 */
export class Checkpoint {
  [OptionalProps]?: 'id' | 'createdAt';
  id: string = randomUUID();
  run!: Run;
  step!: number;
  boundBitsPerChar!: number | null;
  reason!: CheckpointReason;
  formatVersion!: number;
  byteSize!: number;
  bytes!: Buffer;
  createdAt: Date = new Date();
}

export const CheckpointSchema = new EntitySchema<Checkpoint>({
  class: Checkpoint,
  tableName: 'checkpoints',
  indexes: [{ properties: ['run', 'createdAt'] }],
  properties: {
    id: { type: 'uuid', primary: true },
    run: { kind: 'm:1', entity: () => Run, deleteRule: 'cascade' },
    step: { type: 'integer' },
    boundBitsPerChar: { type: 'double', nullable: true },
    reason: { type: 'string', length: 8 },
    formatVersion: { type: 'integer' },
    byteSize: { type: 'integer' },
    bytes: { type: 'blob', lazy: true },
    createdAt: { type: 'datetime' },
  },
});
