/**
 * Debian's Chromium driven by playwright-core. Each `newPerson()` is a separate browser context
 * (its own cookies and localStorage), so two people can use the app side by side in one test.
 */
import { mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';

export const CHROMIUM_PATH = process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium';
export const ARTIFACTS_DIR = resolve('tests/artifacts');

const CHROMIUM_ARGS = [
  '--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync',
];

export interface Person {
  context: BrowserContext;
  page: Page;
  /** Errors the page threw or logged (not HTTP error answers); a test may assert this stays empty. */
  problems: string[];
}

export interface TestBrowser {
  browser: Browser;
  newPerson(baseURL: string): Promise<Person>;
  close(): Promise<void>;
}

export async function launchBrowser(): Promise<TestBrowser> {
  const browser = await chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS });
  return {
    browser,
    async newPerson(baseURL: string) {
      const context = await browser.newContext({ baseURL, viewport: { width: 1280, height: 860 } });
      context.setDefaultTimeout(15_000);
      const page = await context.newPage();
      const problems: string[] = [];
      page.on('pageerror', (error) => problems.push(`page error: ${error.message}`));
      page.on('console', (message) => {
        // Chromium logs every 4xx answer as "Failed to load resource"; those are expected answers that the
        // page turns into messages, so only other console errors count as problems.
        if (message.type() === 'error' && !message.text().startsWith('Failed to load resource')) {
          problems.push(`console: ${message.text()}`);
        }
      });
      return { context, page, problems };
    },
    close: () => browser.close(),
  };
}

/** Saves a full-page screenshot as tests/artifacts/<name>.png. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(ARTIFACTS_DIR, { recursive: true });
  const path = join(ARTIFACTS_DIR, `${name}.png`);
  await page.screenshot({ path, fullPage: true });
  return path;
}
