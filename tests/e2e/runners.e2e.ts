/**
 * Runners, end to end in Chromium: the server starts two embedded runner threads; the admin sees them on the Runners
 * page; a grid of 4 small GRU runs is sent to the runners from the grid form; the page is closed and the runs keep
 * training (steps grow on the server while no tab is open); the reopened page shows the progress; the run list follows
 * the steps from the bench's event stream; Stop on the page of
 * a training run stops the runner's job (status stopped, no runner holds the run any more, its steps stay put); last,
 * that run's checkpoint is evaluated on the runners and the evaluation page shows the figures a runner stored.
 */
import assert from 'node:assert/strict';
import { after, before, test } from 'node:test';
import type { Page } from 'playwright-core';
import type { GridDto } from '../../shared/api/grids';
import type { RunnersOverview } from '../../shared/api/runners';
import type { RunDto } from '../../shared/api/runs';
import { launchBrowser, screenshot, type TestBrowser } from './support/browser';
import { startTestServer, type TestServer } from './support/test-server';
import { benchWithSyllableCorpus, callApi, pick, signUpThroughUi } from './support/workbench';

let server: TestServer;
let browser: TestBrowser;

before(async () => {
  server = await startTestServer({ RUNNER_THREADS: '2' });
  browser = await launchBrowser();
});

after(async () => {
  await browser?.close();
  await server?.stop();
});

const api = <T>(path: string, token: string, init: RequestInit = {}): Promise<T> => callApi<T>(server.url, path, token, init);
const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/** Polls `read` until `check` holds (or fails after `timeoutMs`), returning the last value read. */
async function until<T>(read: () => Promise<T>, check: (value: T) => boolean, timeoutMs: number, what: string): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let value = await read();
  while (!check(value)) {
    if (Date.now() > deadline) throw new Error(`Timed out waiting for ${what}: ${JSON.stringify(value).slice(0, 400)}`);
    await sleep(500);
    value = await read();
  }
  return value;
}

const stepsOf = (grid: GridDto) => grid.cells.reduce((sum, c) => sum + (c.run?.stepsDone ?? 0), 0);

/** Before a screenshot: the navigation has finished sliding in (its content margin is set) after a full page load. */
async function settled(page: Page): Promise<void> {
  await page.waitForFunction(() => {
    const content = document.querySelector('mat-sidenav-content');
    return !content || parseFloat(getComputedStyle(content).marginLeft) > 0;
  }, null, { timeout: 15_000 });
}

