import type { GridCellDto } from '../../../../shared/api/grids';
import { goodness, heatmapData } from './heatmap-data';

const cell = (coords: number[], best: number | null): GridCellDto => ({
  coords, values: [], label: coords.join('/'), run: null, figure: best, best, final: null, wordsPerSecond: null, parameterCount: null,
});

describe('heatmapData', () => {
  // 2 state sizes × 2 flows × 2 seeds; the seeds axis is not drawn, so each square is the mean of two runs.
  const axes = [
    { key: 'model.stateSize', values: [8, 16] },
    { key: 'model.inferenceFlow', values: [[{ kind: 'diag' as const }], [{ kind: 'tril' as const }]] },
    { key: 'training.seed', values: [1, 2] },
  ];
  const cells = [
    cell([0, 0, 0], 2.0), cell([0, 0, 1], 2.2), cell([0, 1, 0], 1.9), cell([0, 1, 1], null),
    cell([1, 0, 0], 1.8), cell([1, 0, 1], 1.6), cell([1, 1, 0], null), cell([1, 1, 1], null),
  ];

  it('averages the figure over the axis that is not drawn and leaves unfinished squares out', () => {
    const d = heatmapData({ axes, cells }, 'bestValidationBitsPerChar', 1, 0, (k) => k);
    expect(d.columns).toEqual(['diag', 'tril']);
    expect(d.rows).toEqual(['8', '16']);
    const at = (x: number, y: number) => d.cells.find((c) => c.x === x && c.y === y);
    // Means worked by hand: (2.0 + 2.2) / 2 = 2.1; 1.9 alone; (1.8 + 1.6) / 2 = 1.7; the last square has no run yet.
    expect(at(0, 0)?.value).toBeCloseTo(2.1, 12);
    expect(at(1, 0)).toMatchObject({ value: 1.9, runs: 1, of: 2 });
    expect(at(0, 1)?.value).toBeCloseTo(1.7, 12);
    expect(at(1, 1)).toBeUndefined();
    // Error bar over the seeds: standard error of the mean s/√n, by hand: values 2.0 and 2.2, s = √0.02 ≈ 0.141421,
    // s/√2 = 0.1; a square of one run has none.
    expect(at(0, 0)?.se).toBeCloseTo(0.1, 12);
    expect(at(1, 0)?.se).toBeNull();
    expect(d.filled).toBe(5);
    expect(d.total).toBe(8);
  });

  it('ranks bound costs lower-is-better, speed higher-is-better, size lower-is-better', () => {
    // Bound figures are stored as costs in bits per character (DEVELOPERS.md, "Runs"): 1.7 beats 2.1.
    expect(goodness(1.7, 'bestValidationBitsPerChar')).toBeGreaterThan(goodness(2.1, 'bestValidationBitsPerChar'));
    expect(goodness(1.7, 'lastBoundBitsPerChar')).toBeGreaterThan(goodness(2.1, 'lastBoundBitsPerChar'));
    expect(goodness(500, 'wordsPerSecond')).toBeGreaterThan(goodness(200, 'wordsPerSecond'));
    expect(goodness(1000, 'parameterCount')).toBeGreaterThan(goodness(5000, 'parameterCount'));
  });
});
