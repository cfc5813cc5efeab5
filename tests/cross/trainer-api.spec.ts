/**
 * The training worker's API end to end over an in-thread MessageChannel with comlink: the real `TrainerSession`
 * is exposed on one port and driven through `wrap<TrainerApi>` on the other, exactly as the page drives the
 * worker. Runs under vitest in Node (TF.js from shared/node: WASM, or CPU as fallback) — jsdom has no WASM.
 */
import { readFileSync } from 'node:fs';
import { expose, proxy, wrap, type Remote } from 'comlink';
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { buildAlphabet } from '../../shared/data/encode';
import { splitCorpus, DEFAULT_SPLIT_SHARES } from '../../shared/data/split';
import { decodeCheckpoint } from '../../shared/model/checkpoint';
import { initNodeBackend } from '../../shared/node/tf-node';
import type { TrainerApi, TrainerSettings, TrainingProgress, TrainingSet } from '../../src/app/workers/trainer-api';
import { fromBoundaryError } from '../../src/app/workers/trainer-client';
import { TrainerSession } from '../../src/app/workers/trainer-session';

function demoSet(): TrainingSet {
  const lines = readFileSync('datasets-demo/syllable-grammar.tsv', 'utf8').trim().split('\n').slice(1, 401);
  const words = lines.map((l) => { const [word, count] = l.split('\t'); return { word: word as string, count: Number(count) }; });
  const { parts } = splitCorpus(words, 1, DEFAULT_SPLIT_SHARES);
  return { alphabet: buildAlphabet(words.map((w) => w.word)).chars, train: parts.train, validation: parts.validation };
}

const SMALL: TrainerSettings = {
  family: 'ssm', stateSize: 4, generativeFlow: ['coupling', 'diag'], inferenceFlow: ['diag'], flowHidden: 12,
  encoderSize: 12, embeddingSize: 6, proposalHidden: 12, observationHidden: 0, samples: 4, batchSize: 16,
  steps: 40, learningRate: 0.01, clipNorm: 5, warmupSteps: 0, regime: 'token', seed: 7, order: 3, evalEvery: 20,
};

let backend = '';
const ports: MessagePort[] = [];
const sessions: Remote<TrainerApi>[] = [];

