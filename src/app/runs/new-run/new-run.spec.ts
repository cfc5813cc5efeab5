import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatChipHarness } from '@angular/material/chips/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatRadioGroupHarness } from '@angular/material/radio/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatStepperHarness } from '@angular/material/stepper/testing';
import { provideRouter } from '@angular/router';
import { RunnersApi } from '../../runners/runners-api';
import { CurrentBench } from '../../benches/current-bench';
import { RunScheduler } from '../run-scheduler';
import { RunsApi } from '../runs-api';
import { TimeProbe } from '../time-estimate-probe';
import { NEW_RUN_TRAINING_DEFAULTS } from '../../../../shared/model/settings-rules';
import { NewRun } from './new-run';

const CORPUS = {
  id: '3f1c2a9e-7a51-4a43-9d55-0f5b3b1f8f01', name: 'Syllables', description: '', fileName: 's.tsv', types: 500, tokens: 9000,
  alphabetSize: 26, unigramEntropyBits: 7, uploadedBy: null, createdAt: '2026-12-01T00:00:00Z', canEdit: true,
};

async function setUp(role: 'owner' | 'coach' | 'member' | 'viewer' = 'member') {
  const create = vi.fn(async () => ({ id: 'run-1' }));
  const enqueue = vi.fn(async () => undefined);
  const measure = vi.fn(async () => ({
    secondsPerStep: 0.25, secondsPerEvaluation: 2, setupSeconds: 5, timedSteps: 4, wordLength: 9, backend: 'wasm', parameterCount: 1, probeSeconds: 3,
  }));
  TestBed.configureTestingModule({
    imports: [NewRun],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      // No runner online: the placement choice keeps the run in this tab (new-run-placement.spec.ts tests the choice).
      { provide: RunnersApi, useValue: { availability: async () => ({ backend: 'embedded', onlineRunners: 0, onlineThreads: 0, waiting: 0, active: 0, canSend: true }) } },
      { provide: RunsApi, useValue: { corpora: async () => [CORPUS], create } },
      { provide: RunScheduler, useValue: { enqueue } },
      { provide: TimeProbe, useValue: { measure, cancel: vi.fn() } },
      { provide: CurrentBench, useValue: { current: signal({ id: 'b1', name: 'Bench', role }), open: async () => null } },
    ],
  });
  const fixture = TestBed.createComponent(NewRun);
  fixture.componentRef.setInput('benchId', 'b1');
  const loader = TestbedHarnessEnvironment.loader(fixture);
  await fixture.whenStable();
  return { fixture, loader, create, enqueue, measure };
}

