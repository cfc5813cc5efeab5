import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatRadioGroupHarness } from '@angular/material/radio/testing';
import type { RunnerAvailability } from '../../../../shared/api/runners';
import { ApiError } from '../../core/api-error';
import { RunnersApi } from '../runners-api';
import { PlacementChoice } from './placement-choice';

const ONLINE: RunnerAvailability = { backend: 'embedded', onlineRunners: 1, onlineThreads: 3, waiting: 2, active: 1, canSend: true };

async function setUp(answer: RunnerAvailability | Error, inputs: { preferRunners?: boolean; plural?: boolean } = {}) {
  const availability = vi.fn(async () => { if (answer instanceof Error) throw answer; return answer; });
  TestBed.configureTestingModule({
    imports: [PlacementChoice],
    providers: [provideZonelessChangeDetection(), { provide: RunnersApi, useValue: { availability } }],
  });
  const fixture = TestBed.createComponent(PlacementChoice);
  fixture.componentRef.setInput('benchId', 'b1');
  for (const [k, v] of Object.entries(inputs)) fixture.componentRef.setInput(k, v);
  await fixture.whenStable();
  const loader = TestbedHarnessEnvironment.loader(fixture);
  const text = () => ((fixture.nativeElement as HTMLElement).querySelector('[data-testid=placement-explanation]')?.textContent ?? '').replace(/\s+/g, ' ').trim();
  return { fixture, loader, text, availability, placement: () => fixture.componentInstance.placement() };
}

describe('PlacementChoice', { timeout: 30_000 }, () => {
  it('prefers the runners for grids when a runner is online, and says what that means', async () => {
    const { loader, text, placement, availability } = await setUp(ONLINE, { preferRunners: true, plural: true });
    expect(availability).toHaveBeenCalledWith('b1');
    const group = await loader.getHarness(MatRadioGroupHarness);
    expect(await group.getCheckedValue()).toBe('runners');
    expect(placement()).toBe('runners');
    expect(text()).toBe("The server's runners train the runs (3 runner threads online, 2 runs of this bench waiting); you can close this page and follow progress from any tab.");
  });

  it('lets the person switch to this tab, with the explanation following the choice', async () => {
    const { loader, text, placement } = await setUp(ONLINE, { preferRunners: true, plural: true });
    const group = await loader.getHarness(MatRadioGroupHarness);
    await group.checkRadioButton({ label: 'Train in this tab' });
    expect(placement()).toBe('tab');
    expect(text()).toContain('A worker of this tab trains the runs; closing or reloading the page pauses training');
  });

  it('keeps a single run in this tab by default', async () => {
    const { loader, placement } = await setUp(ONLINE);
    expect(await (await loader.getHarness(MatRadioGroupHarness)).getCheckedValue()).toBe('tab');
    expect(placement()).toBe('tab');
  });

  it('disables "Send to runners" while no runner is online', async () => {
    const { loader, text, placement } = await setUp({ ...ONLINE, onlineRunners: 0, onlineThreads: 0 }, { preferRunners: true, plural: true });
    const buttons = await (await loader.getHarness(MatRadioGroupHarness)).getRadioButtons({ label: 'Send to runners' });
    expect(await buttons[0]!.isDisabled()).toBe(true);
    expect(placement()).toBe('tab');
    expect(text()).toContain('No runner is online now');
  });

  it('offers no choice to a viewer, and says why', async () => {
    const { loader, text, placement } = await setUp({ ...ONLINE, canSend: false }, { preferRunners: true });
    expect(await loader.getAllHarnesses(MatRadioGroupHarness)).toHaveLength(0);
    expect(placement()).toBe('tab');
    expect(text()).toContain('only members, coaches and owners of the bench can send runs to the runners');
  });

  it('falls back to this tab with a sentence when the status cannot be read', async () => {
    const { text, placement } = await setUp(new ApiError(0, 'NETWORK', 'Cannot reach the Noisewright server.'), { preferRunners: true });
    expect(placement()).toBe('tab');
    expect(text()).toContain('could not be read (Cannot reach the Noisewright server.)');
  });
});
