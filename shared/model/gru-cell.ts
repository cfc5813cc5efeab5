/**
 * A GRU cell in TF.js ops (Cho et al. 2014; the variant with the reset gate applied to the recurrent
 * projection, as in cuDNN). The input projection `x Wx + bx` of all steps is computed in one matmul outside
 * the loop; each step does one fused matmul `h Wh + bh` for the three gates.
 */
import * as tf from '@tensorflow/tfjs-core';

/**
 * One step. `xProj`: [N, 3H] input projection (reset | update | candidate); `h`: [N, H];
 * `wh`: [H, 3H]; `bh`: [3H]. Returns the new state [N, H].
 */
export function gruStep(xProj: tf.Tensor2D, h: tf.Tensor2D, wh: tf.Tensor2D, bh: tf.Tensor1D): tf.Tensor2D {
  const hProj = tf.add(tf.matMul(h, wh), bh);
  const [xr, xz, xn] = tf.split(xProj, 3, 1);
  const [hr, hz, hn] = tf.split(hProj, 3, 1);
  const reset = tf.sigmoid(tf.add(xr as tf.Tensor, hr as tf.Tensor));
  const update = tf.sigmoid(tf.add(xz as tf.Tensor, hz as tf.Tensor));
  const candidate = tf.tanh(tf.add(xn as tf.Tensor, tf.mul(reset, hn as tf.Tensor)));
  // h' = (1 - u) * n + u * h  =  n + u * (h - n)
  return tf.add(candidate, tf.mul(update, tf.sub(h, candidate))) as tf.Tensor2D;
}
