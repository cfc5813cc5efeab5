/**
 * Grids and comparisons, end to end in Chromium: a grid of 4 small GRU runs (state size 4/8 × seed 1/2, a few
 * dozen steps each) is designed in the form, trains in this tab's worker queue, survives a page reload half-way
 * (the unfinished runs continue from their latest checkpoints), and its heat map fills in. Then two of its runs
 * are compared side by side (the differing settings are marked), saved as a report, and the report's CSV is read back.
 * Last, a learnability check with a tiny budget is started from the corpus page and fills its verdict table.
 */
import { parse } from 'csv-parse/sync';
import assert from 'node:assert/strict';
import { after, before, test } from 'node:test';
import type { Page } from 'playwright-core';
import type { GridDto } from '../../shared/api/grids';
import { launchBrowser, screenshot, type TestBrowser } from './support/browser';
import { startTestServer, type TestServer } from './support/test-server';
import { benchWithSyllableCorpus, callApi, pick, signUpThroughUi } from './support/workbench';

let server: TestServer;
let browser: TestBrowser;
/** The bench and corpus of the first test, used again by the learnability check. */
let shared: { benchId: string; corpusId: string; token: string } | null = null;

before(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
});

after(async () => {
  await browser?.close();
  await server?.stop();
});

const api = <T>(path: string, token: string, init: RequestInit = {}): Promise<T> => callApi<T>(server.url, path, token, init);

/** The export read back with the `csv-parse` package (RFC 4180: quoted fields, doubled quotes, CRLF records). */
function parseCsv(text: string): string[][] {
  return parse(text, { relax_column_count: false, record_delimiter: '\r\n' }) as string[][];
}

