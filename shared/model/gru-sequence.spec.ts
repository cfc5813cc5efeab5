import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { createRng } from '../data/random';
import { initNodeBackend } from '../node/tf-node';
import { gruStep } from './gru-cell';
import { backwardGruSequence } from './gru-sequence';

beforeAll(async () => {
  await initNodeBackend('wasm');
});

/** The step-by-step loop with TF.js's automatic differentiation: the reference for values and gradients. */
function loop(xProj: tf.Tensor3D, mask: tf.Tensor3D, wh: tf.Tensor2D, bh: tf.Tensor1D): tf.Tensor3D {
  const [T, B, H3] = xProj.shape;
  const xs = tf.unstack(xProj) as tf.Tensor2D[];
  const ms = tf.unstack(mask) as tf.Tensor2D[];
  let b = tf.zeros([B, H3 / 3]) as tf.Tensor2D;
  const out: tf.Tensor2D[] = new Array(T);
  for (let t = T - 1; t >= 0; t--) {
    b = tf.add(b, tf.mul(ms[t] as tf.Tensor2D, tf.sub(gruStep(xs[t] as tf.Tensor2D, b, wh, bh), b))) as tf.Tensor2D;
    out[t] = b;
  }
  return tf.stack(out) as tf.Tensor3D;
}

describe('backwardGruSequence', () => {
  it('gives the states and the gradients of the step-by-step GRU loop (autodiff), padding included', () => {
    const rng = createRng('gru-sequence');
    const [T, B, H] = [5, 4, 3];
    const r = (n: number, s: number) => Array.from({ length: n }, () => s * rng.normal());
    const x = tf.tensor3d(r(T * B * 3 * H, 1), [T, B, 3 * H]);
    const wh = tf.tensor2d(r(H * 3 * H, 0.7), [H, 3 * H]);
    const bh = tf.tensor1d(r(3 * H, 0.5));
    // Word lengths 5, 3, 1, 4: padding at the end of the shorter words.
    const lengths = [5, 3, 1, 4];
    const mask = tf.tensor3d(Array.from({ length: T * B }, (_, i) => (Math.floor(i / B) < (lengths[i % B] as number) ? 1 : 0)), [T, B, 1]);
    const weights = tf.tensor3d(r(T * B * H, 1), [T, B, H]); // a random linear read-out, so every output matters
    const loss = (f: typeof loop) => (a: tf.Tensor, b: tf.Tensor, c: tf.Tensor) =>
      tf.sum(tf.mul(tf.tanh(f(a as tf.Tensor3D, mask, b as tf.Tensor2D, c as tf.Tensor1D)), weights));
    const ref = tf.tidy(() => loop(x, mask, wh, bh).arraySync());
    const got = tf.tidy(() => backwardGruSequence(x, mask, wh, bh).arraySync());
    got.flat(2).forEach((v, i) => expect(Math.abs(v - (ref.flat(2)[i] as number))).toBeLessThan(1e-6));
    const gRef = tf.grads(loss(loop))([x, wh, bh]).map((g) => Array.from(g.dataSync()));
    const gGot = tf.grads(loss(backwardGruSequence))([x, wh, bh]).map((g) => Array.from(g.dataSync()));
    // float32, sums over a few steps: 2e-5 absolute (common practice, no source); the gradients are of order 1.
    gRef.forEach((g, k) => {
      expect(gGot[k]).toHaveLength(g.length);
      expect(Math.max(...g.map(Math.abs))).toBeGreaterThan(0.05);
      g.forEach((v, i) => expect(Math.abs((gGot[k]![i] as number) - v)).toBeLessThan(2e-5));
    });
    tf.dispose([x, wh, bh, mask, weights]);
  });
});
