/**
 * Arms of the training-recipe study that are not product settings (bench/science/recipe-study.ts): a learning-rate
 * schedule and initial values of the transition, tried and not kept (docs/RESULTS.md, "Training recipe study").
 * The observation scale that was kept lives in shared/training/observation-init.ts.
 */
import { createRng } from '../../shared/data/random';
import type { NamedWeights } from '../../shared/model/params';
import { SOFTPLUS_INVERSE_OF_ONE } from '../../shared/model/flows/conditioner';
import { NEW_RUN_MODEL_DEFAULTS as D } from '../../shared/model/settings-rules';
import { scaleObservationWeights } from '../../shared/training/observation-init';

export interface LearningRateSchedule {
  /** Peak learning rate. */
  learningRate: number;
  /** Steps of linear rise from learningRate / lrWarmupSteps to the peak; 0 = none. */
  lrWarmupSteps: number;
  /** After the warm-up: constant, or a cosine decay to learningRate * lrFinalFraction at `totalSteps`. */
  lrDecay: 'none' | 'cosine';
  lrFinalFraction: number;
  totalSteps: number;
}

/** Learning rate of the step that follows `done` completed steps. */
export function learningRateAt(s: LearningRateSchedule, done: number): number {
  const peak = s.learningRate;
  if (s.lrWarmupSteps > 0 && done < s.lrWarmupSteps) return (peak * (done + 1)) / s.lrWarmupSteps;
  if (s.lrDecay === 'none') return peak;
  const span = Math.max(1, s.totalSteps - s.lrWarmupSteps);
  const progress = Math.min(1, Math.max(0, (done - s.lrWarmupSteps) / span));
  const floor = peak * s.lrFinalFraction;
  return floor + (peak - floor) * 0.5 * (1 + Math.cos(Math.PI * progress));
}

export interface RecipeInit {
  /** Multiplies the initial observation weights (obs.w, or obs.w2 with a hidden layer); 1 = as built. */
  observationScale: number;
  /**
   * Initial memory of the transition: the last diag layer of both flows starts with mu(c) ≈ transitionMemory * c
   * (0 = as built: mu(c) small and unrelated to c).
   */
  transitionMemory: number;
  /** Initial sigma of that diag layer (1 = as built). */
  transitionScale: number;
}

/** What the initial values need from the model. */
export interface RecipeModel {
  readonly settings: { stateSize: number; flowHidden: number; observationHidden: number; generativeFlow: { kind: string }[]; inferenceFlow: { kind: string }[] };
  getWeights(): NamedWeights;
  setWeights(weights: NamedWeights): void;
}

/** Gain of the identity path through tanh: tanh(a x) / a ≈ x for |a x| small. */
const IDENTITY_GAIN = 0.5;

/** Writes the recipe's initial values into a freshly built model (no-op with the neutral values 1, 0, 1). */
export function applyRecipeInit(model: RecipeModel, init: RecipeInit): void {
  if (init.observationScale === 1 && init.transitionMemory === 0 && init.transitionScale === 1) return;
  const w = model.getWeights();
  const s = model.settings;
  const d = s.stateSize;
  scaleObservationWeights(w, s.observationHidden, init.observationScale);
  for (const [prefix, spec] of [['gen/', s.generativeFlow], ['inf/', s.inferenceFlow]] as const) {
    const last = spec.length - 1;
    if (spec[last]?.kind !== 'diag') continue;
    const name = (p: string) => `${prefix}${last}.diag.net.${p}`;
    const w1 = w[name('w1')];
    const w2 = w[name('w2')];
    const b2 = w[name('b2')];
    if (!w1 || !w2 || !b2) continue;
    const H = s.flowHidden;
    if (init.transitionMemory !== 0 && H >= d) {
      // Hidden unit i < d carries c_i: w1[:, i] = a e_i, and w2[i, :] sends it to mu_i only, times memory / a.
      for (let r = 0; r < d; r++) for (let i = 0; i < d; i++) w1.values[r * H + i] = r === i ? IDENTITY_GAIN : 0;
      for (let i = 0; i < d; i++) {
        for (let col = 0; col < 2 * d; col++) w2.values[i * 2 * d + col] = col === i ? init.transitionMemory / IDENTITY_GAIN : 0;
      }
    }
    if (init.transitionScale !== 1) {
      const raw = Math.log(Math.expm1(init.transitionScale));
      for (let i = d; i < 2 * d; i++) b2.values[i] = Number.isFinite(raw) ? raw : SOFTPLUS_INVERSE_OF_ONE;
    }
  }
  model.setWeights(w);
}

