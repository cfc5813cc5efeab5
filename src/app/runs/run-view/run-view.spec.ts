import { ChangeDetectionStrategy, Component, input, provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { provideRouter } from '@angular/router';
import type { RunDto } from '../../../../shared/api/runs';
import { CurrentBench } from '../../benches/current-bench';
import { LiveEvents, RunnerWatch } from '../../runners/live-events';
import { RunnersApi } from '../../runners/runners-api';
import { RunScheduler } from '../run-scheduler';
import { RunsApi } from '../runs-api';

// The chart module (uPlot) asks for the screen's pixel ratio as it loads, and jsdom has no matchMedia: stand one in,
// then load the page (and with it the chart module) lazily.
globalThis.matchMedia ??= ((query: string) => ({
  matches: false, media: query, onchange: null, addEventListener() {}, removeEventListener() {}, addListener() {}, removeListener() {}, dispatchEvent: () => false,
})) as typeof globalThis.matchMedia;

/** Stands in for the canvas chart (jsdom has no canvas). */
@Component({ selector: 'nw-run-curves', changeDetection: ChangeDetectionStrategy.OnPush, template: '' })
class FakeCurves {
  readonly history = input<unknown>();
  readonly live = input<unknown>();
  readonly family = input<unknown>();
}

const RUN = {
  id: 'run-1', benchId: 'b1', corpus: { id: 'c1', name: 'Syllables' }, createdBy: null, name: 'Cell 1', family: 'gru',
  settings: { model: {}, training: { steps: 400 } }, alphabet: ['a'], status: 'training', statusReason: null, summary: {}, stepsDone: 100,
  archived: false, checkpointCount: 0, canControl: true, placement: 'runners', runner: { id: 'r1', name: 'box-2' }, live: null,
  createdAt: '2026-12-05T09:00:00Z', updatedAt: '2026-12-05T09:00:00Z',
} as unknown as RunDto;

async function setUp(run: RunDto) {
  const { RunView } = await import('./run-view');
  const { RunCurves } = await import('../run-curves/run-curves');
  const watches: RunnerWatch[] = [];
  const control = vi.fn(async (_b: string, _r: string, action: string) => ({ ...run, status: action === 'stop' ? 'stopped' : 'paused', message: 'The runner saves a checkpoint first.' }));
  const enqueue = vi.fn();
  TestBed.configureTestingModule({
    imports: [RunView],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      { provide: RunsApi, useValue: { get: async () => run, checkpoints: async () => [], metrics: async () => ({ series: {}, truncated: false }) } },
      { provide: RunScheduler, useValue: { live: () => null, limit: 1, enqueue } },
      { provide: CurrentBench, useValue: { current: signal({ id: 'b1', name: 'Lab', role: run.canControl ? 'member' : 'viewer' }) } },
      { provide: RunnersApi, useValue: { control } },
      {
        provide: LiveEvents,
        useValue: {
          watchRun: (_b: string, r: RunDto) => {
            const w = new RunnerWatch(r);
            w.attach({ close: () => undefined, state: 'open' });
            w.connection.set('open');
            watches.push(w);
            return w;
          },
        },
      },
    ],
  });
  TestBed.overrideComponent(RunView, { remove: { imports: [RunCurves] }, add: { imports: [FakeCurves] } });
  const fixture = TestBed.createComponent(RunView);
  fixture.componentRef.setInput('benchId', 'b1');
  fixture.componentRef.setInput('runId', 'run-1');
  const loader = TestbedHarnessEnvironment.loader(fixture);
  // The page loads the run, its checkpoints and its curves, then renders the runner card.
  await vi.waitFor(async () => {
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).querySelector('[data-testid=runner-where]')).not.toBeNull();
  });
  const text = (id: string) => ((fixture.nativeElement as HTMLElement).querySelector(`[data-testid=${id}]`)?.textContent ?? '').replace(/\s+/g, ' ').trim();
  return { fixture, loader, text, watches, control, enqueue };
}

describe('RunView for a run trained by runners', { timeout: 30_000 }, () => {
  it('follows the run through its event stream and never offers to train it in this tab', async () => {
    const { fixture, loader, text, watches } = await setUp(RUN);
    expect(watches).toHaveLength(1);
    expect(text('runner-where')).toContain('Training on box-2');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Train in this tab|Continue from step/ }))).toHaveLength(0);
    watches[0]!.apply([{ event: 'progress', id: null, data: JSON.stringify({ step: 250, steps: 400, stepsPerSecond: 4, etaSeconds: 38, bitsPerChar: 2.5, isBound: null, runnerName: 'box-2', updatedAt: 'x' }) }]);
    await fixture.whenStable();
    expect(text('runner-steps')).toBe('step 250 / 400');
    watches[0]!.apply([{ event: 'run', id: null, data: JSON.stringify({ ...RUN, status: 'finished', stepsDone: 400 }) }]);
    await fixture.whenStable();
    expect(text('run-state')).toBe('finished');
  });

  it('stops the run through the control route', async () => {
    const { fixture, loader, text, control } = await setUp(RUN);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Stop/ }))).click();
    expect(control).toHaveBeenCalledWith('b1', 'run-1', 'stop');
    await fixture.whenStable();
    expect(text('run-state')).toBe('stopped');
    expect(text('runner-note')).toBe('The runner saves a checkpoint first.');
  });

  it('never calls a GRU run\'s figures a bound and gives its best validation per word, marked exact', async () => {
    const { fixture, text, watches } = await setUp({ ...RUN, summary: { bestValidationBitsPerChar: 2.5, bestValidationBitsPerWord: 13.75, bestValidationStep: 300 } });
    // The runner reports isBound true for every family; the page still names the GRU's figure exact.
    watches[0]!.apply([{ event: 'progress', id: null, data: JSON.stringify({ step: 250, steps: 400, stepsPerSecond: 4, etaSeconds: 38, bitsPerChar: 2.5, isBound: true, runnerName: 'box-2', updatedAt: 'x' }) }]);
    await fixture.whenStable();
    const page = ((fixture.nativeElement as HTMLElement).textContent ?? '').replace(/\s+/g, ' ');
    expect(page).not.toMatch(/bound/i);
    expect(page).not.toMatch(/noise/i);
    expect(page).toContain('Training cross entropy (exact)');
    expect(text('checkpoint-figure-head')).toBe('Cross entropy (exact)');
  });

  it('shows a viewer the live run without controls', async () => {
    const { loader, text } = await setUp({ ...RUN, canControl: false });
    expect(text('runner-where')).toContain('Training on box-2');
    const labels = await Promise.all((await loader.getAllHarnesses(MatButtonHarness)).map((b) => b.getText()));
    expect(labels.filter((l) => /Pause|Stop|Resume/.test(l))).toEqual([]);
  });
});
