/**
 * A small probabilistic syllable grammar, written as data, with its EXACT word distribution.
 *
 *   word     = syllable{n}                 n = 1, 2, 3 with probabilities 0.25, 0.5, 0.25
 *   syllable = onset nucleus coda          chosen independently, with the probabilities below
 *
 * The grammar is ambiguous: one word can have several derivations, e.g. "ana" = (–,a,n)(–,a,–) and
 * (–,a,–)(n,a,–); and because "ai" is a nucleus, "kai" = one syllable (k,ai,–) and also two syllables
 * (k,a,–)(–,i,–). A word's probability is the SUM over all its derivations; the entropy below is
 * computed from these merged probabilities, not from the derivations.
 */
import type { Rng } from '../shared/data/random';
import { drawCategorical } from './demo-corpus-file';

export interface SyllableGrammar {
  syllableCount: [number, number][];
  onset: [string, number][];
  nucleus: [string, number][];
  coda: [string, number][];
}

export const SYLLABLE_GRAMMAR: SyllableGrammar = {
  syllableCount: [[1, 0.25], [2, 0.5], [3, 0.25]],
  onset: [['', 0.2], ['k', 0.25], ['t', 0.2], ['m', 0.15], ['s', 0.1], ['n', 0.1]],
  nucleus: [['a', 0.45], ['i', 0.3], ['u', 0.15], ['ai', 0.1]],
  coda: [['', 0.75], ['n', 0.25]],
};

/** Throws unless every list of probabilities is positive and sums to 1 (within 1e-12). */
export function checkGrammar(g: SyllableGrammar): void {
  for (const [name, items] of Object.entries(g) as [string, [unknown, number][]][]) {
    const sum = items.reduce((s, [, p]) => s + p, 0);
    if (items.some(([, p]) => !(p > 0)) || Math.abs(sum - 1) > 1e-12) {
      throw new Error(`Grammar list "${name}" must hold positive probabilities that sum to 1; they sum to ${sum}.`);
    }
  }
}

/** Every syllable string with its probability, derivations kept apart (same string may repeat). */
function syllableDerivations(g: SyllableGrammar): [string, number][] {
  const out: [string, number][] = [];
  for (const [o, po] of g.onset) for (const [n, pn] of g.nucleus) for (const [c, pc] of g.coda) out.push([o + n + c, po * pn * pc]);
  return out;
}

/**
 * The exact distribution over words: enumerate every derivation (for n syllables, every n-tuple of
 * onset-nucleus-coda choices), multiply the probabilities, and add up derivations that spell the same word.
 */
export function exactWordDistribution(g: SyllableGrammar = SYLLABLE_GRAMMAR): Map<string, number> {
  checkGrammar(g);
  const syllables = syllableDerivations(g);
  const dist = new Map<string, number>();
  let layer: [string, number][] = [['', 1]];
  const maxN = Math.max(...g.syllableCount.map(([n]) => n));
  for (let n = 1; n <= maxN; n++) {
    const next: [string, number][] = [];
    for (const [prefix, p] of layer) for (const [s, ps] of syllables) next.push([prefix + s, p * ps]);
    layer = next;
    const pn = g.syllableCount.find(([k]) => k === n)?.[1] ?? 0;
    if (pn > 0) for (const [w, p] of layer) dist.set(w, (dist.get(w) ?? 0) + pn * p);
  }
  return dist;
}

/** Neumaier-compensated sum (keeps the sum of ~10^6 small terms accurate to ~1e-16 relative). */
export function compensatedSum(values: Iterable<number>): number {
  let sum = 0;
  let c = 0;
  for (const v of values) {
    const t = sum + v;
    c += Math.abs(sum) >= Math.abs(v) ? sum - t + v : v - t + sum;
    sum = t;
  }
  return sum + c;
}

export interface ExactEntropy {
  /** Entropy of the word distribution, in bits and nats. */
  bits: number;
  nats: number;
  /** Number of distinct words with positive probability. */
  types: number;
  /** Number of derivations (syllable sequences), for comparison. */
  derivations: number;
  /** Entropy of the derivation distribution in bits; larger than `bits` because of ambiguity. */
  derivationBits: number;
  /** Variance of -log2 p(w) (bits^2), for the standard error of the plug-in estimate. */
  varianceOfSurprisalBits2: number;
}

export function exactEntropy(g: SyllableGrammar = SYLLABLE_GRAMMAR): ExactEntropy {
  const dist = exactWordDistribution(g);
  const bits = -compensatedSum([...dist.values()].map((p) => p * Math.log2(p)));
  const second = compensatedSum([...dist.values()].map((p) => p * Math.log2(p) ** 2));
  // Derivation entropy: H(count) + sum_n p(n) * n * H(syllable derivation).
  const syllables = syllableDerivations(g);
  const hSyll = -compensatedSum(syllables.map(([, p]) => p * Math.log2(p)));
  const hCount = -compensatedSum(g.syllableCount.map(([, p]) => p * Math.log2(p)));
  const meanN = compensatedSum(g.syllableCount.map(([n, p]) => n * p));
  const derivations = compensatedSum(g.syllableCount.map(([n]) => syllables.length ** n));
  return {
    bits,
    nats: bits * Math.LN2,
    types: dist.size,
    derivations,
    derivationBits: hCount + meanN * hSyll,
    varianceOfSurprisalBits2: second - bits * bits,
  };
}

/** Samples one word from the grammar. */
export function sampleWord(rng: Rng, g: SyllableGrammar = SYLLABLE_GRAMMAR): string {
  const n = drawCategorical(g.syllableCount, rng);
  let w = '';
  for (let i = 0; i < n; i++) w += drawCategorical(g.onset, rng) + drawCategorical(g.nucleus, rng) + drawCategorical(g.coda, rng);
  return w;
}

/** Counts of `tokens` sampled words. */
export function sampleCounts(tokens: number, rng: Rng, g: SyllableGrammar = SYLLABLE_GRAMMAR): Map<string, number> {
  const counts = new Map<string, number>();
  for (let i = 0; i < tokens; i++) {
    const w = sampleWord(rng, g);
    counts.set(w, (counts.get(w) ?? 0) + 1);
  }
  return counts;
}
