/**
 * One training engine per model family behind a common shape, so the worker loop does not care which family
 * it trains: the stochastic state-space model (IWAE bound), the teacher-forced GRU baseline (exact
 * likelihood) and the Kneser–Ney n-gram (closed-form fit, no steps). All figures use the shared/ model and
 * shared/eval estimators; budgets here are small because they run every `evalEvery` steps during training.
 */
import * as tf from '@tensorflow/tfjs-core';
import { createBatcher, type Batcher } from '../data/batcher';
import { alphabetFromChars, encodeBatch, type Alphabet } from '../data/encode';
import { createRng, type Rng } from '../data/random';
import { gruLogProbs, heldOutFigures, ngramLogProbs } from '../eval/baseline-figures';
import { heldOutSample } from '../eval/evaluation-report';
import { LIVE_VALIDATION_WORDS } from '../eval/held-out-subset';
import { noiseInformation } from '../eval/noise-information';
import { gruPredictiveEntropy, ssmObservationEntropy } from '../eval/observation-entropy';
import { drawCategorical, sampleWords } from '../eval/samples';
import { tightEstimate } from '../eval/tight-estimate';
import { CHECKPOINT_FORMAT_VERSION, type Checkpoint } from '../model/checkpoint';
import { GruLanguageModel, GruTrainer, type GruSettings } from '../model/gru-lm';
import { KneserNeyModel } from '../model/ngram-kn';
import { modelFromCheckpoint, restoreTrainer, ssmCheckpoint } from '../model/ssm-checkpoint';
import { StateSpaceModel } from '../model/ssm';
import { SsmTrainer } from '../model/trainer';
import { TrainerError, TrainerErrorCode } from '../model/trainer-errors';
import { applyObservationInitScale } from './observation-init';
import type { EvaluationFigures, TrainerSettings, TrainingSet } from './training-types';

/** Validation budgets during training (the tight estimate of the evaluation page uses far larger ones). */
export const LIVE_EVAL = { words: LIVE_VALIDATION_WORDS, k: 16, miWords: 12, miDraws: 64, entropyWords: 32, samples: 6 } as const;

/**
 * How the validation figures are measured. `live` (the app and the runners): LIVE_EVAL budgets, every figure,
 * a fresh seed per step. `bound` (`npm run train`): only the held-out bound over `words` words with `k` samples
 * and the run's seed; entropy, noise information and samples are left out (null / empty).
 */
export type ValidationBudget = { kind: 'live' } | { kind: 'bound'; words: number; k: number };

/** `bitsPerChar`: minus the step's training bound (or exact log-likelihood) per character, bits — a cost, lower is better. */
export interface StepFigures { bitsPerChar: number; isBound: boolean }

export interface RunEngine {
  readonly parameterCount: number;
  readonly stepCount: number;
  /** True for families without optimisation steps (the n-gram is fitted in `create`). */
  readonly closedForm: boolean;
  step(): StepFigures;
  evaluate(): EvaluationFigures;
  checkpoint(): Checkpoint;
  samples(n: number): string[];
  dispose(): void;
}

const longestWord = (set: TrainingSet) => set.train.reduce((m, w) => Math.max(m, Array.from(w.word).length), 1);

/** Builds the engine for a run: fresh from the seed or from a decoded checkpoint (validated against the run). */
export function createEngine(s: TrainerSettings, set: TrainingSet, ck: Checkpoint | null, budget: ValidationBudget = { kind: 'live' }): RunEngine {
  if (set.train.length === 0) {
    throw new TrainerError(TrainerErrorCode.BadSettings, 'The training split of this corpus is empty; raise the training share or use a larger corpus.');
  }
  const alphabet = alphabetFromChars(set.alphabet);
  if (ck) {
    if (ck.family !== s.family) {
      throw new TrainerError(TrainerErrorCode.BadCheckpoint, `This checkpoint holds a ${ck.family} model but the run trains a ${s.family} model; pick a checkpoint of this run.`);
    }
    if (ck.alphabet.join('') !== alphabet.chars.join('')) {
      throw new TrainerError(TrainerErrorCode.BadCheckpoint, 'The checkpoint was trained on a different alphabet than this corpus; resume it on the corpus the run was trained on.');
    }
  }
  const heldOut = set.validation.length > 0 ? set.validation : set.train;
  const ctx: EngineContext = {
    s, set, alphabet, rng: createRng(s.seed), budget,
    valWords: heldOutSample(heldOut, budget.kind === 'bound' ? budget.words : LIVE_EVAL.words),
    tMax: longestWord(set) + 4,
  };
  if (s.family === 'ngram') return ngramEngine(ctx);
  if (s.family === 'gru') return gruEngine(ctx, ck);
  return ssmEngine(ctx, ck);
}

