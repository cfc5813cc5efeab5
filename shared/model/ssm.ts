/**
 * The non-autoregressive stochastic state-space model (MODEL.md sections 2, 4 and 5):
 * h_t = f_g(h_{t-1}, xi_t) with xi_t ~ N(0, I), w_t | h_t ~ softmax(obs(h_t)); trained through an amortised
 * proposal q(xi_t | h_{t-1}, b_t) with b_t from a backward GRU over the rest of the word, h_t = f_q(h_{t-1}, xi_t).
 */
import * as tf from '@tensorflow/tfjs-core';
import { createRng, type Rng } from '../data/random';
import type { EncodedBatch } from '../data/encode';
import { addBias } from './bias-add';
import { createFlow, type ConditionalFlow } from './flows/flow';
import { backwardGruSequence } from './gru-sequence';
import { checkWeightShapes, ParamSet, type NamedWeights } from './params';
import { computeLogWeights } from './ssm-log-weights';
import { flowDimsOf, ssmCoreParamSpecs, ssmParamSpecs, validateSsmSettings, type SsmSettings } from './ssm-settings';

export type { SsmSettings } from './ssm-settings';
export type { NamedWeights } from './params';

export interface LogWeightOptions {
  /** Seed of the proposal noise; drawn from the model's own noise stream when omitted. */
  seed?: number;
  /** Weight on the prior/posterior terms (warm-up); 1 (the default) gives the true log-weight. */
  klWeight?: number;
  /** Also return the sampled trajectories h_1..h_T as [K, B, T, d]. */
  returnStates?: boolean;
}

export interface LogWeightResult {
  /** log W per word and sample, [B, K] (row b, column k). */
  logW: tf.Tensor2D;
  states?: tf.Tensor4D;
}

export class StateSpaceModel {
  readonly settings: SsmSettings;
  /** The seed the model was built from (initial weights and the default noise stream). */
  readonly seed: number | string;
  readonly generativeFlow: ConditionalFlow;
  readonly inferenceFlow: ConditionalFlow;
  private readonly core: ParamSet;
  private readonly noise: Rng;

  /** Builds the model with seeded Glorot-uniform initial weights (same settings + seed = same weights). */
  constructor(settings: SsmSettings, seed: number | string) {
    validateSsmSettings(settings);
    this.settings = structuredClone(settings);
    this.seed = seed;
    const rng = createRng(seed);
    const dims = flowDimsOf(settings);
    this.core = new ParamSet(ssmCoreParamSpecs(settings), rng.fork('core'));
    this.generativeFlow = createFlow(settings.generativeFlow, dims.dim, dims.ctxDim, dims.hidden, rng.fork('gen'));
    this.inferenceFlow = createFlow(settings.inferenceFlow, dims.dim, dims.ctxDim, dims.hidden, rng.fork('inf'));
    this.noise = rng.fork('noise');
  }

  /** All trainable variables (core, generative flow, inference flow). */
  get variables(): tf.Variable[] {
    return [...this.core.list(), ...this.generativeFlow.variables, ...this.inferenceFlow.variables];
  }

  /** Names of `variables` in the same order, as used by `getWeights`. */
  get variableNames(): string[] {
    return [
      ...this.core.nameList,
      ...this.generativeFlow.variableNames.map((n) => `gen/${n}`),
      ...this.inferenceFlow.variableNames.map((n) => `inf/${n}`),
    ];
  }

  get parameterCount(): number {
    return this.core.parameterCount + this.generativeFlow.parameterCount + this.inferenceFlow.parameterCount;
  }

  /** A fresh noise seed from the model's seeded stream. */
  nextSeed(): number {
    return this.noise.seed();
  }

  initialState(): tf.Tensor1D {
    return this.core.get('h0').clone() as tf.Tensor1D;
  }

  /** h_t = f_g(h_{t-1}, xi_t); [N, d] each. */
  transition(hPrev: tf.Tensor2D, xi: tf.Tensor2D): tf.Tensor2D {
    return tf.tidy(() => this.generativeFlow.forward(hPrev, xi).y);
  }

  /** xi = f_g^{-1}(h; h_{t-1}) and log |det d f_g^{-1} / d h| per row. */
  transitionInverse(hPrev: tf.Tensor2D, h: tf.Tensor2D): { xi: tf.Tensor2D; logdet: tf.Tensor1D } {
    const r = this.generativeFlow.inverse(hPrev, h);
    return { xi: r.z, logdet: r.logdet };
  }

  /** log p(. | h) for each row: [N, d] -> [N, V] (log-softmax of the observation layer). */
  observationLogProbs(h: tf.Tensor2D): tf.Tensor2D {
    return tf.tidy(() => tf.logSoftmax(this.observationLogits(h)));
  }

  /** Observation logits [N, V] (before the softmax). */
  observationLogits(h: tf.Tensor2D): tf.Tensor2D {
    const p = (n: string) => this.core.get(n);
    if (this.settings.observationHidden > 0) {
      const hidden = tf.tanh(addBias(tf.matMul(h, p('obs.w1')), p('obs.b1') as tf.Tensor1D)) as tf.Tensor2D;
      return addBias(tf.matMul(hidden, p('obs.w2')), p('obs.b2') as tf.Tensor1D);
    }
    return addBias(tf.matMul(h, p('obs.w')), p('obs.b') as tf.Tensor1D);
  }