test('a grid sent to the runners trains with the page closed, and Stop on the run page stops the runner job', { timeout: 420_000 }, async () => {
  const person = await browser.newPerson(server.url);
  let page = person.page;
  try {
    // The first account is the instance admin: it sees the Runners page with the server's own runner.
    const token = await signUpThroughUi(page, 'Rita Runner', 'rita@example.org');
    const { benchId } = await benchWithSyllableCorpus(server.url, token, 'Runner lab');
    await page.getByRole('link', { name: 'Runners' }).click();
    await page.waitForURL('**/admin/runners');
    const table = page.getByRole('table', { name: 'Runners' });
    await table.getByText('online', { exact: true }).first().waitFor({ timeout: 60_000 });
    await settled(page);
    await screenshot(page, 'runners-01-page');

    // The grid form offers the runners and picks them by default (a runner is online).
    await page.goto(`/benches/${benchId}/grids/new`);
    await page.getByLabel('Grid name').fill('On the runners');
    await page.getByRole('combobox', { name: 'Corpus' }).click();
    await page.getByRole('option', { name: /Syllable grammar/ }).click();
    await page.getByRole('combobox', { name: 'Model' }).click();
    await page.getByRole('option', { name: 'Teacher-forced GRU' }).click();
    await pick(page, 'Axis 1 values', ['4', '16', '32']); // 8, 16, 32 were ticked: now 4 and 8
    await page.getByRole('button', { name: 'Add an axis' }).click();
    await pick(page, 'Axis 2 values', ['2']); // seeds 1 and 2
    // Enough steps that the runs are still training when the test stops one (they need not finish).
    for (const [label, value] of [['Steps', '20000'], ['Batch size', '16'], ['Learning rate', '0.02'], ['Measure every (steps)', '50'],
      ['Save checkpoint every (steps)', '50']] as const) {
      await page.getByLabel(label, { exact: true }).fill(value);
    }
    const runnersChoice = page.getByRole('radio', { name: 'Send to runners' });
    await runnersChoice.waitFor();
    assert.equal(await runnersChoice.isChecked(), true, 'a grid goes to the runners by default when a runner is online');
    await settled(page);
    await screenshot(page, 'runners-02-grid-form');
    await page.getByRole('button', { name: /Create and train/ }).click();
    await page.waitForURL(/\/grids\/[0-9a-f-]{36}$/);
    const gridPath = new URL(page.url()).pathname;
    const gridId = gridPath.split('/').at(-1)!;
    await page.getByTestId('grid-on-runners').waitFor();
    const grid = await api<GridDto>(`/benches/${benchId}/grids/${gridId}`, token);
    assert.equal(grid.placement, 'runners');

    // The runners start training; the page shows steps growing without this tab training anything.
    await until(() => api<GridDto>(`/benches/${benchId}/grids/${gridId}`, token), (g) => stepsOf(g) > 0, 180_000, 'the first runner steps');
    await settled(page);
    await screenshot(page, 'runners-03-grid-training');

    // Close the page: the runs go on.
    await page.close();
    const closedAt = stepsOf(await api<GridDto>(`/benches/${benchId}/grids/${gridId}`, token));
    const grown = await until(() => api<GridDto>(`/benches/${benchId}/grids/${gridId}`, token), (g) => stepsOf(g) > closedAt + 50, 120_000,
      'steps while no page is open');
    assert.ok(stepsOf(grown) > closedAt, `steps went on with the page closed (${closedAt} → ${stepsOf(grown)})`);

    // Reopen: the grid page shows at least the progress made meanwhile.
    page = await person.context.newPage();
    await page.goto(gridPath);
    await page.getByTestId('grid-name').waitFor();
    await page.waitForFunction((min) => {
      const cells = Array.from(document.querySelectorAll('table.cells tbody tr td:nth-child(4)')).map((td) => Number((td.textContent ?? '').replace(/[^\d]/g, '')));
      return cells.reduce((a, b) => a + b, 0) >= min;
    }, stepsOf(grown), { timeout: 30_000 });
    await settled(page);
    await screenshot(page, 'runners-04-grid-reopened');

    // The run list marks the runner runs and follows their steps from the bench's event stream (no reload).
    await page.goto(`/benches/${benchId}/runs`);
    await page.getByTestId('on-runners').first().waitFor();
    assert.equal(await page.getByTestId('on-runners').count(), 4, 'the four grid runs are marked as trained on runners');
    const listSteps = () => page.evaluate(() => Array.from(document.querySelectorAll('td.mat-column-stepsDone'))
      .reduce((sum, td) => sum + Number(/^[\d,]+/.exec((td.textContent ?? '').trim())?.[0]?.replace(/,/g, '') ?? '0'), 0));
    const listed = await listSteps();
    await until(listSteps, (n) => n > listed, 60_000, 'steps growing on the run list');
    await settled(page);
    await screenshot(page, 'runners-05-run-list');

    // A training run's page: runner name and steps/s live, then Stop.
    const training = await until(() => api<GridDto>(`/benches/${benchId}/grids/${gridId}`, token),
      (g) => g.cells.some((c) => c.run?.status === 'training' && c.run.stepsDone > 0), 120_000, 'a training run');
    const runId = training.cells.find((c) => c.run?.status === 'training' && c.run.stepsDone > 0)!.run!.id;
    await page.goto(`/benches/${benchId}/runs/${runId}`);
    await page.getByTestId('runner-progress').waitFor();
    await page.waitForFunction(() => /Training on/.test(document.querySelector('[data-testid=runner-where]')?.textContent ?? ''), null, { timeout: 30_000 });
    await page.waitForFunction(() => /steps\/s/.test(document.querySelector('[data-testid=runner-speed]')?.textContent ?? ''), null, { timeout: 30_000 });
    await page.waitForTimeout(500);
    await settled(page);
    await screenshot(page, 'runners-06-run-live');
    await page.getByRole('button', { name: /Stop/ }).click();
    await page.waitForFunction(() => (document.querySelector('[data-testid=run-state]')?.textContent ?? '').trim() === 'stopped', null, { timeout: 60_000 });
    const stopped = await until(() => api<RunDto>(`/benches/${benchId}/runs/${runId}`, token), (r) => r.status === 'stopped', 30_000, 'the stopped run');
    const overview = await until(() => api<RunnersOverview>('/runners', token),
      (o) => o.runners.every((r) => r.currentJobs.every((j) => j.runId !== runId)), 30_000, 'the runner letting go of the run');
    assert.ok(overview.runners.length >= 1);
    assert.equal(stopped.runner, null, 'no runner holds the stopped run');
    await sleep(4000);
    const later = await api<RunDto>(`/benches/${benchId}/runs/${runId}`, token);
    assert.equal(later.status, 'stopped');
    assert.equal(later.stepsDone, stopped.stepsDone, 'a stopped run does not train on');
    assert.equal(await page.getByRole('button', { name: /Resume on the runners/ }).count(), 1, 'a stopped runner run offers resume on the runners');
    await settled(page);
    await screenshot(page, 'runners-07-run-stopped');

    // Stop the rest so the server shuts down quickly.
    for (const c of (await api<GridDto>(`/benches/${benchId}/grids/${gridId}`, token)).cells) {
      if (c.run && ['queued', 'training', 'paused'].includes(c.run.status)) {
        await api(`/benches/${benchId}/runs/${c.run.id}/control`, token, {
          method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ action: 'stop' }),
        });
      }
    }

    // The stopped run's last checkpoint, evaluated on the runners (their threads are free now): the page follows
    // the request and shows the figures a runner stored.
    const [checkpoint] = await api<{ id: string; step: number }[]>(`/benches/${benchId}/runs/${runId}/checkpoints`, token);
    await page.goto(`/benches/${benchId}/runs/${runId}`);
    await page.getByRole('link', { name: `Evaluate the checkpoint of step ${checkpoint!.step}` }).click();
    await page.waitForURL(`**/checkpoints/${checkpoint!.id}/evaluation`);
    await page.getByRole('radio', { name: 'Send to runners' }).check();
    await page.getByLabel('Samples', { exact: true }).fill('100');
    await page.getByTestId('evaluate').click();
    await page.getByTestId('runner-evaluation').waitFor({ timeout: 15_000 });
    await page.getByTestId('figures').waitFor({ timeout: 120_000 });
    assert.match((await page.getByTestId('evaluation-notice').textContent()) ?? '', /A runner stored these figures/);
    const stored = await api<{ items: { id: string; checkpoint: { id: string } }[] }>(`/benches/${benchId}/evaluations?runId=${runId}`, token);
    assert.equal(stored.items.filter((e) => e.checkpoint.id === checkpoint!.id).length, 1, 'the runner stored one evaluation of that checkpoint');
    await settled(page);
    await screenshot(page, 'runners-08-evaluation-on-runners');
    assert.deepEqual(person.problems.filter((p) => !/favicon/.test(p)), [], 'no errors in the page');
  } catch (error) {
    if (!page.isClosed()) await screenshot(page, 'runners-failure');
    throw new Error(`${(error as Error).message}\nPage problems: ${JSON.stringify(person.problems)}`);
  }
});
