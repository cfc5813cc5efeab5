import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { LearnabilityVerdict } from '../../../../shared/api/grids';
import { LearnabilityVerdictTable } from './learnability-verdict';

/** Figures invented for the display only (the table copies them; the verdict itself is computed on the server). */
const verdict: LearnabilityVerdict = {
  gridId: 'g', toleranceBits: 0.05, budgetSteps: 300, ngramFloor: { order: 3, bitsPerChar: 2.5 }, complete: true,
  rows: [
    { model: 'ngram-3', family: 'ngram', size: 3, runId: 'a', status: 'finished', bitsPerChar: 2.5, bitsPerWord: 13.75, gapToNgramFloor: 0 },
    { model: 'gru-8', family: 'gru', size: 8, runId: 'b', status: 'finished', bitsPerChar: 2.25, bitsPerWord: 12.5, gapToNgramFloor: -0.25 },
    { model: 'ssm-8', family: 'ssm', size: 8, runId: 'c', status: 'finished', bitsPerChar: 2.375, gapToNgramFloor: -0.125 },
  ],
  comparisons: [{ stateSize: 8, gruBitsPerChar: 2.25, ssmBitsPerChar: 2.375, difference: 0.125, onPar: false }],
};

describe('LearnabilityVerdictTable', () => {
  it('marks each figure exact or bound, gives bits per word beside bits per char and calls the best n-gram no floor', async () => {
    TestBed.configureTestingModule({ imports: [LearnabilityVerdictTable], providers: [provideZonelessChangeDetection()] });
    const fixture = TestBed.createComponent(LearnabilityVerdictTable);
    fixture.componentRef.setInput('verdict', verdict);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const rows = [...el.querySelectorAll('[data-testid=verdict-models] tbody tr')].map((tr) => [...tr.querySelectorAll('td')].map((td) => td.textContent!.trim()));
    expect(rows.map((r) => r[2])).toEqual(['exact', 'exact', 'bound']);
    expect(rows[1]![4]).toBe('12.50bits/word');
    expect(rows[2]![4]).toBe('—');
    const caption = el.querySelector('[data-testid=verdict-caption]')!.textContent!;
    expect(caption).toContain('end-of-word counted');
    expect(caption).toMatch(/not a floor/);
    expect(el.textContent).toContain('bits/char (end-of-word counted), exact');
  });
});
