import { describe, expect, it } from 'vitest';
import { createRng } from './random';

const N = 40_000;

describe('createRng', () => {
  it('repeats for the same seed and differs for another seed', () => {
    const a = createRng(42);
    const b = createRng(42);
    const c = createRng(43);
    const xs = Array.from({ length: 5 }, () => a.next());
    expect(Array.from({ length: 5 }, () => b.next())).toEqual(xs);
    expect(Array.from({ length: 5 }, () => c.next())).not.toEqual(xs);
    expect(createRng('42').next()).not.toBe(createRng(42).next());
  });

  it('forks depend on the root seed and label only', () => {
    const a = createRng(7);
    a.next();
    a.next();
    expect(a.fork('init').next()).toBe(createRng(7).fork('init').next());
    expect(a.fork('init').next()).not.toBe(a.fork('noise').next());
    expect(a.fork('x').fork('y').next()).toBe(createRng(7).fork('x').fork('y').next());
  });

  it('next() is uniform on [0,1): chi-square over 20 bins below the 0.9995 quantile', () => {
    const rng = createRng('uniform');
    const bins = new Array<number>(20).fill(0);
    let outside = 0;
    for (let i = 0; i < N; i++) {
      const x = rng.next();
      if (!(x >= 0 && x < 1)) outside++;
      else bins[Math.floor(x * 20)]++;
    }
    expect(outside).toBe(0);
    const e = N / 20;
    const chi2 = bins.reduce((s, o) => s + (o - e) ** 2 / e, 0);
    // Chi-square 0.9995 quantile for 19 degrees of freedom by the Wilson–Hilferty approximation
    // (Wilson & Hilferty 1931) with z = 3.29: k(1 - 2/(9k) + z sqrt(2/(9k)))^3.
    const k = 19;
    const crit = k * (1 - 2 / (9 * k) + 3.29 * Math.sqrt(2 / (9 * k))) ** 3;
    expect(chi2).toBeLessThan(crit);
  });

  it('normal() matches the standard normal: mean, variance, and P(|x|<1), P(|x|<2)', () => {
    const rng = createRng('normal');
    let s = 0;
    let s2 = 0;
    let in1 = 0;
    let in2 = 0;
    for (let i = 0; i < N; i++) {
      const x = rng.normal();
      s += x;
      s2 += x * x;
      if (Math.abs(x) < 1) in1++;
      if (Math.abs(x) < 2) in2++;
    }
    const mean = s / N;
    const variance = s2 / N - mean * mean;
    // 5 standard errors: mean se = 1/sqrt(N); variance se = sqrt(2/N) (common practice (no source) for 5 se).
    expect(Math.abs(mean)).toBeLessThan(5 / Math.sqrt(N));
    expect(Math.abs(variance - 1)).toBeLessThan(5 * Math.sqrt(2 / N));
    // Abramowitz & Stegun Table 26.1: P(|X|<1) = 0.682689, P(|X|<2) = 0.954500; binomial se, 5 se.
    for (const [count, p] of [[in1, 0.682689], [in2, 0.9545]] as const) {
      expect(Math.abs(count / N - p)).toBeLessThan(5 * Math.sqrt((p * (1 - p)) / N));
    }
  });

  it('int(n) covers 0..n-1 only, pick/shuffle keep the elements, bad n is rejected', () => {
    const rng = createRng(1);
    const seen = new Set<number>();
    for (let i = 0; i < 1000; i++) seen.add(rng.int(7));
    expect([...seen].sort()).toEqual([0, 1, 2, 3, 4, 5, 6]);
    const items = ['a', 'b', 'c', 'd', 'e'];
    const shuffled = rng.shuffle(items);
    expect([...shuffled].sort()).toEqual(items);
    expect(items).toEqual(['a', 'b', 'c', 'd', 'e']);
    expect(items).toContain(rng.pick(items));
    expect(() => rng.int(0)).toThrow(/positive integer/);
    expect(() => rng.pick([])).toThrow(/non-empty/);
    expect(() => createRng(Number.NaN)).toThrow(/finite/);
    const seed = rng.seed();
    expect(Number.isInteger(seed) && seed >= 0 && seed < 2 ** 31).toBe(true);
  });
});
