import { describe, expect, it } from 'vitest';
import { buildAlphabet } from '../data/encode';
import { KneserNeyModel, estimateDiscounts } from './ngram-kn';

const corpus = [
  { word: 'anna', count: 5 }, { word: 'ann', count: 2 }, { word: 'nora', count: 3 }, { word: 'ron', count: 1 },
  { word: 'arno', count: 1 }, { word: 'oran', count: 4 }, { word: 'rona', count: 2 }, { word: 'naan', count: 1 },
];
const alphabet = buildAlphabet(corpus.map((w) => w.word));

describe('KneserNeyModel', () => {
  // Closed-form property of interpolated (modified) KN: every p_k(.|h) is a proper distribution,
  // because the discounted mass Σ min(D, c)/c(h) is exactly the weight γ(h) given to the lower order.
  it.each([1, 2, 3, 4, 5, 6])('sums to one in seen and unseen contexts at order %i', (order) => {
    const model = KneserNeyModel.estimate(corpus, alphabet, { order });
    const prefixes = ['', 'a', 'an', 'ann', 'nor', 'oran', 'rrr', 'oao', 'naanna', 'oo'];
    for (const prefix of prefixes) {
      const dist = model.nextDistribution(prefix);
      const sum = dist.reduce((s, p) => s + p, 0);
      expect(Math.abs(sum - 1)).toBeLessThan(1e-9);
      for (const p of dist) expect(p).toBeGreaterThan(0);
    }
  });

  // Hand computation from the Chen & Goodman 1998 formulas (interpolated KN, one fixed discount D = 0.5):
  // corpus {ab: 2, b: 1}, order 2, symbols EOW=0, a=1, b=2, V = 3.
  //   bigram raw counts: (S,a)=2 (a,b)=2 (b,EOW)=3 (S,b)=1
  //   unigram continuation counts: a:1 (after S), b:2 (after a and S), EOW:1 (after b); total 4, γ = 1.5/4
  //   p1(a) = 0.5/4 + 0.375/3 = 0.25;  p1(b) = 1.5/4 + 0.125 = 0.5;  p1(EOW) = 0.25
  //   p(a|S) = 1.5/3 + (1/3)·0.25 = 0.583333;  p(b|S) = 0.5/3 + (1/3)·0.5 = 0.333333;  p(EOW|S) = 0.083333
  //   p(b|a) = 1.5/2 + 0.25·0.5 = 0.875;  p(EOW|b) = 2.5/3 + (0.5/3)·0.25 = 0.875
  //   p(a|b) = (0.5/3)·0.25 = 0.0416667;  p(EOW|a) = 0.25·0.25 = 0.0625
  it('matches a hand computation of interpolated KN', () => {
    const words = [{ word: 'ab', count: 2 }, { word: 'b', count: 1 }];
    const m = KneserNeyModel.estimate(words, buildAlphabet(['ab', 'b']), { order: 2, discount: 0.5 });
    expect(m.logProb('ab')).toBeCloseTo(Math.log((7 / 12) * 0.875 * 0.875), 9);
    expect(m.logProb('b')).toBeCloseTo(Math.log((1 / 3) * 0.875), 9);
    expect(m.logProb('ba')).toBeCloseTo(Math.log((1 / 3) * (1 / 24) * 0.0625), 9);
    const start = m.nextDistribution('');
    expect(start[0]).toBeCloseTo(1 / 12, 12);
    expect(start[1]).toBeCloseTo(7 / 12, 12);
    expect(start[2]).toBeCloseTo(1 / 3, 12);
  });

  // Chen & Goodman 1998, eq. for modified KN discounts; counts {1,1,1,2,2,3,4}: n1=3 n2=2 n3=1 n4=1,
  // Y = 3/7, D1 = 1 − 2Y·2/3 = 3/7, D2 = 2 − 3Y·1/2 = 19/14, D3+ = 3 − 4Y·1 = 9/7 (hand computation).
  it('estimates the three modified-KN discounts from count-of-counts', () => {
    const d = estimateDiscounts([1, 1, 1, 2, 2, 3, 4]);
    expect(d[0]).toBeCloseTo(3 / 7, 12);
    expect(d[1]).toBeCloseTo(19 / 14, 12);
    expect(d[2]).toBeCloseTo(9 / 7, 12);
  });

  // The order-1 model is a smoothed unigram character model: with a fixed D, p(c) = (n_c − D)/N + (V_seen·D/N)/V.
  // Hand computation from the same formulas for corpus {ab: 1}: counts a:1 b:1 EOW:1, N = 3, D = 0.5,
  // p(a) = 0.5/3 + (1.5/3)/3 = 1/3 (the three seen symbols are equally likely, by symmetry).
  it('reduces to a smoothed unigram at order 1', () => {
    const m = KneserNeyModel.estimate([{ word: 'ab', count: 1 }], buildAlphabet(['ab']), { order: 1, discount: 0.5 });
    expect(m.logProb('ab')).toBeCloseTo(3 * Math.log(1 / 3), 12);
  });

  it('round-trips through JSON with identical probabilities', () => {
    const m = KneserNeyModel.estimate(corpus, alphabet, { order: 4 });
    const back = KneserNeyModel.fromJSON(JSON.parse(JSON.stringify(m.toJSON())));
    for (const w of ['anna', 'ronan', 'o']) expect(back.logProb(w)).toBe(m.logProb(w));
    expect(back.entryCount).toBe(m.entryCount);
  });

  it('rejects bad input with a message that says what to fix', () => {
    expect(() => KneserNeyModel.estimate(corpus, alphabet, { order: 7 })).toThrow(/order must be a whole number from 1 to 6/);
    expect(() => KneserNeyModel.estimate([{ word: 'a', count: -1 }], alphabet, { order: 2 })).toThrow(/positive number/);
    const m = KneserNeyModel.estimate(corpus, alphabet, { order: 3 });
    expect(() => m.logProb('anxa')).toThrow(/"x" in "anxa" is not in the model's alphabet/);
    expect(() => KneserNeyModel.fromJSON({ kind: 'other' })).toThrow(/not a saved Kneser–Ney/);
  });

  it('higher orders fit the training words better than the unigram', () => {
    const lp = (order: number) => {
      const m = KneserNeyModel.estimate(corpus, alphabet, { order });
      return corpus.reduce((s, w) => s + w.count * m.logProb(w.word), 0);
    };
    expect(lp(3)).toBeGreaterThan(lp(1));
  });
});
