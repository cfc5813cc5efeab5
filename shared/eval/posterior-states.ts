/**
 * Posterior trajectories of evaluation words: K proposal samples per word, one of them chosen with
 * probability ∝ W_k (sampling importance resampling, so the chosen path follows the posterior more closely
 * than a raw proposal sample). Returned as plain arrays: the previous states h_{t-1} (h_0 for t = 1) and the
 * states h_t of every unmasked step, row by row in word order.
 */
import * as tf from '@tensorflow/tfjs-core';
import { encodeBatch, type Alphabet } from '../data/encode';
import { createRng } from '../data/random';
import type { SsmView } from './model-view';
import { chunkRanges } from './units';

export interface PosteriorRows {
  d: number;
  /** [R, d] row-major: h_{t-1} for each (word, step) row. */
  prev: Float32Array;
  /** [R, d] row-major: h_t for each row. */
  curr: Float32Array;
  /** Word index and step (0-based) of each row. */
  word: Int32Array;
  step: Int32Array;
  /** Step count T of each word. */
  lengths: Int32Array;
}

export function posteriorRows(model: SsmView, words: readonly string[], alphabet: Alphabet,
                              opts: { k: number; seed: number | string; wordChunk?: number }): PosteriorRows {
  const rng = createRng(opts.seed).fork('posterior-states');
  const h0 = model.initialState();
  const h0v = h0.dataSync().slice();
  h0.dispose();
  const d = h0v.length;
  const lengths = Int32Array.from(words.map((w) => Array.from(w).length + 1));
  const rows = lengths.reduce((s, n) => s + n, 0);
  const prev = new Float32Array(rows * d);
  const curr = new Float32Array(rows * d);
  const word = new Int32Array(rows);
  const step = new Int32Array(rows);
  let r = 0;
  for (const [a, b] of chunkRanges(words.length, opts.wordChunk ?? 64)) {
    const batch = encodeBatch(words.slice(a, b), alphabet);
    const { logW, states } = model.logWeights(batch, opts.k, { returnStates: true, seed: rng.seed() });
    if (!states) throw new Error('Internal error: the model did not return its posterior states.');
    const lw = logW.dataSync();
    const st = states.dataSync(); // [K, B, T, d]
    logW.dispose();
    states.dispose();
    const B = b - a;
    const T = batch.maxLen;
    for (let i = 0; i < B; i++) {
      const kk = pickByLogWeight(Array.from(lw.subarray(i * opts.k, (i + 1) * opts.k)), rng.next());
      const base = (kk * B + i) * T * d;
      for (let t = 0; t < (batch.lengths[i] as number); t++, r++) {
        word[r] = a + i;
        step[r] = t;
        curr.set(st.subarray(base + t * d, base + (t + 1) * d), r * d);
        if (t === 0) prev.set(h0v, r * d);
        else prev.set(st.subarray(base + (t - 1) * d, base + t * d), r * d);
      }
    }
  }
  return { d, prev, curr, word, step, lengths };
}

/** Index drawn with probability ∝ exp(logW_k), using the uniform number u ∈ [0, 1). */
export function pickByLogWeight(logW: readonly number[], u: number): number {
  const m = Math.max(...logW);
  const w = logW.map((l) => Math.exp(l - m));
  const total = w.reduce((s, x) => s + x, 0);
  let acc = 0;
  for (let k = 0; k < w.length; k++) {
    acc += (w[k] as number) / total;
    if (u < acc) return k;
  }
  return w.length - 1;
}

/** Runs `fn` on consecutive row blocks of a [R, d] array as tensors and concatenates the [rows] results. */
export function mapRowBlocks(rowsData: Float32Array, d: number, blockRows: number,
                             fn: (x: tf.Tensor2D, start: number) => tf.Tensor1D): Float64Array {
  const R = rowsData.length / d;
  const out = new Float64Array(R);
  for (const [a, b] of chunkRanges(R, Math.max(1, blockRows))) {
    const res = tf.tidy(() => fn(tf.tensor2d(rowsData.subarray(a * d, b * d), [b - a, d]), a));
    out.set(res.dataSync(), a);
    res.dispose();
  }
  return out;
}
