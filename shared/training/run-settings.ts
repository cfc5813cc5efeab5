/**
 * From a stored run (its DTO, or the job a runner claimed) and its corpus's training set to what the training
 * engine needs: the page's scheduler and the runner program use the same mapping.
 */
import type { GruRunSettings, NgramRunSettings, RunDto, SsmRunSettings, TrainingSet as CorpusTrainingSet } from '../api/runs';
import { splitOf } from '../data/split';
import type { TrainerSettings, TrainingSet } from './training-types';

/**
 * Stand-ins for training settings a stored run lacks: what the trainer did before the setting existed (so an older
 * run resumes as it started). The form, presets, grids, learnability check and command line send every setting
 * explicitly (NEW_RUN_TRAINING_DEFAULTS in shared/model/settings-rules.ts).
 */
const DEFAULT_TRAINING = { steps: 1, batchSize: 64, samples: 8, learningRate: 0.01, clipNorm: 0, warmupSteps: 0, regime: 'token' as const, seed: 1, evalEvery: 100, observationInitScale: 1 };

export function trainerSettingsOf(run: Pick<RunDto, 'family' | 'settings'>): TrainerSettings {
  const t = { ...DEFAULT_TRAINING, ...(run.settings.training ?? {}) };
  const base: TrainerSettings = {
    family: run.family, stateSize: 8, generativeFlow: ['diag'], inferenceFlow: ['diag'], flowHidden: 32, encoderSize: 32,
    embeddingSize: 16, proposalHidden: 32, observationHidden: 0, samples: t.samples, batchSize: t.batchSize, steps: t.steps,
    learningRate: t.learningRate, clipNorm: t.clipNorm, warmupSteps: t.warmupSteps, observationInitScale: t.observationInitScale, regime: t.regime, seed: t.seed, order: 3,
    evalEvery: t.evalEvery,
  };
  if (run.family === 'ssm') {
    const m = (run.settings as SsmRunSettings).model;
    return {
      ...base, stateSize: m.stateSize, generativeFlow: m.generativeFlow.map((l) => l.kind), inferenceFlow: m.inferenceFlow.map((l) => l.kind),
      flowHidden: m.flowHidden, encoderSize: m.encoderSize, embeddingSize: m.embeddingSize, proposalHidden: m.proposalHidden,
      observationHidden: m.observationHidden,
    };
  }
  if (run.family === 'gru') {
    const m = (run.settings as GruRunSettings).model;
    return { ...base, stateSize: m.stateSize, embeddingSize: m.embeddingSize, observationHidden: m.observationHidden };
  }
  const m = (run.settings as NgramRunSettings).model;
  return { ...base, order: m.order, discount: m.discount ?? null, steps: 0 };
}

/**
 * The words a run trains and validates on: the corpus's split, or the run's own split seed and shares when the
 * run was created with one (the split is a stable hash of word and seed, so both sides agree).
 */
export function trainingSetOf(run: Pick<RunDto, 'settings' | 'alphabet'>, corpus: CorpusTrainingSet): TrainingSet {
  const own = run.settings.split;
  const train: TrainingSet['train'] = [];
  const validation: TrainingSet['validation'] = [];
  corpus.words.forEach((word, i) => {
    const part = own ? splitOf(word, own.seed, own.shares) : corpus.splits[i];
    const wc = { word, count: corpus.counts[i] as number };
    if (part === 'train') train.push(wc);
    else if (part === 'validation') validation.push(wc);
  });
  const alphabet = run.alphabet.length > 0 ? run.alphabet : corpus.alphabet;
  return { alphabet, train, validation };
}
