/**
 * `npm run bench:browser`: trains the reference configuration for a fixed number of steps inside a dedicated
 * module worker of headless Chromium (TF.js WASM backend, the same shared/ model code and the same worker
 * engine as the app) and in Node (WASM backend), and prints the browser/Node time ratio (target ≤ 1.3).
 * Writes bench/results/browser.json. The worker bundle is built on the fly with esbuild (already present as a
 * dependency of tsx); a tiny HTTP server sends it with COOP/COEP headers, as the real server does.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import { cpus } from 'node:os';
import { join, resolve } from 'node:path';
import { build } from 'esbuild';
import { chromium } from 'playwright-core';
import { splitCorpus, DEFAULT_SPLIT_SHARES } from '../shared/data/split';
import { buildAlphabet } from '../shared/data/encode';
import { initNodeBackend } from '../shared/node/tf-node';
import { createEngine } from '../shared/training/run-engines';
import type { TrainerSettings, TrainingSet } from '../src/app/workers/trainer-api';

const STEPS = Number(process.env['BENCH_STEPS'] ?? 20);
const WARMUP = Number(process.env['BENCH_WARMUP'] ?? 3);
const CORPUS = 'datasets-demo/archipelago-places.tsv';
const WASM_DIR = resolve('node_modules/@tensorflow/tfjs-backend-wasm/dist');

/** The reference configuration of the README: state 8, K 8, batch 64, gen 2×coupling + diag, inf diag, GRU 64. */
export const REFERENCE: TrainerSettings = {
  family: 'ssm', stateSize: 8, generativeFlow: ['coupling', 'coupling', 'diag'], inferenceFlow: ['diag'], flowHidden: 32,
  encoderSize: 64, embeddingSize: 16, proposalHidden: 32, observationHidden: 0, samples: 8, batchSize: 64,
  steps: STEPS + WARMUP, learningRate: 0.01, clipNorm: 5, warmupSteps: 0, regime: 'token', seed: 1, order: 3, evalEvery: 0,
};

function trainingSet(): TrainingSet {
  const rows = readFileSync(CORPUS, 'utf8').trim().split('\n').slice(1).map((l) => {
    const [word, count] = l.split('\t');
    return { word: word as string, count: Number(count) };
  });
  const { parts } = splitCorpus(rows, 1, DEFAULT_SPLIT_SHARES);
  return { alphabet: buildAlphabet(rows.map((r) => r.word)).chars, train: parts.train, validation: parts.validation };
}

interface Timing { backend: string; simd: boolean; threads: number; msPerStep: number; wordsPerSecond: number }

/** Same loop in both places: WARMUP untimed steps, then STEPS timed ones. */
const WORKER_SOURCE = `
import '@tensorflow/tfjs-core/dist/register_all_gradients';
import { setUpWorkerBackend } from './src/app/workers/worker-backend';
import { createEngine } from './shared/training/run-engines';
self.onmessage = async (e) => {
  const { settings, set, steps, warmup } = e.data;
  const report = await setUpWorkerBackend(); // the app's workers' own set-up
  const engine = createEngine(settings, set, null);
  for (let i = 0; i < warmup; i++) engine.step();
  const t0 = performance.now();
  for (let i = 0; i < steps; i++) engine.step();
  const ms = (performance.now() - t0) / steps;
  self.postMessage({ ...report, msPerStep: ms, wordsPerSecond: settings.batchSize * 1000 / ms });
  engine.dispose();
};
`;

const PAGE = `<!doctype html><meta charset="utf-8"><title>worker bench</title><script type="module">
const w = new Worker('/worker.js', { type: 'module' });
window.benchRun = (input) => new Promise((resolve) => { w.onmessage = (e) => resolve(e.data); w.onerror = (e) => resolve({ error: String(e.message) }); w.postMessage(input); });
</script>`;

