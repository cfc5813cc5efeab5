import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { MatRadioGroupHarness } from '@angular/material/radio/testing';
import type { RunnerAvailability } from '../../../../shared/api/runners';
import { learnabilityRequestSchema } from '../../../../shared/api/grids';
import { RunnersApi } from '../../runners/runners-api';
import { GridsApi } from '../grids-api';
import { LearnabilityDialog } from './learnability-dialog';

const ONLINE: RunnerAvailability = { backend: 'embedded', onlineRunners: 1, onlineThreads: 1, waiting: 0, active: 0, canSend: true };

async function setUp(availability: RunnerAvailability) {
  const learnability = vi.fn(async () => ({ id: 'grid-9' }));
  const close = vi.fn();
  TestBed.configureTestingModule({
    imports: [LearnabilityDialog],
    providers: [
      provideZonelessChangeDetection(),
      { provide: MAT_DIALOG_DATA, useValue: { benchId: 'b1', corpusId: 'c1', corpusName: 'Syllables' } },
      { provide: MatDialogRef, useValue: { close } },
      { provide: GridsApi, useValue: { learnability } },
      { provide: RunnersApi, useValue: { availability: async () => availability } },
    ],
  });
  const fixture = TestBed.createComponent(LearnabilityDialog);
  await fixture.whenStable();
  return { fixture, loader: TestbedHarnessEnvironment.loader(fixture), learnability, close };
}

describe('LearnabilityDialog placement', { timeout: 30_000 }, () => {
  it('sends the check to the runners by default when one is online', async () => {
    const { fixture, loader, learnability, close } = await setUp(ONLINE);
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('models on the runners with the same budget');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Start the check' }))).click();
    const body = learnabilityRequestSchema.parse((learnability.mock.calls[0] as unknown as [string, string, unknown])[2]);
    expect(body.placement).toBe('runners');
    expect(close).toHaveBeenCalledWith('grid-9');
  });

  it('trains in this tab when the person chooses so', async () => {
    const { loader, learnability } = await setUp(ONLINE);
    await (await loader.getHarness(MatRadioGroupHarness)).checkRadioButton({ label: 'Train in this tab' });
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Start the check' }))).click();
    expect(learnabilityRequestSchema.parse((learnability.mock.calls[0] as unknown as [string, string, unknown])[2]).placement).toBe('tab');
  });
});
