/**
 * Which held-out words are scored. By default every one; with a limit, a hash-random subset: the `max` words
 * with the smallest hash of (seed, word) — the split's own hash (shared/data/split.ts) under another seed
 * label — so the subset depends only on the words and the seed, not on their order, counts or spelling order.
 * (An earlier rule took the most frequent words, ties broken alphabetically: on a corpus with equal counts it
 * scored the alphabetically first words.)
 */
import type { WordCount } from '../data/encode';
import { splitPosition } from '../data/split';

/** Most words scored by the in-training validation figures of the command line and of the browser (smaller: live). */
export const TRAINING_VALIDATION_WORDS = 200;
export const LIVE_VALIDATION_WORDS = 64;

/**
 * The held-out words actually scored, in the order given: all of them when `max` is 0 or at least their number,
 * else a hash-random subset of `max` words (seeded by `seed`).
 */
export function heldOutSubset(heldOut: readonly WordCount[], max: number, seed = 1): string[] {
  if (!(max > 0) || max >= heldOut.length) return heldOut.map((w) => w.word);
  const keyed = heldOut.map((w, i) => ({ i, u: splitPosition(w.word, 1_000_003 + seed) }));
  keyed.sort((a, b) => a.u - b.u || a.i - b.i);
  const keep = new Set(keyed.slice(0, max).map((k) => k.i));
  return heldOut.filter((_, i) => keep.has(i)).map((w) => w.word);
}

/** One sentence for help texts and pages. */
export function heldOutSubsetNote(scored: number, total: number): string {
  return scored >= total ? `all ${total} held-out words scored`
    : `${scored} of ${total} held-out words scored (a hash-random subset, the same for every model)`;
}
