import type { EntityManager } from '@mikro-orm/better-sqlite';
import { AUTO_CHECKPOINTS_KEPT, type CheckpointDto, type CheckpointReason } from '../../../shared/api/runs';
import { Checkpoint } from './checkpoint.entity';
import type { Run } from './run.entity';

export function toCheckpointDto(c: Checkpoint): CheckpointDto {
  return {
    id: c.id,
    runId: c.run.id,
    step: c.step,
    boundBitsPerChar: c.boundBitsPerChar,
    reason: c.reason,
    formatVersion: c.formatVersion,
    byteSize: c.byteSize,
    createdAt: c.createdAt.toISOString(),
  };
}

export class CheckpointRepository {
  constructor(private readonly em: EntityManager) {}

  /** Newest first; the bytes are not loaded. */
  list(run: Run): Promise<Checkpoint[]> {
    return this.em.find(Checkpoint, { run }, { orderBy: { createdAt: 'desc', step: 'desc', id: 'asc' } });
  }

  /** With its bytes, for a download. */
  findWithBytes(run: Run, id: string): Promise<Checkpoint | null> {
    return this.em.findOne(Checkpoint, { id, run }, { populate: ['bytes'] });
  }

  create(data: { run: Run; step: number; boundBitsPerChar: number | null; reason: CheckpointReason; formatVersion: number; bytes: Uint8Array; at: Date }): Checkpoint {
    return this.em.create(Checkpoint, {
      run: data.run,
      step: data.step,
      boundBitsPerChar: data.boundBitsPerChar,
      reason: data.reason,
      formatVersion: data.formatVersion,
      byteSize: data.bytes.length,
      bytes: Buffer.from(data.bytes.buffer, data.bytes.byteOffset, data.bytes.byteLength),
      createdAt: data.at,
    });
  }

  /** Keeps the newest AUTO_CHECKPOINTS_KEPT automatic checkpoints of the run (call after the new one is flushed). */
  async pruneAutomatic(run: Run): Promise<void> {
    await this.em.execute(
      `delete from checkpoints where run_id = ? and reason = 'auto' and id not in ` +
        `(select id from checkpoints where run_id = ? and reason = 'auto' order by created_at desc, step desc limit ?)`,
      [run.id, run.id, AUTO_CHECKPOINTS_KEPT],
      'run',
    );
  }
}
