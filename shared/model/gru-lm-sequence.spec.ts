/**
 * The GRU baseline's recurrence with its hand-written gradient (`gru-lm-sequence.ts`) against TF.js's automatic
 * differentiation of the step-by-step loop it replaced: same states and the same gradients for the inputs, the
 * initial state and both recurrent weights. Tolerance: relative 1e-5 of each tensor's largest entry (float32
 * sums in another order; common practice, no source).
 */
import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { createRng } from '../data/random';
import { initNodeBackend } from '../node/tf-node';
import { gruLmSequence } from './gru-lm-sequence';
import { maxAbs, maxDiff } from './testing/array-diff';

beforeAll(async () => {
  await initNodeBackend('wasm');
});

/** The loop as it was written before (automatic differentiation): the reference. Time-major [T, B, d]. */
function loop(x: tf.Tensor3D, h0: tf.Tensor2D, uzr: tf.Tensor2D, uh: tf.Tensor2D): tf.Tensor3D {
  const d = h0.shape[1];
  let h = h0;
  const out: tf.Tensor2D[] = [];
  for (const xt of tf.unstack(x) as tf.Tensor2D[]) {
    const [xz, xr, xh] = tf.split(xt, [d, d, d], 1);
    const [hz, hr] = tf.split(tf.matMul(h, uzr), [d, d], 1);
    const z = tf.sigmoid(tf.add(xz as tf.Tensor, hz as tf.Tensor));
    const r = tf.sigmoid(tf.add(xr as tf.Tensor, hr as tf.Tensor));
    const cand = tf.tanh(tf.add(xh as tf.Tensor, tf.matMul(tf.mul(r, h) as tf.Tensor2D, uh)));
    h = tf.add(tf.mul(z, h), tf.mul(tf.sub(1, z), cand)) as tf.Tensor2D;
    out.push(h);
  }
  return tf.stack(out) as tf.Tensor3D;
}

describe('gruLmSequence', () => {
  it('gives the states and gradients of the step-by-step loop (automatic differentiation)', () => {
    const rng = createRng('gru-lm-sequence');
    const [T, B, d] = [6, 5, 4];
    const r = (n: number, s: number) => Array.from({ length: n }, () => s * rng.normal());
    const x = tf.tensor3d(r(T * B * 3 * d, 1), [T, B, 3 * d]);
    const h0 = tf.tensor2d(r(B * d, 0.5), [B, d]);
    const uzr = tf.tensor2d(r(d * 2 * d, 0.7), [d, 2 * d]);
    const uh = tf.tensor2d(r(d * d, 0.7), [d, d]);
    const weight = tf.tensor3d(r(T * B * d, 1), [T, B, d]);
    const run = (f: typeof loop) => {
      const value = tf.tidy(() => f(x, h0, uzr, uh).dataSync() as Float32Array);
      const grads = tf.tidy(() => tf.grads((a, b, c, e) => tf.sum(tf.mul(f(a as tf.Tensor3D, b as tf.Tensor2D, c as tf.Tensor2D, e as tf.Tensor2D), weight)))([x, h0, uzr, uh]).map((g) => g.dataSync() as Float32Array));
      return { value, grads };
    };
    const fast = run(gruLmSequence);
    const ref = run(loop);
    expect(maxDiff(fast.value, ref.value)).toBeLessThanOrEqual(1e-6 * maxAbs(ref.value));
    ['x', 'h0', 'Uzr', 'Uh'].forEach((name, i) => {
      const [a, b] = [fast.grads[i] as Float32Array, ref.grads[i] as Float32Array];
      expect(a.length, name).toBe(b.length);
      expect(maxAbs(b), name).toBeGreaterThan(0);
      expect(maxDiff(a, b), name).toBeLessThanOrEqual(1e-5 * maxAbs(b));
    });
    const before = tf.memory().numTensors;
    run(gruLmSequence);
    expect(tf.memory().numTensors).toBe(before);
    tf.dispose([x, h0, uzr, uh, weight]);
  });
});
