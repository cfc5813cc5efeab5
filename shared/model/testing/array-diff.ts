/** Tolerance helpers of the tests that compare a hand-written gradient with automatic differentiation. */

/** Largest absolute entry. */
export const maxAbs = (a: ArrayLike<number>): number => Array.from(a).reduce((m, v) => Math.max(m, Math.abs(v)), 0);

/** Largest absolute entry-wise difference of two arrays of the same length. */
export const maxDiff = (a: ArrayLike<number>, b: ArrayLike<number>): number =>
  Array.from(a).reduce((m, v, i) => Math.max(m, Math.abs(v - (b[i] as number))), 0);
