/**
 * The evaluation page end to end in Chromium: a tiny state-space model and a GRU baseline are trained headless
 * with the same code as `npm run train` and imported through the REST API; the checkpoint's evaluation page
 * computes every figure in a web worker with small budgets, stores them, and shows figures, box plots, samples,
 * completions and the noise map. The tight estimate on the page must equal `npm run evaluate`'s for the same
 * checkpoint, corpus and seed. A reload shows the stored figures without computing again.
 */
import assert from 'node:assert/strict';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { after, before, test } from 'node:test';
import { parseEvaluateArgs } from '../../shared/cli/evaluate-options';
import { runEvaluation } from '../../shared/cli/evaluate-run';
import { parseTrainArgs } from '../../shared/cli/train-options';
import { runTraining } from '../../shared/cli/train-run';
import type { SsmEvaluation } from '../../shared/eval/evaluation-report';
import { ARTIFACTS_DIR, launchBrowser, screenshot, type TestBrowser } from './support/browser';
import { startTestServer, type TestServer } from './support/test-server';

let server: TestServer;
let browser: TestBrowser;
const dir = mkdtempSync(join(tmpdir(), 'nw-eval-e2e-'));

before(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
});

after(async () => {
  await browser?.close();
  await server?.stop();
  rmSync(dir, { recursive: true, force: true });
});

async function api<T>(path: string, token: string, init: RequestInit = {}): Promise<T> {
  const res = await fetch(`${server.url}/api${path}`, { ...init, headers: { Authorization: `Bearer ${token}`, ...(init.headers ?? {}) } });
  if (!res.ok) throw new Error(`${init.method ?? 'GET'} ${path} answered ${res.status}: ${await res.text()}`);
  return (await res.json()) as T;
}
const json = (body: unknown): RequestInit => ({ method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify(body) });

/** The first 300 words of the invented syllable demo corpus, most frequent first (the server's order too). */
function writeCorpus(): string {
  const rows = readFileSync('datasets-demo/syllable-grammar.tsv', 'utf8').trim().split('\n').slice(1, 301)
    .map((l) => { const [w, c] = l.split('\t'); return [w as string, Number(c)] as const; })
    .sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : 1));
  const path = join(dir, 'syllables-300.tsv');
  writeFileSync(path, `word\tcount\n${rows.map(([w, c]) => `${w}\t${c}`).join('\n')}\n`);
  return path;
}

const quiet = { write: () => true, isTTY: false };
const small = ['--state-size', '4', '--flow-hidden', '8', '--encoder', '8', '--proposal-hidden', '8', '--embedding', '4', '--batch-size', '16', '--eval-k', '4'];

async function importRun(token: string, benchId: string, corpusId: string, name: string, checkpointPath: string): Promise<{ id: string }> {
  const form = new FormData();
  form.set('corpusId', corpusId);
  form.set('name', name);
  form.set('file', new Blob([readFileSync(checkpointPath)]), `${name}.nwck`);
  return api<{ id: string }>(`/benches/${benchId}/runs/import`, token, { method: 'POST', body: form });
}

