import { AUTO_CHECKPOINTS_KEPT, type CheckpointDto } from '../../../../shared/api/runs';
import { withSavedCheckpoint } from './checkpoint-list';

const ck = (step: number, reason: CheckpointDto['reason'], id = `ck-${step}-${reason}`) =>
  ({ id, step, reason, createdAt: `2026-12-02T06:${String(step % 60).padStart(2, '0')}:00Z` }) as CheckpointDto;

describe('withSavedCheckpoint', () => {
  it('puts the new checkpoint first and keeps the rest in step order', () => {
    const list = [ck(200, 'auto'), ck(150, 'manual'), ck(100, 'auto')];
    expect(withSavedCheckpoint(list, ck(250, 'stop')).map((c) => c.step)).toEqual([250, 200, 150, 100]);
  });

  it('keeps only the newest autosaves, as the server does, and never drops other reasons', () => {
    const autos = Array.from({ length: AUTO_CHECKPOINTS_KEPT }, (_, i) => ck(100 * (AUTO_CHECKPOINTS_KEPT - i), 'auto'));
    const list = [...autos.slice(0, 3), ck(750, 'manual'), ...autos.slice(3)];
    const next = withSavedCheckpoint(list, ck(100 * (AUTO_CHECKPOINTS_KEPT + 1), 'auto'));
    expect(next.filter((c) => c.reason === 'auto').length).toBe(AUTO_CHECKPOINTS_KEPT);
    expect(next.some((c) => c.step === 100)).toBe(false); // the oldest autosave went
    expect(next.some((c) => c.reason === 'manual')).toBe(true);
  });

  it('replaces an entry with the same id instead of listing it twice', () => {
    const list = [ck(100, 'auto', 'same')];
    expect(withSavedCheckpoint(list, ck(100, 'auto', 'same')).length).toBe(1);
  });
});
