import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeCheckpoint } from '../model/checkpoint';
import { parseEvaluateArgs } from './evaluate-options';
import { runEvaluation } from './evaluate-run';
import { ProgressBar, formatDuration } from './progress-bar';
import { parseTrainArgs } from './train-options';
import { runTraining } from './train-run';

const dir = mkdtempSync(join(tmpdir(), 'nw-cli-'));
const corpus = join(dir, 'tiny.tsv');
// An invented corpus of 40 made-up words (no personal data).
const syll = ['ka', 'lo', 'mi', 'ne', 'ru', 'ta', 'vo', 'si'];
const lines = ['word\tcount'];
for (let i = 0; i < 40; i++) lines.push(`${syll[i % 8]}${syll[(i * 3 + 1) % 8]}${i % 3 === 0 ? syll[(i * 5) % 8] : ''}\t${1 + (i % 7)}`);
writeFileSync(corpus, `${lines.join('\n')}\n`);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const quietSink = { write: () => true, isTTY: false };
const small = ['--state-size', '4', '--flow-hidden', '8', '--encoder', '8', '--proposal-hidden', '8', '--embedding', '4',
  '--batch-size', '8', '--eval-k', '4', '--split', '0.6,0.2,0.2'];
const evalArgs = ['--corpus', corpus, '-k', '8', '--repeats', '2', '--trajectories', '32', '--ce-k', '2', '--draws', '8',
  '--detail-words', '5', '--samples', '20', '--tmax', '8', '--particles', '16', '--prefix', 'ka', '--split', '0.6,0.2,0.2'];