test('evaluate a checkpoint in the browser: figures equal npm run evaluate, box plots, completion, noise map', { timeout: 420_000 }, async () => {
  const corpusPath = writeCorpus();
  const ssm = await runTraining(parseTrainArgs(['--corpus', corpusPath, '--steps', '40', '--out', join(dir, 'ssm'), ...small])!, quiet);
  const gru = await runTraining(parseTrainArgs(['--corpus', corpusPath, '--model', 'gru', '--steps', '40', '--out', join(dir, 'gru'), ...small])!, quiet);

  const { token } = await api<{ token: string }>('/auth/signup', '', json({ email: 'evan@example.org', password: 'long-enough-1', displayName: 'Evan Evaluator' }));
  const bench = await api<{ id: string }>('/benches', token, json({ name: 'Evaluation lab' }));
  const upload = new FormData();
  upload.set('name', 'Syllables 300');
  upload.set('options', JSON.stringify({ mergeDuplicates: true }));
  upload.set('file', new Blob([readFileSync(corpusPath)]), 'syllables-300.tsv');
  const corpus = await api<{ id: string }>(`/benches/${bench.id}/corpora`, token, { method: 'POST', body: upload });
  const run = await importRun(token, bench.id, corpus.id, 'tiny-ssm', ssm.checkpointPath);
  await importRun(token, bench.id, corpus.id, 'tiny-gru', gru.checkpointPath);
  const [checkpoint] = await api<{ id: string; step: number }[]>(`/benches/${bench.id}/runs/${run.id}/checkpoints`, token);
  assert.ok(checkpoint, 'the imported run has its checkpoint');

  const person = await browser.newPerson(server.url);
  const { page } = person;
  await page.addInitScript((t) => localStorage.setItem('noisewright.token', t), token);
  try {
    // From the run page's checkpoint list to the evaluation page.
    await page.goto(`/benches/${bench.id}/runs/${run.id}`);
    await page.getByRole('link', { name: `Evaluate the checkpoint of step ${checkpoint.step}` }).click();
    await page.waitForURL(`**/checkpoints/${checkpoint.id}/evaluation`);
    await page.getByTestId('no-evaluations').waitFor();

    // Small budgets; the GRU run as baseline.
    for (const [label, value] of [['K (tight estimate)', '64'], ['Repeats', '2'], ['S (prior trajectories)', '64'], ['M (noise draws)', '64'],
      ['Samples', '200'], ['Seed', '5']] as const) {
      await page.getByLabel(label, { exact: true }).fill(value);
    }
    await page.getByRole('combobox', { name: 'GRU baseline' }).click();
    await page.getByRole('option', { name: /tiny-gru/ }).click();
    await page.getByTestId('evaluate').click();
    await page.getByTestId('evaluation-progress').waitFor({ timeout: 30_000 }).catch(() => undefined);
    await page.getByTestId('figures').waitFor({ timeout: 240_000 });

    // The same figures from npm run evaluate's function (defaults for every setting the form does not show).
    const cli = (await runEvaluation(parseEvaluateArgs([ssm.checkpointPath, '--corpus', corpusPath, '--baseline', gru.checkpointPath,
      '-k', '64', '--repeats', '2', '--trajectories', '64', '--draws', '64', '--samples', '200', '--seed', '5'])!)).output.result as SsmEvaluation;
    const shown = async (key: string) => Number((await page.locator(`[data-figure="${key}"] .value`).textContent())?.replace(/,/g, ''));
    assert.equal(await shown('tight-word'), Number(cli.tight.bitsPerWord.toFixed(3)), 'tight estimate, bits/word');
    assert.equal(await shown('tight-char'), Number(cli.tight.bitsPerChar.toFixed(4)), 'tight estimate, bits/char');
    assert.equal(await shown('ce'), Number(cli.crossEntropy.shared.crossEntropyBits.toFixed(3)), 'sequence cross entropy');
    assert.equal(await shown('hdata'), Number(cli.crossEntropy.shared.dataEntropyBits.toFixed(3)), 'H(p_data)');
    assert.equal(await shown('mi'), Number(cli.noise.meanBits.toFixed(3)), 'mean noise MI');
    assert.equal(await shown('gru'), Number(cli.baselines.gru!.bitsPerChar.toFixed(4)), 'GRU baseline');

    // Box plots, entropy beside the baseline, sample lengths, samples table.
    for (const id of ['chart-noise-mi', 'chart-entropy', 'chart-sample-lengths']) await page.getByTestId(id).locator('canvas').first().waitFor();
    const shareRows = await page.getByTestId('sample-shares').locator('tbody tr').count();
    assert.equal(shareRows, 3, 'training / held-out / new rows');
    await screenshot(page, 'evaluation-01-figures');

    // Completion: a character the model never saw is refused with the characters it knows; a prefix it knows gives
    // weighted continuations that start with it.
    await page.getByTestId('completion-prefix').fill('kaQ');
    await page.getByTestId('complete').click();
    await page.getByRole('alert').filter({ hasText: /The model never saw “Q”; use only these characters/ }).waitFor();
    await page.getByTestId('completion-prefix').fill('ka');
    await page.getByTestId('complete').click();
    await page.getByTestId('completions').locator('tbody tr').first().waitFor({ timeout: 60_000 });
    const firstWord = (await page.getByTestId('completions').locator('tbody tr td').first().textContent())?.trim() ?? '';
    assert.ok(firstWord.startsWith('ka'), `a continuation starts with the prefix (${firstWord})`);

    // Noise map after a prefix: a 21 × 21 grid of cells and a legend of characters.
    await page.getByTestId('map-prefix').fill('ka');
    await page.getByTestId('draw-map').click();
    await page.getByTestId('noise-map').waitFor();
    await page.waitForFunction(() => document.querySelectorAll('[data-testid=noise-map] .cell').length === 441);
    assert.ok(await page.getByTestId('noise-map-legend').locator('li').count() >= 1, 'the legend names the characters');
    mkdirSync(ARTIFACTS_DIR, { recursive: true });
    await page.locator('.live').screenshot({ path: join(ARTIFACTS_DIR, 'evaluation-02-completion-and-noise-map.png') });

    // A reload shows the stored figures at once (no progress, same number).
    const stored = await api<{ id: string }[]>(`/benches/${bench.id}/runs/${run.id}/checkpoints/${checkpoint.id}/evaluations`, token);
    assert.equal(stored.length, 1, 'one evaluation stored on the server');
    await page.reload();
    await page.getByTestId('figures').waitFor();
    assert.equal(await page.getByTestId('evaluation-progress').count(), 0, 'nothing is recomputed');
    assert.equal(await shown('tight-word'), Number(cli.tight.bitsPerWord.toFixed(3)));
    assert.deepEqual(person.problems, []);

    // "Create report" freezes the shown evaluation under a stable link of the bench.
    await page.getByTestId('create-report').click();
    await page.getByTestId('report-title-input').fill('Tight figures of the demo run');
    await page.getByRole('dialog').getByRole('button', { name: 'Create report' }).click();
    await page.waitForURL(new RegExp(`/benches/${bench.id}/reports/[0-9a-f-]{36}$`));

    // A viewer of the bench reads the stored figures but cannot evaluate (no form; the server refuses with 403).
    await api(`/benches/${bench.id}/invitations`, token, json({ email: 'vera@example.org', role: 'viewer' }));
    const mail = await server.server.mailbox!.waitFor((m) => m.to.includes('vera@example.org'));
    const inviteToken = mail.text.match(/\/invite\/([A-Za-z0-9_-]+)/)?.[1] ?? '';
    const vera = await api<{ token: string }>('/auth/signup', '', json({ email: 'vera@example.org', password: 'long-enough-2', displayName: 'Vera Viewer' }));
    await api(`/invitations/${inviteToken}/accept`, vera.token, { method: 'POST' });
    const viewer = await browser.newPerson(server.url);
    await viewer.page.addInitScript((t) => localStorage.setItem('noisewright.token', t), vera.token);
    await viewer.page.goto(`/benches/${bench.id}/runs/${run.id}/checkpoints/${checkpoint.id}/evaluation`);
    await viewer.page.getByTestId('figures').waitFor();
    await viewer.page.getByTestId('read-only').waitFor();
    assert.equal(await viewer.page.getByTestId('evaluate').count(), 0, 'no Evaluate button for a viewer');
    const refused = await fetch(`${server.url}/api/benches/${bench.id}/runs/${run.id}/checkpoints/${checkpoint.id}/evaluations`, {
      method: 'POST', headers: { Authorization: `Bearer ${vera.token}`, 'Content-Type': 'application/json' }, body: '{}',
    });
    assert.equal(refused.status, 403, 'the server refuses an evaluation from a viewer');
  } catch (error) {
    await screenshot(page, 'evaluation-failure');
    throw new Error(`${(error as Error).message}\nPage problems: ${JSON.stringify(person.problems)}`);
  }
});
