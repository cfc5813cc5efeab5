/**
 * The metric series a training job writes to the server (names as in KNOWN_METRIC_SERIES, shared/api/runs.ts),
 * and the points one progress report adds. The page (src/app/runs/live-run.ts) and the runner write the same.
 * Bound figures are costs in bits per character (the end-of-word symbol counted; lower is better).
 */
import type { TrainingProgress } from './training-types';

export const SERIES = {
  train: 'train_bound',
  validation: 'valid_bound',
  entropy: 'obs_entropy',
  noise: 'noise_mi',
  speed: 'words_per_second',
} as const;

export interface CurvePoint { series: string; step: number; value: number }

/** The points a progress report adds to the curves (non-finite values are left out). */
export function metricPointsOf(p: TrainingProgress): CurvePoint[] {
  const out: CurvePoint[] = [];
  if (p.totalSteps > 0 && p.trainBitsPerChar !== null) out.push({ series: SERIES.train, step: p.step, value: p.trainBitsPerChar });
  if (p.totalSteps > 0 && p.wordsPerSecond > 0) out.push({ series: SERIES.speed, step: p.step, value: p.wordsPerSecond });
  const e = p.evaluation;
  if (e) {
    out.push({ series: SERIES.validation, step: e.step, value: e.validationBitsPerChar });
    if (e.observationEntropyBits !== null) out.push({ series: SERIES.entropy, step: e.step, value: e.observationEntropyBits });
    if (e.noiseInformationBits !== null) out.push({ series: SERIES.noise, step: e.step, value: e.noiseInformationBits });
  }
  return out.filter((pt) => Number.isFinite(pt.value));
}
