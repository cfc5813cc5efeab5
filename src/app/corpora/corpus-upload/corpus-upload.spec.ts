import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import { CurrentBench } from '../../benches/current-bench';
import { AppConfigStore } from '../../core/app-config-store';
import { Notice } from '../../core/notice';
import { CorporaApi } from '../corpora-api';
import { CorpusUpload } from './corpus-upload';

const PREVIEW = {
  ok: true, format: 'txt', header: false, problems: [], problemCounts: {}, errorCount: 0, lineCount: 2, alphabet: ['a', 'b'],
  normalisation: null, stats: { types: 2, tokens: 2, unigramEntropyBits: 1 }, splitCounts: {
    train: { types: 2, tokens: 2 }, validation: { types: 0, tokens: 0 }, test: { types: 0, tokens: 0 },
  }, sample: [],
};

async function setUp(role: 'owner' | 'coach' | 'member' | 'viewer') {
  const preview = vi.fn(async () => PREVIEW);
  TestBed.configureTestingModule({
    imports: [CorpusUpload],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      { provide: CorporaApi, useValue: { preview } },
      { provide: AppConfigStore, useValue: { load: async () => undefined, config: signal({ maxUploadBytes: 1_000_000 }) } },
      { provide: Notice, useValue: { done: () => undefined } },
      { provide: CurrentBench, useValue: { current: signal({ id: 'b1', name: 'Bench', role }), problem: signal(null), open: async () => null } },
    ],
  });
  const fixture = TestBed.createComponent(CorpusUpload);
  fixture.componentRef.setInput('benchId', 'b1');
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  /** Drops a file on the drop zone, as a person would. */
  const drop = async (name: string) => {
    const event = new Event('drop', { bubbles: true, cancelable: true }) as DragEvent;
    Object.defineProperty(event, 'dataTransfer', { value: { files: [new File(['ab\nba\n'], name, { type: 'text/plain' })] } });
    el.querySelector('[data-testid=drop-zone]')!.dispatchEvent(event);
    await new Promise((r) => setTimeout(r, 300)); // the preview request waits 250 ms for more changes
    await fixture.whenStable();
  };
  return { fixture, el, loader: TestbedHarnessEnvironment.loader(fixture), preview, drop };
}

describe('CorpusUpload per role', () => {
  for (const role of ['owner', 'coach', 'member'] as const) {
    it(`lets a ${role} choose a file and checks it on the server`, async () => {
      const { loader, preview, drop } = await setUp(role);
      expect(await (await loader.getHarness(MatButtonHarness.with({ text: /Choose a file/ }))).isDisabled()).toBe(false);
      await drop('syllables.txt');
      expect(preview).toHaveBeenCalledTimes(1);
    });
  }

  it('disables the file choice for a viewer, says why, and sends no preview request', async () => {
    const { el, loader, preview, drop } = await setUp('viewer');
    expect(el.textContent).toContain('Viewers cannot upload corpora on this bench');
    expect(await (await loader.getHarness(MatButtonHarness.with({ text: /Choose a file/ }))).isDisabled()).toBe(true);
    await drop('syllables.txt');
    expect(preview).not.toHaveBeenCalled();
    expect(await (await loader.getHarness(MatButtonHarness.with({ text: /Save corpus/ }))).isDisabled()).toBe(true);
  });
});

describe('CorpusUpload corpus name', () => {
  it('follows the latest chosen file until the person types a name', async () => {
    const { loader, drop } = await setUp('member');
    const name = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }));
    await drop('first_list.txt');
    expect(await name.getValue()).toBe('First list');
    await drop('second-list.tsv');
    expect(await name.getValue()).toBe('Second list');
    await name.setValue('My names');
    await drop('third.txt');
    expect(await name.getValue()).toBe('My names');
  });
});
