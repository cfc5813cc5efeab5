import type { EvaluationResults } from '../../../../shared/api/evaluations';
import { ssmResultsFixture } from '../../../../server/modules/evaluations/evaluation-test-fixture';
import { figureRows } from './figure-rows';

/** Display values invented for the table (the rows copy them; no estimator runs here). */
const exact = (): EvaluationResults => ({
  family: 'gru',
  heldOut: { bitsPerWord: 11.25, bitsPerChar: 2.25, words: 40, standardError: { bitsPerWord: 0.5, bitsPerChar: 0.0625 } },
  crossEntropy: { crossEntropyBits: 9.125, dataEntropyBits: 8.5, klGapBits: 0.625, modelMass: 0.6 },
  baselines: {
    unigram: { bitsPerWord: 14, bitsPerChar: 2.9, words: 40 },
    ngram: { bitsPerWord: 12, bitsPerChar: 2.4, words: 40, order: 3, standardError: { bitsPerWord: 0.4, bitsPerChar: 0.05 },
      crossEntropy: { crossEntropyBits: 9.5, dataEntropyBits: 8.5, klGapBits: 1, modelMass: 0.5 } },
  },
} as EvaluationResults);

describe('figureRows', () => {
  it('names exact figures exact and costs, with standard errors and bits per word beside every bits per char', () => {
    const rows = figureRows(exact());
    const by = (k: string) => rows.find((r) => r.key === k)!;
    expect(rows.filter((r) => /bound|log-likelihood/i.test(r.label))).toEqual([]);
    expect(by('exact-char')).toMatchObject({ label: 'Held-out cost per character (exact)', spread: 0.0625, spreadKind: 'se', unit: 'bits/char (end-of-word counted)' });
    expect(by('ngram-word')).toMatchObject({ value: 12, spread: 0.4, unit: 'bits/word' });
    expect(by('ngram-ce').value).toBe(9.5);
    // Every bits-per-char row has a bits-per-word row.
    const perChar = rows.filter((r) => r.unit.startsWith('bits/char'));
    expect(perChar.every((r) => r.unit === 'bits/char (end-of-word counted)')).toBe(true);
    expect(perChar.length).toBeGreaterThan(2);
    expect(rows.filter((r) => r.unit === 'bits/word' && !/cross entropy|H\(p_data\)|KL/.test(r.label)).length).toBe(perChar.length);
  });

  it('calls the state-space figure a bound, and an older evaluation\'s spread a standard deviation over repeats', () => {
    const older = figureRows(ssmResultsFixture() as EvaluationResults);
    expect(older.find((r) => r.key === 'tight-char')).toMatchObject({ spread: 0.02, spreadKind: 'sd-repeats' });
    expect(older.find((r) => r.key === 'tight-char')!.label).toMatch(/a bound/);
    const stored = ssmResultsFixture() as Extract<EvaluationResults, { family: 'ssm' }>;
    const withSe = { ...stored, tight: { ...stored.tight, standardError: {
      bitsPerWord: { words: 0.3, repeats: 0.04, total: 0.3027 }, bitsPerChar: { words: 0.05, repeats: 0.01, total: 0.051 } } } };
    expect(figureRows(withSe).find((r) => r.key === 'tight-char')).toMatchObject({ spread: 0.051, spreadKind: 'se' });
  });
});
