import * as tf from '@tensorflow/tfjs-core';
import { beforeAll, describe, expect, it } from 'vitest';
import { createRng } from '../data/random';
import { initNodeBackend } from '../node/tf-node';
import { gruStep } from './gru-cell';

beforeAll(async () => {
  await initNodeBackend('wasm');
});

/**
 * The GRU equations in float64, written out from their definition (Cho et al. 2014, "Learning Phrase
 * Representations using RNN Encoder-Decoder for Statistical Machine Translation", eqs. 5–8), in the variant whose
 * reset gate multiplies the recurrent projection including its bias (as cuDNN and PyTorch's nn.GRU define it):
 *   r = sigm(x_r + h W_r + b_r),  u = sigm(x_u + h W_u + b_u),  n = tanh(x_n + r * (h W_n + b_n)),
 *   h' = (1 - u) * n + u * h.
 */
function gruStep64(xProj: number[][], h: number[][], wh: number[][], bh: number[]): number[][] {
  const H = h[0]!.length;
  const sigm = (v: number) => 1 / (1 + Math.exp(-v));
  return h.map((row, b) => {
    const proj = Array.from({ length: 3 * H }, (_, j) => row.reduce((s, v, i) => s + v * wh[i]![j]!, bh[j]!));
    return row.map((hv, j) => {
      const x = xProj[b]!;
      const r = sigm(x[j]! + proj[j]!);
      const u = sigm(x[H + j]! + proj[H + j]!);
      const n = Math.tanh(x[2 * H + j]! + r * proj[2 * H + j]!);
      return (1 - u) * n + u * hv;
    });
  });
}

const matrix = (rows: number, cols: number, rng: ReturnType<typeof createRng>, scale: number) =>
  Array.from({ length: rows }, () => Array.from({ length: cols }, () => scale * rng.normal()));

describe('gruStep (inference-network GRU cell)', () => {
  it('matches a float64 implementation of the GRU equations over several steps', () => {
    const rng = createRng('gru-cell');
    const N = 5;
    const H = 7;
    const wh = matrix(H, 3 * H, rng, 0.6);
    const bh = matrix(1, 3 * H, rng, 0.5)[0]!;
    const xs = [0, 1, 2, 3].map(() => matrix(N, 3 * H, rng, 1));
    let ref = matrix(N, H, rng, 0.5);
    let h = tf.tensor2d(ref);
    const w = tf.tensor2d(wh);
    const b = tf.tensor1d(bh);
    for (const x of xs) {
      ref = gruStep64(x, ref, wh, bh);
      const next = tf.tidy(() => gruStep(tf.tensor2d(x), h, w, b));
      h.dispose();
      h = next;
    }
    const got = h.arraySync();
    // float32 over four steps: 1e-5 absolute (common practice, no source); the state stays in (-1, 1).
    got.forEach((row, i) => row.forEach((v, j) => expect(Math.abs(v - ref[i]![j]!)).toBeLessThan(1e-5)));
    // The reference is not trivial: the state moved away from its start and from 0.
    expect(Math.max(...ref.flat().map(Math.abs))).toBeGreaterThan(0.1);
    tf.dispose([h, w, b]);
  });
});
