import { describe, expect, it } from 'vitest';
import { createAliasTable, createBatcher } from './batcher';
import { createRng } from './random';

const corpus = [
  { word: 'ka', count: 50 },
  { word: 'lo', count: 25 },
  { word: 'mi', count: 12 },
  { word: 'nu', count: 8 },
  { word: 'po', count: 4 },
  { word: 'ri', count: 1 },
];
const total = corpus.reduce((s, w) => s + w.count, 0);

/** Chi-square 0.9995 quantile, Wilson–Hilferty approximation (Wilson & Hilferty 1931), z = 3.29. */
function chi2Critical(k: number): number {
  return k * (1 - 2 / (9 * k) + 3.29 * Math.sqrt(2 / (9 * k))) ** 3;
}

function tally(regime: 'token' | 'type', seed: number, batches: number): Map<string, number> {
  const b = createBatcher(corpus, { batchSize: 50, regime, rng: createRng(seed) });
  const seen = new Map<string, number>();
  for (let i = 0; i < batches; i++) for (const w of b.next()) seen.set(w, (seen.get(w) ?? 0) + 1);
  return seen;
}

describe('createBatcher', () => {
  it('token regime: frequencies match p_data (chi-square test, common practice (no source) for alpha = 0.0005)', () => {
    const n = 50 * 600;
    const seen = tally('token', 1, 600);
    const chi2 = corpus.reduce((s, { word, count }) => {
      const e = (n * count) / total;
      return s + ((seen.get(word) ?? 0) - e) ** 2 / e;
    }, 0);
    expect(chi2).toBeLessThan(chi2Critical(corpus.length - 1));
    // And clearly not uniform: the most frequent word is drawn about half of the time.
    expect((seen.get('ka') ?? 0) / n).toBeGreaterThan(0.45);
  });

  it('type regime: every type equally likely (chi-square test)', () => {
    const n = 50 * 600;
    const seen = tally('type', 2, 600);
    const e = n / corpus.length;
    const chi2 = corpus.reduce((s, { word }) => s + ((seen.get(word) ?? 0) - e) ** 2 / e, 0);
    expect(chi2).toBeLessThan(chi2Critical(corpus.length - 1));
  });

  it('is seeded: the same seed gives the same batches', () => {
    const a = createBatcher(corpus, { batchSize: 8, regime: 'token', rng: createRng('s') });
    const b = createBatcher(corpus, { batchSize: 8, regime: 'token', rng: createRng('s') });
    expect([a.next(), a.next()]).toEqual([b.next(), b.next()]);
    expect(a.next()).toHaveLength(8);
  });

  it('rejects bad settings with a clear message', () => {
    const rng = createRng(1);
    expect(() => createBatcher([], { batchSize: 4, regime: 'token', rng })).toThrow(/empty corpus/);
    expect(() => createBatcher(corpus, { batchSize: 0, regime: 'token', rng })).toThrow(/positive whole number/);
    expect(() => createBatcher(corpus, { batchSize: 2, regime: 'word' as never, rng })).toThrow(/token or type/);
    expect(() => createAliasTable([1, -1])).toThrow(/not negative/);
    expect(() => createAliasTable([0, 0])).toThrow(/add up to 0/);
  });

  it('alias table never draws a zero-weight entry', () => {
    const t = createAliasTable([0, 3, 0, 1]);
    const rng = createRng(3);
    const drawn = new Set<number>();
    for (let i = 0; i < 5000; i++) drawn.add(t.sample(rng));
    expect([...drawn].sort()).toEqual([1, 3]);
  });
});
