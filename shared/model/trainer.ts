/**
 * Training loop step for the state-space model (MODEL.md sections 5 and 8): maximise the mean IWAE bound L_K
 * over a batch with Adam, clip gradients by global norm, optionally warm up the prior/posterior terms, and
 * stop on a non-finite loss with the weights of the last good step.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { EncodedBatch } from '../data/encode';
import { createRng } from '../data/random';
import { Adam, flattenTensors } from './adam';
import { iwaeBound, natsToBits } from './bounds';
import type { NamedWeights } from './params';
import type { StateSpaceModel } from './ssm';

export interface SsmTrainerSettings {
  learningRate: number;
  /** Importance samples K per word. */
  samples: number;
  /** Clip the gradient's global norm to this value; 0 turns clipping off. */
  clipNorm: number;
  /** Steps over which the warm-up weight rises linearly to 1; 0 (default) means no warm-up. */
  warmupSteps?: number;
}

export interface StepResult {
  /** 1-based number of this step. */
  step: number;
  /** Minimised loss: minus the mean (warm-up weighted) L_K per word, nats. */
  loss: number;
  /** Mean L_K per word in nats (with the warm-up weight applied while it is below 1). */
  boundNatsPerWord: number;
  /** The same figure per character (EOW included), bits. */
  boundBitsPerChar: number;
  /** False while the warm-up weight is below 1: the figure is then not a bound on log p(w). */
  isBound: boolean;
  klWeight: number;
}

/** The loss or the gradient became NaN or infinite; the weights are those of the last good step. */
export class NonFiniteLossError extends Error {
  override readonly name = 'NonFiniteLossError';
  readonly code = 'NON_FINITE_LOSS';
  constructor(readonly step: number, readonly lastGoodStep: number) {
    super(
      `Training stopped at step ${step}: the loss became NaN or infinite. The weights were rolled back to ` +
        `step ${lastGoodStep}; lower the learning rate, turn on gradient clipping, or resume from the last checkpoint.`,
    );
  }
}

/** sqrt of the sum of squares of every gradient entry. */
export function globalNorm(grads: tf.Tensor[]): tf.Scalar {
  return tf.sqrt(tf.addN(grads.map((g) => tf.sum(tf.square(g))))) as tf.Scalar;
}

/** Scales all gradients by min(1, clip / norm) (clip = 0: unchanged), keeping their direction. */
export function clipByGlobalNorm(grads: tf.Tensor[], norm: number, clip: number): tf.Tensor[] {
  const factor = clip > 0 ? Math.min(1, clip / Math.max(norm, 1e-12)) : 1;
  return factor === 1 ? grads : grads.map((g) => tf.mul(g, factor));
}

interface Snapshot {
  /** Flat weights (the layout of `Adam.applyFlat`). */
  weights: tf.Tensor1D;
  optimizer: ReturnType<Adam['snapshot']>;
}

export class SsmTrainer {
  readonly settings: SsmTrainerSettings;
  private readonly adam: Adam;
  private readonly vars: tf.Variable[];
  private lastGood: Snapshot | null = null;

  constructor(private readonly model: StateSpaceModel, settings: SsmTrainerSettings) {
    if (!Number.isInteger(settings.samples) || settings.samples < 1) {
      throw new Error(`Samples per word (K) must be a positive whole number; got ${settings.samples}.`);
    }
    if (!(settings.clipNorm >= 0)) throw new Error(`The clipping norm must be 0 (off) or positive; got ${settings.clipNorm}.`);
    const warm = settings.warmupSteps ?? 0;
    if (!Number.isInteger(warm) || warm < 0) throw new Error(`Warm-up steps must be a whole number ≥ 0; got ${warm}.`);
    this.settings = { ...settings, warmupSteps: warm };
    this.vars = model.variables;
    this.adam = new Adam(this.vars, model.variableNames, { learningRate: settings.learningRate });
  }

  /** Number of updates applied so far. */
  get stepCount(): number {
    return this.adam.t;
  }

