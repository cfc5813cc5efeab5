/**
 * One evaluation of a checkpoint: decode it, build the corpus / training / held-out words, fit the Kneser–Ney
 * baseline on the training words, then `evaluateSsm` or `evaluateExact` from shared/eval/evaluation-report.ts.
 * `evaluateCheckpoint` is the part every evaluation shares: the evaluation worker (src/app/workers, through
 * `runEvaluationJob`, from the server's training set) and `npm run evaluate` (shared/cli/evaluate-run.ts, from a
 * corpus file) both call it. Framework-free: the Node parity test (tests/cross/evaluation-parity.spec.ts) calls
 * these very functions.
 */
import type { TrainingSet as CorpusTrainingSet } from '../api/runs';
import { alphabetFromChars, type WordCount } from '../data/encode';
import { splitOf, type SplitShares } from '../data/split';
import {
  evaluateExact, evaluateSsm, type EvaluationData, type EvaluationSettings, type EvaluationStageCallback, type ExactEvaluation,
  type SsmEvaluation,
} from '../eval/evaluation-report';
import { decodeCheckpoint, type Checkpoint } from '../model/checkpoint';
import { GruLanguageModel, type GruSettings } from '../model/gru-lm';
import { KneserNeyModel } from '../model/ngram-kn';
import { modelFromCheckpoint } from '../model/ssm-checkpoint';

export interface EvaluationJobInput {
  /** The checkpoint file's bytes. */
  checkpoint: Uint8Array;
  /** The corpus as the server hands it to trainers (`GET .../training-set`). */
  corpus: CorpusTrainingSet;
  /** The run's own split when it has one (else the corpus's stored split applies). */
  split: { seed: number; shares: SplitShares } | null;
  /** The split whose words are scored (`npm run evaluate --held-out`, default test; the page's settings form). */
  heldOutSplit: 'validation' | 'test';
  /** Order of the Kneser–Ney baseline fitted on the training words, 1–6 (`npm run evaluate --order`, default 3). */
  ngramOrder: number;
  settings: EvaluationSettings;
  /** A GRU checkpoint trained on the same corpus: its figures go beside the model's. */
  gruCheckpoint?: Uint8Array | null;
}

export type EvaluationJobResult = SsmEvaluation | ExactEvaluation;

/** Corpus words and their splits, from the server's parallel arrays (and the run's own split, if any). */
export function evaluationData(input: Pick<EvaluationJobInput, 'corpus' | 'split' | 'heldOutSplit'>, chars: readonly string[]): EvaluationData {
  const { corpus, split } = input;
  const known = new Set(chars);
  const words: WordCount[] = [];
  const train: WordCount[] = [];
  const heldOut: WordCount[] = [];
  corpus.words.forEach((word, i) => {
    const wc = { word, count: corpus.counts[i] as number };
    words.push(wc);
    const part = split ? splitOf(word, split.seed, split.shares) : corpus.splits[i];
    if (part === 'train') train.push(wc);
    else if (part === input.heldOutSplit) heldOut.push(wc);
  });
  const bad = words.find((w) => Array.from(w.word).some((c) => !known.has(c)));
  if (bad) {
    throw new Error(`The corpus word "${bad.word}" uses characters the model never saw; evaluate the checkpoint on the corpus it was trained on.`);
  }
  if (heldOut.length === 0) throw new Error(`The ${input.heldOutSplit} split of this corpus is empty; choose the other held-out split.`);
  if (train.length === 0) throw new Error('The training split of this corpus is empty; the baselines cannot be fitted.');
  return { alphabet: alphabetFromChars(chars), corpus: words, train, heldOut };
}

/** A GRU baseline with the checkpoint's settings and weights (disposed again if the weights do not fit). */
export function gruFrom(ck: Checkpoint): GruLanguageModel {
  const model = new GruLanguageModel(ck.settings as GruSettings, ck.seed);
  try {
    model.setWeights(ck.weights);
  } catch (e) {
    model.dispose();
    throw e;
  }
  return model;
}

