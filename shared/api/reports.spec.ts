/**
 * The long-format figure rows of reports (and so of their CSV exports): exact figures never called bounds,
 * bits per char always with the end-of-word note and bits per word beside them, error bars as standard errors.
 * The figures are invented display values (the rows copy them; no estimator runs here).
 */
import { describe, expect, it } from 'vitest';
import { ssmResultsFixture } from '../../server/modules/evaluations/evaluation-test-fixture';
import type { EvaluationDto, EvaluationResults } from './evaluations';
import { BITS_PER_CHAR, BITS_PER_WORD } from './figure-names';
import { comparisonEvaluation, comparisonFigures, evaluationFigures, gridFigures, type ReportFigure } from './reports';
import type { RunDto } from './runs';
import { verdictFixture } from './verdict-test-fixture';

function run(id: string, name: string, family: RunDto['family'], summary: RunDto['summary']): RunDto {
  return {
    id, benchId: 'b', corpus: { id: 'c', name: 'Names' }, createdBy: null, name, family, settings: {} as RunDto['settings'], alphabet: ['a'],
    status: 'finished', statusReason: null, summary, stepsDone: 100, archived: false, checkpointCount: 1, canControl: true,
    placement: 'tab', runner: null, live: null, createdAt: '2026-12-01T00:00:00Z', updatedAt: '2026-12-01T00:00:00Z',
  };
}

function evaluation(results: EvaluationResults, family: RunDto['family'] = results.family): EvaluationDto {
  return {
    id: 'e', benchId: 'b', run: { id: 'r', name: 'model', family }, checkpoint: { id: 'k', step: 100 }, createdBy: null,
    settings: {} as EvaluationDto['settings'], headline: { bitsPerChar: 0, bitsPerWord: 0, crossEntropyBits: 0 }, results, createdAt: '2026-12-01T00:00:00Z',
  };
}

const exactResults = (): EvaluationResults => {
  const ce = { crossEntropyBits: 9.125, dataEntropyBits: 8.5, klGapBits: 0.625, modelMass: 0.6 };
  return {
    family: 'gru',
    heldOut: { bitsPerWord: 11.25, bitsPerChar: 2.25, words: 40, standardError: { bitsPerWord: 0.5, bitsPerChar: 0.0625 } },
    crossEntropy: ce,
    baselines: { unigram: { bitsPerWord: 14, bitsPerChar: 2.9, words: 40 } },
  } as EvaluationResults;
};

const named = (rows: ReportFigure[], name: string) => rows.filter((r) => r.name === name);

describe('report figure rows', () => {
  it('label the GRU and n-gram figures exact and the state-space model\'s as bounds, with bits per word beside', () => {
    const rows = comparisonFigures([
      run('s', 'ssm-8', 'ssm', { lastBoundBitsPerChar: 2.5, lastIsBound: true, bestValidationBitsPerChar: 2.4, bestValidationBitsPerWord: 15.5 }),
      run('g', 'gru-8', 'gru', { lastBoundBitsPerChar: 2.2, bestValidationBitsPerChar: 2.3, bestValidationBitsPerWord: 14.75 }),
      run('n', 'kn-3', 'ngram', { lastBoundBitsPerChar: 2.35, bestValidationBitsPerChar: 2.45 }),
    ], { g: comparisonEvaluation(evaluation(exactResults())) });
    const ofRun = (name: string) => rows.filter((r) => r.setting === name);
    for (const name of ['gru-8', 'kn-3']) {
      expect(ofRun(name).filter((r) => /bound/i.test(r.name))).toEqual([]);
      expect(ofRun(name).find((r) => r.name === 'figures are')!.value).toBe('exact');
    }
    expect(ofRun('ssm-8').find((r) => r.name === 'best validation bound')!.value).toBe(2.4);
    expect(ofRun('gru-8').find((r) => r.name === 'best validation cross entropy (exact)')!.value).toBe(2.3);
    expect(ofRun('gru-8').find((r) => r.name === 'best validation cross entropy (exact) per word')).toMatchObject({ value: 14.75, unit: BITS_PER_WORD });
    // The GRU's exact sequence cross entropy and held-out standard error come from its evaluation.
    expect(ofRun('gru-8').find((r) => r.name === 'sequence cross entropy (exact)')!.value).toBe(9.125);
    expect(ofRun('gru-8').find((r) => r.name === 'bits per char standard error')!.value).toBe(0.0625);
    // Every bits-per-char figure says the end of word is counted.
    expect(rows.filter((r) => r.unit.startsWith('bits/char')).every((r) => r.unit === BITS_PER_CHAR)).toBe(true);
  });

  it('give an evaluation its standard errors (not the spread of repeats) when stored, and baselines per word too', () => {
    const stored = ssmResultsFixture() as Extract<EvaluationResults, { family: 'ssm' }>;
    const withSe = { ...stored, tight: { ...stored.tight, standardError: {
      bitsPerWord: { words: 0.3, repeats: 0.04, total: 0.3027 }, bitsPerChar: { words: 0.05, repeats: 0.01, total: 0.051 } } } };
    const rows = evaluationFigures(evaluation(withSe));
    expect(named(rows, 'bits per char standard error')[0]).toMatchObject({ value: 0.051, unit: BITS_PER_CHAR });
    expect(named(rows, 'bits per word standard error')[0]!.value).toBe(0.3027);
    expect(rows.filter((r) => /spread/.test(r.name))).toEqual([]);
    expect(named(rows, 'bits per char (bound)')[0]!.value).toBe(2.3);
    expect(named(rows, 'GRU bits per word (exact)')[0]).toMatchObject({ value: 11.2, unit: BITS_PER_WORD });
    // An evaluation stored before standard errors existed names its spread for what it is.
    const old = evaluationFigures(evaluation(stored));
    expect(named(old, 'bits per char spread over repeats (sd)')[0]!.value).toBe(0.02);
    // An exact evaluation: exact names, its standard error, no bound.
    const exact = evaluationFigures(evaluation(exactResults()));
    expect(exact.filter((r) => /bound/i.test(r.name))).toEqual([]);
    expect(named(exact, 'bits per char (exact)')[0]).toMatchObject({ value: 2.25, unit: BITS_PER_CHAR });
    expect(named(exact, 'bits per word standard error')[0]!.value).toBe(0.5);
  });

  it('name the best n-gram a reference, not a floor, in a learnability verdict', () => {
    const verdict = verdictFixture();
    const grid = { figure: 'bestValidationBitsPerChar', cells: [] } as unknown as Parameters<typeof gridFigures>[0];
    const rows = gridFigures(grid, verdict);
    expect(rows.filter((r) => /floor/.test(r.name))).toEqual([]);
    expect(rows.find((r) => r.setting === 'gru-8' && r.name === 'gap to the best n-gram')!.value).toBe(-0.25);
    expect(rows.find((r) => r.setting === 'gru-8' && r.name === 'bits per word (exact)')!.value).toBe(12.5);
    expect(rows.find((r) => r.setting === 'ssm-8' && r.name === 'bits per char (bound)')!.value).toBe(2.375);
  });
});
