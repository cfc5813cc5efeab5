/**
 * The small conditioning network used inside every flow layer: one hidden `tanh` layer, then a linear
 * output. Its output columns are fused (e.g. `mu` and the pre-activation of `sigma` come from one matmul).
 * The first layer's product with the context c is computed by the caller (`ctxPre = c W1 + b1`), so several
 * conditioners on the same c share one matmul; `conditionerOutput` does the rest.
 */
import * as tf from '@tensorflow/tfjs-core';
import { addBias } from '../bias-add';
import { glorot, zeros, type ParamSpecs } from '../params';

/** Softplus pre-activation that gives a scale of exactly 1 at start: log(e - 1). */
export const SOFTPLUS_INVERSE_OF_ONE = Math.log(Math.E - 1);
/** Floor added to every softplus scale (MODEL.md section 8: bound every scale). */
export const SCALE_FLOOR = 1e-4;

/** Parameter specs of a conditioner `in -> hidden (tanh) -> out`, named `<prefix>w1`, `b1`, `w2`, `b2`. */
export function conditionerSpecs(prefix: string, inDim: number, hidden: number, outDim: number, outBias?: number[]): ParamSpecs {
  const specs: ParamSpecs = {
    [`${prefix}w1`]: glorot(inDim, hidden),
    [`${prefix}b1`]: zeros([hidden]),
    [`${prefix}w2`]: glorot(hidden, outDim, 0.5),
    [`${prefix}b2`]: zeros([outDim]),
  };
  if (outBias) specs[`${prefix}b2`] = { shape: [outDim], init: { kind: 'values', values: outBias } };
  return specs;
}

export type VariableLookup = (name: string) => tf.Variable;

/** The context part of a conditioner whose whole input is c: `W1` and `b1`. */
export function contextOf(get: VariableLookup, prefix: string): { w: tf.Tensor2D; b: tf.Tensor1D } {
  return { w: get(`${prefix}w1`) as tf.Tensor2D, b: get(`${prefix}b1`) as tf.Tensor1D };
}

/** `tanh(pre) W2 + b2` from the first layer's pre-activation. */
export function conditionerOutput(get: VariableLookup, prefix: string, pre: tf.Tensor2D): tf.Tensor2D {
  return addBias(tf.matMul(tf.tanh(pre), get(`${prefix}w2`)), get(`${prefix}b2`) as tf.Tensor1D);
}

/** `softplus(x) + 1e-4`: a positive scale bounded away from zero. */
export function boundedScale(pre: tf.Tensor): tf.Tensor {
  return tf.add(tf.softplus(pre), SCALE_FLOOR);
}
