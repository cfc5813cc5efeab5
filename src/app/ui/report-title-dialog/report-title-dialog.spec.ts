import { Component, provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { askReportTitle } from './report-title-dialog';

@Component({ selector: 'nw-host', template: '' })
class Host {}

async function open(suggested: string) {
  TestBed.configureTestingModule({ imports: [Host], providers: [provideZonelessChangeDetection()] });
  const fixture = TestBed.createComponent(Host);
  const answer = askReportTitle(TestBed.inject(MatDialog), suggested);
  const loader = TestbedHarnessEnvironment.documentRootLoader(fixture);
  await fixture.whenStable();
  return { answer, loader };
}

describe('askReportTitle', () => {
  afterEach(() => TestBed.inject(MatDialog).closeAll());

  it('offers the suggested title and answers with the one typed, trimmed', async () => {
    const { answer, loader } = await open('Comparison of a, b');
    const input = await loader.getHarness(MatInputHarness.with({ selector: '[data-testid=report-title-input]' }));
    expect(await input.getValue()).toBe('Comparison of a, b');
    await input.setValue('  Two runs side by side ');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Create report' }))).click();
    await expect(answer).resolves.toBe('Two runs side by side');
  });

  it('keeps the dialog open with a message when the title is blank', async () => {
    const { loader } = await open('Grid');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[data-testid=report-title-input]' }))).setValue('   ');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Create report' }))).click();
    const field = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: /Report title/ }));
    expect(await field.getTextErrors()).toEqual(['Give the report a title (at most 160 characters).']);
  });

  it('answers null when the person cancels, so nothing is saved', async () => {
    const { answer, loader } = await open('Grid');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();
    await expect(answer).resolves.toBeNull();
  });
});
