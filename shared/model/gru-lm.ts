/**
 * Teacher-forced GRU language model — the neural baseline of MODEL.md §6.
 *
 *   h_0 = learned vector (size d);  x_t = emb(w_{t-1}) with w_0 = EOW
 *   GRU step as defined by Cho et al. (2014), "Learning Phrase Representations using RNN Encoder–Decoder":
 *     r_t = σ(x_t W_r + h_{t-1} U_r + b_r)
 *     z_t = σ(x_t W_z + h_{t-1} U_z + b_z)
 *     h̃_t = tanh(x_t W_h + (r_t ⊙ h_{t-1}) U_h + b_h)
 *     h_t = z_t ⊙ h_{t-1} + (1 − z_t) ⊙ h̃_t
 *   p(w_t | w_<t) = softmax(h_t W_o + b_o)   (or through one tanh hidden layer when `observationHidden` > 0,
 *   the same observation form as the state-space model)
 * The log-likelihood Σ_t log p(w_t | w_<t) (EOW included) is exact.
 * Fused layout: Wx = [W_z | W_r | W_h] (E × 3d), Uzr = [U_z | U_r] (d × 2d), Uh (d × d), bx (3d).
 */
import * as tf from '@tensorflow/tfjs-core';
import type { EncodedBatch } from '../data/encode';
import { createRng, type Rng } from '../data/random';
import { Adam, flattenTensors } from './adam';
import { addBias } from './bias-add';
import { gruLmSequence } from './gru-lm-sequence';
import { NonFiniteLossError } from './trainer';
import { ParamSet, glorot, zeros, type NamedWeights, type ParamSpecs } from './params';

export interface GruSettings {
  /** Vocabulary size V (characters + EOW). */
  vocabSize: number;
  /** State size d (the same as the state-space model it is compared with). */
  stateSize: number;
  /** Embedding size of the previous character. */
  embeddingSize: number;
  /** Hidden width of the observation MLP; 0 = linear observation layer. */
  observationHidden: number;
}

export { NonFiniteLossError };

export const defaultGruSettings = (vocabSize: number, stateSize = 8): GruSettings =>
  ({ vocabSize, stateSize, embeddingSize: 16, observationHidden: 0 });

/** Parameter table of the GRU baseline (names are the checkpoint names). */
export function gruSpecs(s: GruSettings): ParamSpecs {
  const { vocabSize: v, stateSize: d, embeddingSize: e, observationHidden: o } = s;
  const specs: ParamSpecs = {
    emb: glorot(v, e), h0: zeros([d]), Wx: glorot(e, 3 * d), Uzr: glorot(d, 2 * d), Uh: glorot(d, d),
    bx: zeros([3 * d]), bo: zeros([v]),
  };
  if (o > 0) Object.assign(specs, { Wm: glorot(d, o), bm: zeros([o]), Wo: glorot(o, v) });
  else specs['Wo'] = glorot(d, v);
  return specs;
}

export class GruLanguageModel {
  readonly settings: GruSettings;
  private readonly params: ParamSet;

  constructor(settings: GruSettings, seed: number | string | Rng = 1) {
    for (const [name, n] of Object.entries({ vocabSize: settings.vocabSize, stateSize: settings.stateSize, embeddingSize: settings.embeddingSize })) {
      if (!Number.isInteger(n) || n < 1) throw new Error(`GRU setting ${name} must be a positive whole number (got ${n}).`);
    }
    if (!Number.isInteger(settings.observationHidden) || settings.observationHidden < 0) {
      throw new Error(`GRU setting observationHidden must be 0 or a positive whole number (got ${settings.observationHidden}).`);
    }
    this.settings = { ...settings };
    const rng = typeof seed === 'object' ? seed : createRng(seed).fork('gru-init');
    this.params = new ParamSet(gruSpecs(this.settings), rng);
  }

  /** Trainable variables in name order. */
  get variables(): tf.Variable[] { return this.params.list(); }

  /** Checkpoint names of `variables`, in the same order. */
  get variableNames(): string[] { return Object.keys(this.params.specs).sort(); }

  get parameterCount(): number { return this.params.parameterCount; }

  private w(name: string): tf.Tensor { return this.params.get(name); }

  /** States h_1..h_T of the teacher-forced recurrence, as [B*T, d] (row b*T + t). */
  states(batch: EncodedBatch): tf.Tensor2D {
    return tf.tidy(() => {
      const { batchSize: b, maxLen: t } = batch;
      const d = this.settings.stateSize;
      const prev = new Int32Array(b * t); // w_{t-1}; w_0 = EOW = 0
      for (let i = 0; i < b; i++) prev.set(batch.ids.subarray(i * t, i * t + t - 1), i * t + 1);
      const table = addBias(tf.matMul(this.w('emb') as tf.Tensor2D, this.w('Wx') as tf.Tensor2D), this.w('bx') as tf.Tensor1D);
      // One-hot matmul instead of gather: its gradient is a matmul (the WASM backend has no UnsortedSegmentSum).
      const xin = tf.reshape(tf.matMul(oneHotRows(prev, this.settings.vocabSize), table), [b, t, 3 * d]);
      // The recurrence as one op with a hand-written gradient (gru-lm-sequence.ts), time-major.
      const h0 = addBias(tf.zeros([b, d]), this.w('h0') as tf.Tensor1D);
      const hs = gruLmSequence(tf.transpose(xin, [1, 0, 2]) as tf.Tensor3D, h0, this.w('Uzr') as tf.Tensor2D, this.w('Uh') as tf.Tensor2D);
      return tf.reshape(tf.transpose(hs, [1, 0, 2]), [b * t, d]) as tf.Tensor2D;
    });
  }

