/**
 * Exact figures of the baselines (MODEL.md §6–7): log p(w) per word from the GRU (teacher-forced, exact) and
 * the Kneser–Ney n-gram (closed form), and held-out bits per word / per character from any per-word log-probs.
 */
import { encodeBatch, type Alphabet } from '../data/encode';
import type { GruLanguageModel } from '../model/gru-lm';
import type { KneserNeyModel } from '../model/ngram-kn';
import { meanStandardError, ratioStandardError } from './standard-error';
import { chunkRanges, natsToBits, stepsOf } from './units';

export function gruLogProbs(model: GruLanguageModel, words: readonly string[], alphabet: Alphabet, wordChunk = 256): Float64Array {
  const out = new Float64Array(words.length);
  for (const [a, b] of chunkRanges(words.length, wordChunk)) {
    const ll = model.logLikelihood(encodeBatch(words.slice(a, b), alphabet));
    out.set(ll.dataSync(), a);
    ll.dispose();
  }
  return out;
}

export function ngramLogProbs(model: KneserNeyModel, words: readonly string[]): Float64Array {
  return Float64Array.from(words.map((w) => model.logProb(w)));
}

export interface HeldOutFigures {
  /** Mean over word types of −log p(w), bits. */
  bitsPerWord: number;
  /** Σ −log p(w) / Σ T (EOW counted), bits. */
  bitsPerChar: number;
  words: number;
  /** Standard errors from the per-word spread (exact figures: no Monte-Carlo part; null below 2 words). */
  standardError?: { bitsPerWord: number | null; bitsPerChar: number | null };
}

export function heldOutFigures(words: readonly string[], logProbs: ArrayLike<number>): HeldOutFigures {
  if (words.length === 0) throw new Error('There are no held-out words; check the split shares.');
  let nats = 0;
  let steps = 0;
  const bits = new Float64Array(words.length);
  const lengths = new Float64Array(words.length);
  words.forEach((w, i) => {
    nats -= logProbs[i] as number;
    bits[i] = natsToBits(-(logProbs[i] as number));
    lengths[i] = stepsOf(w);
    steps += lengths[i] as number;
  });
  return {
    bitsPerWord: natsToBits(nats / words.length), bitsPerChar: natsToBits(nats / steps), words: words.length,
    standardError: { bitsPerWord: meanStandardError(bits), bitsPerChar: ratioStandardError(bits, lengths) },
  };
}
