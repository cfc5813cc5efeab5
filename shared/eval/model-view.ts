/**
 * The part of the state-space model API (shared/model/ssm.ts) that the estimators use. Written as a
 * structural interface so the estimators can be read (and tested) without the training machinery;
 * `StateSpaceModel` satisfies it.
 */
import type * as tf from '@tensorflow/tfjs-core';
import type { EncodedBatch } from '../data/encode';

export interface SsmView {
  /** h_0, size d. */
  initialState(): tf.Tensor1D;
  /** f_g(h_{t-1}, xi): [N, d] × [N, d] → [N, d]. */
  transition(hPrev: tf.Tensor2D, xi: tf.Tensor2D): tf.Tensor2D;
  /** log p(. | h): [N, d] → [N, V]. */
  observationLogProbs(h: tf.Tensor2D): tf.Tensor2D;
  /** States h_1..h_tMax of n prior trajectories: [n, tMax, d]. */
  samplePrior(n: number, tMax: number, seed: number): tf.Tensor3D;
  /** Per-sample log-weights [B, K] (and posterior states [K, B, T, d] when asked). */
  logWeights(batch: EncodedBatch, k: number, opts?: { returnStates?: boolean; seed?: number }):
    { logW: tf.Tensor2D; states?: tf.Tensor4D };
}
