import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { provideRouter } from '@angular/router';
import { CurrentBench } from '../../benches/current-bench';
import { RunScheduler } from '../run-scheduler';
import { RunsApi } from '../runs-api';
import { RunList } from './run-list';

async function setUp(role: 'owner' | 'coach' | 'member' | 'viewer') {
  TestBed.configureTestingModule({
    imports: [RunList],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      { provide: RunsApi, useValue: { list: async () => ({ items: [], total: 0 }), corpora: async () => [] } },
      { provide: RunScheduler, useValue: { runs: signal([]), limit: 1 } },
      { provide: CurrentBench, useValue: { current: signal({ id: 'b1', name: 'Bench', role }) } },
    ],
  });
  const fixture = TestBed.createComponent(RunList);
  fixture.componentRef.setInput('benchId', 'b1');
  await fixture.whenStable();
  return { fixture, loader: TestbedHarnessEnvironment.loader(fixture) };
}

const note = (el: HTMLElement) => el.querySelector('[data-testid=viewer-note]')?.textContent?.trim() ?? '';

describe('RunList actions per role', () => {
  for (const role of ['owner', 'coach', 'member'] as const) {
    it(`offers New run and Import a checkpoint to a ${role}`, async () => {
      const { fixture, loader } = await setUp(role);
      expect(await (await loader.getHarness(MatButtonHarness.with({ text: /New run/ }))).isDisabled()).toBe(false);
      expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Import a checkpoint/ }))).toHaveLength(1);
      expect(note(fixture.nativeElement as HTMLElement)).toBe('');
    });
  }

  it('disables New run for a viewer, hides the import and says why', async () => {
    const { fixture, loader } = await setUp('viewer');
    expect(await (await loader.getHarness(MatButtonHarness.with({ text: /New run/ }))).isDisabled()).toBe(true);
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Import a checkpoint/ }))).toHaveLength(0);
    expect(note(fixture.nativeElement as HTMLElement)).toMatch(/Viewers can look at runs but cannot start or import them/);
  });
});
