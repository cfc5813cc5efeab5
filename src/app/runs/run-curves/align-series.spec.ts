import { describe, expect, it } from 'vitest';
import { alignSeries } from './align-series';

describe('alignSeries', () => {
  it('merges the steps of every series and leaves gaps as null (worked by hand)', () => {
    const train = [[1, 4.5], [2, 4.1], [3, 3.9], [5, 3.6]] as const;
    const validation = [[2, 4.3], [5, 3.8]] as const;
    const noise = [[4, 0.2]] as const;
    expect(alignSeries([train, validation, noise])).toEqual([
      [1, 2, 3, 4, 5],
      [4.5, 4.1, 3.9, null, 3.6],
      [null, 4.3, null, null, 3.8],
      [null, null, null, 0.2, null],
    ]);
  });

  it('returns empty rows for empty series', () => {
    expect(alignSeries([[], []])).toEqual([[], [], []]);
  });

  it('keeps every point of long sorted series in order', () => {
    const a = Array.from({ length: 1000 }, (_, i) => [2 * i, i] as const);
    const b = Array.from({ length: 500 }, (_, i) => [4 * i + 1, -i] as const);
    const [steps, ra, rb] = alignSeries([a, b]);
    expect(steps.length).toBe(1500);
    expect(steps.every((s, i) => i === 0 || s > (steps[i - 1] as number))).toBe(true);
    expect(ra?.filter((v) => v !== null).length).toBe(1000);
    expect(rb?.filter((v) => v !== null)).toEqual(b.map(([, v]) => v));
  });
});
