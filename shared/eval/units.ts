/** Unit conversions and small numeric helpers for the estimators (nats inside, bits for people). */

export const natsToBits = (nats: number): number => nats / Math.LN2;

/** log Σ exp(x_i), stable for any finite inputs (−∞ entries allowed). */
export function logSumExp(xs: ArrayLike<number>): number {
  let m = -Infinity;
  for (let i = 0; i < xs.length; i++) if ((xs[i] as number) > m) m = xs[i] as number;
  if (m === -Infinity) return -Infinity;
  let s = 0;
  for (let i = 0; i < xs.length; i++) s += Math.exp((xs[i] as number) - m);
  return m + Math.log(s);
}

/** Mean and (sample, n − 1) standard deviation. */
export function meanAndStd(xs: readonly number[]): { mean: number; std: number } {
  const n = xs.length;
  if (n === 0) return { mean: Number.NaN, std: Number.NaN };
  const mean = xs.reduce((a, b) => a + b, 0) / n;
  if (n === 1) return { mean, std: 0 };
  const v = xs.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1);
  return { mean, std: Math.sqrt(v) };
}

/** Five-number summary (min, quartiles, max; linear interpolation between order statistics) for box plots. */
export function boxStats(xs: readonly number[]): { min: number; q1: number; median: number; q3: number; max: number; n: number } {
  const s = xs.slice().sort((a, b) => a - b);
  const q = (p: number) => {
    if (s.length === 0) return Number.NaN;
    const pos = (s.length - 1) * p;
    const lo = Math.floor(pos);
    const hi = Math.ceil(pos);
    return (s[lo] as number) + ((s[hi] as number) - (s[lo] as number)) * (pos - lo);
  };
  return { min: q(0), q1: q(0.25), median: q(0.5), q3: q(0.75), max: q(1), n: s.length };
}

/** Splits `n` items into index ranges of at most `size`. */
export function chunkRanges(n: number, size: number): [number, number][] {
  if (!(size >= 1)) throw new Error(`Chunk size must be at least 1 (got ${size}).`);
  const out: [number, number][] = [];
  for (let i = 0; i < n; i += size) out.push([i, Math.min(n, i + size)]);
  return out;
}

/** Number of characters of a word (code points) plus one for EOW: the T of MODEL.md §1. */
export const stepsOf = (word: string): number => Array.from(word).length + 1;