type Loader = Awaited<ReturnType<typeof setUp>>['loader'];
const field = (loader: Loader, label: string) => loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
const input = (loader: Loader, name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
const text = (fixture: Awaited<ReturnType<typeof setUp>>['fixture'], id: string) =>
  ((fixture.nativeElement as HTMLElement).querySelector(`[data-testid=${id}]`)?.textContent ?? '').trim();

describe('NewRun form', { timeout: 30_000 }, () => {
  it('refuses to start without a name and a corpus, says what to fix, and sends nothing', async () => {
    const { loader, create } = await setUp();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Start training/ }))).click();
    expect(await (await field(loader, 'Run name')).getTextErrors()).toEqual(['Enter a run name.']);
    expect(await (await field(loader, 'Corpus')).getTextErrors()).toEqual(['Choose the corpus to train on.']);
    expect(create).not.toHaveBeenCalled();
  });

  it('checks numeric ranges and whole numbers with messages that name the fix', async () => {
    const { loader } = await setUp();
    const stepper = await loader.getHarness(MatStepperHarness);
    await (await stepper.getSteps({ label: 'Model' }))[0]!.select();
    const state = await input(loader, 'stateSize');
    await state.setValue('0');
    await state.blur();
    expect(await (await field(loader, 'State size')).getTextErrors()).toEqual(['Use a state size of at least 1.']);
    await state.setValue('2.5');
    await state.blur();
    expect(await (await field(loader, 'State size')).getTextErrors()).toEqual(['Enter a state size as a whole number.']);
    await (await stepper.getSteps({ label: 'Training' }))[0]!.select();
    const lr = await input(loader, 'learningRate');
    await lr.setValue('3');
    await lr.blur();
    expect(await (await field(loader, 'Learning rate')).getTextErrors()).toEqual(['Use a learning rate of at most 1.']);
  });

  it('needs at least one layer in each flow stack', async () => {
    const { fixture, loader, create } = await setUp();
    const stepper = await loader.getHarness(MatStepperHarness);
    await (await stepper.getSteps({ label: 'Model' }))[0]!.select();
    const inference = await loader.getAllHarnesses(MatChipHarness.with({ ancestor: '[data-testid=inferenceFlow]' }));
    expect(inference.length).toBe(1);
    await inference[0]!.remove();
    await fixture.whenStable();
    expect(text(fixture, 'inferenceFlow')).toContain('Add at least one layer to the inference flow.');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Start training/ }))).click();
    expect(create).not.toHaveBeenCalled();
  });

  it('shows the parameter count from the model tables (GRU and state-space model, counted by hand)', async () => {
    const { fixture, loader } = await setUp();
    await (await loader.getHarness(MatSelectHarness)).clickOptions({ text: /Syllables/ });
    const V = 27; // 26 characters + end of word
    const stepper = await loader.getHarness(MatStepperHarness);
    await (await stepper.getSteps({ label: 'Model' }))[0]!.select();
    await (await loader.getHarness(MatRadioGroupHarness.with({ selector: '[aria-label="Model family"]' }))).checkRadioButton({ label: /GRU/ });
    // GRU of gru-lm.ts (Cho et al. 2014 gates, fused): emb V·E, h0 d, Wx E·3d, Uzr d·2d, Uh d·d, bx 3d, Wo d·V, bo V.
    const d = 8, E = 16;
    const gru = V * E + d + E * 3 * d + d * 2 * d + d * d + 3 * d + d * V + V;
    await fixture.whenStable();
    expect(text(fixture, 'parameter-count').replace(/[^\d]/g, '')).toBe(String(gru));

    // State-space model with one shift layer in each flow, linear observation (MODEL.md §2–4):
    // h0 d; obs d·V+V; embedding V·E; backward GRU E·3H+3H + H·3H+3H; proposal d·P + H·P + P + P·2d + 2d;
    // each shift flow: conditioner d·F + F + F·d + d.
    await (await loader.getHarness(MatRadioGroupHarness.with({ selector: '[aria-label="Model family"]' }))).checkRadioButton({ label: /state-space/ });
    const form = (fixture.componentInstance as unknown as { form: { controls: { model: { patchValue(v: object): void } } } }).form;
    form.controls.model.patchValue({ generativeFlow: ['shift'], inferenceFlow: ['shift'], stateSize: 8, embeddingSize: 16, encoderSize: 64, proposalHidden: 32, flowHidden: 32, observationHidden: 0 });
    await fixture.whenStable();
    const H = 64, P = 32, F = 32;
    const shift = d * F + F + F * d + d;
    const ssm = d + (d * V + V) + V * E + (E * 3 * H + 3 * H) + (H * 3 * H + 3 * H) + (d * P + H * P + P + P * 2 * d + 2 * d) + 2 * shift;
    expect(text(fixture, 'parameter-count').replace(/[^\d]/g, '')).toBe(String(ssm));
  });

  it('shows the time measured by the probe on the last step and rescales it when only the steps change', async () => {
    const { fixture, loader, measure } = await setUp();
    await (await input(loader, 'name')).setValue('Timed');
    await (await loader.getHarness(MatSelectHarness)).clickOptions({ text: /Syllables/ });
    const stepper = await loader.getHarness(MatStepperHarness);
    expect(measure).not.toHaveBeenCalled();
    await (await stepper.getSteps({ label: 'Check and start' }))[0]!.select();
    await fixture.whenStable();
    expect(measure).toHaveBeenCalledTimes(1);
    // Default 1,000 steps, measured every 100: 5 s + 1000 × 0.25 s + 10 × 2 s = 275 s (arithmetic of time-estimate.ts).
    expect(text(fixture, 'time-estimate')).toBe('measured on this computer: about 0.25 s per step → about 4 min 35 s');
    await (await stepper.getSteps({ label: 'Training' }))[0]!.select();
    await (await input(loader, 'steps')).setValue('2000');
    await (await stepper.getSteps({ label: 'Check and start' }))[0]!.select();
    await fixture.whenStable();
    expect(measure).toHaveBeenCalledTimes(1); // the step count does not change the step time: no new probe
    expect(text(fixture, 'time-estimate')).toContain('about 9 min 05 s'); // 5 + 2000 × 0.25 + 20 × 2 = 545 s
  });

  it('creates the run and queues it when everything is valid (short trial preset)', async () => {
    const { loader, create, enqueue } = await setUp();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Short trial/ }))).click();
    await (await input(loader, 'name')).setValue('First look');
    await (await loader.getHarness(MatSelectHarness)).clickOptions({ text: /Syllables/ });
    await (await loader.getHarness(MatButtonHarness.with({ text: /Start training/ }))).click();
    expect(create).toHaveBeenCalledTimes(1);
    const body = (create.mock.calls[0] as unknown[])[1] as { family: string; name: string; settings: { model: { stateSize: number }; training: { steps: number; observationInitScale?: number } } };
    expect(body.family).toBe('ssm');
    expect(body.name).toBe('First look');
    expect(body.settings.training.steps).toBe(300);
    expect(body.settings.training.observationInitScale).toBe(NEW_RUN_TRAINING_DEFAULTS.observationInitScale);
    expect(enqueue).toHaveBeenCalledTimes(1);
  });

  it('shows corpus, steps, K and seed on the last step before starting', async () => {
    const { fixture, loader } = await setUp();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Thorough/ }))).click();
    await (await loader.getHarness(MatSelectHarness)).clickOptions({ text: /Syllables/ });
    const stepper = await loader.getHarness(MatStepperHarness);
    await (await stepper.getSteps({ label: 'Check and start' }))[0]!.select();
    await fixture.whenStable();
    expect(text(fixture, 'review-corpus')).toBe('Syllables');
    expect(text(fixture, 'review-steps')).toBe('5,000');
    expect(text(fixture, 'review-k')).toBe('16');
    expect(text(fixture, 'review-seed')).toBe('1');
  });

  it('gives every model size a hint with its range and a unit', async () => {
    const { loader } = await setUp();
    const stepper = await loader.getHarness(MatStepperHarness);
    await (await stepper.getSteps({ label: 'Model' }))[0]!.select();
    for (const label of ['State size', 'Observation width', 'Flow network width', 'Encoder width', 'Proposal width', 'Samples per word (K)']) {
      const f = await field(loader, label);
      expect((await f.getTextHints()).join(' '), label).toMatch(/\d+–\d+/);
      expect(await f.hasLabel(), label).toBe(true);
    }
    expect((await (await field(loader, 'Observation width')).getTextHints()).join(' ')).toContain('0 = a linear map');
  });
});

