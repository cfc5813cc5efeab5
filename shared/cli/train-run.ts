/** `npm run train` as a function: load the corpus, build or resume the model, train, save checkpoint + metrics. */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { trainingWordsRecord } from '../data/training-words';
import { TRAINING_VALIDATION_WORDS } from '../eval/held-out-subset';
import { decodeCheckpoint, encodeCheckpoint } from '../model/checkpoint';
import { toTrainerError } from '../model/trainer-errors';
import { initNodeBackend } from '../node/tf-node';
import { createEngine, type RunEngine } from '../training/run-engines';
import { runTrainingLoop } from '../training/training-loop';
import type { TrainerSettings } from '../training/training-types';
import { loadCorpus } from './corpus-file';
import { loadHeldOutFile } from './word-file';
import { ProgressBar, type ProgressSink } from './progress-bar';
import type { TrainOptions } from './train-options';

/**
 * One training step's figure on its batch, as a positive cost in bits/char (end-of-word counted): `figure` says
 * whether it is the IWAE bound (SSM), the exact teacher-forced cross entropy (GRU), or a warm-up figure that is
 * not a bound.
 */
export interface CurvePoint { step: number; bitsPerChar: number; figure: 'bound' | 'exact' | 'warm-up' }
/** Held-out figure (positive costs, bits/char with end-of-word counted): `exact` for GRU and n-gram, an IWAE estimate with K = k for the SSM. */
export interface ValidationPoint { step: number; bitsPerWord: number; bitsPerChar: number; k: number; exact: boolean; words: number }

/** What the figures of metrics.json are: one sign convention (positive costs) and the units. */
export const METRICS_UNITS = {
  bitsPerChar: 'bits/char (end-of-word counted)',
  bitsPerWord: 'bits/word',
  convention: 'positive costs (minus log-likelihood in bits): lower is better; figure "exact" (GRU, n-gram) is never a bound',
} as const;

export interface TrainMetrics {
  units: typeof METRICS_UNITS;
  model: TrainOptions['model'];
  corpus: string;
  options: Omit<TrainOptions, 'quiet'>;
  backend: string;
  parameterCount: number;
  vocabulary: { types: number; train: number; validation: number; test: number; alphabetSize: number };
  steps: number;
  seconds: number;
  wordsPerSecond: number;
  curve: CurvePoint[];
  validation: ValidationPoint[];
  checkpoint: string;
}

export interface TrainResult { checkpointPath: string; metricsPath: string; metrics: TrainMetrics }

/** The engine settings of the command line's options; `totalSteps` counts the steps of a resumed checkpoint too. */
function trainerSettingsOfOptions(o: TrainOptions, totalSteps: number): TrainerSettings {
  return {
    family: o.model, stateSize: o.stateSize, generativeFlow: o.generativeFlow.map((l) => l.kind), inferenceFlow: o.inferenceFlow.map((l) => l.kind),
    flowHidden: o.flowHidden, encoderSize: o.encoderSize, embeddingSize: o.embeddingSize, proposalHidden: o.proposalHidden,
    observationHidden: o.observationHidden, samples: o.samples, batchSize: o.batchSize, steps: totalSteps, learningRate: o.learningRate,
    clipNorm: o.clipNorm, warmupSteps: o.warmupSteps, observationInitScale: o.observationInitScale, regime: o.regime, seed: o.seed, order: o.order, discount: o.discount, evalEvery: o.evalEvery,
  };
}

