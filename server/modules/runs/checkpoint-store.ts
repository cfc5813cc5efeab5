/**
 * Stores an uploaded checkpoint file of a run: the one path for a person's upload (`POST .../checkpoints`) and a
 * runner's (`POST /api/runner/jobs/:runId/checkpoints`). The bytes must decode, hold finite values with a step
 * in range, and fit the run (family, alphabet, model settings); a refusal is a 422 and nothing is stored.
 * Only the newest automatic checkpoints are kept (AUTO_CHECKPOINTS_KEPT).
 */
import type { CheckpointDto, CheckpointReason } from '../../../shared/api/runs';
import type { AppContext } from '../../app-context';
import { checkFitsRun, readCheckpoint } from './checkpoint-check';
import { checkCheckpointValues } from './checkpoint-value-checks';
import { CheckpointRepository, toCheckpointDto } from './checkpoint.repository';
import type { Run } from './run.entity';

export async function storeUploadedCheckpoint(
  ctx: AppContext,
  run: Run,
  bytes: Uint8Array,
  query: { reason: Exclude<CheckpointReason, 'import'>; boundBitsPerChar?: number | undefined },
): Promise<CheckpointDto> {
  const found = readCheckpoint(bytes);
  checkCheckpointValues(found.checkpoint, query.boundBitsPerChar);
  checkFitsRun(found, run);
  const checkpoints = new CheckpointRepository(ctx.orm.em);
  const saved = checkpoints.create({
    run,
    step: found.checkpoint.step,
    boundBitsPerChar: query.boundBitsPerChar ?? null,
    reason: query.reason,
    formatVersion: found.checkpoint.formatVersion,
    bytes,
    at: ctx.clock.now(),
  });
  await ctx.orm.em.flush();
  if (query.reason === 'auto') await checkpoints.pruneAutomatic(run);
  return toCheckpointDto(saved);
}
