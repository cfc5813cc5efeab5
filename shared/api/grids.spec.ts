// Labels people read for grid cells and axes (written out by hand from the axis values).
import { describe, expect, it } from 'vitest';
import { gridAxisLabel, gridCellLabel, gridValueLabel } from './grids';

describe('grid labels', () => {
  const axes = [
    { key: 'model.generativeFlow', values: [[{ kind: 'shift' }], [{ kind: 'coupling' }, { kind: 'diag' }]] },
    { key: 'model.stateSize', values: [8, 16] },
  ];

  it('names each axis in words and each value plainly, not by its settings key', () => {
    expect(gridCellLabel(axes, [1, 0])).toBe('Generative flow: coupling + diag, State size 8');
    expect(gridCellLabel(axes, [0, 1])).toBe('Generative flow: shift, State size 16');
  });

  it('shows a learnability model by its name alone', () => {
    expect(gridCellLabel([{ key: 'model', values: ['gru-8', 'ssm-16'] }], [1])).toBe('ssm-16');
  });

  it('falls back to the last part of an unknown key', () => {
    expect(gridAxisLabel('training.clipNorm')).toBe('clipNorm');
    expect(gridAxisLabel('training.samples')).toBe('Samples per word (K)');
    expect(gridValueLabel([{ kind: 'tril' }, { kind: 'diag' }])).toBe('tril + diag');
  });
});