/** Checks the evaluation settings a person typed (the worker rejects bad ones before any compute). */
export function checkEvaluationSettings(s: EvaluationSettings): void {
  const whole = (v: number, name: string, min: number, max: number) => {
    if (!Number.isInteger(v) || v < min || v > max) throw new Error(`${name} must be a whole number from ${min} to ${max} (got ${v}).`);
  };
  whole(s.tightK, 'K of the tight estimate', 1, 4096);
  whole(s.repeats, 'Repeats', 1, 20);
  whole(s.trajectories, 'Trajectories S', 1, 16384);
  whole(s.crossEntropyK, 'K of the second cross-entropy estimate', 0, 1024);
  whole(s.noiseDraws, 'Noise draws M', 2, 4096);
  whole(s.detailWords, 'Detail words', 1, 5000);
  whole(s.samples, 'Samples', 1, 100_000);
  whole(s.tMax, 'Longest sample', 2, 200);
  whole(s.particles, 'Particles', 1, 100_000);
  whole(s.maxHeldOut, 'Held-out words (0 = every one)', 0, 100_000); // 0 = every held-out word, as in npm run evaluate
  whole(s.seed, 'Seed', 0, 2 ** 31 - 1);
}

/** Checks the held-out split and the baseline order of a job (the range `KneserNeyModel.estimate` accepts). */
export function checkJobChoices(input: Pick<EvaluationJobInput, 'heldOutSplit' | 'ngramOrder'>): void {
  if (input.heldOutSplit !== 'validation' && input.heldOutSplit !== 'test') {
    throw new Error(`Choose the held-out split validation or test (got "${String(input.heldOutSplit)}").`);
  }
  if (!Number.isInteger(input.ngramOrder) || input.ngramOrder < 1 || input.ngramOrder > 6) {
    throw new Error(`The n-gram baseline order must be a whole number from 1 to 6 (got ${input.ngramOrder}).`);
  }
}

/**
 * The figures of one checkpoint on prepared words: the Kneser–Ney baseline of `ngramOrder` fitted on the training
 * words, and for a state-space model the optional GRU baseline beside it.
 */
export function evaluateCheckpoint(
  ck: Checkpoint, data: EvaluationData, settings: EvaluationSettings, ngramOrder: number, gruCk: Checkpoint | null = null,
  onStage?: EvaluationStageCallback,
): EvaluationJobResult {
  const ngram = KneserNeyModel.estimate(data.train, data.alphabet, { order: ngramOrder });
  if (ck.family === 'ssm') {
    if (gruCk && gruCk.family !== 'gru') throw new Error(`The baseline must be a GRU checkpoint (it holds a ${gruCk.family} model).`);
    if (gruCk && gruCk.alphabet.join('') !== ck.alphabet.join('')) throw new Error('The GRU baseline was trained with another alphabet; choose a GRU run of the same corpus.');
    const model = modelFromCheckpoint(ck);
    let gru: GruLanguageModel | undefined;
    try {
      gru = gruCk ? gruFrom(gruCk) : undefined;
      return evaluateSsm(model, data, settings, { ngram, gru }, onStage);
    } finally {
      model.dispose();
      gru?.dispose();
    }
  }
  onStage?.(0, 1, 'exact likelihood');
  if (ck.family === 'gru') {
    const model = gruFrom(ck);
    try {
      return evaluateExact('gru', model, data, settings, ngram);
    } finally {
      model.dispose();
    }
  }
  return evaluateExact('ngram', KneserNeyModel.fromJSON(ck.settings), data, settings, ngram);
}

export function runEvaluationJob(input: EvaluationJobInput, onStage?: EvaluationStageCallback): EvaluationJobResult {
  checkEvaluationSettings(input.settings);
  checkJobChoices(input);
  const ck = decodeCheckpoint(input.checkpoint);
  const data = evaluationData(input, ck.alphabet);
  const gruCk = ck.family === 'ssm' && input.gruCheckpoint ? decodeCheckpoint(input.gruCheckpoint) : null;
  return evaluateCheckpoint(ck, data, input.settings, input.ngramOrder, gruCk, onStage);
}
