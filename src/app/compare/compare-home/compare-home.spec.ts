import { Component, input, provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { provideRouter } from '@angular/router';
import type { RunDto } from '../../../../shared/api/runs';
import { CurrentBench } from '../../benches/current-bench';
import { ReportsApi } from '../../reports/reports-api';
import { RunsApi } from '../../runs/runs-api';
import { CompareCurves } from '../compare-curves/compare-curves';
import { ComparisonSources } from '../comparison-sources';
import { CompareHome } from './compare-home';

/** Stands in for the chart (ECharts needs a browser's layout). */
@Component({ selector: 'nw-compare-curves', template: '' })
class FakeCurves {
  readonly curves = input<unknown>();
  readonly label = input<unknown>();
  readonly unit = input<unknown>();
}

const run = (id: string): RunDto => ({
  id, benchId: 'b1', corpus: { id: 'c1', name: 'Syllables' }, createdBy: null, name: `Run ${id}`, family: 'ngram',
  settings: { model: { order: 3, discount: null } }, alphabet: ['a'], status: 'finished', statusReason: null,
  summary: {}, stepsDone: 1, archived: false, checkpointCount: 0, canControl: true, placement: 'tab', runner: null, live: null,
  createdAt: '2026-12-01T00:00:00Z', updatedAt: '2026-12-01T00:00:00Z',
} as unknown as RunDto);

describe('CompareHome', { timeout: 30_000 }, () => {
  it('asks for each ticked run\'s latest evaluation once, not again for the runs already shown', async () => {
    const asked: string[][] = [];
    TestBed.configureTestingModule({
      imports: [CompareHome],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        { provide: RunsApi, useValue: {
          list: async () => ({ items: [run('a'), run('b'), run('c')], total: 3 }), corpora: async () => [],
          metrics: async () => ({ series: {} }),
        } },
        { provide: ComparisonSources, useValue: { evaluationFigures: async (_bench: string, runs: RunDto[]) => {
          asked.push(runs.map((r) => r.id));
          return {};
        } } },
        { provide: ReportsApi, useValue: {} },
        { provide: CurrentBench, useValue: { current: signal({ id: 'b1', name: 'Bench', role: 'owner' }) } },
      ],
    });
    TestBed.overrideComponent(CompareHome, { remove: { imports: [CompareCurves] }, add: { imports: [FakeCurves] } });
    const fixture = TestBed.createComponent(CompareHome);
    fixture.componentRef.setInput('benchId', 'b1');
    await fixture.whenStable();
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const boxes = await loader.getAllHarnesses(MatCheckboxHarness); // one per run, in the list's order: a, b, c
    expect(boxes).toHaveLength(3);
    await boxes[0]!.check();
    await fixture.whenStable();
    await boxes[1]!.check();
    await fixture.whenStable();
    expect(asked).toEqual([['a'], ['b']]);
  });
});
