/**
 * Hand-written evaluation figures in the shape `evaluateSsm` produces (shared/eval/evaluation-report.ts),
 * for the server specs: the server stores and returns figures, it does not compute them, so invented
 * numbers are enough. None of them is an expected result of our own estimators.
 */
import type { CreateEvaluationRequest } from '../../../shared/api/evaluations';

export function ssmResultsFixture(): CreateEvaluationRequest['results'] {
  const ce = { crossEntropyBits: 9.25, dataEntropyBits: 8.5, klGapBits: 0.75, modelMass: 0.62 };
  return {
    family: 'ssm',
    tight: { k: 256, repeats: 3, bitsPerWord: 11.5, bitsPerChar: 2.3, repeatBitsPerWord: [11.4, 11.5, 11.6], repeatBitsPerChar: [2.28, 2.3, 2.32], stdBitsPerWord: 0.1, stdBitsPerChar: 0.02 },
    crossEntropy: { shared: ce, iwae: { ...ce, crossEntropyBits: 9.3, klGapBits: 0.8 }, samples: 1024, iwaeK: 16 },
    noise: {
      draws: 64,
      perWord: [{ word: 'abba', bits: [0.5, 0.25, 0.125, 0.1, 0] }],
      perPosition: [{ t: 0, mean: 0.5, min: 0.5, q1: 0.5, median: 0.5, q3: 0.5, max: 0.5, n: 1 }, { t: 1, mean: 0.25, min: 0.25, q1: 0.25, median: 0.25, q3: 0.25, max: 0.25, n: 1 }],
      meanBits: 0.195,
      maxBits: 2,
    },
    observationEntropy: { meanBits: 1.1, perWord: [{ word: 'abba', bits: 1.1 }] },
    samples: {
      count: 10,
      shares: { train: 0.5, heldOut: 0.2, novel: 0.3 },
      lengthHistogram: { samples: [0, 0.1, 0.4, 0.5], corpusTokens: [0, 0.2, 0.3, 0.5], corpusTypes: [0, 0.25, 0.25, 0.5] },
      top: [{ word: 'abba', count: 3, source: 'train' }, { word: 'cabc', count: 1, source: 'novel' }],
      truncated: 0,
    },
    completions: [{ prefix: 'ab', logPrefix: -1.5, effectiveSampleSize: 300.5, continuations: [{ word: 'abba', continuation: 'ba', weight: 0.75, ended: true }, { word: 'abc', continuation: 'c', weight: 0.25, ended: true }], meanState: [0.1, -0.2] }],
    noiseMap: { dims: [0, 1], from: [0.1, -0.2], points: [{ noise: [-3, -3], state: [0.5, 0.25], char: 'a', prob: 0.6 }, { noise: [3, 3], state: [1, 2], char: null, prob: 0.4 }] },
    baselines: { unigram: { bitsPerWord: 14, bitsPerChar: 2.9, words: 3 }, gru: { bitsPerWord: 11.2, bitsPerChar: 2.25, words: 3, crossEntropy: ce, predictiveEntropy: { meanBits: 1.2, perWord: [{ word: 'abba', bits: 1.2 }] } } },
  };
}
