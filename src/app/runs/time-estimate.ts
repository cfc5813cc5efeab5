/**
 * A rough training-time estimate shown before a run starts (the live ETA replaces it once steps are timed).
 * Cost model (rule of thumb, no source): one step costs about batch × K × (mean word length + 1) × P
 * multiply-adds for the forward and backward pass, with P the parameter count; the GRU has no K. The rate is
 * calibrated with `npm run bench:browser` on the reference configuration (see bench/results/browser.json).
 */
import type { TrainerSettings } from '../workers/trainer-api';

/** Effective multiply-adds per second of one worker on the WASM backend (calibrated, see above). */
export const CALIBRATED_RATE = 2.0e8;

export function estimateSeconds(s: TrainerSettings, parameterCount: number | null, meanSteps = 8): number | null {
  if (s.family === 'ngram') return 1;
  if (parameterCount === null || parameterCount <= 0) return null;
  const k = s.family === 'ssm' ? s.samples : 1;
  const perStep = (s.batchSize * k * meanSteps * parameterCount) / CALIBRATED_RATE;
  return perStep * s.steps;
}
