import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatTableHarness } from '@angular/material/table/testing';
import type { RunDto } from '../../../../shared/api/runs';
import { compareRows, NOT_EVALUATED, type EvaluationFigures } from '../compare-rows';
import { CompareTable } from './compare-table';

function ssmRun(id: string, name: string, stateSize: number, inference: string, seed: number): RunDto {
  return {
    id, benchId: 'b1', corpus: { id: 'c1', name: 'Syllables' }, createdBy: null, name, family: 'ssm',
    settings: {
      model: { stateSize, generativeFlow: [{ kind: 'coupling' }, { kind: 'diag' }], inferenceFlow: [{ kind: inference as 'diag' }],
        flowHidden: 16, observationHidden: 0, embeddingSize: 8, encoderSize: 32, proposalHidden: 16 },
      training: { steps: 300, batchSize: 32, samples: 4, learningRate: 0.01, clipNorm: 5, warmupSteps: 0, regime: 'token', seed,
        evalEvery: 50, evalSamples: 64, checkpointEvery: 100 },
    },
    alphabet: ['a', 'b'], status: 'finished', statusReason: null,
    summary: { lastBoundBitsPerChar: 2.5, bestValidationBitsPerChar: stateSize === 8 ? 2.61 : 2.4, parameterCount: 1000 + stateSize },
    stepsDone: 300, archived: false, checkpointCount: 1, canControl: true, placement: 'tab', runner: null, live: null, createdAt: '2026-12-01T00:00:00Z', updatedAt: '2026-12-01T00:00:00Z',
  };
}

async function render(runs: RunDto[], evaluations: Record<string, EvaluationFigures | undefined> = {}) {
  TestBed.configureTestingModule({ imports: [CompareTable], providers: [provideZonelessChangeDetection()] });
  const fixture = TestBed.createComponent(CompareTable);
  fixture.componentRef.setInput('runs', runs);
  fixture.componentRef.setInput('rows', compareRows(runs, evaluations));
  await fixture.whenStable();
  const table = await TestbedHarnessEnvironment.loader(fixture).getHarness(MatTableHarness);
  const rows = await table.getRows();
  const byLabel = new Map<string, Record<string, string>>();
  for (const row of rows) {
    const cells = await row.getCellTextByColumnName();
    byLabel.set(cells['label']!.replace(/\s*differs$/, '').replace(/\s*\(.*\)$/, '').trim(), cells);
  }
  return byLabel;
}

describe('CompareTable', { timeout: 30_000 }, () => {
  it('marks exactly the rows whose values differ between runs', async () => {
    // Two runs that differ only in state size and seed (and hence in the figures that follow from them).
    const rows = await render([ssmRun('r1', 'small', 8, 'diag', 1), ssmRun('r2', 'wider', 16, 'diag', 2)]);
    expect(rows.get('State size')!['label']).toMatch(/differs$/);
    expect(rows.get('Seed')!['label']).toMatch(/differs$/);
    expect(rows.get('Inference flow')!['label']).not.toMatch(/differs/);
    expect(rows.get('Generative flow')!['label']).not.toMatch(/differs/);
    expect(rows.get('Learning rate')!['label']).not.toMatch(/differs/);
    expect(rows.get('Best validation figure')!['label']).toMatch(/differs$/);
    expect(rows.get('Final training figure')!['label']).not.toMatch(/differs/);
    // The values sit in one column per run, numbers as the table prints them.
    expect(rows.get('State size')!['run0']).toBe('8');
    expect(rows.get('State size')!['run1']).toBe('16');
    expect(rows.get('Best validation figure')!['run0']).toBe('2.610');
    expect(rows.get('Generative flow')!['run1']).toBe('coupling → diag');
  });

  it('marks a flow change and leaves the state size alone when only the flow changes', async () => {
    const rows = await render([ssmRun('r1', 'diag', 8, 'diag', 1), ssmRun('r2', 'tril', 8, 'tril', 1)]);
    expect(rows.get('Inference flow')!['label']).toMatch(/differs$/);
    expect(rows.get('State size')!['label']).not.toMatch(/differs/);
    expect(rows.get('Seed')!['label']).not.toMatch(/differs/);
  });

  it('shows a missing figure as a dash and counts it as a difference', async () => {
    const a = ssmRun('r1', 'a', 8, 'diag', 1);
    const b = { ...ssmRun('r2', 'b', 8, 'diag', 1), summary: { ...a.summary, bestValidationBitsPerChar: null } };
    const rows = await render([a, b]);
    expect(rows.get('Best validation figure')!['run1']).toBe('—');
    expect(rows.get('Best validation figure')!['label']).toMatch(/differs$/);
  });

  it('aligns text and numbers of a run column alike, and says the end of word is counted in bits/char', async () => {
    TestBed.configureTestingModule({ imports: [CompareTable], providers: [provideZonelessChangeDetection()] });
    const runs = [ssmRun('r1', 'a', 8, 'diag', 1), ssmRun('r2', 'b', 16, 'tril', 2)];
    const fixture = TestBed.createComponent(CompareTable);
    fixture.componentRef.setInput('runs', runs);
    fixture.componentRef.setInput('rows', compareRows(runs));
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const runCells = [...el.querySelectorAll('td.mat-column-run0, td.mat-column-run1')];
    expect(runCells.length).toBeGreaterThan(10);
    expect(runCells.every((td) => td.classList.contains('run-cell'))).toBe(true);
    // Text values (flows) and numbers (state size) both in run cells: one alignment rule for the column.
    expect(runCells.some((td) => !td.classList.contains('nw-num'))).toBe(true);
    expect(el.textContent).toContain('bits/char, end-of-word counted');
  });
});

