/**
 * Seeded batches of words (MODEL.md section 1): by token (word drawn with probability proportional to
 * its count, i.e. from p_data) or by type (each type equally likely). Draws are independent (with
 * replacement). Token draws use Vose's alias method (Vose 1991, "A linear algorithm for generating
 * random numbers with a given distribution"): O(V) set-up, O(1) per draw.
 */
import type { WordCount } from './encode';
import type { Rng } from './random';

export type SamplingRegime = 'token' | 'type';

export interface BatcherOptions {
  batchSize: number;
  regime: SamplingRegime;
  rng: Rng;
}

export interface Batcher {
  next(): string[];
}

export interface AliasTable {
  /** Index in [0, n) drawn with probability weights[i] / sum(weights). */
  sample(rng: Rng): number;
  readonly size: number;
}

/** Vose's alias table for non-negative, finite weights with a positive sum. */
export function createAliasTable(weights: readonly number[]): AliasTable {
  const n = weights.length;
  if (n === 0) throw new Error('Cannot sample from an empty list of weights.');
  let total = 0;
  weights.forEach((w, i) => {
    if (!Number.isFinite(w) || w < 0) throw new Error(`Weight ${i} is ${w}; weights must be finite and not negative.`);
    total += w;
  });
  if (!(total > 0)) throw new Error('Weights add up to 0; at least one weight must be positive.');
  const prob = new Float64Array(n);
  const alias = new Int32Array(n);
  const scaled = weights.map((w) => (w * n) / total);
  const small: number[] = [];
  const large: number[] = [];
  scaled.forEach((p, i) => (p < 1 ? small : large).push(i));
  while (small.length > 0 && large.length > 0) {
    const s = small.pop() as number;
    const l = large.pop() as number;
    prob[s] = scaled[s] as number;
    alias[s] = l;
    scaled[l] = (scaled[l] as number) + (scaled[s] as number) - 1;
    (scaled[l] < 1 ? small : large).push(l);
  }
  // Leftovers are 1 up to rounding.
  for (const i of large) prob[i] = 1;
  for (const i of small) prob[i] = 1;
  return {
    size: n,
    sample(rng: Rng): number {
      const i = rng.int(n);
      return rng.next() < (prob[i] as number) ? i : (alias[i] as number);
    },
  };
}

/** A batcher over a corpus; `next()` returns `batchSize` words drawn independently. */
export function createBatcher(words: readonly WordCount[], opts: BatcherOptions): Batcher {
  const { batchSize, regime, rng } = opts;
  if (!Number.isInteger(batchSize) || batchSize <= 0) {
    throw new Error(`Batch size must be a positive whole number; got ${batchSize}.`);
  }
  if (words.length === 0) throw new Error('Cannot make batches from an empty corpus; add words first.');
  const list = words.map((w) => w.word);
  if (regime === 'type') {
    return { next: () => Array.from({ length: batchSize }, () => list[rng.int(list.length)] as string) };
  }
  if (regime === 'token') {
    const table = createAliasTable(words.map((w) => w.count));
    return { next: () => Array.from({ length: batchSize }, () => list[table.sample(rng)] as string) };
  }
  throw new Error(`Unknown sampling regime ${JSON.stringify(regime)}; choose token or type.`);
}
