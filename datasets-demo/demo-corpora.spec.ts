import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseCorpus } from '../shared/data/corpus-parse';
import { entropyBits } from '../shared/data/corpus-stats';
import { createRng } from '../shared/data/random';
import { buildArchipelagoTsv } from './generate-archipelago';
import { buildSyllableEntropyJson, buildSyllableGrammarTsv } from './generate-syllable-grammar';
import { buildTeaBlendsTsv } from './generate-tea-blends';
import { hasAvoidedSubstring } from './demo-corpus-file';
import { SYLLABLE_GRAMMAR, compensatedSum, exactEntropy, exactWordDistribution, sampleCounts, sampleWord } from './syllable-grammar';

const committed = (name: string) => readFileSync(new URL(`./${name}`, import.meta.url), 'utf8');

describe('demo corpora are reproducible byte for byte', () => {
  it.each([
    ['archipelago-places.tsv', buildArchipelagoTsv],
    ['tea-blends.tsv', buildTeaBlendsTsv],
    ['syllable-grammar.tsv', buildSyllableGrammarTsv],
    ['syllable-grammar.entropy.json', buildSyllableEntropyJson],
  ])('%s equals its regenerated text', (name, build) => {
    expect(build() === committed(name)).toBe(true);
  });
});

describe('demo corpora parse cleanly and have the promised shape', () => {
  const parsed = (name: string) => parseCorpus(new TextEncoder().encode(committed(name)), { fileName: name });

  it('archipelago-places: a few thousand lower-case names of 3–14 letters, no problems', () => {
    const r = parsed('archipelago-places.tsv');
    expect(r.problems).toEqual([]);
    expect(r.header).toEqual(['word', 'count']);
    expect(r.stats.types).toBeGreaterThanOrEqual(2000);
    expect(r.stats.minLength).toBeGreaterThanOrEqual(3);
    expect(r.stats.maxLength).toBeLessThanOrEqual(14);
    expect(r.words.every((w) => /^[a-z]+$/.test(w.word))).toBe(true);
  });

  it('tea-blends: hundreds of single lower-case words, no problems', () => {
    const r = parsed('tea-blends.tsv');
    expect(r.problems).toEqual([]);
    expect(r.stats.types).toBeGreaterThanOrEqual(300);
    expect(r.stats.types).toBeLessThanOrEqual(1000);
    expect(r.words.every((w) => /^[a-z]+$/.test(w.word))).toBe(true);
  });

  it('invented names contain none of the avoided letter sequences', () => {
    for (const name of ['archipelago-places.tsv', 'tea-blends.tsv']) {
      expect(parsed(name).words.filter((w) => hasAvoidedSubstring(w.word))).toEqual([]);
    }
  });

  it('syllable-grammar: 50,000 sampled tokens, no problems', () => {
    const r = parsed('syllable-grammar.tsv');
    expect(r.problems).toEqual([]);
    expect(r.stats.tokens).toBe(50_000);
  });
});

describe('syllable grammar: exact distribution', () => {
  const dist = exactWordDistribution();
  const g = Object.fromEntries(
    (['onset', 'nucleus', 'coda'] as const).map((k) => [k, Object.fromEntries(SYLLABLE_GRAMMAR[k])]),
  ) as Record<'onset' | 'nucleus' | 'coda', Record<string, number>>;
  const syl = (o: string, n: string, c: string) => (g.onset[o] ?? 0) * (g.nucleus[n] ?? 0) * (g.coda[c] ?? 0);

  it('sums to 1 (compensated sum, within 1e-12)', () => {
    expect(Math.abs(compensatedSum(dist.values()) - 1)).toBeLessThan(1e-12);
  });

  it('adds up all derivations of an ambiguous word (worked by hand from the grammar)', () => {
    // "kai" = (k,ai,–) with 1 syllable, or (k,a,–)(–,i,–) with 2 syllables.
    const kai = 0.25 * syl('k', 'ai', '') + 0.5 * syl('k', 'a', '') * syl('', 'i', '');
    expect(dist.get('kai')).toBeCloseTo(kai, 15);
    // "ana" = (–,a,n)(–,a,–) or (–,a,–)(n,a,–), both with 2 syllables.
    const ana = 0.5 * (syl('', 'a', 'n') * syl('', 'a', '') + syl('', 'a', '') * syl('n', 'a', ''));
    expect(dist.get('ana')).toBeCloseTo(ana, 15);
    // Merging makes the word entropy smaller than the derivation entropy (data processing: the word is a
    // function of the derivation).
    const e = exactEntropy();
    expect(e.types).toBeLessThan(e.derivations);
    expect(e.bits).toBeLessThan(e.derivationBits);
  });

  it('the entropy file matches the exact computation', () => {
    const doc = JSON.parse(committed('syllable-grammar.entropy.json')) as { wordEntropyBits: number };
    expect(doc.wordEntropyBits).toBeCloseTo(exactEntropy().bits, 12);
  });

  it('the sampler agrees with the exact distribution: mean surprisal of samples estimates H within 5 se', () => {
    // E[-log2 p(W)] = H for W ~ p (definition of entropy); standard error sqrt(Var/N). 5 se is common
    // practice (no source).
    const e = exactEntropy();
    const rng = createRng('surprisal');
    const n = 20_000;
    let total = 0;
    for (let i = 0; i < n; i++) total -= Math.log2(dist.get(sampleWord(rng)) ?? Number.NaN);
    expect(Math.abs(total / n - e.bits)).toBeLessThan(5 * Math.sqrt(e.varianceOfSurprisalBits2 / n));
  });

  it('the plug-in entropy of growing samples converges to the exact entropy from below', () => {
    // The plug-in (maximum-likelihood) estimator is biased low; to first order the bias is
    // -(types - 1) / (2 N ln 2) bits (Miller 1955, from memory), so it shrinks as N grows, and adding the
    // Miller–Madow correction moves the estimate towards the truth.
    const exact = exactEntropy().bits;
    const sizes = [2_000, 8_000, 32_000, 128_000];
    const biases = sizes.map((n, i) => {
      const counts = sampleCounts(n, createRng(`converge-${i}`));
      const plugIn = entropyBits(counts.values());
      const millerMadow = plugIn + (counts.size - 1) / (2 * n * Math.LN2);
      expect(plugIn).toBeLessThan(exact);
      expect(Math.abs(millerMadow - exact)).toBeLessThan(Math.abs(plugIn - exact));
      return exact - plugIn;
    });
    for (let i = 1; i < biases.length; i++) expect(biases[i]).toBeLessThan(biases[i - 1] as number);
    expect(biases[biases.length - 1]).toBeLessThan(0.5);
  });
});
