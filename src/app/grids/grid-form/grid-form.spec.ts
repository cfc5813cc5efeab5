import { provideZonelessChangeDetection, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { provideRouter } from '@angular/router';
import { MAX_GRID_CELLS, createGridSchema } from '../../../../shared/api/grids';
import type { RunnerAvailability } from '../../../../shared/api/runners';
import { CurrentBench } from '../../benches/current-bench';
import { RunnersApi } from '../../runners/runners-api';
import { RunsApi } from '../../runs/runs-api';
import { GridsApi } from '../grids-api';
import { GridForm } from './grid-form';

const CORPUS = {
  id: '3f1c2a9e-7a51-4a43-9d55-0f5b3b1f8f01', name: 'Syllables', description: '', fileName: 's.tsv', types: 500, tokens: 9000,
  alphabetSize: 26, unigramEntropyBits: 7, uploadedBy: null, createdAt: '2026-12-01T00:00:00Z', canEdit: true,
};

const RUNNERS_ONLINE: RunnerAvailability = { backend: 'embedded', onlineRunners: 1, onlineThreads: 2, waiting: 0, active: 0, canSend: true };

async function setUp(role: 'member' | 'viewer' = 'member', availability: RunnerAvailability = RUNNERS_ONLINE) {
  const create = vi.fn(async () => ({ id: 'grid-1' }));
  TestBed.configureTestingModule({
    imports: [GridForm],
    providers: [
      provideZonelessChangeDetection(),
      provideRouter([]),
      { provide: RunsApi, useValue: { corpora: async () => [CORPUS] } },
      { provide: GridsApi, useValue: { create } },
      { provide: RunnersApi, useValue: { availability: async () => availability } },
      { provide: CurrentBench, useValue: { current: signal({ id: 'b1', name: 'Bench', role }), open: async () => null } },
    ],
  });
  const fixture = TestBed.createComponent(GridForm);
  fixture.componentRef.setInput('benchId', 'b1');
  const loader = TestbedHarnessEnvironment.loader(fixture);
  await fixture.whenStable();
  const text = (id: string) => ((fixture.nativeElement as HTMLElement).querySelector(`[data-testid=${id}]`)?.textContent ?? '').replace(/\s+/g, ' ').trim();
  const select = async (label: string) => (await (await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }))).getControl(MatSelectHarness))!;
  return { fixture, loader, create, text, select };
}

/** Ticks every option of a multiple select (the harness clicks them one by one). */
async function chooseAll(s: MatSelectHarness): Promise<number> {
  await s.open();
  const options = await s.getOptions();
  for (const o of options) if (!(await o.isSelected())) await o.click();
  await s.close();
  return options.length;
}

describe('GridForm axes', { timeout: 60_000 }, () => {
  it('shows the cell count as the product of the axis lengths', async () => {
    const { loader, text, select } = await setUp();
    // Default: state size 8, 16 and 32 → 3 cells.
    expect(text('cell-count')).toMatch(/^3 cells/);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add an axis/ }))).click();
    // The second axis starts with one value: still 3 cells.
    expect(text('cell-count')).toMatch(/^3 cells/);
    const flows = await chooseAll(await select('Axis 2 values'));
    expect(text('cell-count')).toMatch(new RegExp(`^${3 * flows} cells`));
  });

  it(`rejects a grid of more than ${MAX_GRID_CELLS} cells with a message and sends nothing`, async () => {
    const { loader, text, select, create } = await setUp();
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('Too big');
    const corpus = await select('Corpus');
    await corpus.open();
    await corpus.clickOptions({ text: 'Syllables' });
    const add = await loader.getHarness(MatButtonHarness.with({ text: /Add an axis/ }));
    await add.click();
    const a2 = await chooseAll(await select('Axis 2 values'));
    await add.click();
    const axis3 = await select('Axis 3 setting');
    await axis3.open();
    await axis3.clickOptions({ text: 'Seed' });
    const a3 = await chooseAll(await select('Axis 3 values'));
    const cells = 3 * a2 * a3;
    expect(cells).toBeGreaterThan(MAX_GRID_CELLS);
    expect(text('cell-count')).toMatch(new RegExp(`^${cells} cells`));
    expect(text('axes-problem')).toContain(`This grid has ${cells} cells; at most ${MAX_GRID_CELLS} are allowed`);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Create and train/ }))).click();
    expect(create).not.toHaveBeenCalled();
    // Removing the third axis brings the grid back under the limit and creating it is allowed.
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Remove axis 3"]' }))).click();
    expect(text('cell-count')).toMatch(new RegExp(`^${3 * a2} cells`));
    await (await loader.getHarness(MatButtonHarness.with({ text: /Create and train/ }))).click();
    expect(create).toHaveBeenCalledTimes(1);
  });

  it('sends axes with the chosen setting values, accepted by the server schema', async () => {
    const { loader, select, create } = await setUp();
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('Sizes');
    const corpus = await select('Corpus');
    await corpus.open();
    await corpus.clickOptions({ text: 'Syllables' });
    await (await loader.getHarness(MatButtonHarness.with({ text: /Create and train/ }))).click();
    expect(create).toHaveBeenCalledTimes(1);
    const body = (create.mock.calls[0] as unknown as [string, unknown])[1];
    const parsed = createGridSchema.safeParse(body);
    expect(parsed.success).toBe(true);
    expect(parsed.data?.axes).toEqual([{ key: 'model.stateSize', values: [8, 16, 32] }]);
    expect(parsed.data?.corpusId).toBe(CORPUS.id);
    // A runner is online: a grid goes to the runners unless the person chooses this tab.
    expect(parsed.data?.placement).toBe('runners');
  });

  it('keeps the grid in this tab when no runner is online, and says why', async () => {
    const { loader, select, create, text } = await setUp('member', { ...RUNNERS_ONLINE, onlineRunners: 0, onlineThreads: 0 });
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('Here');
    const corpus = await select('Corpus');
    await corpus.open();
    await corpus.clickOptions({ text: 'Syllables' });
    expect(text('placement-explanation')).toContain('No runner is online now');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Create and train/ }))).click();
    expect(createGridSchema.parse((create.mock.calls[0] as unknown as [string, unknown])[1]).placement).toBe('tab');
  });

  it('does not let a viewer start a grid', async () => {
    const { loader, create, text } = await setUp('viewer');
    expect(text('viewer-note')).toContain('cannot start');
    const button = await loader.getHarness(MatButtonHarness.with({ text: /Create and train/ }));
    expect(await button.isDisabled()).toBe(true);
    expect(create).not.toHaveBeenCalled();
  });
});
