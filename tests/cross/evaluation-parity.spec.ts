/**
 * The evaluation page's figures come from the evaluation worker, which runs `runEvaluationJob`
 * (src/app/workers/evaluator-job.ts) on the server's training set; `npm run evaluate` runs `runEvaluation`
 * (shared/cli/evaluate-run.ts) on a corpus file. For the same checkpoint, corpus, split and seed both must give
 * every figure identically. Also drives the worker's API (`EvaluatorSession`) over an in-thread MessageChannel
 * with comlink, exactly as the page does.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { expose, proxy, wrap } from 'comlink';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { TrainingSet as CorpusTrainingSet } from '../../shared/api/runs';
import { parseCorpus } from '../../shared/data/corpus-parse';
import { splitCorpus } from '../../shared/data/split';
import { parseEvaluateArgs } from '../../shared/cli/evaluate-options';
import { runEvaluation } from '../../shared/cli/evaluate-run';
import { parseTrainArgs } from '../../shared/cli/train-options';
import { runTraining } from '../../shared/cli/train-run';
import { initNodeBackend } from '../../shared/node/tf-node';
import type { EvaluatorApi, EvaluationProgress } from '../../src/app/workers/evaluator-api';
import { runEvaluationJob } from '../../src/app/workers/evaluator-job';
import { EvaluatorSession } from '../../src/app/workers/evaluator-session';

const dir = mkdtempSync(join(tmpdir(), 'nw-eval-parity-'));
const corpusPath = join(dir, 'invented.tsv');
// An invented corpus of made-up syllable words (no personal data). Written most frequent first, ties by word —
// the order the server's training-set endpoint uses — so both sides sum over the words in the same order.
const syll = ['ka', 'lo', 'mi', 'ne', 'ru', 'ta', 'vo', 'si'];
const rows = new Map<string, number>();
for (let i = 0; i < 60; i++) rows.set(`${syll[i % 8]}${syll[(i * 3 + 1) % 8]}${i % 3 === 0 ? syll[(i * 5) % 8] : ''}`, 1 + ((i * 7) % 11));
const sorted = [...rows].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : 1));
writeFileSync(corpusPath, `word\tcount\n${sorted.map(([w, c]) => `${w}\t${c}`).join('\n')}\n`);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const SHARES = { train: 0.6, validation: 0.2, test: 0.2 };
const small = ['--state-size', '4', '--flow-hidden', '8', '--encoder', '8', '--proposal-hidden', '8', '--embedding', '4',
  '--batch-size', '8', '--eval-k', '4', '--split', '0.6,0.2,0.2', '--split-seed', '3'];
const evalArgs = ['--corpus', corpusPath, '-k', '16', '--repeats', '2', '--trajectories', '64', '--ce-k', '4', '--draws', '8',
  '--detail-words', '6', '--samples', '40', '--tmax', '8', '--particles', '32', '--prefix', 'ka', '--split', '0.6,0.2,0.2',
  '--split-seed', '3', '--seed', '11'];
const quiet = { write: () => true, isTTY: false };

/** The corpus as the server's `GET .../training-set` returns it (same parser, same split, count-descending). */
function serverTrainingSet(): CorpusTrainingSet {
  const parsed = parseCorpus(new Uint8Array(readFileSync(corpusPath)), {
    fileName: 'invented.tsv', mergeDuplicates: true,
    normalise: { lowerCase: true, nfc: true, stripDiacritics: false, outsideAlphabet: 'drop-word' },
  });
  const { parts } = splitCorpus(parsed.words, 3, SHARES);
  const splitOfWord = new Map<string, 'train' | 'validation' | 'test'>();
  for (const name of ['train', 'validation', 'test'] as const) for (const w of parts[name]) splitOfWord.set(w.word, name);
  const words = parsed.words.slice().sort((a, b) => b.count - a.count || (a.word < b.word ? -1 : 1));
  return { alphabet: parsed.alphabet.chars, words: words.map((w) => w.word), counts: words.map((w) => w.count), splits: words.map((w) => splitOfWord.get(w.word)!) };
}

let ssmPath = '';
let gruPath = '';

beforeAll(async () => {
  await initNodeBackend('wasm');
  ssmPath = (await runTraining(parseTrainArgs(['--corpus', corpusPath, '--steps', '4', '--out', join(dir, 'ssm'), ...small])!, quiet)).checkpointPath;
  gruPath = (await runTraining(parseTrainArgs(['--corpus', corpusPath, '--model', 'gru', '--steps', '4', '--out', join(dir, 'gru'), ...small])!, quiet)).checkpointPath;
}, 120_000);

