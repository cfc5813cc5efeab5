/**
 * Value checks of a decoded checkpoint, shared by every route that stores one (upload to a run, import as a
 * new run, and the runners' uploads): every weight and optimiser value finite (the first bad tensor is
 * named), the step a whole number from 0 to 10^9, and a reported bound finite and not negative. A refusal
 * is a 422 `CHECKPOINT_UNUSABLE` thrown before anything is written, so the run's previous checkpoint stays
 * its newest good one.
 */
import type { Checkpoint } from '../../../shared/model/checkpoint';
import type { NamedWeights } from '../../../shared/model/params';
import { unusable } from './checkpoint-check';

export const MAX_CHECKPOINT_STEP = 1_000_000_000;

function firstNonFinite(group: NamedWeights | undefined): { name: string; index: number; value: number } | null {
  if (!group) return null;
  for (const name of Object.keys(group).sort()) {
    const values = group[name]!.values;
    for (let i = 0; i < values.length; i++) {
      const v = values[i]!;
      // v - v is NaN exactly for NaN and ±Infinity; cheaper than Number.isFinite in this loop.
      if (v - v !== 0) return { name, index: i, value: v };
    }
  }
  return null;
}

function describeValue(v: number): string {
  return Number.isNaN(v) ? 'NaN' : v > 0 ? '+Infinity' : '-Infinity';
}

/** Throws 422 for a checkpoint whose values cannot be trusted; `bound` is the reported bound, if any. */
export function checkCheckpointValues(checkpoint: Pick<Checkpoint, 'step' | 'weights' | 'optimizer'>, bound?: number | null): void {
  const step = checkpoint.step;
  if (!Number.isInteger(step) || step < 0 || step > MAX_CHECKPOINT_STEP) {
    throw unusable(
      `The checkpoint's step (${String(step)}) is outside 0 … 1,000,000,000 or not a whole number; the file is damaged — save the checkpoint again.`,
    );
  }
  const weight = firstNonFinite(checkpoint.weights);
  if (weight) {
    throw unusable(
      `The weight tensor "${weight.name}" holds ${describeValue(weight.value)} (at index ${weight.index}); training diverged before this save — ` +
        'resume from an earlier checkpoint with a lower learning rate or gradient clipping.',
    );
  }
  const moment = firstNonFinite(checkpoint.optimizer);
  if (moment) {
    throw unusable(
      `The optimiser tensor "${moment.name}" holds ${describeValue(moment.value)} (at index ${moment.index}); the file cannot resume training — ` +
        'save the checkpoint again, or resume from an earlier one.',
    );
  }
  if (bound !== undefined && bound !== null && (!Number.isFinite(bound) || bound < 0)) {
    throw unusable(`The reported bound (${String(bound)} bits per character) must be a finite number of 0 or more; send the figure the trainer measured, or leave it out.`);
  }
}
