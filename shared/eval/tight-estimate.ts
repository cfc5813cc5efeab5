/**
 * Tight held-out estimate (MODEL.md §7): the IWAE bound L_K with a large K per word, computed in chunks of
 * samples combined by logsumexp, repeated R times to show its spread.
 *   L_K(w) = logsumexp_k log W_k − log K   (Burda, Grosse & Salakhutdinov 2016)
 */
import { encodeBatch, type Alphabet } from '../data/encode';
import { createRng } from '../data/random';
import type { SsmView } from './model-view';
import { combineErrors, meanStandardError, ratioStandardError, repeatStandardError, type StandardErrors } from './standard-error';
import { chunkRanges, logSumExp, meanAndStd, natsToBits, stepsOf } from './units';

export interface TightEstimateOptions {
  /** Importance samples per word (e.g. 256–1024). */
  k: number;
  /** Samples per call to the model (memory bound); default 64. */
  sampleChunk?: number;
  /** Words per call to the model; default 64. */
  wordChunk?: number;
  /** Independent repeats of the whole estimate; default 1. */
  repeats?: number;
  seed?: number | string;
}

export interface TightEstimate {
  k: number;
  repeats: number;
  /** Per word: L_K in nats, averaged over the repeats. */
  perWord: { word: string; logP: number; steps: number }[];
  /** Mean over word types, in bits per word. */
  bitsPerWord: number;
  /** Total bits over total characters (EOW counted), over word types. */
  bitsPerChar: number;
  /** Figures of each repeat and their standard deviations (n − 1). */
  repeatBitsPerWord: number[];
  repeatBitsPerChar: number[];
  stdBitsPerWord: number;
  stdBitsPerChar: number;
  /** Error bars: standard errors from the per-word spread and the repeats (shared/eval/standard-error.ts). */
  standardError: { bitsPerWord: StandardErrors; bitsPerChar: StandardErrors };
}

/** L_K per word for one repeat (nats). */
export function iwaeLogLikelihoods(model: SsmView, words: readonly string[], alphabetOf: Alphabet,
                                   k: number, seed: number | string, sampleChunk = 64, wordChunk = 64): Float64Array {
  if (!Number.isInteger(k) || k < 1) throw new Error(`The number of importance samples K must be a positive whole number (got ${k}).`);
  const out = new Float64Array(words.length);
  const rng = createRng(seed).fork('tight-estimate');
  for (const [a, b] of chunkRanges(words.length, wordChunk)) {
    const batch = encodeBatch(words.slice(a, b), alphabetOf);
    const parts: Float64Array[] = Array.from({ length: b - a }, () => new Float64Array(k));
    for (const [s0, s1] of chunkRanges(k, sampleChunk)) {
      const { logW, states } = model.logWeights(batch, s1 - s0, { seed: rng.seed() });
      states?.dispose();
      const vals = logW.dataSync();
      logW.dispose();
      for (let i = 0; i < b - a; i++) {
        for (let j = 0; j < s1 - s0; j++) (parts[i] as Float64Array)[s0 + j] = vals[i * (s1 - s0) + j] as number;
      }
    }
    parts.forEach((p, i) => { out[a + i] = logSumExp(p) - Math.log(k); });
  }
  return out;
}

export function tightEstimate(model: SsmView, words: readonly string[], alphabet: Alphabet,
                              opts: TightEstimateOptions): TightEstimate {
  if (words.length === 0) throw new Error('There are no held-out words to evaluate; check the split shares.');
  const repeats = opts.repeats ?? 1;
  if (!Number.isInteger(repeats) || repeats < 1) throw new Error(`Repeats must be a positive whole number (got ${repeats}).`);
  const steps = words.map(stepsOf);
  const totalSteps = steps.reduce((s, n) => s + n, 0);
  const sums = new Float64Array(words.length);
  const perRepeatWord: number[] = [];
  const perRepeatChar: number[] = [];
  for (let r = 0; r < repeats; r++) {
    const lp = iwaeLogLikelihoods(model, words, alphabet, opts.k, `${opts.seed ?? 0}/repeat-${r}`, opts.sampleChunk, opts.wordChunk);
    let tot = 0;
    lp.forEach((v, i) => { sums[i] = (sums[i] as number) + v; tot += v; });
    perRepeatWord.push(natsToBits(-tot / words.length));
    perRepeatChar.push(natsToBits(-tot / totalSteps));
  }
  const perWord = words.map((word, i) => ({ word, logP: (sums[i] as number) / repeats, steps: steps[i] as number }));
  const total = perWord.reduce((s, w) => s + w.logP, 0);
  const perWordBits = perWord.map((w) => natsToBits(-w.logP));
  return {
    k: opts.k, repeats, perWord,
    bitsPerWord: natsToBits(-total / words.length),
    bitsPerChar: natsToBits(-total / totalSteps),
    repeatBitsPerWord: perRepeatWord, repeatBitsPerChar: perRepeatChar,
    stdBitsPerWord: meanAndStd(perRepeatWord).std, stdBitsPerChar: meanAndStd(perRepeatChar).std,
    standardError: {
      bitsPerWord: combineErrors(meanStandardError(perWordBits), repeatStandardError(perRepeatWord)),
      bitsPerChar: combineErrors(ratioStandardError(perWordBits, steps), repeatStandardError(perRepeatChar)),
    },
  };
}
