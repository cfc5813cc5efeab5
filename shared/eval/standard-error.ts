/**
 * Error bars of held-out figures: a standard error from the per-word spread and, for Monte-Carlo estimates,
 * from the spread between repeats.
 *
 * Bits per word is a mean over word types: SE = s / √n with s the sample standard deviation of the per-word
 * figures (n − 1). Bits per character is a ratio of sums Σ b_i / Σ T_i: its standard error comes from the
 * linearised residuals r_i = b_i − R·T_i (delta method for a ratio estimator, Cochran, "Sampling Techniques",
 * 3rd ed. 1977, §6.3 — from memory): SE = √(Σ r_i² / (n (n − 1))) · n / Σ T_i.
 * Repeats: the Monte-Carlo standard error of a figure averaged over R repeats is s_R / √R. The reported
 * total is √(SE_words² + SE_repeats²) — conservative, since the per-word spread already holds part of the
 * Monte-Carlo noise (common practice, no source).
 */
import { meanAndStd } from './units';

export interface StandardErrors {
  /** From the per-word spread (sampling of held-out words); null below 2 words. */
  words: number | null;
  /** From the spread between repeats (0 for exact figures or a single repeat). */
  repeats: number;
  /** √(words² + repeats²); null when `words` is. */
  total: number | null;
}

/** Standard error of the mean of `perWord` (bits per word). */
export function meanStandardError(perWord: ArrayLike<number>): number | null {
  const xs = Array.from(perWord);
  return xs.length < 2 ? null : meanAndStd(xs).std / Math.sqrt(xs.length);
}

/** Standard error of Σ bits / Σ steps (bits per character, EOW counted). */
export function ratioStandardError(bits: ArrayLike<number>, steps: ArrayLike<number>): number | null {
  const n = bits.length;
  if (n < 2) return null;
  let sb = 0;
  let st = 0;
  for (let i = 0; i < n; i++) { sb += bits[i] as number; st += steps[i] as number; }
  const ratio = sb / st;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += ((bits[i] as number) - ratio * (steps[i] as number)) ** 2;
  return (Math.sqrt(ss / (n * (n - 1))) * n) / st;
}

/** Monte-Carlo standard error of the mean of R repeat figures. */
export function repeatStandardError(repeatFigures: readonly number[]): number {
  return repeatFigures.length < 2 ? 0 : meanAndStd(repeatFigures).std / Math.sqrt(repeatFigures.length);
}

export function combineErrors(words: number | null, repeats: number): StandardErrors {
  return { words, repeats, total: words === null ? null : Math.sqrt(words ** 2 + repeats ** 2) };
}