describe('command line (in process)', () => {
  it('prints help and rejects bad options with a message that names the option', () => {
    expect(parseTrainArgs(['--help'])).toBeNull();
    expect(() => parseTrainArgs(['--corpus', corpus, '--steps', 'ten'])).toThrow(/--steps must be a whole number/);
    expect(() => parseTrainArgs(['--corpus', corpus, '--gen-flow', 'coupling,spiral'])).toThrow(/Layer 2 of the generative flow/);
    expect(() => parseEvaluateArgs([])).toThrow(/exactly one checkpoint/);
  });

  it('trains an SSM, writes a checkpoint and metrics that decode, and evaluates every figure', async () => {
    const opts = parseTrainArgs(['--corpus', corpus, '--steps', '3', '--out', join(dir, 'ssm'), ...small]);
    const res = await runTraining(opts!, quietSink);
    const ck = decodeCheckpoint(new Uint8Array(readFileSync(res.checkpointPath)));
    expect(ck.family).toBe('ssm');
    expect(ck.step).toBe(3);
    const metrics = JSON.parse(readFileSync(res.metricsPath, 'utf8'));
    expect(metrics.curve).toHaveLength(3);
    expect(metrics.validation.at(-1).bitsPerChar).toBeGreaterThan(0);
    // One sign convention: every figure a positive cost; the SSM's training figures are bounds, its held-out ones estimates.
    expect(metrics.units.bitsPerChar).toBe('bits/char (end-of-word counted)');
    expect(metrics.curve.every((p: { bitsPerChar: number; figure: string }) => p.bitsPerChar > 0 && p.figure === 'bound')).toBe(true);
    expect(metrics.validation.every((v: { exact: boolean; bitsPerWord: number }) => !v.exact && v.bitsPerWord > 0)).toBe(true);

    const gru = await runTraining(parseTrainArgs(['--corpus', corpus, '--model', 'gru', '--steps', '3', '--out', join(dir, 'gru'), ...small])!, quietSink);
    expect(decodeCheckpoint(new Uint8Array(readFileSync(gru.checkpointPath))).family).toBe('gru');
    // The GRU's figures are exact, never labelled bounds, and positive.
    const gruMetrics = JSON.parse(readFileSync(gru.metricsPath, 'utf8'));
    expect(gruMetrics.curve.every((p: { bitsPerChar: number; figure: string }) => p.bitsPerChar > 0 && p.figure === 'exact')).toBe(true);
    expect(gruMetrics.validation.every((v: { exact: boolean }) => v.exact)).toBe(true);
    expect(JSON.stringify(gruMetrics.curve)).not.toMatch(/bound/);

    const { output, table } = await runEvaluation(parseEvaluateArgs([res.checkpointPath, ...evalArgs, '--baseline', gru.checkpointPath])!);
    for (const label of ['Tight estimate', 'Sequence cross entropy', 'Corpus entropy H(p_data)', 'KL gap', 'Noise mutual information',
      'Observation entropy', 'Samples', 'Completion of "ka"', 'Kneser–Ney 3-gram', 'GRU baseline: predictive entropy']) {
      expect(table).toContain(label);
    }
    expect(output.result.family).toBe('ssm');
    const json = JSON.parse(JSON.stringify(output));
    expect(json.result.tight.repeatBitsPerWord).toHaveLength(2);
  });

  it('fits an n-gram, saves it as a family "ngram" checkpoint and evaluates it exactly', async () => {
    const res = await runTraining(parseTrainArgs(['--corpus', corpus, '--model', 'ngram', '--order', '2', '--out', join(dir, 'ng'), '--split', '0.6,0.2,0.2'])!, quietSink);
    const ck = decodeCheckpoint(new Uint8Array(readFileSync(res.checkpointPath)));
    expect(ck.family).toBe('ngram');
    const { table, output } = await runEvaluation(parseEvaluateArgs([res.checkpointPath, ...evalArgs])!);
    expect(table).toContain('Kneser–Ney n-gram: held-out (exact)');
    expect(table).toContain('bits/char (end-of-word counted)');
    if (output.result.family !== 'ngram') throw new Error('expected an n-gram result');
    // The n-gram's probabilities over all strings sum to 1, so its mass on the corpus words is below 1 (closed form).
    expect(output.result.crossEntropy.modelMass).toBeLessThan(1);
    expect(output.result.crossEntropy.klGapBits).toBeGreaterThan(0); // Gibbs' inequality for an exact p_model
  });

  it('resumes an SSM run from its checkpoint and continues the step count', async () => {
    const first = await runTraining(parseTrainArgs(['--corpus', corpus, '--steps', '2', '--out', join(dir, 'r1'), '--eval-every', '0', ...small])!, quietSink);
    const again = await runTraining(parseTrainArgs(['--corpus', corpus, '--steps', '1', '--out', join(dir, 'r2'), '--eval-every', '0',
      '--resume', first.checkpointPath, ...small])!, quietSink);
    expect(decodeCheckpoint(new Uint8Array(readFileSync(again.checkpointPath))).step).toBe(3);
    await expect(runTraining(parseTrainArgs(['--corpus', corpus, '--model', 'gru', '--steps', '1', '--out', join(dir, 'r3'),
      '--resume', first.checkpointPath, ...small])!, quietSink)).rejects.toThrow(/holds a ssm checkpoint but --model is gru/);
  });

  it('draws the terminal progress bar with share, count and note, and prints lines elsewhere', () => {
    expect(formatDuration(75)).toBe('1m15s');
    expect(formatDuration(3725)).toBe('1h02m');
    const out: string[] = [];
    const tty = { write: (t: string) => { out.push(t); return true; }, isTTY: true };
    const bar = new ProgressBar(10, tty, 10);
    bar.update(5, 'bound 3.1 bits/char');
    bar.update(10, 'done');
    const text = out.join('');
    expect(text).toContain('[#####-----] 50% 5/10');
    expect(text).toContain('bound 3.1 bits/char');
    expect(text).toContain('[##########] 100% 10/10');
    const lines: string[] = [];
    const log = new ProgressBar(10, { write: (t: string) => { lines.push(t); return true; }, isTTY: false });
    for (let i = 1; i <= 10; i++) log.update(i, `step ${i}`);
    expect(lines).toHaveLength(10);
    expect(lines.at(-1)).toMatch(/^100% 10\/10 .* step 10\n$/);
  });

  it('refuses a corpus with characters the checkpoint never saw, with a message that says what to do', async () => {
    const other = join(dir, 'other.txt');
    writeFileSync(other, 'zebra\nquokka\n');
    const res = await runTraining(parseTrainArgs(['--corpus', corpus, '--model', 'ngram', '--out', join(dir, 'ng2'), '--split', '0.6,0.2,0.2'])!, quietSink);
    await expect(runEvaluation(parseEvaluateArgs([res.checkpointPath, '--corpus', other])!)).rejects.toThrow(/characters the model never saw/);
  });
});
