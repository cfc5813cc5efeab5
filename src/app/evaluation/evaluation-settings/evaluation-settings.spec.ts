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
  it('starts from the defaults (test split, order 3, K 256, 3 repeats, S 1024, M 64, 1000 samples, seed 1) and emits them', async () => {
    const { loader, emitted } = await setUp();
    expect(await (await input(loader, 'K')).getValue()).toBe('256');
    expect(await (await loader.getHarness(MatSelectHarness.with({ selector: '[data-testid=held-out-split]' }))).getValueText()).toBe('Test');
    await (await evaluateButton(loader)).click();
    expect(emitted).toEqual([{
      heldOutSplit: 'test', ngramOrder: 3, K: 256, repeats: 3, S: 1024, M: 64, sampleCount: 1000, seed: 1, baselineRunId: null,
      maxHeldOut: 500, detailWords: 100, crossEntropyK: 16, tMax: 24, particles: 512, prefixes: [],
    }]);
    // The server's schema accepts what the form sends (the same zod schema validates the POST body), and the
    // form's defaults are the schema's own: parsing {K: 256} alone gives the same settings.
    const parsed = evaluationSettingsSchema.safeParse(emitted[0]);
    expect(parsed.success).toBe(true);
    expect(parsed.data).toEqual(evaluationSettingsSchema.parse({ K: 256 }));
  });

  it('refuses an n-gram order outside 1–6 with a sentence, and emits nothing', async () => {
    const { loader, emitted } = await setUp();
    for (const bad of ['7', '0', '2.5']) {
      await (await input(loader, 'ngramOrder')).setValue(bad);
      await (await evaluateButton(loader)).click();
      expect(await (await field(loader, 'N-gram baseline order')).getTextErrors()).toEqual(['Give the n-gram order as a whole number from 1 to 6.']);
    }
    expect(emitted).toEqual([]);
    await (await input(loader, 'ngramOrder')).setValue('6');
    await (await evaluateButton(loader)).click();
    expect(emitted.map((s) => s.ngramOrder)).toEqual([6]);
  });

  it('sends the further settings chosen under More settings, and opens them when one of them is wrong', async () => {
    const { fixture, loader, emitted } = await setUp();
    fixture.componentRef.setInput('alphabet', ['a', 'k', 'l', 'o']);
    await (await loader.getHarness(MatButtonHarness.with({ text: /More settings/ }))).click();
    await (await input(loader, 'maxHeldOut')).setValue('40');
    await (await input(loader, 'crossEntropyK')).setValue('0');
    await (await input(loader, 'tMax')).setValue('12');
    await (await input(loader, 'prefixes')).setValue('ka, lo,, kaq');
    await (await loader.getHarness(MatButtonHarness.with({ text: /More settings/ }))).click();
    await (await evaluateButton(loader)).click();
    // "kaq" holds a character outside the alphabet: the section opens again and says which prefix and character.
    expect(await (await field(loader, 'Completion prefixes')).getTextErrors())
      .toEqual(['The prefix "kaq" uses "q", which is not in the corpus alphabet; remove it or change the prefix.']);
    expect(emitted).toEqual([]);
    await (await input(loader, 'prefixes')).setValue('ka, lo,, ');
    await (await evaluateButton(loader)).click();
    expect(emitted).toHaveLength(1);
    expect(emitted[0]).toMatchObject({ maxHeldOut: 40, crossEntropyK: 0, tMax: 12, prefixes: ['ka', 'lo'] });
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
    const select = await loader.getHarness(MatSelectHarness.with({ selector: '[data-testid=gru-baseline]' }));
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
