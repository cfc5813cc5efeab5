/**
 * Training in the browser, end to end in Chromium: a run on a demo corpus is designed in the new-run form,
 * trains in a web worker for a few hundred steps while the curves move, is saved by hand, paused, resumed and
 * stopped; a second tab of the same browser is kept from training it at the same time; its checkpoints are
 * listed; after a page reload the run continues from the last one. The page's main thread runs no model code
 * (asserted: TF.js there never gets a backend). A PerformanceObserver records the main thread's long tasks
 * (over 50 ms) from step 20 until the Stop click — while the worker trains and the person saves, pauses and
 * resumes — into tests/artifacts/training-long-tasks.json (or $TRAINING_LONG_TASKS_FILE), with the slowest
 * frames and their scripts. That time limit is a speed target: `npm run bench:page` runs this test several times
 * and reports how often the limit held. The test gives the worker threads the lowest scheduling priority
 * (`deprioritiseWorkerThreads`), as desktop systems rank background compute below the thread that draws the page.
 */
import assert from 'node:assert/strict';
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { after, before, test } from 'node:test';
import type { Page } from 'playwright-core';
import { deprioritiseWorkerThreads, launchBrowser, screenshot, type TestBrowser } from './support/browser';
import { startTestServer, type TestServer } from './support/test-server';
import { benchWithSyllableCorpus, callApi, signUpThroughUi } from './support/workbench';

let server: TestServer;
let browser: TestBrowser;

before(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
});

after(async () => {
  await browser?.close();
  await server?.stop();
});

const api = <T>(path: string, token: string, init: RequestInit = {}): Promise<T> => callApi<T>(server.url, path, token, init);

const LONG_TASK_PROBE = () => {
  const w = window as unknown as { __longTasks: number[]; __frames: string[] };
  w.__longTasks = [];
  w.__frames = [];
  new PerformanceObserver((list) => { for (const e of list.getEntries()) w.__longTasks.push(Math.round(e.duration)); }).observe({ type: 'longtask', buffered: true });
  // Which scripts made a slow frame (for the failure message only).
  try {
    new PerformanceObserver((list) => {
      type Script = { invoker: string; duration: number; sourceURL?: string; sourceFunctionName?: string };
      for (const e of list.getEntries() as unknown as { duration: number; scripts?: Script[] }[]) {
        const scripts = (e.scripts ?? []).map((x) => `${x.invoker} ${Math.round(x.duration)}ms (${x.sourceURL?.split('/').pop() ?? ''} ${x.sourceFunctionName ?? ''})`);
        w.__frames.push(`${Math.round(e.duration)}ms: ${scripts.join(', ')}`);
      }
    }).observe({ type: 'long-animation-frame', buffered: false });
  } catch { /* not supported */ }
};

const stepOf = async (page: Page) => Number((await page.getByTestId('step-count').textContent())?.match(/step ([\d,]+)/)?.[1]?.replace(/,/g, '') ?? '0');
const waitForStep = (page: Page, atLeast: number, timeout = 90_000) =>
  page.waitForFunction((n) => {
    const m = document.querySelector('[data-testid=step-count]')?.textContent?.match(/step ([\d,]+)/);
    return m ? Number(m[1]!.replace(/,/g, '')) >= n : false;
  }, atLeast, { timeout, polling: 250 }); // an interval, not every animation frame: the test must not load the page it measures

test('train a run in a worker: curves move, pause, resume, stop, checkpoint, reload and continue', { timeout: 360_000 }, async () => {
  const person = await browser.newPerson(server.url);
  const { page } = person;
  await page.addInitScript(LONG_TASK_PROBE);
  try {
    await trainingStory(person);
  } catch (error) {
    await screenshot(page, 'training-failure');
    throw new Error(`${(error as Error).message}\nPage problems: ${JSON.stringify(person.problems)}`);
  }
});