  /** Warm-up weight of the next step: min(1, (step + 1) / warmupSteps), or 1 without warm-up. */
  klWeight(): number {
    const w = this.settings.warmupSteps ?? 0;
    return w > 0 ? Math.min(1, (this.adam.t + 1) / w) : 1;
  }

  /**
   * Noise seed of a step: a function of the model seed and the step number only, so a run resumed from a
   * checkpoint draws the same noise as the uninterrupted run.
   */
  stepSeed(stepNo: number): number {
    return createRng(this.model.seed).fork(`train-step/${stepNo}`).seed();
  }

  /**
   * One optimisation step on a batch, inside a single tf.tidy; reads back one small tensor (loss and gradient
   * norm). Throws `NonFiniteLossError` (weights rolled back to the last good step) if either is not finite.
   */
  step(batch: EncodedBatch, seed?: number): StepResult {
    const beta = this.klWeight();
    const K = this.settings.samples;
    const clip = this.settings.clipNorm;
    const stepNo = this.adam.t + 1;
    const noiseSeed = seed ?? this.stepSeed(stepNo);
    let stats: Float32Array | null = null;
    let failed = false;
    tf.tidy(() => {
      const { value, grads } = tf.variableGrads(() => {
        const { logW } = this.model.logWeights(batch, K, { seed: noiseSeed, klWeight: beta });
        return tf.neg(tf.mean(iwaeBound(logW))) as tf.Scalar;
      }, this.vars);
      const flat = flattenTensors(this.vars.map((v) => grads[v.name] as tf.Tensor));
      const norm = tf.sqrt(tf.sum(tf.square(flat)));
      stats = tf.stack([value, norm]).dataSync() as Float32Array;
      if (!Number.isFinite(stats[0]) || !Number.isFinite(stats[1])) {
        failed = true;
        return;
      }
      // The roll-back point: the weights and moments that gave this finite loss (shared, not copied).
      this.dropLastGood();
      const optimizer = this.adam.snapshot();
      const factor = clip > 0 ? Math.min(1, clip / Math.max(stats[1] as number, 1e-12)) : 1;
      const weights = this.adam.applyFlat(factor === 1 ? flat : (tf.mul(flat, factor) as tf.Tensor1D), true) as tf.Tensor1D;
      this.lastGood = { weights, optimizer };
    });
    if (failed) {
      this.rollBack();
      throw new NonFiniteLossError(stepNo, this.adam.t);
    }
    const loss = (stats as unknown as Float32Array)[0] as number;
    let chars = 0;
    for (const len of batch.lengths) chars += len;
    return {
      step: stepNo,
      loss,
      boundNatsPerWord: -loss,
      boundBitsPerChar: natsToBits((-loss * batch.batchSize) / chars),
      isBound: beta >= 1,
      klWeight: beta,
    };
  }

  /** Adam moments and update count, for checkpoints (`t`, `m/<weight>`, `v/<weight>`). */
  getOptimizerState(): NamedWeights {
    return this.adam.getState();
  }

  /** Restores the optimiser state saved with a checkpoint, so a resumed run continues exactly. */
  setOptimizerState(state: NamedWeights): void {
    this.adam.setState(state);
    this.dropLastGood();
  }

  set learningRate(lr: number) {
    if (!(lr > 0) || !Number.isFinite(lr)) throw new Error(`The learning rate must be a positive number; got ${lr}.`);
    this.adam.learningRate = lr;
  }

  get learningRate(): number {
    return this.adam.learningRate;
  }

  /** Back to the weights (and optimiser state) that produced the last finite loss. */
  private rollBack(): void {
    const s = this.lastGood;
    if (!s) return; // the first step failed: nothing was applied
    this.adam.setFlatWeights(s.weights);
    this.adam.restore(s.optimizer);
  }

  private dropLastGood(): void {
    if (!this.lastGood) return;
    for (const t of [this.lastGood.weights, ...this.lastGood.optimizer.m, ...this.lastGood.optimizer.v]) t.dispose();
    this.lastGood = null;
  }

  dispose(): void {
    this.dropLastGood();
    this.adam.dispose();
  }
}
