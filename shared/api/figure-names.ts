/**
 * One wording for held-out and training figures on every page, CSV and table: units that say the end-of-word
 * symbol is counted, and names that call a figure a bound only when it is one. The state-space model's
 * figures are importance-weighted bounds (an upper bound on the cost); the GRU's and the n-gram's are exact
 * cross entropies. All figures are costs (minus log-likelihood, in bits): positive, lower is better.
 */
import type { RunFamily } from './runs';

/** Bits per character always count the end-of-word symbol as one more character. */
export const BITS_PER_CHAR = 'bits/char (end-of-word counted)';
export const BITS_PER_WORD = 'bits/word';

/** True for the families whose likelihoods are exact (never a bound). */
export const isExactFamily = (family: RunFamily): boolean => family !== 'ssm';

/** What the figures of a family are: "bound" (state-space model) or "exact" (GRU, n-gram). */
export const figureKind = (family: RunFamily): 'bound' | 'exact' => (isExactFamily(family) ? 'exact' : 'bound');

/** The training figure's name: a bound (or not yet one during warm-up) for the SSM, exact otherwise. */
export function trainingFigureName(family: RunFamily, isBound = true): string {
  if (isExactFamily(family)) return 'Training cross entropy (exact)';
  return isBound ? 'Training bound' : 'Training figure (warm-up, not a bound)';
}

/** The held-out figure measured while training. */
export function validationFigureName(family: RunFamily): string {
  return isExactFamily(family) ? 'Validation cross entropy (exact)' : 'Validation bound';
}

/** A family-neutral name, for a row or column that holds runs of several families. */
export const NEUTRAL_NAMES = {
  training: 'Final training figure',
  validation: 'Best validation figure',
  kind: 'Figures are',
} as const;

/** The value of the "Figures are" row or column of a run. */
export const figureKindText = (family: RunFamily): string => (isExactFamily(family) ? 'exact' : 'bounds (IWAE)');

/** A unit as printed beside a figure: bits/char always says the end-of-word symbol is counted. */
export const unitText = (unit: string): string => (unit === 'bits/char' ? BITS_PER_CHAR : unit);

/** The same where the unit already stands in brackets (a row label, a caption): "bits/char, end-of-word counted". */
export const unitNote = (unit: string): string => (unit === 'bits/char' ? 'bits/char, end-of-word counted' : unit);
