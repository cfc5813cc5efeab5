// Download names of reports. Expected stems are written out by hand from the titles.
import { describe, expect, it } from 'vitest';
import { reportFileStem } from './report-file-name';

describe('reportFileStem', () => {
  it('drops the hyphen a closing bracket would leave at the end', () => {
    expect(reportFileStem('gru-small, step 40: evaluation (test split, order 3, K = 256, seed 1)'))
      .toBe('gru-small-step-40-evaluation-test-split-order-3-k-256-seed-1');
  });

  it('cuts long titles between words, never leaving a hyphen at the end', () => {
    const stem = reportFileStem('Comparison of archipelago places coupling diag, archipelago places shift only, syllables');
    expect(stem).toBe('comparison-of-archipelago-places-coupling-diag-archipelago');
    expect(stem.length).toBeLessThanOrEqual(60);
  });

  it('keeps letters of accented words and falls back to "report" when nothing is left', () => {
    expect(reportFileStem('Évaluation — café')).toBe('evaluation-cafe');
    expect(reportFileStem('¿?!')).toBe('report');
  });

  it('cuts a single very long word at 60 characters', () => {
    expect(reportFileStem('a'.repeat(80))).toBe('a'.repeat(60));
  });
});