const finishedOf = async (page: Page) => Number(/(\d+) \//.exec((await page.getByTestId('grid-progress').textContent()) ?? '')?.[1] ?? '0');

test('a grid of 4 cells trains, survives a reload, renders its heat map; two runs are compared and reported', { timeout: 300_000 }, async () => {
  const person = await browser.newPerson(server.url);
  const { page } = person;
  try {
    await gridStory(page, person.problems);
  } catch (error) {
    await screenshot(page, 'grid-failure');
    throw new Error(`${(error as Error).message}\nPage problems: ${JSON.stringify(person.problems)}`);
  }
});

async function gridStory(page: Page, problems: string[]): Promise<void> {
  const token = await signUpThroughUi(page, 'Gita Gridder', 'gita@example.org');
  const { benchId, corpusId } = await benchWithSyllableCorpus(server.url, token, 'Grid lab');
  const bench = { id: benchId };
  shared = { benchId, corpusId, token };

  // The grid form: GRU, state size 4 and 8 × seed 1 and 2, a tiny budget.
  await page.goto(`/benches/${bench.id}/grids`);
  await page.getByRole('link', { name: 'New grid' }).click();
  await page.getByLabel('Grid name').fill('Size by seed');
  await page.getByRole('combobox', { name: 'Corpus' }).click();
  await page.getByRole('option', { name: /Syllable grammar/ }).click();
  await page.getByRole('combobox', { name: 'Model' }).click();
  await page.getByRole('option', { name: 'Teacher-forced GRU' }).click();
  await pick(page, 'Axis 1 values', ['4', '16', '32']); // 8, 16, 32 were ticked: now 4 and 8
  await page.getByRole('button', { name: 'Add an axis' }).click();
  await pick(page, 'Axis 2 values', ['2']); // seed 1 was ticked: now 1 and 2
  for (const [label, value] of [['Steps', '80'], ['Batch size', '16'], ['Learning rate', '0.02'], ['Measure every (steps)', '20'],
    ['Save checkpoint every (steps)', '20']] as const) {
    await page.getByLabel(label, { exact: true }).fill(value);
  }
  assert.match((await page.getByTestId('cell-count').textContent()) ?? '', /^\s*4 cells/, 'the form counts 2 × 2 = 4 cells');
  await screenshot(page, 'grid-01-form');
  await page.getByRole('button', { name: /Create and train/ }).click();
  await page.waitForURL(/\/grids\/[0-9a-f-]{36}$/);
  const gridUrl = new URL(page.url()).pathname;
  const gridId = gridUrl.split('/').at(-1)!;

  // Training: wait for the first cell to finish, then reload while the others wait or train.
  await page.waitForFunction(() => /^\s*[1-3] \//.test(document.querySelector('[data-testid=grid-progress]')?.textContent ?? ''), null, { timeout: 120_000 });
  await screenshot(page, 'grid-02-partly-filled');
  const beforeReload = await api<GridDto>(`/benches/${bench.id}/grids/${gridId}`, token);
  const unfinished = beforeReload.cells.filter((c) => c.run && c.run.status !== 'finished').length;
  assert.ok(unfinished >= 1, 'some cells are still unfinished at the reload');
  await page.reload();
  await page.getByTestId('grid-name').waitFor();
  // After the reload, the page hands the unfinished runs to the tab's queue again; they all finish.
  await page.getByTestId('grid-done').waitFor({ timeout: 180_000 });
  assert.equal(await finishedOf(page), 4, 'all four cells finished after the reload');
  const done = await api<GridDto>(`/benches/${bench.id}/grids/${gridId}`, token);
  assert.deepEqual(done.cells.map((c) => c.run?.status), ['finished', 'finished', 'finished', 'finished']);
  for (const cell of done.cells) assert.equal(cell.run?.stepsDone, 80, `${cell.label} trained its full budget`);
  // The heat map: 2 × 2 filled squares once every run reported its validation bound.
  await page.waitForFunction(() => document.querySelector('[data-testid=heatmap]')?.getAttribute('data-filled') === '4', null, { timeout: 15_000 });
  await page.waitForTimeout(500);
  await screenshot(page, 'grid-03-heatmap');

  // Compare two runs of the grid that differ in state size only.
  const a = done.cells.find((c) => c.coords[0] === 0 && c.coords[1] === 0)!;
  const b = done.cells.find((c) => c.coords[0] === 1 && c.coords[1] === 0)!;
  await page.goto(`/benches/${bench.id}/compare`);
  await page.getByRole('checkbox', { name: `Compare ${a.run!.name}` }).check();
  await page.getByRole('checkbox', { name: `Compare ${b.run!.name}` }).check();
  const table = page.getByTestId('compare-table');
  await table.waitFor();
  const sizeRow = table.getByRole('row', { name: /^State size/ });
  assert.match((await sizeRow.textContent()) ?? '', /differs/, 'the state size row is marked as differing');
  const kindRow = table.getByRole('row', { name: /^Figures are/ });
  assert.match((await kindRow.textContent()) ?? '', /exact\s*exact/, 'both GRU runs\' figures are marked exact');
  const seedRow = table.getByRole('row', { name: /^Seed/ });
  assert.doesNotMatch((await seedRow.textContent()) ?? '', /differs/, 'the seed row is the same for both runs');
  await page.waitForTimeout(500);
  await screenshot(page, 'compare-01-side-by-side');

  // Saved as a report: a stable link, and the CSV parses back to the runs' stored figures.
  await page.getByRole('button', { name: /Save as report/ }).click();
  // The report asks for its title first (suggested from the runs' names).
  const titleInput = page.getByTestId('report-title-input');
  assert.match(await titleInput.inputValue(), /^Comparison of /);
  await titleInput.fill('Two runs side by side');
  await page.getByRole('dialog').getByRole('button', { name: 'Create report' }).click();
  await page.waitForURL(/\/reports\/[0-9a-f-]{36}$/);
  assert.equal((await page.getByTestId('report-title').textContent())?.trim(), 'Two runs side by side');
  await page.getByTestId('report-title').waitFor();
  await page.waitForTimeout(500);
  await screenshot(page, 'compare-02-report');
  const reportId = new URL(page.url()).pathname.split('/').at(-1)!;
  const csv = await api<string>(`/benches/${bench.id}/reports/${reportId}/export.csv`, token);
  const records = parseCsv(csv);
  assert.deepEqual(records[0], ['section', 'name', 'setting', 'value', 'unit']);
  // A GRU's figure is exact: the CSV names it so, never a bound, in bits/char with the end of word counted.
  const bestOfA = records.find((f) => f[1] === 'best validation cross entropy (exact)' && f[2] === a.run!.name);
  assert.ok(bestOfA, 'the CSV holds the best validation cross entropy of the first run');
  assert.equal(bestOfA[4], 'bits/char (end-of-word counted)');
  assert.ok(!records.some((f) => /bound/.test(f[1]!)), 'no GRU figure is called a bound');
  assert.ok(Math.abs(Number(bestOfA[3]) - (a.best ?? NaN)) < 1e-9, `CSV ${bestOfA[3]} equals the grid's figure ${a.best}`);
  await page.emulateMedia({ media: 'print' });
  await screenshot(page, 'compare-03-report-print');
  await page.emulateMedia({ media: 'screen' });
  assert.deepEqual(problems.filter((p) => !/favicon/.test(p)), [], 'no errors in the page');
}

test('a learnability check started from the corpus page trains its 11 runs and shows the verdict', { timeout: 300_000 }, async () => {
  assert.ok(shared, 'the first test set up a bench and a corpus');
  const person = await browser.newPerson(server.url);
  const { page } = person;
  try {
    await page.goto('/sign-in');
    await page.getByLabel('E-mail').fill('gita@example.org');
    await page.getByLabel('Password').fill('long-enough-1');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL('**/benches');
    await page.goto(`/benches/${shared.benchId}/corpora/${shared.corpusId}`);
    await page.getByRole('button', { name: 'Check learnability' }).click();
    await page.getByLabel('Training steps per model').fill('10');
    await page.getByRole('button', { name: 'Start the check' }).click();
    await page.waitForURL(/\/grids\/[0-9a-f-]{36}$/);
    await page.getByTestId('verdict-models').waitFor();
    await page.getByTestId('grid-done').waitFor({ timeout: 240_000 });
    const gridId = new URL(page.url()).pathname.split('/').at(-1)!;
    const verdict = await api<{ rows: { model: string; bitsPerChar: number | null }[]; ngramFloor: { bitsPerChar: number } | null;
      comparisons: { onPar: boolean | null }[] }>(`/benches/${shared.benchId}/grids/${gridId}/verdict`, shared.token);
    assert.equal(verdict.rows.length, 11, 'n-gram orders 1–5, GRU and state-space model at 8/16/32');
    // Bits per character are positive costs. The exact figures (n-grams, GRU) of a syllable corpus lie between 1 and
    // about log2(27) ≈ 4.75 bits (closed form of the uniform cost over 26 letters and the end of word). A state-space
    // model's figure is an upper bound after only 10 steps from a sharp random emission, so it may lie above the
    // uniform cost; it stays finite and under twice that (common practice (no source): a sanity range).
    for (const r of verdict.rows) {
      const cap = r.model.startsWith('ssm') ? 2 * Math.log2(27) : 6;
      assert.ok(r.bitsPerChar !== null && r.bitsPerChar > 0.5 && r.bitsPerChar < cap, `${r.model}: ${r.bitsPerChar}`);
    }
    assert.ok(verdict.ngramFloor && verdict.ngramFloor.bitsPerChar === Math.min(...verdict.rows.filter((r) => r.model.startsWith('ngram')).map((r) => r.bitsPerChar!)),
      'the n-gram floor is the best n-gram');
    await page.waitForFunction(() => !/not yet known/.test(document.querySelector('[data-testid=verdict-on-par]')?.textContent ?? 'not yet known'), null, { timeout: 15_000 });
    const answers = await page.getByTestId('verdict-on-par').locator('tbody tr td:last-child').allTextContents();
    assert.deepEqual(answers.map((a) => a.trim()).filter((a) => a === 'yes' || a === 'no').length, 3, `one on-par answer per state size: ${answers}`);
    await page.waitForTimeout(500);
    await screenshot(page, 'grid-04-learnability-verdict');
    assert.deepEqual(person.problems.filter((p) => !/favicon/.test(p)), [], 'no errors in the page');
  } catch (error) {
    await screenshot(page, 'grid-learnability-failure');
    throw new Error(`${(error as Error).message}\nPage problems: ${JSON.stringify(person.problems)}`);
  }
});
