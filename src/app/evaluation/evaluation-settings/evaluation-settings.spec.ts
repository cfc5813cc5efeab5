import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { evaluationSettingsSchema, type EvaluationSettingsInput } from '../../../../shared/api/evaluations';
import { EvaluationSettingsForm } from './evaluation-settings';

async function setUp() {
  TestBed.configureTestingModule({ imports: [EvaluationSettingsForm], providers: [provideZonelessChangeDetection()] });
  const fixture = TestBed.createComponent(EvaluationSettingsForm);
  fixture.componentRef.setInput('baselines', [{ runId: '0b7e7a4c-4d1a-4a4e-9b55-1f5b3b1f8f02', label: 'gru-8 (state size 8)' }]);
  const emitted: EvaluationSettingsInput[] = [];
  fixture.componentInstance.evaluate.subscribe((s) => emitted.push(s));
  const loader = TestbedHarnessEnvironment.loader(fixture);
  await fixture.whenStable();
  return { fixture, loader, emitted };
}

type Loader = Awaited<ReturnType<typeof setUp>>['loader'];
const input = (loader: Loader, name: string) => loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
const field = (loader: Loader, label: string) => loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
const evaluateButton = (loader: Loader) => loader.getHarness(MatButtonHarness.with({ text: /Evaluate/ }));

describe('Evaluation settings form', { timeout: 30_000 }, () => {
  it('starts from the defaults (K 256, 3 repeats, S 1024, M 64, 1000 samples, seed 1) and emits them', async () => {
    const { loader, emitted } = await setUp();
    expect(await (await input(loader, 'K')).getValue()).toBe('256');
    await (await evaluateButton(loader)).click();
    expect(emitted).toEqual([{ K: 256, repeats: 3, S: 1024, M: 64, sampleCount: 1000, seed: 1, baselineRunId: null }]);
    // The server's schema accepts what the form sends (the same zod schema validates the POST body).
    expect(evaluationSettingsSchema.safeParse(emitted[0]).success).toBe(true);
  });

  it('refuses K outside 64–1024, M below 64 and a fractional seed, says what to fix, and emits nothing', async () => {
    const { loader, emitted } = await setUp();
    await (await input(loader, 'K')).setValue('2000');
    await (await input(loader, 'M')).setValue('8');
    await (await input(loader, 'seed')).setValue('1.5');
    await (await evaluateButton(loader)).click();
    expect(await (await field(loader, 'K (tight estimate)')).getTextErrors()).toEqual(['Give K as a whole number from 64 to 1024.']);
    expect(await (await field(loader, 'M (noise draws)')).getTextErrors()).toEqual(['Give M as a whole number from 64 to 4096.']);
    expect(await (await field(loader, 'Seed')).getTextErrors()).toEqual(['Give the seed as a whole number of 0 or more.']);
    expect(emitted).toEqual([]);
  });

  it('sends the chosen K, seed and GRU baseline', async () => {
    const { loader, emitted } = await setUp();
    await (await input(loader, 'K')).setValue('512');
    await (await input(loader, 'seed')).setValue('7');
    const select = await loader.getHarness(MatSelectHarness);
    await select.open();
    await select.clickOptions({ text: 'gru-8 (state size 8)' });
    await (await evaluateButton(loader)).click();
    expect(emitted).toHaveLength(1);
    expect(emitted[0]).toMatchObject({ K: 512, seed: 7, baselineRunId: '0b7e7a4c-4d1a-4a4e-9b55-1f5b3b1f8f02' });
  });

  it('disables Evaluate while an evaluation runs', async () => {
    const { fixture, loader } = await setUp();
    fixture.componentRef.setInput('busy', true);
    await fixture.whenStable();
    expect(await (await evaluateButton(loader)).isDisabled()).toBe(true);
  });
});
