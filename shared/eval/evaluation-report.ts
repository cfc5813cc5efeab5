/**
 * Every MODEL.md §7 figure for one trained model, as plain numbers (bits), ready for a table, a chart or JSON.
 * Framework-free: the command line, the worker and the tests call the same function.
 */
import type { Alphabet, WordCount } from '../data/encode';
import type { GruLanguageModel } from '../model/gru-lm';
import type { KneserNeyModel } from '../model/ngram-kn';
import { gruLogProbs, heldOutFigures, ngramLogProbs, type HeldOutFigures } from './baseline-figures';
import { completePrefix, type Completion } from './completion';
import { UnigramCharModel } from './corpus-entropy';
import type { SsmView } from './model-view';
import { noiseInformation, type NoiseInformation } from './noise-information';
import { noiseMap, type NoiseMap } from './noise-map';
import { gruPredictiveEntropy, ssmObservationEntropy, type ObservationEntropy } from './observation-entropy';
import { sampleReport, sampleWords, type SampleReport } from './samples';
import { crossEntropyFrom, ssmSequenceCrossEntropy, type CrossEntropyFigures, type SsmCrossEntropy } from './sequence-cross-entropy';
import { heldOutSubset } from './held-out-subset';
import { tightEstimate, type TightEstimate } from './tight-estimate';

export interface EvaluationData {
  alphabet: Alphabet;
  /** Every word of the corpus with its count (for the cross entropy against p_data). */
  corpus: WordCount[];
  train: WordCount[];
  /** Held-out words (validation or test split). */
  heldOut: WordCount[];
}

export interface EvaluationSettings {
  /** K of the tight estimate and its repeats. */
  tightK: number;
  repeats: number;
  /** Prior trajectories S for the sequence cross entropy; K for its second (IWAE) estimate (0 = skip). */
  trajectories: number;
  crossEntropyK: number;
  /** Noise draws M and the number of held-out words used for noise and observation figures. */
  noiseDraws: number;
  detailWords: number;
  samples: number;
  tMax: number;
  particles: number;
  prefixes: string[];
  /** Most held-out words scored (0 = every one); with fewer than the held-out words, a hash-random subset
   *  seeded by `seed` (shared/eval/held-out-subset.ts). */
  maxHeldOut: number;
  seed: number;
}

export const defaultEvaluationSettings: EvaluationSettings = {
  tightK: 256, repeats: 3, trajectories: 1024, crossEntropyK: 16, noiseDraws: 64, detailWords: 100, samples: 1000,
  tMax: 24, particles: 512, prefixes: [], maxHeldOut: 500, seed: 1,
};

export interface BaselineFigures {
  unigram: HeldOutFigures;
  ngram?: HeldOutFigures & { order: number; crossEntropy: Omit<CrossEntropyFigures, 'logProbs'> };
  gru?: HeldOutFigures & { crossEntropy: Omit<CrossEntropyFigures, 'logProbs'>; predictiveEntropy: ObservationEntropy };
}

export interface SsmEvaluation {
  family: 'ssm';
  tight: Omit<TightEstimate, 'perWord'>;
  crossEntropy: { shared: Omit<CrossEntropyFigures, 'logProbs'>; iwae: Omit<CrossEntropyFigures, 'logProbs'> | null; samples: number; iwaeK: number };
  noise: NoiseInformation;
  observationEntropy: ObservationEntropy;
  samples: SampleReport & { truncated: number };
  completions: Omit<Completion, 'particleStates' | 'particleWeights'>[];
  noiseMap: NoiseMap | null;
  baselines: BaselineFigures;
}

export interface ExactEvaluation {
  family: 'gru' | 'ngram';
  heldOut: HeldOutFigures;
  crossEntropy: Omit<CrossEntropyFigures, 'logProbs'>;
  predictiveEntropy?: ObservationEntropy;
  baselines: BaselineFigures;
}

const strip = <T extends { logProbs: Float64Array }>(x: T): Omit<T, 'logProbs'> => {
  const { logProbs: _drop, ...rest } = x;
  return rest;
};

/** The held-out words actually scored: all of them, or a hash-random subset of `max` (see held-out-subset.ts). */
export function heldOutSample(heldOut: readonly WordCount[], max: number, seed = 1): string[] {
  return heldOutSubset(heldOut, max, seed);
}

/** Baseline figures on the held-out `words`; the GRU's predictive entropy on `detail` (the words of the SSM's entropy figures). */
export function baselineFigures(data: EvaluationData, words: string[], ngram?: KneserNeyModel, gru?: GruLanguageModel,
                                detail: string[] = words.slice(0, 100)): BaselineFigures {
  const uni = new UnigramCharModel(data.train, data.alphabet);
  const out: BaselineFigures = { unigram: heldOutFigures(words, words.map((w) => uni.logProb(w))) };
  const corpusWords = data.corpus.map((w) => w.word);
  if (ngram) {
    out.ngram = {
      ...heldOutFigures(words, ngramLogProbs(ngram, words)), order: ngram.order,
      crossEntropy: strip(crossEntropyFrom(data.corpus, ngramLogProbs(ngram, corpusWords))),
    };
  }
  if (gru) {
    out.gru = {
      ...heldOutFigures(words, gruLogProbs(gru, words, data.alphabet)),
      crossEntropy: strip(crossEntropyFrom(data.corpus, gruLogProbs(gru, corpusWords, data.alphabet))),
      predictiveEntropy: gruPredictiveEntropy(gru, detail, data.alphabet),
    };
  }
  return out;
}

