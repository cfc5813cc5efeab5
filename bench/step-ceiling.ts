/**
 * The machine's own ceiling for `npm run bench:runners`: the bare training step of the benchmark's runs (same
 * model, settings and corpus words; the runner's engine, `createEngine` of shared/training) in one worker thread
 * alone and in two worker threads at once, in one process, with no server and no runner around it. Two threads
 * never step faster than this, so the grid's speed-up can be read against it: what the ceiling loses is the
 * machine's (cores, caches, memory), what the grid loses beyond it is the runner's and the server's.
 * Rounds alternate (alone, two, two, alone, ...) so a change in the machine's load hits both.
 */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { parseCorpus } from '../shared/data/corpus-parse';
import type { TrainingSet } from '../shared/training/training-types';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');

/** The benchmark's runs: a small state-space model (state 8, K 4, batch 32) that trains at tens of steps per second on one core. */
export function benchRunSettings(steps: number) {
  return {
    model: { stateSize: 8, generativeFlow: [{ kind: 'coupling' }, { kind: 'diag' }], inferenceFlow: [{ kind: 'diag' }], flowHidden: 16, encoderSize: 16, embeddingSize: 8, proposalHidden: 16, observationHidden: 0 },
    training: { steps, batchSize: 32, samples: 4, learningRate: 0.01, clipNorm: 5, evalEvery: 50, evalSamples: 8, checkpointEvery: 50, seed: 1 },
  };
}

/** Words of the benchmark's corpus (the first `words` of datasets-demo/syllable-grammar.tsv, invented words), all for training. */
export function benchTrainingSet(words = 300): TrainingSet {
  const lines = readFileSync(join(root, 'datasets-demo', 'syllable-grammar.tsv'), 'utf8').trim().split('\n').slice(0, words + 1);
  const parsed = parseCorpus(new TextEncoder().encode(`${lines.join('\n')}\n`), { fileName: 'syllables.tsv' });
  if (!parsed.ok) throw new Error(`The benchmark corpus did not parse: ${parsed.problems.map((p) => p.message).join('; ')}`);
  const train = parsed.words.map((w) => ({ word: w.word, count: w.count }));
  const alphabet = [...new Set(train.flatMap((w) => Array.from(w.word)))].sort();
  return { alphabet, train, validation: [] };
}

/** The median of a few rounds (the lower middle one when their number is even), as bench:runners reports its rounds. */
export const lowerMedian = (xs: readonly number[]): number => [...xs].sort((a, b) => a - b)[Math.floor((xs.length - 1) / 2)] as number;

export interface CeilingResult {
  /** Milliseconds per training step, one figure per round. */
  msPerStepAlone: number[];
  /** Milliseconds per step of each of the two threads stepping at once (their mean), one figure per round. */
  msPerStepTwoAtOnce: number[];
  medianMsPerStepAlone: number;
  medianMsPerStepTwoAtOnce: number;
  /** 2 × (alone ms/step) / (two-at-once ms/step): the most two threads can gain over one on this machine now. */
  speedUpCeiling: number;
  stepsTimed: number;
  rounds: number;
}

interface StepThread { worker: Worker; ready: Promise<void>; timed: Promise<number> }
type ThreadMessage = { type: 'ready' } | { type: 'timed'; msPerStep: number };

/** A worker thread that builds the engine, warms up, and times `steps` steps once told to go. */
function startThread(steps: number, seed: number): StepThread {
  const worker = new Worker(new URL('./step-ceiling-entry.mjs', import.meta.url), { workerData: { steps, seed } });
  const ended = new Promise<never>((_, reject) => {
    worker.once('error', reject);
    worker.once('exit', (code) => reject(new Error(`A ceiling thread ended before it was done (exit code ${code}).`)));
  });
  ended.catch(() => undefined);
  const message = <M extends ThreadMessage>(type: M['type']) =>
    Promise.race([new Promise<M>((resolve) => worker.on('message', (m: ThreadMessage) => { if (m.type === type) resolve(m as M); })), ended]);
  const thread = { worker, ready: message('ready').then(() => undefined), timed: message<Extract<ThreadMessage, { type: 'timed' }>>('timed').then((m) => m.msPerStep) };
  // A thread that fails before it is ready rejects both; the caller awaits `ready` first, so `timed` is marked handled here.
  thread.timed.catch(() => undefined);
  return thread;
}

/** Mean ms/step of `n` threads that step at once (all warmed up before any starts timing). */
async function timeThreads(n: number, steps: number, round: number): Promise<number> {
  const threads = Array.from({ length: n }, (_, i) => startThread(steps, 1 + 10 * round + i));
  try {
    await Promise.all(threads.map((t) => t.ready));
    for (const t of threads) t.worker.postMessage('go');
    const ms = await Promise.all(threads.map((t) => t.timed));
    return ms.reduce((a, b) => a + b, 0) / ms.length;
  } finally {
    await Promise.all(threads.map((t) => t.worker.terminate()));
  }
}

export async function measureCeiling(steps: number, rounds: number): Promise<CeilingResult> {
  const alone: number[] = [];
  const two: number[] = [];
  for (let round = 0; round < rounds; round++) {
    for (const n of round % 2 === 0 ? [1, 2] : [2, 1]) (n === 1 ? alone : two).push(await timeThreads(n, steps, round));
  }
  const r2 = (x: number) => Number(x.toFixed(2));
  const a = lowerMedian(alone);
  const b = lowerMedian(two);
  return {
    msPerStepAlone: alone.map(r2), msPerStepTwoAtOnce: two.map(r2), medianMsPerStepAlone: r2(a), medianMsPerStepTwoAtOnce: r2(b),
    speedUpCeiling: r2((2 * a) / b), stepsTimed: steps, rounds,
  };
}
