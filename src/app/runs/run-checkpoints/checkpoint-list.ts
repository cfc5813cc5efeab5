import { AUTO_CHECKPOINTS_KEPT, type CheckpointDto } from '../../../../shared/api/runs';

/**
 * The run's checkpoint list after one more save, as the server now holds it: newest first, and only the newest
 * `AUTO_CHECKPOINTS_KEPT` autosaves (the server drops older ones when a new autosave arrives). Lets the page
 * show a save without asking the server for the whole list again.
 */
export function withSavedCheckpoint(list: readonly CheckpointDto[], saved: CheckpointDto): CheckpointDto[] {
  const merged = [saved, ...list.filter((c) => c.id !== saved.id)];
  merged.sort((a, b) => b.step - a.step || b.createdAt.localeCompare(a.createdAt));
  let autos = 0;
  return merged.filter((c) => c.reason !== 'auto' || ++autos <= AUTO_CHECKPOINTS_KEPT);
}
