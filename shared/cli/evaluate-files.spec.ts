/**
 * Evaluation on the model's own training words, on a held-out file, per-word output, error bars and metrics.json
 * sign conventions. Corpus: invented made-up words (no personal data).
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { buildAlphabet } from '../data/encode';
import { splitCorpus } from '../data/split';
import { KneserNeyModel } from '../model/ngram-kn';
import { parseEvaluateArgs } from './evaluate-options';
import { runEvaluation } from './evaluate-run';
import { parseTrainArgs } from './train-options';
import { runTraining } from './train-run';

const dir = mkdtempSync(join(tmpdir(), 'nw-evalfiles-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const syll = ['ka', 'lo', 'mi', 'ne', 'ru', 'ta', 'vo', 'si'];
const words = Array.from({ length: 60 }, (_, i) => `${syll[i % 8]}${syll[(i * 3 + 1) % 8]}${i % 3 === 0 ? syll[(i * 5) % 8] : ''}${i % 4 === 0 ? syll[(i * 7) % 8] : ''}`);
const unique = [...new Set(words)];
const corpus = join(dir, 'made-up.tsv');
writeFileSync(corpus, `word\tcount\n${unique.map((w, i) => `${w}\t${1 + (i % 5)}`).join('\n')}\n`);
const heldFile = join(dir, 'held.txt');
writeFileSync(heldFile, 'kalomi\nnerutavo\nsika\n');
const quietSink = { write: () => true, isTTY: false };
const small = ['--state-size', '4', '--flow-hidden', '8', '--encoder', '8', '--proposal-hidden', '8', '--embedding', '4', '--batch-size', '8', '--eval-k', '4'];
const evalSmall = ['-k', '4', '--repeats', '2', '--trajectories', '16', '--ce-k', '0', '--draws', '4', '--detail-words', '3', '--samples', '10', '--tmax', '8', '--particles', '8'];

describe('evaluate on the model\'s own words', () => {
  it('fits the n-gram baseline on exactly the training words of the run (its split, not the default one)', async () => {
    const run = await runTraining(parseTrainArgs(['--corpus', corpus, '--model', 'ngram', '--order', '2', '--split', '0.5,0.25,0.25', '--split-seed', '7', '--out', join(dir, 'ng')])!, quietSink);
    const { output, table } = await runEvaluation(parseEvaluateArgs([run.checkpointPath, '--corpus', corpus, '--order', '2'])!);
    if (output.result.family !== 'ngram') throw new Error('expected an n-gram result');
    // The baseline is the same closed-form model as the run's: identical held-out figures (same words, same fit).
    expect(output.result.baselines.ngram!.bitsPerChar).toBeCloseTo(output.result.heldOut.bitsPerChar, 12);
    // ... and the split is the recorded one: an independent fit on split 0.5/0.25/0.25, seed 7 gives the same figure.
    const parsed = unique.map((w, i) => ({ word: w, count: 1 + (i % 5) }));
    const { parts } = splitCorpus(parsed, 7, { train: 0.5, validation: 0.25, test: 0.25 });
    const m = KneserNeyModel.estimate(parts.train, buildAlphabet(unique), { order: 2 });
    const nats = parts.test.reduce((s, w) => s - m.logProb(w.word), 0);
    const steps = parts.test.reduce((s, w) => s + w.word.length + 1, 0);
    expect(output.result.heldOut.bitsPerChar).toBeCloseTo(nats / steps / Math.LN2, 9);
    expect(output.data.scored).toBe(parts.test.length);
    expect(table).toContain(`all ${parts.test.length} held-out words scored`);
    expect(table).toContain('checked against the checkpoint');
  });

  it('refuses other training words with a message that says what to give', async () => {
    const run = await runTraining(parseTrainArgs(['--corpus', corpus, '--model', 'ngram', '--split', '0.5,0.25,0.25', '--out', join(dir, 'ng2')])!, quietSink);
    await expect(runEvaluation(parseEvaluateArgs([run.checkpointPath, '--corpus', corpus, '--split', '0.8,0.1,0.1'])!))
      .rejects.toThrow(/not the ones the model was trained on.*leave out --split/);
  });

  it('scores a held-out file, writes per-word JSON lines and error bars', async () => {
    const run = await runTraining(parseTrainArgs(['--corpus', corpus, '--model', 'gru', '--steps', '2', '--validation-file', heldFile, '--out', join(dir, 'gru'), ...small])!, quietSink);
    expect(run.metrics.vocabulary.train).toBe(unique.length); // --validation-file: the corpus is trained on whole
    await expect(runEvaluation(parseEvaluateArgs([run.checkpointPath, '--corpus', corpus, ...evalSmall])!))
      .rejects.toThrow(/validated on "held.txt": give --held-out-file/);
    const perWord = join(dir, 'per-word.jsonl');
    const { output } = await runEvaluation(parseEvaluateArgs([run.checkpointPath, '--corpus', corpus, '--held-out-file', heldFile, '--per-word', perWord, ...evalSmall])!);
    if (output.result.family !== 'gru') throw new Error('expected a GRU result');
    const lines = readFileSync(perWord, 'utf8').trim().split('\n').map((l) => JSON.parse(l) as { word: string; bits: number; characters: number; exact: boolean; ngramBits: number });
    expect(lines.map((l) => l.word)).toEqual(['kalomi', 'nerutavo', 'sika']);
    // Bits per word of the report = mean of the per-word bits; bits/char = their sum over the characters (EOW counted).
    const mean = lines.reduce((s, l) => s + l.bits, 0) / 3;
    expect(output.result.heldOut.bitsPerWord).toBeCloseTo(mean, 9);
    expect(output.result.heldOut.bitsPerChar).toBeCloseTo(lines.reduce((s, l) => s + l.bits, 0) / (7 + 9 + 5), 9);
    expect(lines.every((l) => l.exact)).toBe(true);
    // Standard error of the mean of the three per-word figures (closed form s/√n).
    const sd = Math.sqrt(lines.reduce((s, l) => s + (l.bits - mean) ** 2, 0) / 2);
    expect(output.result.heldOut.standardError!.bitsPerWord).toBeCloseTo(sd / Math.sqrt(3), 9);
  });

  it('scores a stated hash-random subset with --max-held-out, and the SSM\'s error bar has both parts', async () => {
    const run = await runTraining(parseTrainArgs(['--corpus', corpus, '--steps', '2', '--split', '0.4,0.3,0.3', '--out', join(dir, 'ssm'), ...small])!, quietSink);
    const { output, table } = await runEvaluation(parseEvaluateArgs([run.checkpointPath, '--corpus', corpus, '--max-held-out', '5', ...evalSmall])!);
    if (output.result.family !== 'ssm') throw new Error('expected an SSM result');
    expect(output.data.scored).toBe(5);
    expect(table).toMatch(/5 of \d+ held-out words scored \(a hash-random subset/);
    const e = output.result.tight.standardError!.bitsPerChar;
    expect(e.words).toBeGreaterThan(0);
    expect(e.total).toBeCloseTo(Math.hypot(e.words!, e.repeats), 12);
  });

  it('writes metrics.json with positive costs and says which figures are exact', async () => {
    const gru = await runTraining(parseTrainArgs(['--corpus', corpus, '--model', 'gru', '--steps', '2', '--out', join(dir, 'm1'), ...small])!, quietSink);
    const metrics = JSON.parse(readFileSync(gru.metricsPath, 'utf8'));
    for (const p of metrics.curve) { expect(p.bitsPerChar).toBeGreaterThan(0); expect(p.figure).toBe('exact'); }
    expect(metrics.validation.at(-1)).toMatchObject({ exact: true, k: 0 });
    const ssm = await runTraining(parseTrainArgs(['--corpus', corpus, '--steps', '2', '--out', join(dir, 'm2'), ...small])!, quietSink);
    const m2 = JSON.parse(readFileSync(ssm.metricsPath, 'utf8'));
    for (const p of m2.curve) { expect(p.bitsPerChar).toBeGreaterThan(0); expect(p.figure).toBe('bound'); }
    expect(m2.validation.at(-1).exact).toBe(false);
  });
});