async function trainingStory(person: Awaited<ReturnType<TestBrowser['newPerson']>>): Promise<void> {
  const { page } = person;

  // An account through the UI, then a bench and a demo corpus through the REST API.
  const token = await signUpThroughUi(page, 'Tara Trainer', 'tara@example.org');
  const bench = { id: (await benchWithSyllableCorpus(server.url, token, 'Training lab')).benchId };

  // The new-run form: a small model so that a few hundred steps take well under a minute.
  await page.goto(`/benches/${bench.id}/runs`);
  await page.getByRole('link', { name: 'New run' }).waitFor();
  await page.waitForTimeout(2000);
  // Baseline for the failure message: long tasks of the idle page over 3 s (a busy machine stretches every task).
  await page.evaluate(() => { (window as unknown as { __longTasks: number[] }).__longTasks = []; });
  await page.waitForTimeout(3000);
  const idleLongTasks = await page.evaluate(() => (window as unknown as { __longTasks: number[] }).__longTasks);
  await page.getByRole('link', { name: 'New run' }).click();
  await page.getByRole('button', { name: 'Short trial' }).click();
  await page.getByLabel('Run name').fill('Small syllable model');
  await page.getByRole('combobox', { name: 'Corpus' }).click();
  await page.getByRole('option', { name: /Syllable grammar/ }).click();
  await page.locator('mat-step-header', { hasText: 'Model' }).click();
  await page.getByRole('button', { name: 'Remove Coupling' }).click();
  for (const [label, value] of [['State size', '4'], ['Embedding size', '8'], ['Flow network width', '8'], ['Encoder width', '16'],
    ['Proposal width', '8'], ['Samples per word (K)', '2']] as const) {
    await page.getByLabel(label, { exact: true }).fill(value);
  }
  await page.locator('mat-step-header', { hasText: 'Training' }).click();
  for (const [label, value] of [['Batch size', '16'], ['Steps', '3000'], ['Learning rate', '0.02'], ['Measure every (steps)', '50'],
    ['Save checkpoint every (steps)', '100']] as const) {
    await page.getByLabel(label, { exact: true }).fill(value);
  }
  await page.locator('mat-step-header', { hasText: 'Check and start' }).click();
  const count = await page.getByTestId('parameter-count').textContent();
  assert.match(count ?? '', /\d/, 'the parameter count is shown before training');
  await screenshot(page, 'training-01-new-run-review');
  await page.getByRole('button', { name: /Start training/ }).click();
  await page.waitForURL(/\/runs\/[0-9a-f-]{36}$/);
  const runUrl = new URL(page.url()).pathname;

  // Training: the worker reports its backend; steps, speed and the curves move.
  await page.getByTestId('engine').filter({ hasText: /WebAssembly|cpu/ }).waitFor({ timeout: 60_000 });
  const workerThreads = deprioritiseWorkerThreads();
  await waitForStep(page, 20);
  await page.evaluate(() => { (window as unknown as { __longTasks: number[]; __frames: string[] }).__longTasks = []; (window as unknown as { __frames: string[] }).__frames = []; });
  const pointsBefore = Number(await page.locator('nw-run-curves .chart').getAttribute('data-points'));
  const windowStart = Date.now();
  await waitForStep(page, 120);
  const pointsAfter = Number(await page.locator('nw-run-curves .chart').getAttribute('data-points'));
  assert.ok(pointsAfter > pointsBefore, `the curves gain points while training (${pointsBefore} → ${pointsAfter})`);
  await page.getByTestId('samples').waitFor();
  await screenshot(page, 'training-02-live-view');

  // Save by hand: the worker sends the checkpoint; it is listed as saved by hand.
  await page.getByTestId('save-now').click();
  await page.getByTestId('save-note').filter({ hasText: /^Saved step \d/ }).waitFor({ timeout: 30_000 });
  await page.getByTestId('checkpoints').getByRole('cell', { name: 'saved by hand' }).waitFor();

  // Pause: the step count stands still; resume: it moves again.
  await page.getByRole('button', { name: 'Pause' }).click();
  await page.getByTestId('run-state').filter({ hasText: 'paused' }).waitFor();
  const pausedAt = await stepOf(page);
  await page.waitForTimeout(1500);
  assert.equal(await stepOf(page), pausedAt, 'no steps while paused');
  await screenshot(page, 'training-03-paused');
  await page.getByRole('button', { name: 'Resume' }).click();
  await waitForStep(page, Math.max(pausedAt + 10, 210));
  const windowMs = Date.now() - windowStart;
  const longTasks = await page.evaluate(() => (window as unknown as { __longTasks: number[] }).__longTasks);
  const slowFrames = await page.evaluate(() => (window as unknown as { __frames: string[] }).__frames.slice(0, 12));
  // No model work on the main thread: TF.js was never given a backend there and holds no tensors.
  const mainScripts = await page.evaluate(() => [...new Set(performance.getEntriesByType('resource').map((e) => e.name)
    .filter((name) => /\.m?js(\?|$)/.test(name)))]);
  const mainThreadTf = await page.evaluate(() => {
    const engine = (window as unknown as { _tfengine?: { backendName: string | null; state: { numTensors: number } } })._tfengine;
    return engine ? { backend: engine.backendName ?? null, tensors: engine.state.numTensors } : null;
  });

  // A second tab of the same browser cannot train the run while this one does (the run's Web Lock).
  const second = await page.context().newPage();
  await second.goto(runUrl);
  await second.getByTestId('train-here').click();
  await second.getByTestId('run-state').filter({ hasText: 'in another tab' }).waitFor();
  await second.getByTestId('run-problem').filter({ hasText: /training in another tab/ }).waitFor();
  await screenshot(second, 'training-03b-second-tab');
  await second.close();

  // Stop: a checkpoint is saved and listed with its step.
  await page.getByRole('button', { name: 'Stop' }).click();
  await page.getByTestId('run-state').filter({ hasText: 'stopped' }).waitFor({ timeout: 30_000 });
  const stoppedAt = await stepOf(page);
  assert.ok(stoppedAt >= 200, `trained at least 200 steps before stopping (${stoppedAt})`);
  const checkpoints = page.getByTestId('checkpoints');
  // The checkpoint of the stopping step: saved on stop, or the autosave of that very step when the stop landed on
  // one (the scheduler stores no second copy of a step it has just saved).
  const stopRow = checkpoints.getByRole('row').filter({ has: page.getByRole('cell', { name: stoppedAt.toLocaleString('en-US'), exact: true }) }).first();
  await stopRow.waitFor();
  assert.match((await stopRow.textContent()) ?? '', /on stop|autosave/, `the checkpoint of step ${stoppedAt} is kept on stop`);
  await checkpoints.getByRole('cell', { name: 'autosave' }).first().waitFor();
  await checkpoints.getByRole('cell', { name: 'saved by hand' }).waitFor();
  await screenshot(page, 'training-04-stopped-with-checkpoints');

  // Reload: the server holds everything; continue from the latest checkpoint.
  await page.reload();
  await page.getByTestId('run-name').waitFor();
  await page.getByTestId('run-state').filter({ hasText: 'stopped' }).waitFor();
  const resume = page.getByTestId('train-here');
  await resume.filter({ hasText: /Continue from step \d+/ }).waitFor();
  const fromStep = Number(/Continue from step ([\d,]+)/.exec((await resume.textContent()) ?? '')?.[1]?.replace(/,/g, ''));
  assert.equal(fromStep, stoppedAt, 'the latest checkpoint is the one saved on stop');
  await resume.click();
  await page.getByTestId('engine').filter({ hasText: /parameters/ }).waitFor({ timeout: 60_000 });
  await waitForStep(page, stoppedAt + 10);
  await screenshot(page, 'training-05-continued-after-reload');
  await page.getByRole('button', { name: 'Stop' }).click();
  await page.getByTestId('run-state').filter({ hasText: 'stopped' }).waitFor({ timeout: 30_000 });

  // The runs table lists the run with its steps.
  await page.goto(`/benches/${bench.id}/runs`);
  await page.getByRole('link', { name: 'Small syllable model' }).waitFor();
  await screenshot(page, 'training-06-run-list');
  assert.ok(runUrl.includes(bench.id));
  assert.deepEqual(person.problems.filter((p) => !/favicon/.test(p)), [], 'no errors in the page');
  // No model code runs on the main thread, checked so that the check can fail: the probe (TF.js's engine global)
  // is shown to find TF.js where it is — the trainer worker's bundle holds it —; the global is present on the
  // page exactly when a script the page loaded holds TF.js (a lazy page may import model code for a parameter
  // count); and where it is present it has no backend and no tensors.
  const marker = '_tfengine';
  const pageScripts = await Promise.all(mainScripts.map(async (url) => ({ url, text: await (await fetch(url)).text() })));
  assert.ok(pageScripts.length > 0, 'the page loaded scripts');
  const pageHoldsTf = pageScripts.some((s) => s.text.includes(marker));
  assert.equal(mainThreadTf !== null, pageHoldsTf, `TF.js's global is on the page exactly when a page script holds TF.js (${JSON.stringify(mainThreadTf)})`);
  assert.ok(mainThreadTf === null || (mainThreadTf.backend === null && mainThreadTf.tensors === 0),
    `the page's main thread runs no model code (its TF.js: ${JSON.stringify(mainThreadTf)})`);
  const workerUrls = [...new Set(pageScripts.flatMap((s) => [...s.text.matchAll(/worker-[A-Za-z0-9_-]+\.js/g)].map((m) => new URL(m[0], s.url).href)))];
  const workerTexts = await Promise.all(workerUrls.map(async (url) => (await fetch(url)).text()));
  assert.ok(workerTexts.some((t) => t.includes(marker)), `the trainer worker's bundle holds TF.js (checked ${workerUrls.length} worker script(s))`);
  // The main thread's long tasks are recorded, not asserted: a time limit is a speed target, measured over repeated
  // runs by `npm run bench:page` (bench/page-responsiveness.ts) and reported in the README.
  const out = process.env['TRAINING_LONG_TASKS_FILE'] ?? 'tests/artifacts/training-long-tasks.json';
  mkdirSync(dirname(out), { recursive: true });
  writeFileSync(out, JSON.stringify({
    windowMs, longTasks, maxTaskMs: Math.max(0, ...longTasks), idleLongTasks, slowFrames, limitMs: 50, workerThreadsAtNice19: workerThreads,
  }, null, 1));
}
