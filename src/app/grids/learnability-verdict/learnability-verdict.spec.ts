import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { verdictFixture } from '../../../../shared/api/verdict-test-fixture';
import { LearnabilityVerdictTable } from './learnability-verdict';

describe('LearnabilityVerdictTable', () => {
  it('marks each figure exact or bound, gives bits per word beside bits per char and calls the best n-gram no floor', async () => {
    TestBed.configureTestingModule({ imports: [LearnabilityVerdictTable], providers: [provideZonelessChangeDetection()] });
    const fixture = TestBed.createComponent(LearnabilityVerdictTable);
    fixture.componentRef.setInput('verdict', verdictFixture());
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