async function serve(bundle: string): Promise<{ server: Server; url: string }> {
  const server = createServer((req, res) => {
    res.setHeader('Cross-Origin-Opener-Policy', 'same-origin');
    res.setHeader('Cross-Origin-Embedder-Policy', 'require-corp');
    const path = (req.url ?? '/').split('?')[0] as string;
    if (path === '/') return res.writeHead(200, { 'Content-Type': 'text/html' }).end(PAGE);
    if (path === '/worker.js') return res.writeHead(200, { 'Content-Type': 'text/javascript' }).end(bundle);
    const wasm = /^\/tfjs-wasm\/([\w-]+\.wasm)$/.exec(path);
    if (wasm) return res.writeHead(200, { 'Content-Type': 'application/wasm' }).end(readFileSync(join(WASM_DIR, wasm[1] as string)));
    return res.writeHead(404).end();
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const address = server.address();
  return { server, url: `http://127.0.0.1:${typeof address === 'object' && address ? address.port : 0}/` };
}

async function inBrowser(set: TrainingSet): Promise<Timing> {
  const out = await build({
    stdin: { contents: WORKER_SOURCE, resolveDir: resolve('.'), loader: 'ts' },
    bundle: true, format: 'esm', platform: 'browser', write: false, minify: true, logLevel: 'silent',
    define: { 'process.env.NODE_ENV': '"production"' },
  });
  const { server, url } = await serve(out.outputFiles[0]?.text ?? '');
  const browser = await chromium.launch({ executablePath: process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium', args: ['--headless', '--no-sandbox', ...(process.env['BENCH_CHROMIUM_FLAGS'] ?? '').split(' ').filter(Boolean)] });
  try {
    const page = await browser.newPage();
    await page.goto(url);
    await page.waitForFunction(() => typeof (window as unknown as { benchRun?: unknown }).benchRun === 'function');
    const result = await page.evaluate((input) => (window as unknown as { benchRun(i: unknown): Promise<unknown> }).benchRun(input),
      { settings: REFERENCE, set, steps: STEPS, warmup: WARMUP }) as Timing & { error?: string };
    if (result.error) throw new Error(`The worker failed: ${result.error}`);
    return result;
  } finally {
    await browser.close();
    server.close();
  }
}

async function inNode(set: TrainingSet): Promise<Timing> {
  const backend = await initNodeBackend('wasm');
  const engine = createEngine(REFERENCE, set, null);
  for (let i = 0; i < WARMUP; i++) engine.step();
  const t0 = performance.now();
  for (let i = 0; i < STEPS; i++) engine.step();
  const ms = (performance.now() - t0) / STEPS;
  engine.dispose();
  return { backend, simd: true, threads: 1, msPerStep: ms, wordsPerSecond: (REFERENCE.batchSize * 1000) / ms };
}

async function main(): Promise<void> {
  const set = trainingSet();
  const browser = await inBrowser(set);
  const node = await inNode(set);
  const ratio = browser.msPerStep / node.msPerStep;
  const result = {
    createdAt: new Date().toISOString(),
    machine: { cpu: cpus()[0]?.model ?? 'unknown', cores: cpus().length, node: process.version },
    corpus: CORPUS, configuration: REFERENCE, timedSteps: STEPS, warmupSteps: WARMUP,
    browser, node, ratio, target: 1.3, withinTarget: ratio <= 1.3,
    notes: 'Browser = one dedicated module worker in headless Chromium (cross-origin isolated page). Same model code and worker engine as the app.',
  };
  mkdirSync('bench/results', { recursive: true });
  writeFileSync('bench/results/browser.json', `${JSON.stringify(result, null, 1)}\n`);
  const f = (t: Timing) => `${t.msPerStep.toFixed(0)} ms/step, ${t.wordsPerSecond.toFixed(1)} words/s (${t.backend}${t.simd ? ' + SIMD' : ''}, ${t.threads} thread(s))`;
  console.log(`Reference configuration, ${STEPS} timed steps after ${WARMUP} warm-up steps`);
  console.log(`  browser worker: ${f(browser)}`);
  console.log(`  Node:           ${f(node)}`);
  console.log(`  ratio browser/Node: ${ratio.toFixed(2)} (target ≤ 1.3) ${ratio <= 1.3 ? 'OK' : 'ABOVE TARGET'}`);
  console.log('Wrote bench/results/browser.json');
}

await main();