interface EngineContext {
  s: TrainerSettings;
  set: TrainingSet;
  alphabet: Alphabet;
  rng: Rng;
  budget: ValidationBudget;
  valWords: string[];
  tMax: number;
}

function batcherFor(c: EngineContext, startStep: number): Batcher {
  // The batch stream of a resumed run is forked by its start step, as in the command-line trainer.
  return createBatcher(c.set.train, { batchSize: c.s.batchSize, regime: c.s.regime, rng: c.rng.fork(`batches/${startStep}`) });
}

function ssmEngine(c: EngineContext, ck: Checkpoint | null): RunEngine {
  const { s, alphabet } = c;
  const model = ck ? modelFromCheckpoint(ck) : new StateSpaceModel({
    stateSize: s.stateSize, vocabSize: alphabet.size,
    generativeFlow: s.generativeFlow.map((kind) => ({ kind })), inferenceFlow: s.inferenceFlow.map((kind) => ({ kind })),
    flowHidden: s.flowHidden, observationHidden: s.observationHidden, embeddingSize: s.embeddingSize,
    encoderSize: s.encoderSize, proposalHidden: s.proposalHidden,
  }, s.seed);
  let trainer: SsmTrainer;
  try {
    if (!ck) applyObservationInitScale(model, s.observationInitScale ?? 1);
    trainer = new SsmTrainer(model, { learningRate: s.learningRate, samples: s.samples, clipNorm: s.clipNorm, warmupSteps: s.warmupSteps });
    if (ck) restoreTrainer(trainer, ck);
  } catch (e) {
    model.dispose();
    throw e;
  }
  const batcher = batcherFor(c, trainer.stepCount);
  return {
    parameterCount: model.parameterCount,
    get stepCount() { return trainer.stepCount; },
    closedForm: false,
    step() {
      const r = trainer.step(encodeBatch(batcher.next(), alphabet));
      return { bitsPerChar: -r.boundBitsPerChar, isBound: r.isBound };
    },
    evaluate() {
      const step = trainer.stepCount;
      if (c.budget.kind === 'bound') {
        const e = tightEstimate(model, c.valWords, alphabet, { k: c.budget.k, seed: s.seed });
        return { step, validationBitsPerChar: e.bitsPerChar, validationBitsPerWord: e.bitsPerWord, observationEntropyBits: null, noiseInformationBits: null, samples: [] };
      }
      const seed = createRng(s.seed).fork(`live-eval/${step}`).seed();
      const est = tightEstimate(model, c.valWords, alphabet, { k: LIVE_EVAL.k, seed, sampleChunk: LIVE_EVAL.k });
      const ent = ssmObservationEntropy(model, c.valWords.slice(0, LIVE_EVAL.entropyWords), alphabet, { k: 4, seed });
      const mi = noiseInformation(model, c.valWords.slice(0, LIVE_EVAL.miWords), alphabet, { draws: LIVE_EVAL.miDraws, k: 4, seed });
      return {
        step, validationBitsPerChar: est.bitsPerChar, validationBitsPerWord: est.bitsPerWord,
        observationEntropyBits: ent.meanBits, noiseInformationBits: mi.meanBits,
        samples: sampleWords(model, alphabet, { n: LIVE_EVAL.samples, tMax: c.tMax, seed }).words,
      };
    },
    checkpoint: () => ssmCheckpoint(model, { alphabet: alphabet.chars, seed: s.seed, trainer }),
    samples: (n) => sampleWords(model, alphabet, { n, tMax: c.tMax, seed: model.nextSeed() }).words,
    dispose() { trainer.dispose(); model.dispose(); },
  };
}