/** Called between the figures of `evaluateSsm` (done of total, and the figure about to be computed). */
export type EvaluationStageCallback = (done: number, total: number, next: string) => void;

export function evaluateSsm(model: SsmView, data: EvaluationData, s: EvaluationSettings,
                            baselines: { ngram?: KneserNeyModel; gru?: GruLanguageModel } = {},
                            onStage: EvaluationStageCallback = () => {},
                            onPerWord?: (perWord: TightEstimate['perWord']) => void): SsmEvaluation {
  const total = 7;
  const words = heldOutSample(data.heldOut, s.maxHeldOut, s.seed);
  const detail = words.slice(0, s.detailWords);
  onStage(0, total, 'tight estimate');
  const { perWord, ...tight } = tightEstimate(model, words, data.alphabet, { k: s.tightK, repeats: s.repeats, seed: s.seed });
  onPerWord?.(perWord);
  onStage(1, total, 'sequence cross entropy');
  const ce: SsmCrossEntropy = ssmSequenceCrossEntropy(model, data.corpus, data.alphabet,
    { samples: s.trajectories, iwaeK: s.crossEntropyK, seed: s.seed });
  onStage(2, total, 'samples');
  const sampled = sampleWords(model, data.alphabet, { n: s.samples, tMax: s.tMax, seed: s.seed });
  const trainSet = new Set(data.train.map((w) => w.word));
  const heldSet = new Set(data.heldOut.map((w) => w.word));
  onStage(3, total, 'completions');
  const completions = s.prefixes.map((prefix) => {
    const { particleStates: _a, particleWeights: _b, ...c } = completePrefix(model, data.alphabet, prefix,
      { particles: s.particles, tMax: s.tMax, seed: s.seed });
    return { ...c, continuations: c.continuations.slice(0, 20) };
  });
  const first = completions[0];
  onStage(4, total, 'noise mutual information');
  const noise = noiseInformation(model, detail, data.alphabet, { draws: s.noiseDraws, seed: s.seed });
  onStage(5, total, 'observation entropy');
  const observationEntropy = ssmObservationEntropy(model, detail, data.alphabet, { seed: s.seed });
  onStage(6, total, 'noise map and baselines');
  const out: SsmEvaluation = {
    family: 'ssm',
    tight,
    crossEntropy: { shared: strip(ce.shared), iwae: ce.iwae ? strip(ce.iwae) : null, samples: ce.samples, iwaeK: ce.iwaeK },
    noise,
    observationEntropy,
    samples: { ...sampleReport(sampled.words, trainSet, heldSet, data.corpus), truncated: sampled.truncated },
    completions,
    noiseMap: noiseMapAt(model, data, first?.meanState),
    baselines: baselineFigures(data, words, baselines.ngram, baselines.gru, detail),
  };
  onStage(total, total, 'done');
  return out;
}

export function evaluateExact(family: 'gru' | 'ngram', model: GruLanguageModel | KneserNeyModel, data: EvaluationData,
                              s: EvaluationSettings, ngramBaseline?: KneserNeyModel): ExactEvaluation {
  const words = heldOutSample(data.heldOut, s.maxHeldOut, s.seed);
  const corpusWords = data.corpus.map((w) => w.word);
  const lp = (ws: string[]) => (family === 'gru'
    ? gruLogProbs(model as GruLanguageModel, ws, data.alphabet) : ngramLogProbs(model as KneserNeyModel, ws));
  return {
    family,
    heldOut: heldOutFigures(words, lp(words)),
    crossEntropy: strip(crossEntropyFrom(data.corpus, lp(corpusWords))),
    ...(family === 'gru' ? { predictiveEntropy: gruPredictiveEntropy(model as GruLanguageModel, words.slice(0, s.detailWords), data.alphabet) } : {}),
    baselines: baselineFigures(data, words, ngramBaseline, undefined, words.slice(0, s.detailWords)),
  };
}

/** Noise-map grid over noise dimensions 0 and 1 at the filter's mean state after the first prefix, or at h_0. */
function noiseMapAt(model: SsmView, data: EvaluationData, state?: number[]): NoiseMap | null {
  let from = state;
  if (!from) {
    const h0 = model.initialState();
    from = Array.from(h0.dataSync());
    h0.dispose();
  }
  return from.length >= 2 ? noiseMap(model, data.alphabet, from, { mode: 'grid', dims: [0, 1], steps: 21, range: 3 }) : null;
}
