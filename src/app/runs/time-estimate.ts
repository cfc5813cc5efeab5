/**
 * A rough training-time estimate shown before a run starts (the live ETA replaces it once steps are timed).
 * Rule of thumb (no source), two parts per step: a kernel-dispatch overhead that grows with the longest word
 * and the number of layers unrolled per character, plus arithmetic of about batch × K × steps-per-word × P
 * multiply-adds (P = parameter count; the GRU has no K). Both constants were fitted on this project's 2-core
 * test machine: the reference case of bench/results/node.json (≈ 1.7 s/step) and the small model of the
 * end-to-end test (≈ 0.3 s/step). Expect a factor of two either way.
 */
import type { TrainerSettings } from '../workers/trainer-api';

/** Seconds per unrolled character and layer (kernel dispatch). */
export const DISPATCH_SECONDS = 0.01;
/** Effective multiply-adds per second of one worker on the WASM backend. */
export const ARITHMETIC_RATE = 1.2e8;

export function estimateSeconds(s: TrainerSettings, parameterCount: number | null, meanSteps = 8, longestSteps = 12): number | null {
  if (s.family === 'ngram') return 1;
  if (parameterCount === null || parameterCount <= 0) return null;
  const k = s.family === 'ssm' ? s.samples : 1;
  const layers = s.family === 'ssm' ? 2 + s.generativeFlow.length + s.inferenceFlow.length : 1;
  const perStep = DISPATCH_SECONDS * longestSteps * layers + (s.batchSize * k * meanSteps * parameterCount) / ARITHMETIC_RATE;
  return perStep * s.steps;
}