describe('evaluation page ↔ npm run evaluate', () => {
  it('gives every figure of a state-space checkpoint (with GRU and n-gram baselines) identically', async () => {
    const opts = parseEvaluateArgs([ssmPath, ...evalArgs, '--baseline', gruPath])!;
    const cli = (await runEvaluation(opts)).output.result;
    const stages: string[] = [];
    const page = runEvaluationJob({
      checkpoint: new Uint8Array(readFileSync(ssmPath)), gruCheckpoint: new Uint8Array(readFileSync(gruPath)),
      corpus: serverTrainingSet(), split: null, heldOutSplit: 'test', ngramOrder: 3, settings: opts.settings,
    }, (_done, _total, next) => stages.push(next));
    expect(cli.family).toBe('ssm');
    // Every number, array and label: a plain JSON round trip is what the server stores and the page shows.
    expect(JSON.parse(JSON.stringify(page))).toEqual(JSON.parse(JSON.stringify(cli)));
    expect(stages.at(-1)).toBe('done');
    expect(stages.length).toBeGreaterThanOrEqual(7);
  });

  it('gives the figures of a GRU checkpoint identically, and a different seed gives different figures', async () => {
    const opts = parseEvaluateArgs([gruPath, ...evalArgs])!;
    const cli = (await runEvaluation(opts)).output.result;
    const input = { checkpoint: new Uint8Array(readFileSync(gruPath)), corpus: serverTrainingSet(), split: null, heldOutSplit: 'test' as const, ngramOrder: 3 };
    const page = runEvaluationJob({ ...input, settings: opts.settings });
    expect(JSON.parse(JSON.stringify(page))).toEqual(JSON.parse(JSON.stringify(cli)));
    // The n-gram baseline is fitted on the training words only: scoring the validation split instead must change it.
    const other = runEvaluationJob({ ...input, heldOutSplit: 'validation', settings: opts.settings });
    expect(other.baselines.ngram?.bitsPerWord).not.toBe(page.baselines.ngram?.bitsPerWord);
  });

  it('serves the same result through the worker API over a MessageChannel, with progress, completion and noise map', async () => {
    const channel = new MessageChannel();
    expose(new EvaluatorSession(async () => ({ backend: 'node', simd: false, threads: 1 })), channel.port1);
    const api = wrap<EvaluatorApi>(channel.port2);
    try {
      const opts = parseEvaluateArgs([ssmPath, ...evalArgs])!;
      const cli = (await runEvaluation(opts)).output.result;
      const seen: EvaluationProgress[] = [];
      const result = await api.evaluate({
        checkpoint: new Uint8Array(readFileSync(ssmPath)), corpus: serverTrainingSet(), split: null, heldOutSplit: 'test',
        ngramOrder: 3, settings: opts.settings,
      }, proxy((p: EvaluationProgress) => { seen.push(p); }));
      expect(JSON.parse(JSON.stringify(result))).toEqual(JSON.parse(JSON.stringify(cli)));
      expect(seen.length).toBeGreaterThan(0);
      expect(seen.every((p) => p.done <= p.total)).toBe(true);

      await api.open(new Uint8Array(readFileSync(ssmPath)));
      const c = await api.complete('ka', { particles: 32, tMax: 8, seed: 11 });
      // Same prefix, particles and seed as the CLI's --prefix ka: the same weighted continuations.
      const cliCompletion = cli.family === 'ssm' ? cli.completions[0]! : null;
      expect(c.continuations.slice(0, 20)).toEqual(cliCompletion?.continuations);
      // Weights of the continuations are normalised (closed form: they sum to one over all particles).
      expect(c.continuations.reduce((a, x) => a + x.weight, 0)).toBeLessThanOrEqual(1 + 1e-9);
      const map = await api.noiseMap({ prefix: 'ka', dims: [0, 1], steps: 5, range: 2, particles: 32, seed: 11 });
      expect(map.points).toHaveLength(25);
      expect(map.points.every((p) => p.prob > 0 && p.prob <= 1)).toBe(true);
      await expect(api.noiseMap({ prefix: 'ka', dims: [0, 0], steps: 5, range: 2, particles: 32, seed: 11 }))
        .rejects.toThrow(/two different noise dimensions/);
      await expect(api.complete('kaq', { particles: 8, tMax: 8, seed: 1 })).rejects.toThrow(/q/);
    } finally {
      await api.dispose();
      channel.port1.close();
      channel.port2.close();
    }
  });

  it('refuses bad settings with a message that says what to change', () => {
    const opts = parseEvaluateArgs([ssmPath, ...evalArgs])!;
    expect(() => runEvaluationJob({
      checkpoint: new Uint8Array(readFileSync(ssmPath)), corpus: serverTrainingSet(), split: null, heldOutSplit: 'test', ngramOrder: 3,
      settings: { ...opts.settings, tightK: 0 },
    })).toThrow(/K of the tight estimate must be a whole number from 1/);
  });
});
