/**
 * `npm run bench:twin`: the reference training step against an independent PyTorch twin of the same model
 * (bench/torch-twin/, Python 3 + python3-torch; installed with apt-get when missing).
 *
 * 1. Check: both start from the product's initial weights, batch and noise (the noise is the same
 *    `tf.randomNormal` draw the model makes, exported to the twin) and must agree on the loss, the gradient norm
 *    and the loss after one clipped Adam step (relative difference < 1e-5) — otherwise the run stops with exit 1.
 *    The twin is written from docs/MODEL.md in another framework, so this is also a second, independent
 *    implementation of the loss.
 * 2. Timing: rounds interleaved in one run, order alternated, the product on one thread (TF.js WASM in Node)
 *    and the twin with torch.set_num_threads(1); CPU seconds per step of each process, ratio product / twin.
 * Options: --rounds <n> (default 8, at least 5), --steps <n> per round (default 8); --gen / --inf <kinds> (comma-separated
 * flow layers, e.g. tril,shift, to check other flows; default coupling,coupling,diag / diag); --check-only.
 * Writes bench/results/twin.json (the reference flows only).
 */
import { spawn, spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import * as tf from '@tensorflow/tfjs-core';
import { createBatcher } from '../shared/data/batcher';
import { parseCorpus } from '../shared/data/corpus-parse';
import { buildAlphabet, encodeBatch, type EncodedBatch } from '../shared/data/encode';
import { createRng } from '../shared/data/random';
import { iwaeBound } from '../shared/model/bounds';
import type { FlowSpec } from '../shared/model/flows/flow';
import { StateSpaceModel } from '../shared/model/ssm';
import { defaultSsmSettings } from '../shared/model/ssm-settings';
import { globalNorm, SsmTrainer } from '../shared/model/trainer';
import { initNodeBackend } from '../shared/node/tf-node';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const PYTHON = '/usr/bin/python3';
const TOLERANCE = 1e-5;
const { values } = parseArgs({
  options: { rounds: { type: 'string' }, steps: { type: 'string' }, gen: { type: 'string' }, inf: { type: 'string' }, 'check-only': { type: 'boolean' } },
});
const rounds = Math.max(5, Number(values.rounds ?? 8));
const stepsPerRound = Math.max(1, Number(values.steps ?? 8));

function fail(message: string): never {
  process.stderr.write(`\nbench:twin FAILED: ${message}\n`);
  process.exit(1);
}

function ensureTorch(): void {
  if (spawnSync(PYTHON, ['-c', 'import torch']).status === 0) return;
  process.stderr.write('python3-torch is missing; installing it with apt-get (needs root)…\n');
  const r = spawnSync('apt-get', ['install', '-y', 'python3-torch'], { stdio: 'inherit' });
  if (r.status !== 0 || spawnSync(PYTHON, ['-c', 'import torch']).status !== 0) {
    fail('could not install python3-torch; run `apt-get install -y python3-torch` as root and try again.');
  }
}

// The reference configuration of `npm run bench` (README speed table).
const TRAINING = { learningRate: 0.01, samples: 8, clipNorm: 5 };
const BATCH_SIZE = 64;

function referenceBatch(): { batch: EncodedBatch; vocabSize: number } {
  const file = join(root, 'datasets-demo', 'archipelago-places.tsv');
  const parsed = parseCorpus(new Uint8Array(readFileSync(file)), { fileName: 'archipelago-places.tsv' });
  if (!parsed.ok || parsed.words.length === 0) fail(`could not read the demo corpus ${file}.`);
  const alphabet = buildAlphabet(parsed.words.map((w) => w.word));
  const batcher = createBatcher(parsed.words, { batchSize: BATCH_SIZE, regime: 'token', rng: createRng(1) });
  return { batch: encodeBatch(batcher.next(), alphabet), vocabSize: alphabet.size };
}

function productLoss(model: StateSpaceModel, batch: EncodedBatch, seed: number): tf.Scalar {
  return tf.neg(tf.mean(iwaeBound(model.logWeights(batch, TRAINING.samples, { seed }).logW))) as tf.Scalar;
}

const relDiff = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), 1e-30);

