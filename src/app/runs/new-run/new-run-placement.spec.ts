import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatRadioGroupHarness } from '@angular/material/radio/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatStepperHarness } from '@angular/material/stepper/testing';
import { provideRouter } from '@angular/router';
import type { RunnerAvailability } from '../../../../shared/api/runners';
import { createRunSchema } from '../../../../shared/api/runs';
import { CurrentBench } from '../../benches/current-bench';
import { RunnersApi } from '../../runners/runners-api';
import { RunScheduler } from '../run-scheduler';
import { RunsApi } from '../runs-api';
import { NewRun } from './new-run';

const CORPUS = {
  id: '3f1c2a9e-7a51-4a43-9d55-0f5b3b1f8f01', name: 'Syllables', description: '', fileName: 's.tsv', types: 500, tokens: 9000,
  alphabetSize: 26, unigramEntropyBits: 7, uploadedBy: null, createdAt: '2026-12-01T00:00:00Z', canEdit: true,
};
const ONLINE: RunnerAvailability = { backend: 'embedded', onlineRunners: 1, onlineThreads: 3, waiting: 0, active: 0, canSend: true };

async function setUp() {
  const create = vi.fn(async (_benchId: string, body: { placement?: string }) => ({ id: 'run-1', placement: body.placement ?? 'tab' }));
  const enqueue = vi.fn(async () => undefined);
  TestBed.configureTestingModule({
    imports: [NewRun],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      { provide: RunsApi, useValue: { corpora: async () => [CORPUS], create } },
      { provide: RunScheduler, useValue: { enqueue } },
      { provide: RunnersApi, useValue: { availability: async () => ONLINE } },
      { provide: CurrentBench, useValue: { current: signal({ id: 'b1', name: 'Bench', role: 'member' }), open: async () => null } },
    ],
  });
  const fixture = TestBed.createComponent(NewRun);
  fixture.componentRef.setInput('benchId', 'b1');
  const loader = TestbedHarnessEnvironment.loader(fixture);
  await fixture.whenStable();
  await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('Off the tab');
  await (await loader.getHarness(MatSelectHarness)).clickOptions({ text: /Syllables/ });
  const stepper = await loader.getHarness(MatStepperHarness);
  await (await stepper.getSteps({ label: 'Check and start' }))[0]!.select();
  const where = await loader.getHarness(MatRadioGroupHarness.with({ selector: '[aria-label="Where the training runs"]' }));
  const start = async () => (await loader.getHarness(MatButtonHarness.with({ text: /Start training/ }))).click();
  return { create, enqueue, where, start };
}

describe('NewRun placement', { timeout: 30_000 }, () => {
  it('keeps a single run in this tab by default and queues it in the tab', async () => {
    const { create, enqueue, where, start } = await setUp();
    expect(await where.getCheckedValue()).toBe('tab');
    await start();
    expect(createRunSchema.parse((create.mock.calls[0] as unknown[])[1]).placement).toBe('tab');
    expect(enqueue).toHaveBeenCalledTimes(1);
  });

  it('sends the run to the runners when chosen, and then does not train it in this tab', async () => {
    const { create, enqueue, where, start } = await setUp();
    await where.checkRadioButton({ label: 'Send to runners' });
    await start();
    expect(create).toHaveBeenCalledTimes(1);
    expect(createRunSchema.parse((create.mock.calls[0] as unknown[])[1]).placement).toBe('runners');
    expect(enqueue).not.toHaveBeenCalled();
  });
});
