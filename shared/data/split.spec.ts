import { describe, expect, it } from 'vitest';
import { fmix32, fnv1a32, splitCorpus, splitOf, splitPosition, validateShares } from './split';

const enc = (s: string) => new TextEncoder().encode(s);
const shares = { train: 0.8, validation: 0.1, test: 0.1 };
const words = Array.from({ length: 20_000 }, (_, i) => `w${i.toString(36)}x${(i * 7919) % 1000}`);

describe('hash building blocks', () => {
  it('FNV-1a 32 matches the published test vectors', () => {
    // FNV test vectors (draft-eastlake-fnv / isthe.com FNV page), from memory: "" -> 0x811c9dc5,
    // "a" -> 0xe40c292c, "foobar" -> 0xbf9cf968.
    expect(fnv1a32(enc(''))).toBe(0x811c9dc5);
    expect(fnv1a32(enc('a'))).toBe(0xe40c292c);
    expect(fnv1a32(enc('foobar'))).toBe(0xbf9cf968);
  });

  it('fmix32 matches MurmurHash3_x86_32 of the empty input (which is fmix32(seed))', () => {
    // MurmurHash3_x86_32("", seed=1) = 0x514E28B7 and seed=0xFFFFFFFF gives 0x81F16F39
    // (widely quoted SMHasher verification values, from memory); seed 0 gives 0.
    expect(fmix32(1)).toBe(0x514e28b7);
    expect(fmix32(0xffffffff)).toBe(0x81f16f39);
    expect(fmix32(0)).toBe(0);
  });
});

describe('splitOf', () => {
  it('is deterministic: same word and seed give the same split', () => {
    const a = words.slice(0, 500).map((w) => splitOf(w, 11, shares));
    const b = words.slice(0, 500).map((w) => splitOf(w, 11, shares));
    expect(b).toEqual(a);
  });

  it('a different seed changes the assignment of many words', () => {
    const changed = words.slice(0, 2000).filter((w) => splitOf(w, 1, shares) !== splitOf(w, 2, shares)).length;
    // Independent assignments disagree with probability 1 - (0.8^2 + 0.1^2 + 0.1^2) = 0.34 (closed form).
    expect(changed / 2000).toBeGreaterThan(0.25);
  });

  it('proportions match the shares within 5 binomial standard errors', () => {
    const { counts } = splitCorpus(words.map((word) => ({ word, count: 1 })), 3, shares);
    const n = words.length;
    for (const name of ['train', 'validation', 'test'] as const) {
      const p = shares[name];
      // Binomial standard error sqrt(p(1-p)/n); 5 se is common practice (no source).
      expect(Math.abs(counts[name].types / n - p)).toBeLessThan(5 * Math.sqrt((p * (1 - p)) / n));
    }
  });

  it('positions are uniform: Kolmogorov–Smirnov distance below the 0.001 critical value', () => {
    const u = words.map((w) => splitPosition(w, 99)).sort((a, b) => a - b);
    const n = u.length;
    let d = 0;
    u.forEach((x, i) => (d = Math.max(d, (i + 1) / n - x, x - i / n)));
    // Asymptotic KS critical value 1.95/sqrt(n) at alpha = 0.001 (Smirnov 1948 table, from memory).
    expect(d).toBeLessThan(1.95 / Math.sqrt(n));
  });

  it('a zero share gets no words; token counts are summed per split', () => {
    const r = splitCorpus(words.slice(0, 300).map((word) => ({ word, count: 2 })), 5, { train: 0.9, validation: 0.1, test: 0 });
    expect(r.counts.test.types).toBe(0);
    expect(r.counts.train.tokens + r.counts.validation.tokens).toBe(600);
    expect(r.parts.train.length).toBe(r.counts.train.types);
  });

  it('rejects shares that do not sum to 1 or fall outside [0,1], and non-integer seeds', () => {
    expect(() => validateShares({ train: 0.8, validation: 0.1, test: 0.2 })).toThrow(/add up to 1.*= 1.1/);
    expect(() => validateShares({ train: 1.2, validation: -0.1, test: -0.1 })).toThrow(/train share must be a number between 0 and 1/);
    expect(() => splitOf('a', 1.5, shares)).toThrow(/whole number/);
  });
});
