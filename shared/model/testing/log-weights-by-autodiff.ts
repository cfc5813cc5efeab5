/**
 * The log-weight computation as it was before the hand-written gradient of the inference recurrence: every step
 * (proposal, inference flow, generative flow's inverse) in one loop, differentiated by TF.js's automatic
 * differentiation. Kept only as the reference the tests compare the faster code's values and gradients with.
 * The observation term and masking after the loop are not part of what is compared (automatic differentiation
 * on both sides), so they are the production code's own `observedLogWeights`.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { EncodedBatch } from '../../data/encode';
import { boundedScale } from '../flows/conditioner';
import { observedLogWeights, type LogWeightModel } from '../ssm-log-weights';

/** log W as [B, K] and, if asked, the sampled states as [K, B, T, d]. Call inside a tf.tidy. */
export function computeLogWeightsByAutodiff(
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
  const bProj = tf.reshape(tf.add(tf.matMul(tf.reshape(enc, [T * B, H]), p('prop.wb')), p('prop.b1')), [T, B, P]);
  // Every first-layer term that does not depend on h_{t-1}, for all steps at once: the proposal's word-level
  // input (with prop.b1) repeated for the K samples, then both flows' first-layer biases. [T, N, P + flow widths]
  // (Broadcast onto zeros rather than tf.tile: the gradient of tile is a slice and an add per copy.)
  const flowB = tf.concat([inf.contextB, gen.contextB]);
  const flowBiases = tf.add(tf.zeros([T, N, flowB.shape[0]]), flowB);
  const propInput = tf.reshape(tf.add(tf.zeros([T, k, B, P]), tf.reshape(bProj, [T, 1, B, P])), [T, N, P]);
  const biasSteps = tf.unstack(tf.concat([propInput, flowBiases], 2)) as tf.Tensor2D[];
  const wCtx = tf.concat([p('prop.wh'), inf.contextW, gen.contextW], 1); // [d, P + widths of both flows]
  const eps = tf.randomNormal([T, N, d], 0, 1, 'float32', seed);
  const noise = tf.unstack(eps) as tf.Tensor2D[];
  let hPrev = tf.add(tf.zeros([N, d]), p('h0')) as tf.Tensor2D;
  const states: tf.Tensor2D[] = [];
  const zs: tf.Tensor2D[] = [];
  // Per-step pieces of the log-determinant terms, combined after the loop (same additions in the same order).
  const stds: tf.Tensor2D[] = [];
  const genLogDets: tf.Tensor1D[] = [];
  const infLogDets: tf.Tensor1D[] = [];
  for (let t = 0; t < T; t++) {
    const pre = tf.add(tf.matMul(hPrev, wCtx), biasSteps[t] as tf.Tensor2D) as tf.Tensor2D;
    const [propPre, infPre, genPre] = tf.split(pre, [P, inf.contextWidth, gen.contextWidth], 1) as tf.Tensor2D[];
    // Proposal q(xi_t | h_{t-1}, b_t) = N(m, diag(s^2)), s = softplus(.) + 1e-4; reparameterised sample.
    const [mean, scalePre] = tf.split(tf.add(tf.matMul(tf.tanh(propPre as tf.Tensor2D), p('prop.w2')), p('prop.b2')), 2, 1);
    const std = boundedScale(scalePre as tf.Tensor);
    const xi = tf.add(mean as tf.Tensor, tf.mul(std, noise[t] as tf.Tensor2D)) as tf.Tensor2D;
    const q = inf.forward(infPre as tf.Tensor2D, xi); // h_t and log |det d f_q / d xi|
    const g = gen.inverse(genPre as tf.Tensor2D, q.y); // eps_t = f_g^{-1}(h_t) and its log-det
    stds.push(std as tf.Tensor2D);
    genLogDets.push(g.logdet);
    infLogDets.push(q.logdet);
    zs.push(g.z);
    states.push(q.y);
    hPrev = q.y;
  }
  const hs = tf.stack(states, 0) as tf.Tensor3D; // [T, N, d]
  // log N(eps_t; 0, I) + logdet_g - log N(xi_t; m, s^2) + logdet_q; the -d/2 log(2 pi) terms cancel:
  // = 0.5 * (|e|^2 - |eps_t|^2) + sum log s + logdet_g + logdet_q   (xi = m + s * e).
  const quadratic = tf.mul(tf.sub(tf.sum(tf.square(eps), 2), tf.sum(tf.square(tf.stack(zs, 0)), 2)), 0.5);
  const logDets = tf.add(tf.add(tf.sum(tf.log(tf.stack(stds, 0)), 2), tf.stack(genLogDets, 0)), tf.stack(infLogDets, 0));
  const latent = tf.reshape(tf.add(quadratic, logDets), [T, k, B]);
  return observedLogWeights(m, batch, hs, latent, k, beta, returnStates);
}