/**
 * The initial state h0 (zeros and learned as built). `h0Spread` > 0 draws it from N(0, h0Spread^2) at the start
 * (seeded by the model seed); `h0Learned` 0 keeps it fixed at that value throughout training.
 */
export interface InitialStateArm {
  h0Spread: number;
  h0Learned: number;
}

/** The initial state's starting values of an arm: null when it stays as built (zeros). */
export function initialStateValues(arm: InitialStateArm, stateSize: number, seed: number): Float32Array | null {
  if (arm.h0Spread === 0) return arm.h0Learned ? null : new Float32Array(stateSize);
  const rng = createRng(seed).fork('recipe/h0');
  return Float32Array.from({ length: stateSize }, () => arm.h0Spread * rng.normal());
}

/** Everything one arm of the study sets (recipe-study.ts takes any of these as `setting=value`). */
export interface ArmSettings extends RecipeInit, LearningRateSchedule, InitialStateArm {
  /** Initial gain of the flows' context weights (scaleContextWeights); 1 = as built. */
  contextGain: number;
  stateSize: number; generativeFlow: string; inferenceFlow: string; flowHidden: number; encoderSize: number; proposalHidden: number;
  embeddingSize: number; observationHidden: number; samples: number; batchSize: number; clipNorm: number; warmupSteps: number;
}

/**
 * Where every arm starts (what it does not name; the table's "defaults"): the model defaults of
 * shared/model/settings-rules.ts as the study began, Adam at a constant 0.01, clipping 5, and the neutral initial
 * values — observation scale 1 and flow width 32, not the product's later defaults 3 and 16, so that arms stay
 * comparable (name them on the command line for the current defaults). `totalSteps` is the run's own.
 */
export const STUDY_START: Omit<ArmSettings, 'totalSteps'> = {
  stateSize: D.stateSize, generativeFlow: D.generativeFlow.join(','), inferenceFlow: D.inferenceFlow.join(','), flowHidden: 32,
  encoderSize: D.encoderSize, proposalHidden: D.proposalHidden, embeddingSize: D.embeddingSize, observationHidden: D.observationHidden,
  samples: D.samples, batchSize: 64, clipNorm: 5, warmupSteps: 0,
  learningRate: 0.01, lrWarmupSteps: 0, lrDecay: 'none', lrFinalFraction: 1,
  observationScale: 1, transitionMemory: 0, transitionScale: 1, h0Spread: 0, h0Learned: 1, contextGain: 1,
};

/**
 * How strongly the flows see h_{t-1} at the start: multiplies the initial first-layer conditioner weights that read
 * the context c = h_{t-1} (every row of a diag or shift layer's w1; the rows after the d state rows of a coupling
 * layer's w1) in both flows by `gain` (1 = as built, Glorot uniform).
 */
export function scaleContextWeights(model: RecipeModel, gain: number): void {
  if (gain === 1) return;
  const w = model.getWeights();
  const d = model.settings.stateSize;
  const H = model.settings.flowHidden;
  for (const [name, t] of Object.entries(w)) {
    const m = /^(gen|inf)\/\d+\.(\w+)\.(net|mu)\.w1$/.exec(name);
    if (!m) continue;
    const firstRow = m[2] === 'coupling' ? d : 0;
    for (let i = firstRow * H; i < t.values.length; i++) t.values[i] = (t.values[i] as number) * gain;
  }
  model.setWeights(w);
}
