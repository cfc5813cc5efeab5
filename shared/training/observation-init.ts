/**
 * The `observationInitScale` training setting: a fresh state-space model's observation weights (`obs.w`, or
 * `obs.w2` with a hidden layer) are multiplied by it once, before the first step. A sharper emission at the
 * start lets the noise decide the characters instead of the emission's own randomness (docs/RESULTS.md,
 * "Training recipe study"). Only initial values change: not the model's math, not the checkpoint format, and
 * a resumed run keeps its stored weights.
 */
import type { NamedWeights } from '../model/params';
import { isObservationInitScale, OBSERVATION_INIT_SCALE_RANGE } from '../model/settings-rules';

/** Multiplies the observation weights in `w` (in place) by `scale`. */
export function scaleObservationWeights(w: NamedWeights, observationHidden: number, scale: number): void {
  if (scale === 1) return;
  const obs = w[observationHidden > 0 ? 'obs.w2' : 'obs.w'];
  if (!obs) throw new Error('The model has no observation weights to scale.');
  obs.values = obs.values.map((x) => x * scale);
}

/** What the setting needs from the model. */
export interface ObservationInitModel {
  readonly settings: { observationHidden: number };
  getWeights(): NamedWeights;
  setWeights(weights: NamedWeights): void;
}

/** Applies the setting to a freshly built model (nothing to do at 1). */
export function applyObservationInitScale(model: ObservationInitModel, scale: number): void {
  if (scale === 1) return;
  if (!isObservationInitScale(scale)) {
    throw new Error(`The observation init scale must be a number from ${OBSERVATION_INIT_SCALE_RANGE[0]} to ${OBSERVATION_INIT_SCALE_RANGE[1]}; got ${scale}.`);
  }
  const w = model.getWeights();
  scaleObservationWeights(w, model.settings.observationHidden, scale);
  model.setWeights(w);
}
