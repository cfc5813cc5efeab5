/**
 * Row-bias addition `x + b` ([R, C] + [C]) whose gradient for b — the column sums of the upstream gradient — is
 * one matmul with a row of ones. Automatic differentiation of a broadcast add sums over axis 0 instead, which the
 * WASM backend does by transposing first: about 20 ms for a [7168, 96] gradient against well under 1 ms through
 * the matmul path. Same values up to the order of float32 additions.
 */
import * as tf from '@tensorflow/tfjs-core';

/** Column sums of a matrix, [R, C] -> [C], as ones[1, R] x. */
export function columnSums(x: tf.Tensor2D): tf.Tensor1D {
  const [R, C] = x.shape;
  return tf.reshape(tf.matMul(tf.ones([1, R]), x), [C]) as tf.Tensor1D;
}

const addRowBias = tf.customGrad((...args: Array<tf.Tensor | tf.GradSaveFunc>) => {
  const [x, b] = args as [tf.Tensor2D, tf.Tensor1D];
  return {
    value: tf.add(x, b) as tf.Tensor2D,
    gradFunc: (dy: tf.Tensor) => [dy, columnSums(dy as tf.Tensor2D)],
  };
});

/** `x + b` for x [R, C] and b [C]. */
export function addBias(x: tf.Tensor2D, b: tf.Tensor1D): tf.Tensor2D {
  return addRowBias(x, b) as tf.Tensor2D;
}