describe('NewRun per role', { timeout: 30_000 }, () => {
  for (const role of ['owner', 'coach', 'member'] as const) {
    it(`lets a ${role} fill in the form and start`, async () => {
      const { fixture, loader } = await setUp(role);
      expect(text(fixture, 'viewer-note')).toBe('');
      expect(await (await loader.getHarness(MatButtonHarness.with({ text: /Start training/ }))).isDisabled()).toBe(false);
      expect(await (await input(loader, 'name')).isDisabled()).toBe(false);
    });
  }

  it('shows a viewer why, disables the fields, presets and Start, and does not let the steps be walked', async () => {
    const { fixture, loader, create } = await setUp('viewer');
    expect(text(fixture, 'viewer-note')).toMatch(/Viewers can look at runs but cannot start them/);
    expect(await (await input(loader, 'name')).isDisabled()).toBe(true);
    expect(await (await loader.getHarness(MatButtonHarness.with({ text: /Short trial/ }))).isDisabled()).toBe(true);
    expect(await (await loader.getHarness(MatButtonHarness.with({ text: /Start training/ }))).isDisabled()).toBe(true);
    const stepper = await loader.getHarness(MatStepperHarness);
    await (await stepper.getSteps({ label: 'Model' }))[0]!.select();
    expect(await (await stepper.getSteps({ label: 'Model' }))[0]!.isSelected()).toBe(false);
    expect(await (await stepper.getSteps({ label: 'Corpus and split' }))[0]!.isSelected()).toBe(true);
    expect(create).not.toHaveBeenCalled();
  });
});