export async function runTraining(o: TrainOptions, progress: ProgressSink = process.stderr): Promise<TrainResult> {
  const backend = await initNodeBackend(o.backend);
  const data = loadCorpus(o.corpus, {
    splitSeed: o.splitSeed, shares: o.shares,
    parse: { normalise: { lowerCase: !o.keepCase, nfc: true, stripDiacritics: false, outsideAlphabet: 'drop-word', ...(o.allowedChars ? { allowedChars: o.allowedChars } : {}) } },
  });
  const { alphabet, parts } = data;
  if (parts.train.length === 0) throw new Error('The training split is empty; raise the train share (--split) or use a larger corpus.');
  const heldOut = o.validationFile ? loadHeldOutFile(o.validationFile, alphabet, { keepCase: o.keepCase, option: '--validation-file' })
    : parts.validation.length > 0 ? parts.validation : parts.test;
  if (heldOut.length === 0) throw new Error('There are no validation words: give --validation-file or a validation/test share in --split.');
  const trainingWords = trainingWordsRecord(parts.train, { corpus: basename(o.corpus), splitSeed: o.splitSeed, shares: o.shares,
    keepCase: o.keepCase, allowedChars: o.allowedChars, validationFile: o.validationFile ? basename(o.validationFile) : null });
  mkdirSync(o.outDir, { recursive: true });
  const checkpointPath = join(o.outDir, 'checkpoint.nwck');
  const metricsPath = join(o.outDir, 'metrics.json');
  const curve: CurvePoint[] = [];
  const validation: ValidationPoint[] = [];
  const t0 = performance.now();
  let parameterCount = 0;
  let steps = 0;
  let words = 0;
  const resumeCk = o.resume ? decodeCheckpoint(new Uint8Array(readFileSync(o.resume))) : null;
  if (resumeCk && resumeCk.family !== o.model) throw new Error(`--resume holds a ${resumeCk.family} checkpoint but --model is ${o.model}.`);
  if (resumeCk && resumeCk.alphabet.join('') !== alphabet.chars.join('')) {
    throw new Error('The corpus alphabet differs from the checkpoint\'s; resume on the corpus the run was trained on.');
  }
  const startStep = resumeCk?.step ?? 0;
  const settings = trainerSettingsOfOptions(o, o.model === 'ngram' ? 0 : startStep + o.steps);
  const exact = o.model !== 'ssm';
  const validationWords = Math.min(heldOut.length, TRAINING_VALIDATION_WORDS);
  // The shared engine and loop (shared/training), as in the browser worker and the runners; the held-out bound
  // here uses the command line's own budget (--eval-k, a hash-random subset of TRAINING_VALIDATION_WORDS words).
  let engine: RunEngine;
  try {
    engine = createEngine(settings, { alphabet: alphabet.chars, train: parts.train, validation: heldOut }, resumeCk,
      { kind: 'bound', words: TRAINING_VALIDATION_WORDS, k: o.evalK });
  } catch (e) {
    throw new Error(toTrainerError(e).message);
  }
  parameterCount = engine.parameterCount;
  const bar = o.quiet || engine.closedForm ? null : new ProgressBar(o.steps, progress);
  try {
    const outcome = await runTrainingLoop(engine, settings, {
      progressEveryMs: 0,
      checkpointEvery: o.checkpointEvery,
      saveCheckpoint: async () => writeFileSync(checkpointPath, encodeCheckpoint({ ...engine.checkpoint(), trainingWords })),
      onStep: (step, f) => {
        steps++;
        words += o.batchSize;
        const figure = exact ? 'exact' : f.isBound ? 'bound' : 'warm-up';
        curve.push({ step, bitsPerChar: f.bitsPerChar, figure });
        bar?.update(step - startStep, `${figure === 'exact' ? 'cross entropy (exact)' : figure === 'bound' ? 'cross-entropy bound' : 'warm-up figure (not a bound)'} ` +
          `${f.bitsPerChar.toFixed(3)} bits/char (end-of-word counted)`);
      },
      onProgress: (p) => {
        const e = p.evaluation;
        if (e) validation.push({ step: e.step, bitsPerWord: e.validationBitsPerWord, bitsPerChar: e.validationBitsPerChar, k: exact ? 0 : o.evalK, exact, words: validationWords });
      },
    });
    if (outcome.kind === 'failed') throw new Error(outcome.error.message);
  } finally {
    bar?.stop();
    engine.dispose();
  }
  const seconds = (performance.now() - t0) / 1000;
  const { quiet: _q, ...options } = o;
  const metrics: TrainMetrics = {
    units: METRICS_UNITS, model: o.model, corpus: o.corpus, options, backend, parameterCount,
    vocabulary: { types: data.words.length, train: parts.train.length, validation: parts.validation.length, test: parts.test.length, alphabetSize: alphabet.size },
    steps, seconds, wordsPerSecond: seconds > 0 ? words / seconds : 0, curve, validation, checkpoint: checkpointPath,
  };
  writeFileSync(metricsPath, `${JSON.stringify(metrics, null, 1)}\n`);
  return { checkpointPath, metricsPath, metrics };
}
