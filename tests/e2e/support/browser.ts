/**
 * Debian's Chromium driven by playwright-core. Each `newPerson()` is a separate browser context
 * (its own cookies and localStorage), so two people can use the app side by side in one test.
 */
import { mkdirSync, readdirSync, readFileSync } from 'node:fs';
import { setPriority } from 'node:os';
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

/**
 * Lowers the scheduling priority (nice 19) of every web-worker thread of the running Chromium renderers and
 * returns how many threads it changed. On a 2-core machine the training worker, the server, the browser's other
 * threads and the test itself share the cores, and Linux would otherwise slice the page's main thread between
 * them at random; desktop systems schedule background compute below the thread that draws the page, and this
 * does the same here, so a long-task check measures the page's own work. Linux only (reads /proc); needs the
 * right to change those threads' priority (the test runs as their owner). Returns 0 when nothing was changed.
 */
export function deprioritiseWorkerThreads(): number {
  let changed = 0;
  let pids: string[] = [];
  try {
    pids = readdirSync('/proc').filter((p) => /^\d+$/.test(p));
  } catch {
    return 0;
  }
  for (const pid of pids) {
    try {
      const cmdline = readFileSync(`/proc/${pid}/cmdline`, 'utf8');
      if (!cmdline.includes('--type=renderer')) continue;
      for (const tid of readdirSync(`/proc/${pid}/task`)) {
        const name = readFileSync(`/proc/${pid}/task/${tid}/comm`, 'utf8').trim();
        if (!name.startsWith('DedicatedWorker')) continue;
        setPriority(Number(tid), 19);
        changed += 1;
      }
    } catch {
      // The process ended meanwhile, or it is not ours to change: skip it.
    }
  }
  return changed;
}