function gruEngine(c: EngineContext, ck: Checkpoint | null): RunEngine {
  const { s, alphabet } = c;
  const settings: GruSettings = ck ? (ck.settings as GruSettings)
    : { vocabSize: alphabet.size, stateSize: s.stateSize, embeddingSize: s.embeddingSize, observationHidden: s.observationHidden };
  const model = new GruLanguageModel(settings, s.seed);
  let trainer: GruTrainer;
  try {
    if (ck) model.setWeights(ck.weights);
    trainer = new GruTrainer(model, { learningRate: s.learningRate, clipNorm: s.clipNorm });
    if (ck?.optimizer) trainer.setOptimizerState(ck.optimizer);
  } catch (e) {
    model.dispose();
    throw e;
  }
  const batcher = batcherFor(c, trainer.stepCount);
  const sampleRng = c.rng.fork('gru-samples');
  return {
    parameterCount: model.parameterCount,
    get stepCount() { return trainer.stepCount; },
    closedForm: false,
    step() {
      const r = trainer.step(encodeBatch(batcher.next(), alphabet));
      return { bitsPerChar: -r.boundBitsPerChar, isBound: true };
    },
    evaluate() {
      const f = heldOutFigures(c.valWords, gruLogProbs(model, c.valWords, alphabet));
      if (c.budget.kind === 'bound') {
        return { step: trainer.stepCount, validationBitsPerChar: f.bitsPerChar, validationBitsPerWord: f.bitsPerWord, observationEntropyBits: null, noiseInformationBits: null, samples: [] };
      }
      const ent = gruPredictiveEntropy(model, c.valWords.slice(0, LIVE_EVAL.entropyWords), alphabet);
      return {
        step: trainer.stepCount, validationBitsPerChar: f.bitsPerChar, validationBitsPerWord: f.bitsPerWord,
        observationEntropyBits: ent.meanBits, noiseInformationBits: null,
        samples: gruSamples(model, alphabet, LIVE_EVAL.samples, c.tMax, sampleRng),
      };
    },
    checkpoint: () => ({
      formatVersion: CHECKPOINT_FORMAT_VERSION, family: 'gru', settings, alphabet: alphabet.chars, step: trainer.stepCount,
      seed: s.seed, weights: model.getWeights(), optimizer: trainer.getOptimizerState(), createdAt: new Date().toISOString(),
    }),
    samples: (n) => gruSamples(model, alphabet, n, c.tMax, sampleRng),
    dispose() { trainer.dispose(); model.dispose(); },
  };
}

/**
 * Ancestral samples from the teacher-forced GRU: extend every unfinished prefix by one character drawn from
 * p(. | prefix) (the row after the prefix's last character of the teacher-forced pass), until EOW or tMax.
 */
export function gruSamples(model: GruLanguageModel, alphabet: Alphabet, n: number, tMax: number, rng: Rng): string[] {
  const words = new Array<string>(n).fill('');
  const open = new Set(Array.from({ length: n }, (_, i) => i));
  const v = alphabet.size;
  for (let t = 0; t < tMax && open.size > 0; t++) {
    const ids = [...open];
    const batch = encodeBatch(ids.map((i) => words[i] as string), alphabet);
    const probs = tf.tidy(() => tf.exp(model.predictiveLogProbs(batch)));
    const p = probs.dataSync();
    probs.dispose();
    ids.forEach((i, b) => {
      const row = b * batch.maxLen + Array.from(words[i] as string).length;
      const cId = drawCategorical(p, row * v, v, rng.next());
      if (cId === 0) open.delete(i);
      else words[i] += alphabet.chars[cId - 1];
    });
  }
  return words;
}

function ngramEngine(c: EngineContext): RunEngine {
  const { s, alphabet } = c;
  const model = KneserNeyModel.estimate(c.set.train, alphabet, { order: s.order, ...(s.discount != null ? { discount: s.discount } : {}) });
  const rng = c.rng.fork('ngram-samples');
  const sample = (n: number) => Array.from({ length: n }, () => {
    let word = '';
    for (let t = 0; t < c.tMax; t++) {
      const p = model.nextDistribution(word);
      const id = drawCategorical(p, 0, p.length, rng.next());
      if (id === 0) break;
      word += alphabet.chars[id - 1];
    }
    return word;
  });
  return {
    parameterCount: model.entryCount,
    stepCount: 0,
    closedForm: true,
    step: () => { throw new TrainerError(TrainerErrorCode.WrongState, 'An n-gram model is fitted in one go; it has no training steps.'); },
    evaluate() {
      const f = heldOutFigures(c.valWords, ngramLogProbs(model, c.valWords));
      return {
        step: 0, validationBitsPerChar: f.bitsPerChar, validationBitsPerWord: f.bitsPerWord,
        observationEntropyBits: null, noiseInformationBits: null, samples: c.budget.kind === 'bound' ? [] : sample(LIVE_EVAL.samples),
      };
    },
    checkpoint: () => ({
      formatVersion: CHECKPOINT_FORMAT_VERSION, family: 'ngram', settings: model.toJSON(), alphabet: alphabet.chars,
      step: 0, seed: s.seed, weights: {}, createdAt: new Date().toISOString(),
    }),
    samples: sample,
    dispose() { /* plain JavaScript tables: nothing to free */ },
  };
}
