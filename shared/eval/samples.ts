/**
 * Ancestral samples from the prior (MODEL.md §7): states h_1..h_Tmax from the prior, then w_t ~ p(. | h_t) until
 * EOW or Tmax. Because the model is non-autoregressive the emitted characters never feed back, so one prior
 * trajectory per sample is all that is needed. Also: which samples are training words, held-out words or novel,
 * and the sample length histogram against the corpus's.
 * Note: generated words can coincide with real names, brands or trademarks; treat them as raw model output.
 */
import * as tf from '@tensorflow/tfjs-core';
import type { Alphabet, WordCount } from '../data/encode';
import { charsOf } from '../data/encode';
import { createRng, type Rng } from '../data/random';
import type { SsmView } from './model-view';
import { chunkRanges } from './units';

export interface SampleSet {
  words: string[];
  /** Samples that reached Tmax without emitting EOW (kept, cut at Tmax). */
  truncated: number;
}

/** Draws an index from probabilities p[offset .. offset+v) with a uniform number. */
export function drawCategorical(p: ArrayLike<number>, offset: number, v: number, u: number): number {
  let total = 0;
  for (let c = 0; c < v; c++) total += p[offset + c] as number;
  let acc = 0;
  const target = u * total;
  for (let c = 0; c < v; c++) {
    acc += p[offset + c] as number;
    if (target < acc) return c;
  }
  return v - 1;
}

export function sampleWords(model: SsmView, alphabet: Alphabet, opts: { n: number; tMax: number; seed: number }): SampleSet {
  if (!Number.isInteger(opts.n) || opts.n < 1) throw new Error(`The number of samples must be a positive whole number (got ${opts.n}).`);
  if (!Number.isInteger(opts.tMax) || opts.tMax < 1) throw new Error(`Tmax must be a positive whole number (got ${opts.tMax}).`);
  const rng = createRng(opts.seed).fork('samples');
  const words: string[] = [];
  let truncated = 0;
  for (const [a, b] of chunkRanges(opts.n, 256)) {
    const n = b - a;
    const probs = tf.tidy(() => {
      const h = model.samplePrior(n, opts.tMax, rng.seed());
      return tf.exp(model.observationLogProbs(tf.reshape(h, [n * opts.tMax, h.shape[2]]) as tf.Tensor2D));
    });
    const v = probs.shape[1] as number;
    const p = probs.dataSync();
    probs.dispose();
    for (let i = 0; i < n; i++) {
      const r = emitFromRows(p, i * opts.tMax, opts.tMax, v, alphabet, rng);
      words.push(r.word);
      if (!r.ended) truncated++;
    }
  }
  return { words, truncated };
}

/** Emits characters from consecutive probability rows until EOW (id 0) or the rows run out. */
export function emitFromRows(p: ArrayLike<number>, firstRow: number, rows: number, v: number, alphabet: Alphabet,
                             rng: Rng): { word: string; ended: boolean } {
  let word = '';
  for (let t = 0; t < rows; t++) {
    const c = drawCategorical(p, (firstRow + t) * v, v, rng.next());
    if (c === 0) return { word, ended: true };
    word += alphabet.chars[c - 1];
  }
  return { word, ended: false };
}

export interface SampleReport {
  count: number;
  shares: { train: number; heldOut: number; novel: number };
  /** Histogram by character count (index = length): share of samples, of corpus tokens and of corpus types. */
  lengthHistogram: { samples: number[]; corpusTokens: number[]; corpusTypes: number[] };
  /** Most frequent samples with their counts and where they come from. */
  top: { word: string; count: number; source: 'train' | 'held-out' | 'novel' }[];
}

export function sampleReport(samples: readonly string[], train: ReadonlySet<string>, heldOut: ReadonlySet<string>,
                             corpus: readonly WordCount[], topN = 20): SampleReport {
  if (samples.length === 0) throw new Error('There are no samples to report on.');
  const source = (w: string) => (train.has(w) ? 'train' : heldOut.has(w) ? 'held-out' : 'novel') as 'train' | 'held-out' | 'novel';
  const counts = new Map<string, number>();
  let nTrain = 0;
  let nHeld = 0;
  for (const w of samples) {
    counts.set(w, (counts.get(w) ?? 0) + 1);
    const s = source(w);
    if (s === 'train') nTrain++;
    else if (s === 'held-out') nHeld++;
  }
  let maxLen = 0;
  for (const w of samples) maxLen = Math.max(maxLen, charsOf(w).length);
  for (const w of corpus) maxLen = Math.max(maxLen, charsOf(w.word).length);
  const hist = (items: { len: number; weight: number }[]) => {
    const h = new Array<number>(maxLen + 1).fill(0);
    const total = items.reduce((s, x) => s + x.weight, 0);
    for (const x of items) h[x.len] = (h[x.len] as number) + x.weight / total;
    return h;
  };
  const n = samples.length;
  return {
    count: n,
    shares: { train: nTrain / n, heldOut: nHeld / n, novel: (n - nTrain - nHeld) / n },
    lengthHistogram: {
      samples: hist(samples.map((w) => ({ len: charsOf(w).length, weight: 1 }))),
      corpusTokens: hist(corpus.map((w) => ({ len: charsOf(w.word).length, weight: w.count }))),
      corpusTypes: hist(corpus.map((w) => ({ len: charsOf(w.word).length, weight: 1 }))),
    },
    top: [...counts].sort((x, y) => y[1] - x[1] || (x[0] < y[0] ? -1 : 1)).slice(0, topN)
      .map(([word, count]) => ({ word, count, source: source(word) })),
  };
}
