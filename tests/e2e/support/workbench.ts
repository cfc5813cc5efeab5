/**
 * Set-up steps several end-to-end stories share: an account created through the sign-up page, then a bench
 * and a demo corpus created through the REST API.
 */
import { readFileSync } from 'node:fs';
import type { Page } from 'playwright-core';

/** Calls the REST API of the server at `baseUrl` with a bearer token; JSON answers are parsed, others returned as text. */
export async function callApi<T>(baseUrl: string, path: string, token: string, init: RequestInit = {}): Promise<T> {
  const res = await fetch(`${baseUrl}/api${path}`, { ...init, headers: { Authorization: `Bearer ${token}`, ...(init.headers ?? {}) } });
  if (!res.ok) throw new Error(`${init.method ?? 'GET'} ${path} answered ${res.status}: ${await res.text()}`);
  const type = res.headers.get('content-type') ?? '';
  return (type.includes('json') ? await res.json() : await res.text()) as T;
}

/** Creates an account through the sign-up page and returns the sign-in token the app stored. */
export async function signUpThroughUi(page: Page, name: string, email: string): Promise<string> {
  await page.goto('/sign-up');
  await page.getByLabel('Your name').fill(name);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password', { exact: true }).fill('long-enough-1');
  await page.getByLabel('Password again').fill('long-enough-1');
  await page.getByRole('button', { name: 'Create account' }).click();
  await page.waitForURL('**/benches');
  return (await page.evaluate(() => localStorage.getItem('noisewright.token'))) as string;
}

/** A new bench holding the demo corpus `datasets-demo/syllable-grammar.tsv`, named "Syllable grammar". */
export async function benchWithSyllableCorpus(baseUrl: string, token: string, benchName: string): Promise<{ benchId: string; corpusId: string }> {
  const bench = await callApi<{ id: string }>(baseUrl, '/benches', token, {
    method: 'POST', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ name: benchName }),
  });
  const form = new FormData();
  form.set('name', 'Syllable grammar');
  form.set('options', JSON.stringify({ mergeDuplicates: true }));
  form.set('file', new Blob([readFileSync('datasets-demo/syllable-grammar.tsv')]), 'syllable-grammar.tsv');
  const corpus = await callApi<{ id: string }>(baseUrl, `/benches/${bench.id}/corpora`, token, { method: 'POST', body: form });
  return { benchId: bench.id, corpusId: corpus.id };
}

/** Chooses options of a Material multi-select by its label, then closes the panel. */
export async function pick(page: Page, field: string, options: string[]): Promise<void> {
  await page.getByRole('combobox', { name: field }).click();
  for (const name of options) await page.getByRole('option', { name, exact: true }).click();
  await page.keyboard.press('Escape');
}