  /** Prior trajectories h_1..h_tMax of n samples, [n, tMax, d]; no data involved. */
  samplePrior(n: number, tMax: number, seed: number = this.nextSeed()): tf.Tensor3D {
    checkCount('samplePrior n', n);
    checkCount('samplePrior tMax', tMax);
    return tf.tidy(() => {
      const d = this.settings.stateSize;
      const xi = tf.randomNormal([tMax, n, d], 0, 1, 'float32', seed);
      let h = tf.tile(tf.reshape(this.core.get('h0'), [1, d]), [n, 1]) as tf.Tensor2D;
      const states: tf.Tensor2D[] = [];
      const noise = tf.unstack(xi) as tf.Tensor2D[];
      // The flow's per-call set-up (masks, stacked conditioner weights) once, not once per step.
      const flow = this.generativeFlow.prepare();
      for (let t = 0; t < tMax; t++) {
        h = flow.forward(tf.add(tf.matMul(h, flow.contextW), flow.contextB) as tf.Tensor2D, noise[t] as tf.Tensor2D).y;
        states.push(h);
      }
      return tf.stack(states, 1) as tf.Tensor3D;
    });
  }

  /**
   * Backward GRU over the embedded characters: b_t summarises w_t..w_T (padding leaves the state at zero).
   * Returns the time-major stack [T, B, H].
   */
  encodeBackward(batch: EncodedBatch): tf.Tensor3D {
    this.checkBatch(batch);
    return tf.tidy(() => {
      const { batchSize: B, maxLen: T } = batch;
      const H = this.settings.encoderSize;
      const p = (n: string) => this.core.get(n);
      const ids = tf.transpose(tf.tensor2d(batch.ids, [B, T], 'int32')); // [T, B]
      const mask = tf.transpose(tf.tensor2d(batch.mask, [B, T])); // [T, B]
      // Embedding lookup as one-hot x matrix: the WASM backend has no gradient kernel for gather. (Its OneHot
      // kernel also returns zeros when asked for float32 directly, hence int32 + cast.)
      const emb = tf.matMul(tf.cast(tf.oneHot(tf.reshape(ids, [T * B]), this.settings.vocabSize), 'float32'), p('enc.embed'));
      const xProj = tf.reshape(addBias(tf.matMul(emb, p('enc.wx')), p('enc.bx') as tf.Tensor1D), [T, B, 3 * H]);
      return backwardGruSequence(xProj as tf.Tensor3D, tf.expandDims(mask, 2) as tf.Tensor3D, p('enc.wh') as tf.Tensor2D, p('enc.bh') as tf.Tensor1D);
    });
  }

  /**
   * Log importance weights log W (MODEL.md section 5) of K proposal samples per word: [B, K].
   * The batch is tiled to B*K rows (row k*B + b is sample k of word b); masked steps contribute nothing.
   */
  logWeights(batch: EncodedBatch, k: number, opts: LogWeightOptions = {}): LogWeightResult {
    checkCount('logWeights k', k);
    const seed = opts.seed ?? this.nextSeed();
    const beta = opts.klWeight ?? 1;
    if (!(beta >= 0 && beta <= 1)) throw new Error(`The warm-up weight must lie in [0, 1]; got ${beta}.`);
    return tf.tidy(() => computeLogWeights(this, batch, k, seed, beta, opts.returnStates === true));
  }

  /** A core parameter by name (for `computeLogWeights`). */
  param(name: string): tf.Variable {
    return this.core.get(name);
  }

  /** Every weight by name (core names, `gen/...`, `inf/...`), copied out of the tensors. */
  getWeights(): NamedWeights {
    const out: NamedWeights = this.core.getWeights();
    for (const [name, w] of Object.entries(this.generativeFlow.getWeights())) out[`gen/${name}`] = w;
    for (const [name, w] of Object.entries(this.inferenceFlow.getWeights())) out[`inf/${name}`] = w;
    return out;
  }

  /** Replaces every weight; checks all names and shapes against the settings first (nothing changes on error). */
  setWeights(weights: NamedWeights): void {
    checkWeightShapes(ssmParamSpecs(this.settings), weights, 'state-space model');
    const core: NamedWeights = {};
    const gen: NamedWeights = {};
    const inf: NamedWeights = {};
    for (const [name, w] of Object.entries(weights)) {
      if (name.startsWith('gen/')) gen[name.slice(4)] = w;
      else if (name.startsWith('inf/')) inf[name.slice(4)] = w;
      else core[name] = w;
    }
    this.core.setWeights(core);
    this.generativeFlow.setWeights(gen);
    this.inferenceFlow.setWeights(inf);
  }

  /** Validates a batch for this model (sizes and ids); throws a clear error on a mismatch. */
  checkBatch(batch: EncodedBatch): void {
    checkBatchAgainst(batch, this.settings.vocabSize);
  }

  dispose(): void {
    this.core.dispose();
    this.generativeFlow.dispose();
    this.inferenceFlow.dispose();
  }
}

/** Throws if the batch's arrays do not match its sizes or an id is outside this model's vocabulary. */
function checkBatchAgainst(batch: EncodedBatch, vocabSize: number): void {
  const { batchSize: B, maxLen: T } = batch;
  if (!(B >= 1) || !(T >= 1) || batch.ids.length !== B * T || batch.mask.length !== B * T || batch.lengths.length !== B) {
    throw new Error(`The batch arrays do not match its size ${B} x ${T}; build batches with encodeBatch().`);
  }
  for (let i = 0; i < batch.ids.length; i++) {
    const id = batch.ids[i] as number;
    if (id < 0 || id >= vocabSize) {
      throw new Error(
        `Character id ${id} is outside this model's vocabulary of ${vocabSize} symbols; encode the words with the ` +
          "alphabet stored with the model.",
      );
    }
  }
}

function checkCount(what: string, n: number): void {
  if (!Number.isInteger(n) || n < 1) throw new Error(`${what} must be a positive whole number; got ${n}.`);
}