  /** log p(. | h) for states [N, d] → [N, V]. */
  observationLogProbs(h: tf.Tensor2D): tf.Tensor2D {
    return tf.tidy(() => {
      let x: tf.Tensor2D = h;
      if (this.settings.observationHidden > 0) x = tf.tanh(addBias(tf.matMul(x, this.w('Wm') as tf.Tensor2D), this.w('bm') as tf.Tensor1D)) as tf.Tensor2D;
      return tf.logSoftmax(addBias(tf.matMul(x, this.w('Wo') as tf.Tensor2D), this.w('bo') as tf.Tensor1D)) as tf.Tensor2D;
    });
  }

  /** Next-character log-probabilities along the words: [B*T, V], row b*T + t = log p(. | w_<t). */
  predictiveLogProbs(batch: EncodedBatch): tf.Tensor2D {
    return tf.tidy(() => this.observationLogProbs(this.states(batch)));
  }

  /** Exact log p(w) per word, in nats: [B]. */
  logLikelihood(batch: EncodedBatch): tf.Tensor1D {
    return tf.tidy(() => {
      const { batchSize: b, maxLen: t } = batch;
      const v = this.settings.vocabSize;
      const lp = this.predictiveLogProbs(batch);
      const picked = tf.sum(tf.mul(lp, oneHotRows(batch.ids, v, batch.mask)), 1);
      return tf.sum(tf.reshape(picked, [b, t]), 1) as tf.Tensor1D;
    });
  }

  getWeights(): NamedWeights { return this.params.getWeights(); }

  /** Replaces every weight; throws a WeightShapeError (and changes nothing) if names or shapes differ. */
  setWeights(weights: NamedWeights): void { this.params.setWeights(weights, 'GRU'); }

  dispose(): void { this.params.dispose(); }
}

export interface GruTrainSettings {
  learningRate: number;
  /** Global-norm gradient clipping threshold; 0 = off. */
  clipNorm: number;
}

export interface GruStepResult {
  /** Mean negative log-likelihood per word (nats) — the training loss. */
  loss: number;
  /** Mean exact log-likelihood per word (nats); always a true value, not a bound. */
  boundNatsPerWord: number;
  /** Exact cross entropy in bits per character (EOW counted as a character). */
  boundBitsPerChar: number;
  /** The GRU figure is an exact likelihood (it bounds nothing), reported in the same slot as the SSM bound. */
  isBound: true;
  gradNorm: number;
}

/** Adam with global-norm clipping; one tf.tidy and one two-number read per step; weights untouched on a non-finite loss. */
export class GruTrainer {
  private readonly adam: Adam;

  constructor(readonly model: GruLanguageModel, readonly train: GruTrainSettings) {
    if (!(train.clipNorm >= 0)) throw new Error(`The clipping norm must be 0 (off) or positive (got ${train.clipNorm}).`);
    this.adam = new Adam(model.variables, model.variableNames, { learningRate: train.learningRate });
  }

  get stepCount(): number { return this.adam.t; }

  step(batch: EncodedBatch): GruStepResult {
    const chars = batch.lengths.reduce((s, n) => s + n, 0);
    const read = tf.tidy(() => {
      const vars = this.model.variables;
      const { value, grads } = tf.variableGrads(() => tf.neg(tf.mean(this.model.logLikelihood(batch))) as tf.Scalar, vars);
      const flat = flattenTensors(vars.map((v) => grads[v.name] as tf.Tensor));
      const norm = tf.sqrt(tf.sum(tf.square(flat)));
      const both = tf.stack([value, norm]).dataSync(); // the one read of the step
      const loss = both[0] as number;
      const gradNorm = both[1] as number;
      if (!Number.isFinite(loss) || !Number.isFinite(gradNorm)) return { loss, gradNorm, ok: false };
      const factor = this.train.clipNorm > 0 ? Math.min(1, this.train.clipNorm / Math.max(gradNorm, 1e-12)) : 1;
      this.adam.applyFlat(factor === 1 ? flat : (tf.mul(flat, factor) as tf.Tensor1D));
      return { loss, gradNorm, ok: true };
    });
    if (!read.ok) throw new NonFiniteLossError(this.adam.t + 1, this.adam.t);
    const nats = -read.loss;
    return {
      loss: read.loss, boundNatsPerWord: nats, boundBitsPerChar: (nats * batch.batchSize) / chars / Math.LN2,
      isBound: true, gradNorm: read.gradNorm,
    };
  }

  /** Adam moments and update count for checkpoints (`t`, `m/<weight>`, `v/<weight>`). */
  getOptimizerState(): NamedWeights { return this.adam.getState(); }

  setOptimizerState(state: NamedWeights): void { this.adam.setState(state); }

  dispose(): void { this.adam.dispose(); }
}

/** [N, V] float one-hot rows of `ids`, each row scaled by `weight[i]` (default 1). */
export function oneHotRows(ids: ArrayLike<number>, v: number, weight?: ArrayLike<number>): tf.Tensor2D {
  const out = new Float32Array(ids.length * v);
  for (let i = 0; i < ids.length; i++) out[i * v + (ids[i] as number)] = weight ? (weight[i] as number) : 1;
  return tf.tensor2d(out, [ids.length, v]);
}