/** A line-per-reply conversation with the Python twin. */
function startTwin(exportFile: string) {
  const child = spawn(PYTHON, [join(root, 'bench', 'torch-twin', 'twin_main.py'), exportFile], {
    stdio: ['pipe', 'pipe', 'inherit'],
    env: { ...process.env, OMP_NUM_THREADS: '1', MKL_NUM_THREADS: '1', PYTHONDONTWRITEBYTECODE: '1' },
  });
  const lines = createInterface({ input: child.stdout })[Symbol.asyncIterator]();
  child.on('exit', (code) => { if (code !== 0 && code !== null) fail(`the PyTorch twin exited with code ${code}.`); });
  const next = async (): Promise<Record<string, any>> => {
    const r = await lines.next();
    if (r.done) fail('the PyTorch twin closed its output.');
    return JSON.parse(r.value) as Record<string, any>;
  };
  return {
    next,
    ask: async (cmd: string) => { child.stdin.write(`${cmd}\n`); return next(); },
    quit: () => { child.stdin.write('quit\n'); child.stdin.end(); },
  };
}

ensureTorch();
const loadBefore = loadavg();
await initNodeBackend('wasm');
const { batch, vocabSize } = referenceBatch();
const flowOf = (kinds: string) => kinds.split(',').map((kind) => ({ kind: kind.trim() })) as FlowSpec[];
const genKinds = values.gen ?? 'coupling,coupling,diag';
const infKinds = values.inf ?? 'diag';
const isReference = genKinds === 'coupling,coupling,diag' && infKinds === 'diag';
const settings = defaultSsmSettings(vocabSize, { stateSize: 8, generativeFlow: flowOf(genKinds), inferenceFlow: flowOf(infKinds), encoderSize: 64 });
const model = new StateSpaceModel(settings, 1);
const trainer = new SsmTrainer(model, TRAINING);
const seed = trainer.stepSeed(1);
const T = batch.maxLen;
const N = BATCH_SIZE * TRAINING.samples;
// The same draw the model makes inside logWeights: tf.randomNormal([T, B*K, d], 0, 1, 'float32', seed).
const noise = tf.tidy(() => tf.randomNormal([T, N, settings.stateSize], 0, 1, 'float32', seed).dataSync() as Float32Array);
const weights = model.getWeights();

// The product's figures on the same inputs: loss and gradient norm as the trainer computes them, then one step.
const first = tf.tidy(() => {
  const { value, grads } = tf.variableGrads(() => productLoss(model, batch, seed), model.variables);
  return [value.dataSync()[0] as number, globalNorm(Object.values(grads)).dataSync()[0] as number];
});
const stepped = trainer.step(batch, seed);
const postAdam = tf.tidy(() => productLoss(model, batch, seed).dataSync()[0] as number);
const product = { loss: first[0] as number, gradNorm: first[1] as number, postAdamLoss: postAdam };
if (relDiff(stepped.loss, product.loss) > TOLERANCE) fail(`the trainer's loss ${stepped.loss} differs from logWeights' ${product.loss}.`);

const dir = mkdtempSync(join(tmpdir(), 'noisewright-twin-'));
const exportFile = join(dir, 'export.json');
const plain = Object.fromEntries(Object.entries(weights).map(([k, w]) => [k, { shape: w.shape, values: Array.from(w.values) }]));
writeFileSync(exportFile, JSON.stringify({
  settings, weights: plain, learningRate: TRAINING.learningRate, clipNorm: TRAINING.clipNorm,
  batch: { batchSize: batch.batchSize, maxLen: batch.maxLen, ids: Array.from(batch.ids), mask: Array.from(batch.mask) },
  noise: { shape: [T, N, settings.stateSize], values: Array.from(noise) },
}));

const twin = startTwin(exportFile);
const hello = await twin.next();
const checked = await twin.ask('check');
rmSync(dir, { recursive: true, force: true });
const twin32 = checked['float32'] as typeof product & { parameterCount: number };
const twin64 = checked['float64'] as typeof product;
process.stderr.write(`PyTorch ${hello['torch']} on ${hello['threads']} thread; ${model.parameterCount} parameters (twin ${twin32.parameterCount}); ` +
  `batch ${BATCH_SIZE} × ${T} steps, K ${TRAINING.samples}\n\n`);
process.stderr.write('Check against an independent implementation of the loss (the PyTorch twin, written from docs/MODEL.md):\n');
const rows = (['loss', 'gradNorm', 'postAdamLoss'] as const).map((key) => {
  const r = relDiff(product[key], twin32[key]);
  process.stderr.write(`  ${key.padEnd(13)} product ${product[key].toPrecision(9).padStart(13)}  twin float32 ${twin32[key].toPrecision(9).padStart(13)}` +
    `  float64 ${twin64[key].toPrecision(9).padStart(13)}  relative difference ${r.toExponential(2)}\n`);
  return { key, product: product[key], twinFloat32: twin32[key], twinFloat64: twin64[key], relativeDifference: r };
});
if (twin32.parameterCount !== model.parameterCount) fail(`parameter counts differ: ${model.parameterCount} vs ${twin32.parameterCount}.`);
const bad = rows.filter((r) => !(r.relativeDifference < TOLERANCE));
if (bad.length > 0) {
  twin.quit();
  fail(`product and twin disagree on ${bad.map((r) => r.key).join(', ')} (relative difference ≥ ${TOLERANCE}).`);
}
process.stderr.write(`Check passed (generative flow ${genKinds}; inference flow ${infKinds}).\n\n`);
if (values['check-only'] || !isReference) {
  twin.quit();
  process.exit(0);
}

