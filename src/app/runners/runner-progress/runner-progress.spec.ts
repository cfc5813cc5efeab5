import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatProgressBarHarness } from '@angular/material/progress-bar/testing';
import type { RunLiveProgress } from '../../../../shared/api/runners';
import type { RunDto } from '../../../../shared/api/runs';
import { RunnerProgress } from './runner-progress';

const RUN = {
  id: 'run-1', family: 'gru', status: 'training', stepsDone: 100, settings: { training: { steps: 400 } }, placement: 'runners',
  runner: { id: 'r1', name: 'box-2' }, live: null, canControl: true,
} as unknown as RunDto;
const PROGRESS: RunLiveProgress = {
  step: 120, steps: 400, stepsPerSecond: 3.25, etaSeconds: 86, bitsPerChar: 2.4567, isBound: true, runnerName: 'box-2', updatedAt: '2026-12-05T09:00:00Z',
};

async function setUp(inputs: Record<string, unknown>) {
  TestBed.configureTestingModule({ imports: [RunnerProgress], providers: [provideZonelessChangeDetection()] });
  const fixture = TestBed.createComponent(RunnerProgress);
  for (const [k, v] of Object.entries({ run: RUN, ...inputs })) fixture.componentRef.setInput(k, v);
  await fixture.whenStable();
  const loader = TestbedHarnessEnvironment.loader(fixture);
  const text = (id: string) => ((fixture.nativeElement as HTMLElement).querySelector(`[data-testid=${id}]`)?.textContent ?? '').replace(/\s+/g, ' ').trim();
  const actions: string[] = [];
  fixture.componentInstance.control.subscribe((a) => actions.push(a));
  return { fixture, loader, text, actions };
}

describe('RunnerProgress', { timeout: 30_000 }, () => {
  it('shows the runner, step / steps with a bar, steps/s, time left and the figure', async () => {
    const { loader, text } = await setUp({ progress: PROGRESS, connection: 'open', canControl: true });
    expect(text('runner-where')).toContain('Training on box-2');
    expect(text('runner-steps')).toBe('step 120 / 400');
    expect(await (await loader.getHarness(MatProgressBarHarness)).getValue()).toBe(30);
    expect(text('runner-speed')).toBe('3.3steps/s');
    expect(text('runner-eta')).toBe('1 min 26 s');
    expect(text('runner-figure')).toBe('2.457bits/char, end-of-word symbol counted');
    expect(text('runner-connection')).toContain('live');
  });

  it('offers pause and stop to those who may control the run, and emits the action', async () => {
    const { loader, actions } = await setUp({ progress: PROGRESS, canControl: true });
    const labels = await Promise.all((await loader.getAllHarnesses(MatButtonHarness)).map((b) => b.getText()));
    expect(labels.map((l) => l.replace(/^\w+\s/, ''))).toEqual(['Pause', 'Stop']);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Stop/ }))).click();
    expect(actions).toEqual(['stop']);
  });

  it('offers resume for a stopped run', async () => {
    const { loader, actions } = await setUp({ run: { ...RUN, status: 'stopped' }, canControl: true });
    await (await loader.getHarness(MatButtonHarness.with({ text: /Resume on the runners/ }))).click();
    expect(actions).toEqual(['resume']);
  });

  it('says why a run waits for a runner again when its runner went silent', async () => {
    const why = 'The runner "box-2" stopped answering (no word since its lease ran out at 09:01:00 UTC); waiting for a runner.';
    const { text } = await setUp({ run: { ...RUN, status: 'queued', runner: null, statusReason: why }, canControl: true });
    expect(text('runner-where')).toContain('Waiting for a runner');
    expect(text('runner-wait-reason')).toBe(why);
  });

  it('shows a viewer the progress but no controls', async () => {
    const { loader, text } = await setUp({ progress: PROGRESS, canControl: false });
    expect(text('runner-steps')).toBe('step 120 / 400');
    expect(await loader.getAllHarnesses(MatButtonHarness)).toHaveLength(0);
  });
});
