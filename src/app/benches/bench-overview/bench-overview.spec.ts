import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { provideRouter } from '@angular/router';
import { BenchSummary } from '../../core/api-types';
import { Notice } from '../../core/notice';
import { CorporaApi } from '../../corpora/corpora-api';
import { GridsApi } from '../../grids/grids-api';
import { ReportsApi } from '../../reports/reports-api';
import { RunsApi } from '../../runs/runs-api';
import { BenchesApi } from '../benches-api';
import { CurrentBench } from '../current-bench';
import { BenchOverview } from './bench-overview';

async function setUp() {
  TestBed.configureTestingModule({
    imports: [BenchOverview],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      { provide: BenchesApi, useValue: {} },
      { provide: CurrentBench, useValue: {} },
      { provide: Notice, useValue: { done: () => undefined } },
      { provide: CorporaApi, useValue: { list: async () => [{ id: 'c1' }, { id: 'c2' }] } },
      { provide: RunsApi, useValue: { list: async () => ({ items: [], total: 7 }) } },
      { provide: GridsApi, useValue: { list: async () => [{ id: 'g1' }] } },
      { provide: ReportsApi, useValue: { list: async () => ({ items: [], total: 0 }) } },
    ],
  });
  const fixture = TestBed.createComponent(BenchOverview);
  const bench: BenchSummary = { id: 'b1', name: 'Lab', description: '', role: 'member', memberCount: 2, createdAt: '2026-12-01T00:00:00Z' };
  fixture.componentRef.setInput('bench', bench);
  await fixture.whenStable();
  await vi.waitFor(() => expect((fixture.nativeElement as HTMLElement).querySelector('[data-testid=bench-counts]')).not.toBeNull());
  return { fixture, loader: TestbedHarnessEnvironment.loader(fixture) };
}

describe('BenchOverview', () => {
  it('counts what the bench holds, in words with the right number', async () => {
    const { fixture } = await setUp();
    const text = (fixture.nativeElement as HTMLElement).querySelector('[data-testid=bench-counts]')!.textContent!.replace(/\s+/g, ' ').trim();
    expect(text).toBe('2 corpora, 7 runs, 1 grid, 0 reports');
  });

  it('has shortcuts to every part of the bench, Grids and Reports included', async () => {
    const { loader } = await setUp();
    const labels = await Promise.all((await loader.getAllHarnesses(MatButtonHarness)).map((b) => b.getText()));
    for (const name of ['Corpora', 'Runs', 'Compare', 'Grids', 'Reports']) expect(labels.some((l) => l.endsWith(name)), name).toBe(true);
  });
});