// Timing: warm-up, then rounds with alternating order.
const productSteps = (n: number) => {
  const c0 = process.cpuUsage();
  const w0 = performance.now();
  for (let i = 0; i < n; i++) trainer.step(batch);
  const c = process.cpuUsage(c0);
  return { cpuSeconds: (c.user + c.system) / 1e6, wallSeconds: (performance.now() - w0) / 1000 };
};
productSteps(3);
await twin.ask('time 3');
const timed: { round: number; first: string; productMs: number; twinMs: number; productWallMs: number; twinWallMs: number; ratio: number }[] = [];
for (let r = 0; r < rounds; r++) {
  let p = { cpuSeconds: 0, wallSeconds: 0 };
  let t: Record<string, any> = {};
  if (r % 2 === 0) { p = productSteps(stepsPerRound); t = await twin.ask(`time ${stepsPerRound}`); }
  else { t = await twin.ask(`time ${stepsPerRound}`); p = productSteps(stepsPerRound); }
  const productMs = (1000 * p.cpuSeconds) / stepsPerRound;
  const twinMs = (1000 * (t['cpuSeconds'] as number)) / stepsPerRound;
  timed.push({ round: r + 1, first: r % 2 === 0 ? 'product' : 'twin', productMs, twinMs,
    productWallMs: (1000 * p.wallSeconds) / stepsPerRound, twinWallMs: (1000 * (t['wallSeconds'] as number)) / stepsPerRound, ratio: productMs / twinMs });
  const x = timed.at(-1)!;
  process.stderr.write(`round ${x.round} (${x.first} first): product ${x.productMs.toFixed(1)} ms, twin ${x.twinMs.toFixed(1)} ms CPU per step → ratio ${x.ratio.toFixed(2)}\n`);
}
twin.quit();
const loadAfter = loadavg();
const sorted = timed.map((x) => x.ratio).sort((a, b) => a - b);
const median = (v: number[]) => (v.length % 2 ? v[(v.length - 1) / 2]! : (v[v.length / 2 - 1]! + v[v.length / 2]!) / 2);
const summary = { min: sorted[0]!, median: median(sorted), max: sorted.at(-1)! };
const wallRatios = timed.map((x) => x.productWallMs / x.twinWallMs).sort((a, b) => a - b);
process.stderr.write(`\nproduct / twin CPU time per step: median ${summary.median.toFixed(2)} (min ${summary.min.toFixed(2)}, max ${summary.max.toFixed(2)}) ` +
  `over ${rounds} rounds of ${stepsPerRound} steps; wall-clock median ${median(wallRatios).toFixed(2)}\n` +
  `load average (1/5/15 min) before ${loadBefore.map((x) => x.toFixed(2)).join(' ')}, after ${loadAfter.map((x) => x.toFixed(2)).join(' ')}\n`);

const results = {
  createdAt: new Date().toISOString(),
  machine: { cpu: cpus()[0]?.model ?? 'unknown', cores: cpus().length, node: process.version, torch: hello['torch'], loadAverageBefore: loadBefore, loadAverageAfter: loadAfter },
  case: { stateSize: 8, k: TRAINING.samples, batchSize: BATCH_SIZE, maxLen: T, generativeFlow: 'coupling, coupling, diag', inferenceFlow: 'diag',
    encoderSize: 64, parameterCount: model.parameterCount, backend: tf.getBackend() },
  check: { tolerance: TOLERANCE, passed: true, note: 'The PyTorch twin is a second, independent implementation of the loss (written from docs/MODEL.md).', rows },
  timing: { rounds, stepsPerRound, unit: 'CPU ms per training step (process CPU time; one thread each)', ratioProductOverTwin: summary,
    wallRatioMedian: median(wallRatios), perRound: timed },
};
mkdirSync(join(root, 'bench', 'results'), { recursive: true });
writeFileSync(join(root, 'bench', 'results', 'twin.json'), `${JSON.stringify(results, null, 1)}\n`);
process.stderr.write('Wrote bench/results/twin.json.\n');
trainer.dispose();
model.dispose();
