/**
 * Noise usage per time step (MODEL.md §7):
 *   I_t = I(xi_t ; w_t | h_{t-1}) = H(p̄) − mean_m H(p(. | h_t^(m))),   h_t^(m) = f_g(h_{t-1}, xi^(m)), xi^(m) ~ N(0, I)
 * with p̄ the mean of the M categorical distributions; h_{t-1} taken from posterior trajectories of the
 * evaluation words. 0 ≤ I_t ≤ log V.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { Alphabet } from '../data/encode';
import { createRng } from '../data/random';
import type { SsmView } from './model-view';
import { mapRowBlocks, posteriorRows } from './posterior-states';
import { boxStats, natsToBits } from './units';

/** I per row from log-probabilities [R·M, V] laid out row-major by (row, draw). Nats. */
export function mutualInformationFromLogProbs(logProbs: tf.Tensor2D, m: number): tf.Tensor1D {
  return tf.tidy(() => {
    const [rm, v] = logProbs.shape;
    const r = rm / m;
    const lp = tf.reshape(logProbs, [r, m, v]);
    const p = tf.exp(lp);
    const meanH = tf.mean(tf.neg(tf.sum(tf.mul(p, lp), 2)), 1);
    const pBar = tf.mean(p, 1);
    const hBar = tf.neg(tf.sum(tf.mul(pBar, tf.log(tf.maximum(pBar, 1e-30))), 1));
    return tf.sub(hBar, meanH) as tf.Tensor1D;
  });
}

export interface NoiseInformationOptions {
  /** Noise draws per h_{t-1} (MODEL.md asks for at least 64). */
  draws: number;
  /** Proposal samples per word for the posterior trajectory (one chosen by weight). */
  k?: number;
  seed: number;
  /** Bound on R·M rows per model call (default 16384). */
  maxRows?: number;
}

export interface NoiseInformation {
  draws: number;
  /** values[i][t] = I_t in bits for word i, step t (EOW step included). */
  perWord: { word: string; bits: number[] }[];
  /** One box per position t (across words that have that step), bits. */
  perPosition: { t: number; mean: number; min: number; q1: number; median: number; q3: number; max: number; n: number }[];
  /** Mean over all (word, step) pairs, bits. */
  meanBits: number;
  /** log V in bits: the upper end of every I_t. */
  maxBits: number;
}

export function noiseInformation(model: SsmView, words: readonly string[], alphabet: Alphabet,
                                 opts: NoiseInformationOptions): NoiseInformation {
  const m = opts.draws;
  if (!Number.isInteger(m) || m < 2) throw new Error(`Noise draws M must be a whole number ≥ 2 (64 or more recommended); got ${m}.`);
  if (words.length === 0) throw new Error('There are no words to measure noise usage on.');
  const rows = posteriorRows(model, words, alphabet, { k: opts.k ?? 8, seed: `${opts.seed}/mi` });
  const rng = createRng(opts.seed).fork('mi-noise');
  const d = rows.d;
  const values = mapRowBlocks(rows.prev, d, Math.floor((opts.maxRows ?? 16384) / m), (hPrev) => {
    const r = hPrev.shape[0];
    const rep = tf.reshape(tf.tile(hPrev, [1, m]), [r * m, d]) as tf.Tensor2D;
    const xi = tf.randomNormal([r * m, d], 0, 1, 'float32', rng.seed()) as tf.Tensor2D;
    return mutualInformationFromLogProbs(model.observationLogProbs(model.transition(rep, xi)), m);
  });
  const perWord = words.map((word) => ({ word, bits: [] as number[] }));
  const byPos: number[][] = [];
  let total = 0;
  values.forEach((v, i) => {
    const bits = natsToBits(v);
    (perWord[rows.word[i] as number] as { bits: number[] }).bits.push(bits);
    (byPos[rows.step[i] as number] ??= []).push(bits);
    total += bits;
  });
  return {
    draws: m, perWord,
    perPosition: byPos.map((xs, t) => ({ t: t + 1, mean: xs.reduce((s, x) => s + x, 0) / xs.length, ...boxStats(xs) })),
    meanBits: total / values.length,
    maxBits: natsToBits(Math.log(alphabet.size)),
  };
}
