/**
 * One row of `npm run bench:science`, run in a process of its own: train with the CLI's `runTraining` (the
 * options parsed by the CLI's own parser, so every unnamed setting is the CLI default) and evaluate the
 * checkpoint with the CLI's `runEvaluation` on the test split. Writes the row's figures as JSON.
 * Usage (by science.ts): tsx bench/science/science-job.ts <job.json>
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseEvaluateArgs } from '../../shared/cli/evaluate-options';
import { runEvaluation } from '../../shared/cli/evaluate-run';
import { parseTrainArgs } from '../../shared/cli/train-options';
import { runTraining } from '../../shared/cli/train-run';
import type { ExactEvaluation, SsmEvaluation } from '../../shared/eval/evaluation-report';
import type { Budget, RunSpec } from './science-plan';

export interface JobInput {
  spec: RunSpec;
  corpusFile: string;
  outDir: string;
  resultFile: string;
  budget: Budget;
  /** GRU checkpoint of the same corpus (seed 1) for the SSM's observation entropy against the GRU's. */
  gruBaseline: string | null;
}

export interface RowFigures {
  label: string;
  group: string;
  corpus: string;
  model: string;
  seed: number;
  parameterCount: number;
  steps: number;
  trainSeconds: number;
  evaluateSeconds: number;
  /** Held-out (test split) cost in bits per character, end-of-word counted; an upper bound for the SSM, exact otherwise. */
  heldOutBitsPerChar: number;
  heldOutBitsPerWord: number;
  heldOutWords: number;
  /** SSM only: standard deviation of bits/char over the repeats of the tight estimate. */
  repeatStdBitsPerChar: number | null;
  /** Standard error of the held-out bits/char from the per-word spread (and, for the SSM, the repeats). */
  heldOutStandardErrorBitsPerChar: number | null;
  /**
   * Per scored word, in the evaluation's order (the same words for every row of a corpus and split seed): the
   * model's bits and the word's characters (end-of-word counted). For paired differences between rows; kept
   * out of science.json (bench/results/science-per-word.json holds the bits, never the words).
   */
  perWord?: { bits: number[]; characters: number[] };
  exact: boolean;
  /** H(p_data, p_model) in bits per word against the whole corpus; for the SSM the lower of its two estimates. */
  crossEntropyBits: number;
  crossEntropyEstimates: { shared: number; iwae: number | null } | null;
  dataEntropyBits: number;
  observationEntropyBits: number | null;
  /** The GRU baseline's predictive entropy on the same words (SSM rows with a baseline). */
  gruPredictiveEntropyBits: number | null;
  meanNoiseInformationBits: number | null;
  noiseInformationPerStep: { t: number; mean: number; n: number }[] | null;
}

const flags = (args: Record<string, string>) => Object.entries(args).flatMap(([k, v]) => [`--${k}`, v]);

