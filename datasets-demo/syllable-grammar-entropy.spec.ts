/**
 * The syllable grammar's word entropy (11.494 bits in syllable-grammar.entropy.json) derived a second way,
 * written apart from `exactWordDistribution`: merge syllables by spelling first, list every word as a string
 * (a Set of concatenations), then score each word with a segmentation dynamic program (the forward / inside
 * algorithm over the word's characters: p(w) = Σ_n p(n) · Σ over splits of w into n syllable strings of Π s(x)),
 * and sum −p log2 p in sorted order. A merging or enumeration mistake in either computation makes them differ.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { SYLLABLE_GRAMMAR } from './syllable-grammar';

const g = SYLLABLE_GRAMMAR;
/** Probability of a syllable *string* (all onset–nucleus–coda choices that spell it). */
const syllableString = new Map<string, number>();
for (const [o, po] of g.onset) for (const [n, pn] of g.nucleus) for (const [c, pc] of g.coda) {
  syllableString.set(o + n + c, (syllableString.get(o + n + c) ?? 0) + po * pn * pc);
}
const maxSyllableLength = Math.max(...[...syllableString.keys()].map((s) => s.length));
const countProb = new Map(g.syllableCount);

/** inside[n][i]: probability that w[0, i) is spelled by exactly n syllables. */
function wordProbability(w: string): number {
  const maxN = Math.max(...countProb.keys());
  let row = new Float64Array(w.length + 1);
  row[0] = 1;
  let p = 0;
  for (let n = 1; n <= maxN; n++) {
    const next = new Float64Array(w.length + 1);
    for (let i = 0; i < w.length; i++) {
      if (row[i] === 0) continue;
      for (let len = 1; len <= maxSyllableLength && i + len <= w.length; len++) {
        const s = syllableString.get(w.slice(i, i + len));
        if (s !== undefined) next[i + len] = (next[i + len] as number) + (row[i] as number) * s;
      }
    }
    p += (countProb.get(n) ?? 0) * (next[w.length] as number);
    row = next;
  }
  return p;
}

describe('syllable grammar entropy, second derivation', () => {
  const words = new Set<string>();
  const strings = [...syllableString.keys()];
  for (const a of strings) {
    words.add(a);
    for (const b of strings) {
      words.add(a + b);
      for (const c of strings) words.add(a + b + c);
    }
  }
  const probs = [...words].sort().map(wordProbability);

  it('is a distribution over the same number of word types', () => {
    const doc = JSON.parse(readFileSync(new URL('./syllable-grammar.entropy.json', import.meta.url), 'utf8')) as { wordTypes: number };
    expect(words.size).toBe(doc.wordTypes);
    const total = probs.reduce((s, p) => s + p, 0);
    expect(Math.abs(total - 1)).toBeLessThan(1e-9);
  });

  it('gives the committed word entropy', () => {
    const doc = JSON.parse(readFileSync(new URL('./syllable-grammar.entropy.json', import.meta.url), 'utf8')) as { wordEntropyBits: number };
    const h = probs.reduce((s, p) => s - p * Math.log2(p), 0);
    expect(h).toBeCloseTo(doc.wordEntropyBits, 9);
  });
});
