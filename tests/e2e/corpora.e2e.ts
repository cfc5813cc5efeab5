/**
 * Corpora, end to end in Chromium: a person signs up, creates a bench, uploads a .tsv with one bad line,
 * sees the line-numbered error (nothing saved), uploads the corrected file, previews it, saves it, and
 * looks at the corpus page with its charts and words table.
 */
import assert from 'node:assert/strict';
import { after, before, test } from 'node:test';
import { launchBrowser, screenshot, type TestBrowser } from './support/browser';
import { startTestServer, type TestServer } from './support/test-server';

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

// Invented words with invented counts; line 4 has a negative count.
const BAD = 'word\tcount\nmarrowvey\t40\nkelsella\t25\nanvilmok\t-3\nsorrelorrin\t12\nbeevey\t9\nzinnamok\t7\nquillasella\t4\n';
const GOOD = BAD.replace('anvilmok\t-3', 'anvilmok\t3');

test('a member uploads a corpus, fixes a bad line, saves it and sees its charts', async () => {
  const { page, problems } = await browser.newPerson(server.url);
  await page.goto('/sign-up');
  await page.getByLabel('Your name').fill('Cora Uploader');
  await page.getByLabel('E-mail').fill('cora.uploader@example.org');
  await page.getByLabel('Password', { exact: true }).fill('correct-horse-7');
  await page.getByLabel('Password again').fill('correct-horse-7');
  await page.getByRole('button', { name: 'Create account' }).click();
  await page.waitForURL('**/benches');
  await page.getByRole('button', { name: 'New bench' }).click();
  await page.getByRole('dialog').getByLabel('Name').fill('Word garden');
  await page.getByRole('dialog').getByRole('button', { name: 'Create bench' }).click();
  await page.waitForURL(/\/benches\/[0-9a-f-]{36}$/);
  const benchUrl = new URL(page.url()).pathname;

  await page.goto(`${benchUrl}/corpora`);
  await page.getByTestId('no-corpora').waitFor();
  await page.getByRole('link', { name: 'Upload a corpus' }).click();
  await page.waitForURL(`**${benchUrl}/corpora/upload`);
  // The upload limit from the server is stated on the page (5 MB by default).
  await page.getByTestId('max-upload').filter({ hasText: '5 MB' }).waitFor();

  // The file with a bad line: the preview names line 4 and saving is impossible.
  await page.getByTestId('file-input').setInputFiles({ name: 'garden-places.tsv', mimeType: 'text/tab-separated-values', buffer: Buffer.from(BAD) });
  await page.getByTestId('preview-errors').waitFor();
  const problemList = page.getByRole('list', { name: 'Problems by line' });
  await problemList.getByText('Line 4', { exact: true }).waitFor();
  assert.match(await problemList.innerText(), /Line 4: "anvilmok" has a negative count \(-3\)/);
  assert.equal(await page.getByRole('button', { name: 'Save corpus' }).isDisabled(), true);
  await screenshot(page, 'corpora-01-bad-line');

  // The corrected file: no errors, split counts shown, save enabled.
  await page.getByTestId('file-input').setInputFiles({ name: 'garden-places.tsv', mimeType: 'text/tab-separated-values', buffer: Buffer.from(GOOD) });
  await page.getByText('No errors: this file can be saved.').waitFor();
  const splitTypes = await Promise.all(['train', 'validation', 'test'].map(async (s) => Number(await page.getByTestId(`split-${s}`).first().innerText())));
  assert.equal(splitTypes.reduce((a, b) => a + b, 0), 7, 'every word is in exactly one split');
  assert.equal(await page.getByTestId('alphabet').innerText(), 'a b e i k l m n o q r s u v w y z'); // letters of the seven words, listed by hand
  await screenshot(page, 'corpora-02-preview');
  assert.equal(await page.getByLabel('Corpus name').inputValue(), 'Garden places');
  await page.getByLabel('Description (optional)').fill('Invented place names for a first try.');
  await page.getByRole('button', { name: 'Save corpus' }).click();

  // The corpus page: figures, three charts drawn on canvas, the words table.
  await page.waitForURL(/\/corpora\/[0-9a-f-]{36}$/);
  await page.getByTestId('corpus-name').filter({ hasText: 'Garden places' }).waitFor();
  assert.equal(await page.getByTestId('stat-types').innerText(), '7');
  for (const chart of ['chart-lengths', 'chart-chars', 'chart-top']) {
    await page.getByTestId(chart).locator('canvas').first().waitFor();
  }
  await page.getByRole('table', { name: 'Words of the corpus' }).getByRole('cell', { name: 'marrowvey' }).waitFor();
  // Close the "Saved" notice so it does not cover a chart in the screenshot.
  await page.getByRole('button', { name: 'Close' }).click();
  await page.getByText('Saved "Garden places"').waitFor({ state: 'detached' });
  await screenshot(page, 'corpora-03-corpus-page');

  // The list shows the new corpus with its figures.
  await page.goto(`${benchUrl}/corpora`);
  const row = page.getByRole('row').filter({ hasText: 'Garden places' });
  await row.waitFor();
  assert.match(await row.innerText(), /7\s*words/);
  // Only the corrected file was stored: one header row and one corpus row.
  assert.equal(await page.getByRole('table', { name: 'Corpora of the bench' }).getByRole('row').count(), 2);
  await screenshot(page, 'corpora-04-list');

  assert.deepEqual(problems, [], 'no page errors');
});