export async function runJob(job: JobInput): Promise<RowFigures> {
  const { spec, budget } = job;
  const trainOptions = parseTrainArgs([
    '--corpus', job.corpusFile, '--model', spec.model, '--seed', String(spec.seed), '--out', job.outDir,
    // The training's own end-of-run validation is not a reported figure: a small K keeps it cheap.
    '--eval-every', '0', '--eval-k', '8', '--quiet', ...flags(spec.args),
  ]);
  if (!trainOptions) throw new Error('Internal error: no training options.');
  const trained = await runTraining(trainOptions);
  const e = budget.evaluation;
  const evalOptions = parseEvaluateArgs([
    trained.checkpointPath, '--corpus', job.corpusFile, '--held-out', 'test', '--order', '3',
    '-k', String(e.tightK), '--repeats', String(e.repeats), '--trajectories', String(e.trajectories), '--ce-k', String(e.crossEntropyK),
    '--draws', String(e.noiseDraws), '--detail-words', String(e.detailWords), '--samples', String(e.samples),
    '--max-held-out', String(e.maxHeldOut), '--seed', '1', '--per-word', join(job.outDir, 'per-word.jsonl'),
    ...(job.gruBaseline && spec.model === 'ssm' ? ['--baseline', job.gruBaseline] : []),
  ]);
  if (!evalOptions) throw new Error('Internal error: no evaluation options.');
  const t0 = performance.now();
  const { output } = await runEvaluation(evalOptions);
  const evaluateSeconds = (performance.now() - t0) / 1000;
  const perWord = readPerWord(join(job.outDir, 'per-word.jsonl'));
  const base = {
    perWord,
    label: spec.label, group: spec.group, corpus: spec.corpus, model: spec.model, seed: spec.seed,
    parameterCount: trained.metrics.parameterCount, steps: trained.metrics.steps, trainSeconds: trained.metrics.seconds, evaluateSeconds,
  };
  if (output.result.family === 'ssm') {
    const r = output.result as SsmEvaluation;
    const shared = r.crossEntropy.shared.crossEntropyBits;
    const iwae = r.crossEntropy.iwae?.crossEntropyBits ?? null;
    return {
      ...base, heldOutBitsPerChar: r.tight.bitsPerChar, heldOutBitsPerWord: r.tight.bitsPerWord, heldOutWords: countWords(r),
      repeatStdBitsPerChar: r.tight.stdBitsPerChar, heldOutStandardErrorBitsPerChar: r.tight.standardError.bitsPerChar.total, exact: false,
      crossEntropyBits: iwae === null ? shared : Math.min(shared, iwae), crossEntropyEstimates: { shared, iwae },
      dataEntropyBits: r.crossEntropy.shared.dataEntropyBits,
      observationEntropyBits: r.observationEntropy.meanBits, gruPredictiveEntropyBits: r.baselines.gru?.predictiveEntropy.meanBits ?? null,
      meanNoiseInformationBits: r.noise.meanBits, noiseInformationPerStep: r.noise.perPosition.map((p) => ({ t: p.t, mean: p.mean, n: p.n })),
    };
  }
  const r = output.result as ExactEvaluation;
  return {
    ...base, heldOutBitsPerChar: r.heldOut.bitsPerChar, heldOutBitsPerWord: r.heldOut.bitsPerWord, heldOutWords: r.heldOut.words,
    repeatStdBitsPerChar: null, heldOutStandardErrorBitsPerChar: r.heldOut.standardError?.bitsPerChar ?? null, exact: true, crossEntropyBits: r.crossEntropy.crossEntropyBits, crossEntropyEstimates: null,
    dataEntropyBits: r.crossEntropy.dataEntropyBits, observationEntropyBits: r.predictiveEntropy?.meanBits ?? null,
    gruPredictiveEntropyBits: null, meanNoiseInformationBits: null, noiseInformationPerStep: null,
  };
}

/** The evaluation's per-word file (`--per-word`): bits and characters per scored word, rounded to 1e-4 bits. */
function readPerWord(path: string): { bits: number[]; characters: number[] } | undefined {
  if (!existsSync(path)) return undefined;
  const lines = readFileSync(path, 'utf8').split('\n').filter((l) => l.trim() !== '');
  const rows = lines.map((l) => JSON.parse(l) as { bits: number; characters: number });
  return { bits: rows.map((r) => Number(r.bits.toFixed(4))), characters: rows.map((r) => r.characters) };
}

/** Held-out words of the SSM's tight estimate (the baselines were scored on the same words). */
function countWords(r: SsmEvaluation): number {
  return r.baselines.unigram.words;
}

if (process.argv[1] && process.argv[1].endsWith('science-job.ts') && process.argv[2]) {
  const job = JSON.parse(readFileSync(process.argv[2], 'utf8')) as JobInput;
  const row = await runJob(job);
  writeFileSync(job.resultFile, `${JSON.stringify(row)}\n`);
  process.stderr.write(`  done ${row.corpus} ${row.label}: ${row.heldOutBitsPerChar.toFixed(3)} bits/char held-out, ` +
    `train ${row.trainSeconds.toFixed(0)} s, evaluate ${row.evaluateSeconds.toFixed(0)} s\n`);
}
export const jobScript = (root: string) => join(root, 'bench', 'science', 'science-job.ts');
