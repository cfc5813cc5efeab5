/**
 * Scoring many words with ONE set of prior trajectories (MODEL.md §7). The model is non-autoregressive, so
 * S trajectories h^(s)_{1..Tmax} sampled once from the prior serve every word:
 *   A[s, t, c] = log p(c | h^(s)_t)                       (computed once)
 *   log p̂(w)  = logsumexp_s Σ_t A[s, t, w_t] − log S      (an unbiased estimate of p(w) inside the log)
 * A is built in chunks of samples and the words are scored in batches with one matmul per batch and chunk, so
 * memory stays bounded by (sample chunk × word batch) plus the batch's one-hot columns (≤ 4M floats).
 */
import * as tf from '@tensorflow/tfjs-core';
import type { SsmView } from './model-view';
import { chunkRanges } from './units';

export interface SharedTrajectoryOptions {
  /** Number S of prior trajectories. */
  samples: number;
  seed: number;
  /** Trajectories per chunk (default 256). */
  sampleChunk?: number;
  /** Sequences per gather (default 1024). */
  wordChunk?: number;
}

/** Log-probability tables A for S prior trajectories, in chunks: each [s, tMax, V]. The caller disposes them. */
export function trajectoryTables(model: SsmView, tMax: number, opts: SharedTrajectoryOptions): tf.Tensor3D[] {
  const chunk = opts.sampleChunk ?? 256;
  return chunkRanges(opts.samples, chunk).map(([a, b], i) => tf.tidy(() => {
    const n = b - a;
    const h = model.samplePrior(n, tMax, opts.seed + 7919 * i);
    const d = h.shape[2];
    const lp = model.observationLogProbs(tf.reshape(h, [n * tMax, d]) as tf.Tensor2D);
    return tf.reshape(lp, [n, tMax, lp.shape[1]]) as tf.Tensor3D;
  }));
}

/**
 * log p̂ of each id sequence (nats): logsumexp over all trajectories of the summed log-probabilities, minus log S.
 * Each sequence is scored as given (add EOW yourself for whole words; leave it off for a prefix).
 */
export function scoreWithTables(tables: tf.Tensor3D[], sequences: readonly ArrayLike<number>[], wordChunk = 1024): Float64Array {
  if (tables.length === 0) throw new Error('Internal error: no trajectory tables to score with.');
  const [, tMax, v] = (tables[0] as tf.Tensor3D).shape;
  const total = tables.reduce((s, t) => s + t.shape[0], 0);
  for (const seq of sequences) {
    if (seq.length > tMax) throw new Error(`A sequence of ${seq.length} steps is longer than the ${tMax} trajectory steps.`);
  }
  const out = new Float64Array(sequences.length).fill(-Infinity);
  // Σ_t A[s, t, w_t] for a batch of words is one matmul of A (flattened to [s, tMax·V]) with the words' one-hot
  // columns [tMax·V, words]; padded steps have no 1, so they add nothing. (About 10× faster than a gather in WASM.)
  const rows = tMax * v;
  const chunk = Math.max(1, Math.min(wordChunk, Math.floor(4_000_000 / rows)));
  const flat = tables.map((t) => tf.reshape(t, [t.shape[0], rows]) as tf.Tensor2D);
  for (const [a, b] of chunkRanges(sequences.length, chunk)) {
    const n = b - a;
    const oneHot = new Float32Array(rows * n);
    for (let i = a; i < b; i++) {
      const seq = sequences[i] as ArrayLike<number>;
      for (let t = 0; t < seq.length; t++) oneHot[(t * v + (seq[t] as number)) * n + (i - a)] = 1;
    }
    const cols = tf.tensor2d(oneHot, [rows, n]);
    for (const table of flat) {
      const lse = tf.tidy(() => tf.logSumExp(tf.matMul(table, cols), 0)); // [words]
      const vals = lse.dataSync();
      lse.dispose();
      for (let i = a; i < b; i++) out[i] = logAddExp(out[i] as number, vals[i - a] as number);
    }
    cols.dispose();
  }
  for (const t of flat) t.dispose();
  for (let i = 0; i < out.length; i++) out[i] = (out[i] as number) - Math.log(total);
  return out;
}

/** Convenience: sample the tables, score, dispose. */
export function sharedTrajectoryLogProbs(model: SsmView, sequences: readonly ArrayLike<number>[],
                                         opts: SharedTrajectoryOptions & { tMax?: number }): Float64Array {
  if (!Number.isInteger(opts.samples) || opts.samples < 1) {
    throw new Error(`The number of prior trajectories S must be a positive whole number (got ${opts.samples}).`);
  }
  const tMax = opts.tMax ?? sequences.reduce((m, s) => Math.max(m, s.length), 1);
  const tables = trajectoryTables(model, tMax, opts);
  try {
    return scoreWithTables(tables, sequences, opts.wordChunk);
  } finally {
    for (const t of tables) t.dispose();
  }
}

export function logAddExp(a: number, b: number): number {
  if (a === -Infinity) return b;
  if (b === -Infinity) return a;
  const m = Math.max(a, b);
  return m + Math.log(Math.exp(a - m) + Math.exp(b - m));
}