function connect(): Remote<TrainerApi> {
  const channel = new MessageChannel();
  ports.push(channel.port1, channel.port2);
  expose(new TrainerSession(async () => ({ backend, simd: false, threads: 1 })), channel.port1);
  const api = wrap<TrainerApi>(channel.port2);
  sessions.push(api);
  return api;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

beforeAll(async () => { backend = await initNodeBackend('wasm'); });

afterEach(async () => {
  for (const api of sessions.splice(0)) await api.dispose();
  for (const p of ports.splice(0)) p.close();
});

describe('TrainerApi over a MessageChannel', () => {
  const set = demoSet();
  const log2V = Math.log2(set.alphabet.length + 1);

  it('trains with progress callbacks, measures validation figures and ends as completed', async () => {
    const api = connect();
    const info = await api.init(SMALL, set);
    expect(info.backend).toBe(backend);
    expect(info.step).toBe(0);
    expect(info.parameterCount).toBeGreaterThan(0);
    const seen: TrainingProgress[] = [];
    const outcome = await api.start(proxy((p: TrainingProgress) => { seen.push(p); }));
    expect(outcome).toEqual({ kind: 'completed', step: 40 });
    const steps = seen.map((p) => p.step);
    expect(steps).toEqual([...steps].sort((a, b) => a - b));
    const evals = seen.filter((p) => p.evaluation).map((p) => p.evaluation!);
    expect(evals.map((e) => e.step)).toEqual([20, 40]);
    for (const e of evals) {
      // Closed form: a model no better than uniform over V symbols costs log2 V bits per character; a trained
      // model on this low-entropy syllable corpus must do better (MODEL.md §7 bounds, closed form).
      expect(e.validationBitsPerChar).toBeGreaterThan(0);
      expect(e.validationBitsPerChar).toBeLessThan(log2V);
      // I_t lies between 0 and log V (MODEL.md §7; closed form: MI ≤ entropy of the symbol).
      expect(e.noiseInformationBits!).toBeGreaterThanOrEqual(0);
      expect(e.noiseInformationBits!).toBeLessThanOrEqual(log2V);
      // An entropy over V outcomes lies in [0, log2 V] (closed form).
      expect(e.observationEntropyBits!).toBeGreaterThanOrEqual(0);
      expect(e.observationEntropyBits!).toBeLessThanOrEqual(log2V);
      expect(e.samples.length).toBe(6);
      for (const w of e.samples) for (const c of w) expect(set.alphabet).toContain(c);
    }
    const last = seen.at(-1)!;
    expect(last.step).toBe(40);
    expect(last.wordsPerSecond).toBeGreaterThan(0);
    expect(last.etaSeconds).toBe(0);
    // −L_K per character is a cost ≥ 0 (L_K ≤ log p(w) ≤ 0 for a discrete distribution, MODEL.md §5).
    for (const p of seen) expect(p.trainBitsPerChar).toBeGreaterThan(0);
  });

  it('pauses (no steps while paused), resumes, and stops on request', async () => {
    const api = connect();
    await api.init({ ...SMALL, steps: 100_000, evalEvery: 0 }, set);
    let latest = 0;
    const firstProgress = new Promise<void>((resolve) => {
      void api.start(proxy((p: TrainingProgress) => { latest = p.step; resolve(); })).then((o) => { outcome = o; });
    });
    let outcome: Awaited<ReturnType<TrainerApi['start']>> | null = null;
    await firstProgress;
    await api.pause();
    const pausedAt = decodeCheckpoint(await api.checkpoint()).step;
    await sleep(400);
    const stillAt = decodeCheckpoint(await api.checkpoint()).step;
    expect(stillAt).toBe(pausedAt);
    await api.resume();
    await sleep(600);
    expect(decodeCheckpoint(await api.checkpoint()).step).toBeGreaterThan(stillAt);
    expect(latest).toBeGreaterThan(0);
    await api.stop();
    for (let i = 0; i < 50 && !outcome; i++) await sleep(20);
    expect(outcome).not.toBeNull();
    expect(outcome!.kind).toBe('stopped');
    expect(outcome!.step).toBeLessThan(100_000);
  });

  it('round-trips checkpoint bytes: a new worker resumed from them saves the very same weights', async () => {
    const a = connect();
    await a.init({ ...SMALL, steps: 12, evalEvery: 0 }, set);
    await a.start(proxy(() => {}));
    const bytes = await a.checkpoint();
    expect(bytes).toBeInstanceOf(Uint8Array);
    const ck = decodeCheckpoint(bytes);
    expect(ck.step).toBe(12);
    expect(ck.optimizer).toBeDefined();

    const b = connect();
    const info = await b.init({ ...SMALL, steps: 12, evalEvery: 0 }, set, bytes);
    expect(info.step).toBe(12);
    const again = decodeCheckpoint(await b.checkpoint());
    expect(Object.keys(again.weights).sort()).toEqual(Object.keys(ck.weights).sort());
    for (const [name, w] of Object.entries(ck.weights)) expect(Array.from(again.weights[name]!.values)).toEqual(Array.from(w.values));
    // Continuing the resumed run trains further steps.
    const more = connect();
    await more.init({ ...SMALL, steps: 15, evalEvery: 0 }, set, bytes);
    expect(await more.start(proxy(() => {}))).toEqual({ kind: 'completed', step: 15 });
  });

  it('resumed from the checkpoint of its last step, reports the validation figures once and no training figure', async () => {
    // The page can close between the final save and the run's last progress message; the resumed run has no step
    // left, yet its validation figure must still reach the server (else a grid's heat map keeps an empty square).
    const a = connect();
    await a.init({ ...SMALL, steps: 12, evalEvery: 0 }, set);
    await a.start(proxy(() => {}));
    const bytes = await a.checkpoint();
    const b = connect();
    await b.init({ ...SMALL, steps: 12, evalEvery: 0 }, set, bytes);
    const seen: TrainingProgress[] = [];
    expect(await b.start(proxy((p: TrainingProgress) => { seen.push(p); }))).toEqual({ kind: 'completed', step: 12 });
    expect(seen).toHaveLength(1);
    expect(seen[0]!.step).toBe(12);
    expect(seen[0]!.trainBitsPerChar).toBeNull();
    expect(seen[0]!.evaluation!.step).toBe(12);
    expect(seen[0]!.evaluation!.validationBitsPerChar).toBeGreaterThan(0);
  });

  it('refuses bad checkpoint bytes with a plain { name, message } error that says what to do', async () => {
    const api = connect();
    const err = await api.init(SMALL, set, new TextEncoder().encode('not a checkpoint')).catch((e: unknown) => e);
    const shape = fromBoundaryError(err);
    expect(shape.code).toBe('BAD_CHECKPOINT');
    expect(shape.message).toMatch(/not a Noisewright checkpoint/);
  });

  it('fails with a sentence on a non-finite loss and keeps finite weights', async () => {
    const api = connect();
    // A learning rate of 1e38 overflows float32 weights after one Adam step (float32 max ≈ 3.4e38, IEEE 754).
    await api.init({ ...SMALL, learningRate: 1e38, clipNorm: 0, steps: 20, evalEvery: 0 }, set);
    const outcome = await api.start(proxy(() => {}));
    expect(outcome.kind).toBe('failed');
    if (outcome.kind !== 'failed') return;
    expect(outcome.error.code).toBe('NON_FINITE_LOSS');
    expect(outcome.error.message).toMatch(/NaN or infinite/);
    const ck = decodeCheckpoint(await api.checkpoint());
    for (const w of Object.values(ck.weights)) expect(w.values.every(Number.isFinite)).toBe(true);
  });

  it('fits an n-gram in one go and scores it', async () => {
    const api = connect();
    await api.init({ ...SMALL, family: 'ngram', order: 3 }, set);
    const seen: TrainingProgress[] = [];
    expect(await api.start(proxy((p: TrainingProgress) => { seen.push(p); }))).toEqual({ kind: 'completed', step: 0 });
    expect(seen[0]!.trainBitsPerChar).toBeNull(); // no training steps: no training figure to store
    const e = seen[0]!.evaluation!;
    expect(e.validationBitsPerChar).toBeLessThan(log2V); // closed form: uniform costs log2 V bits per character
    expect(e.observationEntropyBits).toBeNull();
    expect((await api.samples(5)).length).toBe(5);
  });

  it('trains the GRU baseline and draws samples from it', async () => {
    const api = connect();
    await api.init({ ...SMALL, family: 'gru', steps: 20, evalEvery: 20 }, set);
    const seen: TrainingProgress[] = [];
    await api.start(proxy((p: TrainingProgress) => { seen.push(p); }));
    const e = seen.find((p) => p.evaluation)!.evaluation!;
    expect(e.validationBitsPerChar).toBeLessThan(log2V);
    expect(e.noiseInformationBits).toBeNull();
    const words = await api.samples(4);
    expect(words.length).toBe(4);
    for (const w of words) for (const c of w) expect(set.alphabet).toContain(c);
  });
});
