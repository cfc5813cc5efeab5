/**
 * The per-sample log-weight log W of MODEL.md section 5, for K proposal samples per word, written for few
 * kernel launches (per-kernel overhead dominates at these sizes):
 * - only the proposal and the inference flow run step by step (`ssm-recurrence.ts`, one op with a hand-written
 *   gradient: each weight's gradient is one matmul over all steps);
 * - the generative flow's inverse, the observation term and the Gaussian terms of all steps are computed after
 *   the loop, on [T, K, B, ...] stacks (automatic differentiation, a few kernels each), and masked by one multiply.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { EncodedBatch } from '../data/encode';
import { addBias } from './bias-add';
import type { ConditionalFlow } from './flows/flow';
import { proposalRecurrence } from './ssm-recurrence';
import type { SsmSettings } from './ssm-settings';

/** What the computation needs from the model. */
export interface LogWeightModel {
  readonly settings: SsmSettings;
  readonly generativeFlow: ConditionalFlow;
  readonly inferenceFlow: ConditionalFlow;
  param(name: string): tf.Variable;
  encodeBackward(batch: EncodedBatch): tf.Tensor3D;
  observationLogits(h: tf.Tensor2D): tf.Tensor2D;
}

/** log W as [B, K] and, if asked, the sampled states as [K, B, T, d]. Call inside a tf.tidy. */
export function computeLogWeights(
  m: LogWeightModel, batch: EncodedBatch, k: number, seed: number, beta: number, returnStates: boolean,
): { logW: tf.Tensor2D; states?: tf.Tensor4D } {
  const { batchSize: B, maxLen: T } = batch;
  const { stateSize: d, encoderSize: H, proposalHidden: P } = m.settings;
  const N = B * k;
  const p = (n: string) => m.param(n);
  const gen = m.generativeFlow.prepare();
  const inf = m.inferenceFlow.prepare();
  // Rows are k*B + b (sample k of word b); word-level inputs are broadcast over the K samples once per call.
  const enc = m.encodeBackward(batch); // [T, B, H]
  const bProj = tf.reshape(addBias(tf.matMul(tf.reshape(enc, [T * B, H]), p('prop.wb')), p('prop.b1') as tf.Tensor1D), [T, B, P]);
  // Every first-layer term of the step-by-step part that does not depend on h_{t-1}, for all steps at once: the
  // proposal's word-level input (with prop.b1) repeated for the K samples, then the inference flow's first-layer
  // biases. [T, N, P + flow width] (Broadcast onto zeros rather than tf.tile: the gradient of tile is a slice and
  // an add per copy.)
  const propInput = tf.reshape(tf.add(tf.zeros([T, k, B, P]), tf.reshape(bProj, [T, 1, B, P])), [T, N, P]);
  const bias = tf.concat([propInput, tf.add(tf.zeros([T, N, inf.contextWidth]), inf.contextB)], 2) as tf.Tensor3D;
  const eps = tf.randomNormal([T, N, d], 0, 1, 'float32', seed) as tf.Tensor3D;
  const h0 = tf.add(tf.zeros([N, d]), p('h0')) as tf.Tensor2D;
  // Proposal and inference flow, step by step (hand-written gradient): h_t and L_t = sum log s_t + logdet f_q.
  const hl = proposalRecurrence({
    h0, eps, bias,
    w: tf.concat([p('prop.wh'), inf.contextW], 1) as tf.Tensor2D,
    w2: p('prop.w2') as tf.Tensor2D,
    b2: p('prop.b2') as tf.Tensor1D,
    layers: inf.layers,
    layerWidth: m.settings.flowHidden,
  });
  const [hs, proposalLogDets] = tf.split(hl, [d, 1], 2) as [tf.Tensor3D, tf.Tensor3D]; // [T, N, d], [T, N, 1]
  // The generative flow's inverse does not feed the next step: all steps at once, eps_t = f_g^{-1}(h_t; h_{t-1}).
  const hPrev = T === 1 ? tf.reshape(h0, [1, N, d]) : tf.concat([tf.reshape(h0, [1, N, d]), tf.slice(hs, [0, 0, 0], [T - 1, N, d])], 0);
  const g = gen.inverseFromContext(tf.reshape(hPrev, [T * N, d]) as tf.Tensor2D, tf.reshape(hs, [T * N, d]) as tf.Tensor2D);
  // log N(eps_t; 0, I) + logdet_g - log N(xi_t; m, s^2) + logdet_q; the -d/2 log(2 pi) terms cancel:
  // = 0.5 * (|e|^2 - |eps_t|^2) + sum log s + logdet_q + logdet_g   (xi = m + s * e).
  const quadratic = tf.mul(tf.sub(tf.sum(tf.square(eps), 2), tf.reshape(tf.sum(tf.square(g.z), 1), [T, N])), 0.5);
  const logDets = tf.add(tf.reshape(proposalLogDets, [T, N]), tf.reshape(g.logdet, [T, N]));
  const latent = tf.reshape(tf.add(quadratic, logDets), [T, k, B]);
  return observedLogWeights(m, batch, hs, latent, k, beta, returnStates);
}

/**
 * log W [B, K] from the states `hs` [T, N, d] and the latent term `latent` [T, K, B]: log p(w_t | h_t) plus beta
 * times the latent term, masked and summed over steps; and, if asked, the states as [K, B, T, d].
 */
export function observedLogWeights(
  m: Pick<LogWeightModel, 'settings' | 'observationLogits'>, batch: EncodedBatch, hs: tf.Tensor3D, latent: tf.Tensor,
  k: number, beta: number, returnStates: boolean,
): { logW: tf.Tensor2D; states?: tf.Tensor4D } {
  const { batchSize: B, maxLen: T } = batch;
  const { stateSize: d, vocabSize: V } = m.settings;
  const N = B * k;
  // log p(w_t | h_t) for all steps at once: one-hot targets [T, 1, B, V] broadcast over the K samples.
  const logProbs = tf.reshape(tf.logSoftmax(m.observationLogits(tf.reshape(hs, [T * N, d]) as tf.Tensor2D)), [T, k, B, V]);
  const idsT = tf.transpose(tf.tensor2d(batch.ids, [B, T], 'int32'));
  const target = tf.reshape(tf.cast(tf.oneHot(idsT, V), 'float32'), [T, 1, B, V]);
  const logObs = tf.sum(tf.mul(logProbs, target), 3); // [T, K, B]
  const perStep = tf.add(logObs, beta === 1 ? latent : tf.mul(latent, beta));
  const mask = tf.reshape(tf.transpose(tf.tensor2d(batch.mask, [B, T])), [T, 1, B]);
  const total = tf.sum(tf.mul(perStep, mask), 0); // masked steps add 0; [K, B]
  const logW = tf.transpose(total) as tf.Tensor2D;
  if (!returnStates) return { logW };
  return { logW, states: tf.transpose(tf.reshape(hs, [T, k, B, d]), [1, 2, 0, 3]) as tf.Tensor4D };
}
