/** `npm run train` as a function: load the corpus, build or resume the model, train, save checkpoint + metrics. */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { encodeBatch } from '../data/encode';
import { createBatcher } from '../data/batcher';
import { createRng } from '../data/random';
import { trainingWordsRecord } from '../data/training-words';
import { gruLogProbs, heldOutFigures, ngramLogProbs } from '../eval/baseline-figures';
import { heldOutSample } from '../eval/evaluation-report';
import { TRAINING_VALIDATION_WORDS } from '../eval/held-out-subset';
import { tightEstimate } from '../eval/tight-estimate';
import { decodeCheckpoint, encodeCheckpoint, CHECKPOINT_FORMAT_VERSION, type Checkpoint } from '../model/checkpoint';
import { GruLanguageModel, GruTrainer, type GruSettings } from '../model/gru-lm';
import { KneserNeyModel } from '../model/ngram-kn';
import { modelFromCheckpoint, restoreTrainer, ssmCheckpoint } from '../model/ssm-checkpoint';
import { StateSpaceModel } from '../model/ssm';
import { SsmTrainer } from '../model/trainer';
import { initNodeBackend } from '../node/tf-node';
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

export interface TrainMetrics {
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

const nowIso = () => new Date().toISOString();

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
  const valWords = heldOutSample(heldOut, TRAINING_VALIDATION_WORDS);
  mkdirSync(o.outDir, { recursive: true });
  const checkpointPath = join(o.outDir, 'checkpoint.nwck');
  const metricsPath = join(o.outDir, 'metrics.json');
  const curve: CurvePoint[] = [];
  const validation: ValidationPoint[] = [];
  const t0 = performance.now();
  let parameterCount = 0;
  let steps = 0;
  let words = 0;
  const save = (ck: Checkpoint) => writeFileSync(checkpointPath, encodeCheckpoint({ ...ck, trainingWords }));
  const resumeCk = o.resume ? decodeCheckpoint(new Uint8Array(readFileSync(o.resume))) : null;
  if (resumeCk && resumeCk.family !== o.model) throw new Error(`--resume holds a ${resumeCk.family} checkpoint but --model is ${o.model}.`);
  if (resumeCk && resumeCk.alphabet.join('') !== alphabet.chars.join('')) {
    throw new Error('The corpus alphabet differs from the checkpoint\'s; resume on the corpus the run was trained on.');
  }