function exactRun(id: string, name: string, family: 'gru' | 'ngram'): RunDto {
  const base = ssmRun(id, name, 8, 'diag', 1);
  const settings = family === 'gru'
    ? { model: { stateSize: 8, embeddingSize: 16, observationHidden: 0 }, training: base.settings.training }
    : { model: { order: 3 } };
  return { ...base, family, settings: settings as RunDto['settings'],
    summary: { lastBoundBitsPerChar: 2.2, bestValidationBitsPerChar: 2.3, bestValidationBitsPerWord: 14.25, parameterCount: 500 } };
}

describe('CompareTable figures of mixed families', { timeout: 30_000 }, () => {
  it('never calls the GRU or n-gram figures a bound, and shows their exact cross entropy with bits per word', async () => {
    const runs = [ssmRun('r1', 'ssm', 8, 'diag', 1), exactRun('r2', 'gru', 'gru'), exactRun('r3', 'kn3', 'ngram')];
    // Figures as an evaluation stores them (invented values for the display only).
    const evaluations: Record<string, EvaluationFigures> = {
      r1: { crossEntropyBitsPerWord: 9.5, meanNoiseInformationBits: 0.4, heldOutBitsPerChar: 2.41, heldOutBitsPerWord: 15.1,
        heldOutSeBitsPerChar: 0.021, heldOutSeBitsPerWord: 0.3 },
      r2: { crossEntropyBitsPerWord: 9.25, meanNoiseInformationBits: null, heldOutBitsPerChar: 2.35, heldOutBitsPerWord: 14.5,
        heldOutSeBitsPerChar: 0.02, heldOutSeBitsPerWord: 0.25 },
    };
    const rows = await render(runs, evaluations);
    const labels = [...rows.keys()];
    expect(labels.filter((l) => /bound/i.test(l))).toEqual([]);
    expect(rows.get('Figures are')!['run0']).toBe('bounds (IWAE)');
    expect(rows.get('Figures are')!['run1']).toBe('exact');
    expect(rows.get('Figures are')!['run2']).toBe('exact');
    // The GRU's sequence cross entropy is a number, not a dash; the n-gram without an evaluation says so.
    expect(rows.get('Sequence cross entropy')!['run1']).toBe('9.250');
    expect(rows.get('Sequence cross entropy')!['run2']).toBe(NOT_EVALUATED);
    expect(rows.get('Best validation figure per word')!['run1']).toBe('14.250');
    expect(rows.get('Held-out cost')!['run1']).toBe('2.350');
    expect(rows.get('± standard error')!['run0']).toBe('0.021');
    // No noise in an exact model: the row does not apply (a dash), whereas the SSM shows its figure.
    expect(rows.get('Noise mutual information')!['run1']).toBe('—');
    expect(rows.get('Noise mutual information')!['run0']).toBe('0.400');
    // Bits per char say the end of word is counted; bits per word stand beside them.
    const label = rows.get('Held-out cost')!['label']!;
    expect(label).toContain('bits/char, end-of-word counted');
    expect(rows.get('Held-out cost per word')!['label']).toContain('bits/word');
  });
});
