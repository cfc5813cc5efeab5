import { describe, expect, it } from 'vitest';
import { heldOutSubset, heldOutSubsetNote } from './held-out-subset';
import { meanStandardError, ratioStandardError, repeatStandardError, combineErrors } from './standard-error';

const words = Array.from({ length: 500 }, (_, i) => ({ word: `w${String(i).padStart(3, '0')}`, count: 1 }));

describe('heldOutSubset', () => {
  it('scores every held-out word by default (max 0) and when the limit is not reached', () => {
    expect(heldOutSubset(words, 0)).toEqual(words.map((w) => w.word));
    expect(heldOutSubset(words, 500)).toHaveLength(500);
  });

  // With equal counts the old rule (most frequent, ties alphabetical) took w000..w049. A hash-random subset of 50
  // of 500 has mean rank 249.5 ± 144/√50 ≈ ±20 (uniform ranks; common practice, no source): allow ±80.
  it('takes a hash-random subset, not the alphabetically first words', () => {
    const sub = heldOutSubset(words, 50, 1);
    expect(sub).toHaveLength(50);
    expect(new Set(sub).size).toBe(50);
    const meanRank = sub.reduce((s, w) => s + Number(w.slice(1)), 0) / 50;
    expect(Math.abs(meanRank - 249.5)).toBeLessThan(80);
    expect(sub).not.toEqual(words.slice(0, 50).map((w) => w.word));
  });

  it('depends on the words and the seed only, not on their order', () => {
    const reversed = words.slice().reverse();
    expect(heldOutSubset(reversed, 50, 3).slice().sort()).toEqual(heldOutSubset(words, 50, 3).slice().sort());
    expect(heldOutSubset(words, 50, 4)).not.toEqual(heldOutSubset(words, 50, 3));
  });

  it('says in words what was scored', () => {
    expect(heldOutSubsetNote(500, 500)).toBe('all 500 held-out words scored');
    expect(heldOutSubsetNote(50, 500)).toMatch(/50 of 500 held-out words scored \(a hash-random subset/);
  });
});

describe('standard errors', () => {
  // Hand computation: [1, 2, 3, 4]: sample sd = √(5/3) = 1.290994, SE = sd/√4 = 0.645497.
  it('of a mean over words', () => {
    expect(meanStandardError([1, 2, 3, 4])).toBeCloseTo(Math.sqrt(5 / 3) / 2, 12);
    expect(meanStandardError([7])).toBeNull();
  });

  // Hand computation: bits [2, 4, 6] over steps [1, 2, 3] have the ratio 2 exactly: zero residuals, zero error.
  // bits [3, 4] over steps [1, 1]: R = 3.5, residuals ∓0.5, SE = √(0.5/(2·1))·2/2 = 0.5 — the SE of the mean of
  // [3, 4] (sd 0.7071/√2 = 0.5), as it must be when every word has the same length.
  it('of a ratio of sums (bits per character)', () => {
    expect(ratioStandardError([2, 4, 6], [1, 2, 3])).toBeCloseTo(0, 12);
    expect(ratioStandardError([3, 4], [1, 1])).toBeCloseTo(0.5, 12);
    expect(ratioStandardError([3, 4], [1, 1])).toBeCloseTo(meanStandardError([3, 4]) as number, 12);
  });

  // Monte-Carlo check of the delta method (common practice, no source): draw 400 datasets of 200 words with
  // random lengths and bits, compare the spread of the ratio over datasets with the mean reported SE (±15%).
  it('of a ratio agrees with the spread over repeated samples', () => {
    let seed = 7;
    const rand = () => { seed = (seed * 1103515245 + 12345) % 2147483648; return seed / 2147483648; };
    const ratios: number[] = [];
    const ses: number[] = [];
    for (let d = 0; d < 400; d++) {
      const steps = Array.from({ length: 200 }, () => 2 + Math.floor(rand() * 10));
      const bits = steps.map((t) => t * (2 + rand()) + 3 * rand());
      ratios.push(bits.reduce((a, b) => a + b, 0) / steps.reduce((a, b) => a + b, 0));
      ses.push(ratioStandardError(bits, steps) as number);
    }
    const mean = ratios.reduce((a, b) => a + b, 0) / ratios.length;
    const sd = Math.sqrt(ratios.reduce((a, b) => a + (b - mean) ** 2, 0) / (ratios.length - 1));
    const meanSe = ses.reduce((a, b) => a + b, 0) / ses.length;
    expect(meanSe / sd).toBeGreaterThan(0.85);
    expect(meanSe / sd).toBeLessThan(1.15);
  });

  // Hand computation: repeats [1, 3]: sd √2, SE √2/√2 = 1; combined with a word SE of 1: √2.
  it('of repeats, and their combination', () => {
    expect(repeatStandardError([1, 3])).toBeCloseTo(1, 12);
    expect(repeatStandardError([5])).toBe(0);
    expect(combineErrors(1, 1).total).toBeCloseTo(Math.SQRT2, 12);
    expect(combineErrors(null, 1).total).toBeNull();
  });
});