  if (o.model === 'ngram') {
    const model = KneserNeyModel.estimate(parts.train, alphabet, { order: o.order, ...(o.discount !== null ? { discount: o.discount } : {}) });
    parameterCount = model.entryCount;
    const f = heldOutFigures(valWords, ngramLogProbs(model, valWords));
    validation.push({ step: 0, bitsPerWord: f.bitsPerWord, bitsPerChar: f.bitsPerChar, k: 0, exact: true, words: valWords.length });
    save({ formatVersion: CHECKPOINT_FORMAT_VERSION, family: 'ngram', settings: model.toJSON(), alphabet: alphabet.chars, step: 0, seed: o.seed, weights: {}, createdAt: nowIso() });
  } else {
    const rng = createRng(o.seed);
    const batcher = createBatcher(parts.train, { batchSize: o.batchSize, regime: o.regime, rng: rng.fork(`batches/${resumeCk?.step ?? 0}`) });
    const bar = o.quiet ? null : new ProgressBar(o.steps, progress);
    let runStep: () => { bits: number; isBound: boolean; exact?: boolean };
    let validate: () => ValidationPoint;
    let checkpoint: () => Checkpoint;
    let dispose: () => void;
    if (o.model === 'ssm') {
      const model = resumeCk ? modelFromCheckpoint(resumeCk) : new StateSpaceModel({
        stateSize: o.stateSize, vocabSize: alphabet.size, generativeFlow: o.generativeFlow, inferenceFlow: o.inferenceFlow,
        flowHidden: o.flowHidden, observationHidden: o.observationHidden, embeddingSize: o.embeddingSize,
        encoderSize: o.encoderSize, proposalHidden: o.proposalHidden,
      }, o.seed);
      const trainer = new SsmTrainer(model, { learningRate: o.learningRate, samples: o.samples, clipNorm: o.clipNorm, warmupSteps: o.warmupSteps });
      if (resumeCk) restoreTrainer(trainer, resumeCk);
      parameterCount = model.parameterCount;
      runStep = () => { const r = trainer.step(encodeBatch(batcher.next(), alphabet)); return { bits: r.boundBitsPerChar, isBound: r.isBound }; };
      validate = () => {
        const e = tightEstimate(model, valWords, alphabet, { k: o.evalK, seed: o.seed });
        return { step: trainer.stepCount, bitsPerWord: e.bitsPerWord, bitsPerChar: e.bitsPerChar, k: o.evalK, exact: false, words: valWords.length };
      };
      checkpoint = () => ssmCheckpoint(model, { alphabet: alphabet.chars, seed: o.seed, trainer });
      dispose = () => { trainer.dispose(); model.dispose(); };
    } else {
      const settings: GruSettings = resumeCk ? resumeCk.settings as GruSettings
        : { vocabSize: alphabet.size, stateSize: o.stateSize, embeddingSize: o.embeddingSize, observationHidden: o.observationHidden };
      const model = new GruLanguageModel(settings, o.seed);
      if (resumeCk) model.setWeights(resumeCk.weights);
      const trainer = new GruTrainer(model, { learningRate: o.learningRate, clipNorm: o.clipNorm });
      if (resumeCk?.optimizer) trainer.setOptimizerState(resumeCk.optimizer);
      parameterCount = model.parameterCount;
      runStep = () => { const r = trainer.step(encodeBatch(batcher.next(), alphabet)); return { bits: r.boundBitsPerChar, isBound: true, exact: true }; };
      validate = () => {
        const f = heldOutFigures(valWords, gruLogProbs(model, valWords, alphabet));
        return { step: trainer.stepCount, bitsPerWord: f.bitsPerWord, bitsPerChar: f.bitsPerChar, k: 0, exact: true, words: valWords.length };
      };
      checkpoint = () => ({ formatVersion: CHECKPOINT_FORMAT_VERSION, family: 'gru', settings, alphabet: alphabet.chars,
        step: trainer.stepCount, seed: o.seed, weights: model.getWeights(), optimizer: trainer.getOptimizerState(), createdAt: nowIso() });
      dispose = () => { trainer.dispose(); model.dispose(); };
    }
    try {
      for (let s = 1; s <= o.steps; s++) {
        const r = runStep();
        steps++;
        words += o.batchSize;
        const figure = r.exact ? 'exact' : r.isBound ? 'bound' : 'warm-up';
        curve.push({ step: s, bitsPerChar: -r.bits, figure });
        bar?.update(s, `${figure === 'exact' ? 'cross entropy (exact)' : figure === 'bound' ? 'cross-entropy bound' : 'warm-up figure (not a bound)'} ` +
          `${(-r.bits).toFixed(3)} bits/char (end-of-word counted)`);
        if (o.evalEvery > 0 && s % o.evalEvery === 0 && s < o.steps) validation.push(validate());
        if (o.checkpointEvery > 0 && s % o.checkpointEvery === 0) save(checkpoint());
      }
      validation.push(validate());
      save(checkpoint());
    } finally {
      bar?.stop();
      dispose();
    }
  }
  const seconds = (performance.now() - t0) / 1000;
  const { quiet: _q, ...options } = o;
  const metrics: TrainMetrics = {
    model: o.model, corpus: o.corpus, options, backend, parameterCount,
    vocabulary: { types: data.words.length, train: parts.train.length, validation: parts.validation.length, test: parts.test.length, alphabetSize: alphabet.size },
    steps, seconds, wordsPerSecond: seconds > 0 ? words / seconds : 0, curve, validation, checkpoint: checkpointPath,
  };
  writeFileSync(metricsPath, `${JSON.stringify(metrics, null, 1)}\n`);
  return { checkpointPath, metricsPath, metrics };
}
