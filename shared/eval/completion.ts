/**
 * Completion of a prefix (MODEL.md §7). The state after a prefix is uncertain, so it is estimated with a
 * bootstrap particle filter (sequential importance resampling): N particles start at h_0; for each prefix
 * character w_t every particle moves through the prior, h_t = f_g(h_{t-1}, xi), and gets weight p(w_t | h_t);
 * particles are resampled (systematic resampling) before each move. Each particle is then continued by prior
 * sampling until EOW or Tmax, and the continuations are aggregated by string with the final weights.
 * By-product: Σ_t log mean_n w_t^(n) estimates log p(prefix) (the mean of the weights is an unbiased estimate
 * of each predictive factor).
 * Note: completions can coincide with real names, brands or trademarks.
 */
import * as tf from '@tensorflow/tfjs-core';
import { encodeWord, type Alphabet } from '../data/encode';
import { createRng, type Rng } from '../data/random';
import type { SsmView } from './model-view';
import { emitFromRows } from './samples';
import { logSumExp } from './units';

export interface CompletionOptions {
  particles: number;
  /** Longest whole word (prefix + continuation, EOW included) in steps. */
  tMax: number;
  seed: number;
  resampling?: 'systematic' | 'multinomial';
}

export interface Completion {
  prefix: string;
  /** Estimate of log p(prefix characters) in nats (no EOW), from the filter's weights. */
  logPrefix: number;
  /** Effective sample size of the final weights. */
  effectiveSampleSize: number;
  /** Weighted continuations, heaviest first; weights sum to one. */
  continuations: { word: string; continuation: string; weight: number; ended: boolean }[];
  /** Weighted mean of the particle states after the prefix (for the noise map). */
  meanState: number[];
  /** Particle states after the prefix [N][d] and their normalised weights. */
  particleStates: number[][];
  particleWeights: number[];
}

/** Ancestor indices: systematic (one uniform) or multinomial resampling of normalised weights. */
export function resampleIndices(weights: readonly number[], rng: Rng, scheme: 'systematic' | 'multinomial'): Int32Array {
  const n = weights.length;
  const out = new Int32Array(n);
  const cdf = new Float64Array(n);
  let acc = 0;
  weights.forEach((w, i) => { acc += w; cdf[i] = acc; });
  const u0 = rng.next();
  let j = 0;
  const points = Array.from({ length: n }, (_, i) => (scheme === 'systematic' ? (i + u0) / n : rng.next()) * acc);
  if (scheme === 'multinomial') points.sort((a, b) => a - b);
  for (let i = 0; i < n; i++) {
    while (j < n - 1 && (points[i] as number) >= (cdf[j] as number)) j++;
    out[i] = j;
  }
  return out;
}

export function completePrefix(model: SsmView, alphabet: Alphabet, prefix: string, opts: CompletionOptions): Completion {
  const n = opts.particles;
  if (!Number.isInteger(n) || n < 1) throw new Error(`The number of particles must be a positive whole number (got ${n}).`);
  const ids = Array.from(encodeWord(prefix, alphabet)).slice(0, -1); // prefix characters, no EOW
  if (opts.tMax <= ids.length) throw new Error(`Tmax (${opts.tMax}) must be longer than the prefix (${ids.length} characters).`);
  const rng = createRng(opts.seed).fork('completion');
  const scheme = opts.resampling ?? 'systematic';
  const h0 = model.initialState();
  const d = h0.shape[0];
  let h = tf.tidy(() => tf.tile(tf.reshape(h0, [1, d]), [n, 1])) as tf.Tensor2D;
  h0.dispose();
  let weights = new Array<number>(n).fill(1 / n);
  let logPrefix = 0;
  const step = (xiSeed: number) => {
    const next = tf.tidy(() => model.transition(h, tf.randomNormal([n, d], 0, 1, 'float32', xiSeed) as tf.Tensor2D));
    h.dispose();
    h = next;
  };
  for (let t = 0; t < ids.length; t++) {
    if (t > 0) {
      const idx = resampleIndices(weights, rng, scheme);
      const moved = tf.tidy(() => tf.gather(h, tf.tensor1d(idx, 'int32')));
      h.dispose();
      h = moved as tf.Tensor2D;
    }
    step(rng.seed());
    const lw = tf.tidy(() => tf.reshape(tf.slice(model.observationLogProbs(h), [0, ids[t] as number], [n, 1]), [n]));
    const logw = Array.from(lw.dataSync());
    lw.dispose();
    const lse = logSumExp(logw);
    logPrefix += lse - Math.log(n);
    weights = logw.map((l) => Math.exp(l - lse));
  }
  const statesNow = h.arraySync() as number[][];
  const meanState = new Array<number>(d).fill(0);
  statesNow.forEach((s, i) => s.forEach((x, j) => { meanState[j] = (meanState[j] as number) + (weights[i] as number) * x; }));
  // Continue every particle by prior sampling until EOW or Tmax.
  const rest = opts.tMax - ids.length;
  const rows: tf.Tensor2D[] = [];
  for (let t = 0; t < rest; t++) {
    step(rng.seed());
    rows.push(tf.tidy(() => tf.exp(model.observationLogProbs(h))));
  }
  h.dispose();
  const probs = tf.tidy(() => tf.stack(rows, 1)); // [n, rest, V]
  for (const r of rows) r.dispose();
  const v = probs.shape[2] as number;
  const p = probs.dataSync();
  probs.dispose();
  const agg = new Map<string, { weight: number; ended: boolean }>();
  for (let i = 0; i < n; i++) {
    const r = emitFromRows(p, i * rest, rest, v, alphabet, rng);
    const prev = agg.get(r.word);
    agg.set(r.word, { weight: (prev?.weight ?? 0) + (weights[i] as number), ended: r.ended });
  }
  const ess = 1 / weights.reduce((s, w) => s + w * w, 0);
  return {
    prefix, logPrefix, effectiveSampleSize: ess,
    continuations: [...agg].sort((a, b) => b[1].weight - a[1].weight)
      .map(([continuation, x]) => ({ word: prefix + continuation, continuation, weight: x.weight, ended: x.ended })),
    meanState, particleStates: statesNow, particleWeights: weights,
  };
}
