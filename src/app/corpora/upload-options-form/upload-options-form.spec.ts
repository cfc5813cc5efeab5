import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import type { CorpusOptionsInput } from '../corpora-api';
import { UploadOptionsForm } from './upload-options-form';

async function setUp() {
  const fixture = TestBed.createComponent(UploadOptionsForm);
  const emitted: (CorpusOptionsInput | null)[] = [];
  fixture.componentInstance.optionsChange.subscribe((o) => emitted.push(o));
  await fixture.whenStable();
  const loader = TestbedHarnessEnvironment.loader(fixture);
  const input = (control: string) => loader.getHarness(MatInputHarness.with({ selector: `[formcontrolname="${control}"]` }));
  return { fixture, loader, emitted, input };
}

describe('UploadOptionsForm', () => {
  it('starts with the usual defaults: lower-case, NFC, 80/10/10 split, seed 1', async () => {
    const { fixture } = await setUp();
    expect(fixture.componentInstance.options()).toEqual({
      mergeDuplicates: false,
      maxWordLength: 40,
      normalise: { lowerCase: true, nfc: true, stripDiacritics: false, allowedChars: '', outsideAlphabet: 'drop-word' },
      split: { train: 0.8, validation: 0.1, test: 0.1, seed: 1 },
    });
  });

  it('says inline when the split shares do not add up to 100 %, and emits null until fixed', async () => {
    const { fixture, loader, emitted, input } = await setUp();
    await (await input('train')).setValue('70');
    await (await input('test')).setValue('30');
    expect(emitted.at(-1)).toBeNull();
    const alert = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Train' }));
    expect(await alert.isControlValid()).toBe(true);
    const host = (fixture.nativeElement as HTMLElement).querySelector('.sum-error');
    expect(host?.textContent).toContain('The shares add up to 110 %; make them add up to 100 %.');
    await (await input('validation')).setValue('0');
    const last = emitted.at(-1);
    expect(last?.split).toEqual({ train: 0.7, validation: 0, test: 0.3, seed: 1 });
  });

  it('refuses a longest-word length outside 1–200 with a message saying the range', async () => {
    const { loader, emitted, input } = await setUp();
    const field = await input('maxWordLength');
    await field.setValue('0');
    await field.blur();
    const formField = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Longest word' }));
    expect(await formField.getTextErrors()).toEqual(['Enter the longest word length from 1 to 200.']);
    expect(emitted.at(-1)).toBeNull();
  });

  it('passes merging, the allowed characters and the policy for other characters', async () => {
    const { loader, emitted, input } = await setUp();
    await (await loader.getHarness(MatCheckboxHarness.with({ label: /Merge repeated words/ }))).check();
    await (await loader.getHarness(MatCheckboxHarness.with({ label: /Lower-case/ }))).uncheck();
    await (await input('allowedChars')).setValue('abc');
    const select = await loader.getHarness(MatSelectHarness.with({ selector: '[formcontrolname="outsideAlphabet"]' }));
    await select.open();
    await select.clickOptions({ text: 'Remove the character' });
    expect(emitted.at(-1)).toMatchObject({
      mergeDuplicates: true,
      normalise: { lowerCase: false, allowedChars: 'abc', outsideAlphabet: 'drop-char' },
    });
  });
});
