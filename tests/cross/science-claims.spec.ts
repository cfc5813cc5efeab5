// The reproduction benchmark's paired error bars (bench/science/science-claims.ts): the difference of two rows'
// held-out bits/char on the same words, with its standard error from the per-word differences.
import { describe, expect, it } from 'vitest';
import { pairedDifference } from '../../bench/science/science-claims';
import type { RowFigures } from '../../bench/science/science-job';

const row = (bits: number[], characters: number[]): RowFigures => ({ perWord: { bits, characters } }) as unknown as RowFigures;

describe('paired per-word difference', () => {
  it('matches a hand-worked example', () => {
    // Worked by hand: d = (1, 0, 2), mean 1, sample sd √((0² + 1² + 1²) / 2) = 1; 5 characters a word, so the
    // difference is 1 / 5 = 0.2 bits/char (= 39/15 − 36/15, the two rows' ratios) and its standard error 1 / √3 / 5.
    const p = pairedDifference(row([10, 12, 14], [5, 5, 5]), row([11, 12, 16], [5, 5, 5]))!;
    expect(p.diff).toBeCloseTo(0.2, 12);
    expect(p.se).toBeCloseTo(1 / Math.sqrt(3) / 5, 12);
    expect(p.words).toBe(3);
  });

  it('equals the difference of the rows\' bits/char (Σ bits / Σ characters) for words of unequal length', () => {
    const a = [7.1, 20.4, 11.9, 3.3];
    const b = [6.8, 21.0, 12.6, 2.9];
    const chars = [3, 9, 6, 2];
    const ratio = (x: number[]) => x.reduce((s, v) => s + v, 0) / chars.reduce((s, v) => s + v, 0);
    expect(pairedDifference(row(a, chars), row(b, chars))!.diff).toBeCloseTo(ratio(b) - ratio(a), 12);
  });

  it('gives no figure when the rows were not scored on the same number of words, or without per-word figures', () => {
    expect(pairedDifference(row([1, 2, 3], [2, 2, 2]), row([1, 2], [2, 2]))).toBeNull();
    expect(pairedDifference({} as RowFigures, row([1, 2], [2, 2]))).toBeNull();
  });
});
