/** Gaussian log-densities used by the model, summed over the last axis (natural logs). */
import * as tf from '@tensorflow/tfjs-core';

export const LOG_2PI = Math.log(2 * Math.PI);

/** `sum_i log N(x_i; 0, 1)` over the last axis of x. */
export function standardNormalLogPdf(x: tf.Tensor): tf.Tensor {
  const d = x.shape[x.shape.length - 1] as number;
  return tf.sub(tf.mul(tf.sum(tf.square(x), -1), -0.5), 0.5 * d * LOG_2PI);
}

/**
 * `sum_i log N(x_i; mean_i, std_i^2)` over the last axis, given the standardised value `eps = (x - mean)/std`
 * and `log std` (the form the reparameterised sampler already has, which avoids a division).
 */
export function diagNormalLogPdfFromEps(eps: tf.Tensor, logStd: tf.Tensor): tf.Tensor {
  return tf.sub(standardNormalLogPdf(eps), tf.sum(logStd, -1));
}

/** `sum_i log N(x_i; mean_i, std_i^2)` over the last axis. */
export function diagNormalLogPdf(x: tf.Tensor, mean: tf.Tensor, std: tf.Tensor): tf.Tensor {
  return diagNormalLogPdfFromEps(tf.div(tf.sub(x, mean), std), tf.log(std));
}
