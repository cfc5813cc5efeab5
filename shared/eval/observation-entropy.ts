/**
 * Observation entropy (MODEL.md §7): the mean over steps of H(p(. | h_t)) along posterior trajectories of the
 * evaluation words, beside the GRU baseline's predictive entropy H(p(. | w_<t)) on the same words.
 */
import * as tf from '@tensorflow/tfjs-core';
import { encodeBatch, type Alphabet } from '../data/encode';
import type { GruLanguageModel } from '../model/gru-lm';
import type { SsmView } from './model-view';
import { mapRowBlocks, posteriorRows } from './posterior-states';
import { chunkRanges, natsToBits } from './units';

/** Entropy of each row of log-probabilities [N, V] → [N], nats. */
export function rowEntropy(logProbs: tf.Tensor2D): tf.Tensor1D {
  return tf.tidy(() => tf.neg(tf.sum(tf.mul(tf.exp(logProbs), logProbs), 1)) as tf.Tensor1D);
}

export interface ObservationEntropy {
  /** Mean over all (word, step) pairs, bits. */
  meanBits: number;
  /** Mean over the steps of each word, bits. */
  perWord: { word: string; bits: number }[];
}

function summarise(words: readonly string[], wordOf: ArrayLike<number>, values: ArrayLike<number>): ObservationEntropy {
  const sum = new Float64Array(words.length);
  const cnt = new Float64Array(words.length);
  let total = 0;
  for (let i = 0; i < values.length; i++) {
    const w = wordOf[i] as number;
    sum[w] = (sum[w] as number) + (values[i] as number);
    cnt[w] = (cnt[w] as number) + 1;
    total += values[i] as number;
  }
  return {
    meanBits: natsToBits(total / values.length),
    perWord: words.map((word, i) => ({ word, bits: natsToBits((sum[i] as number) / (cnt[i] as number)) })),
  };
}

export function ssmObservationEntropy(model: SsmView, words: readonly string[], alphabet: Alphabet,
                                      opts: { k?: number; seed: number }): ObservationEntropy {
  if (words.length === 0) throw new Error('There are no words to measure observation entropy on.');
  const rows = posteriorRows(model, words, alphabet, { k: opts.k ?? 8, seed: `${opts.seed}/obs-entropy` });
  const h = mapRowBlocks(rows.curr, rows.d, 4096, (x) => rowEntropy(model.observationLogProbs(x)));
  return summarise(words, rows.word, h);
}

export function gruPredictiveEntropy(model: GruLanguageModel, words: readonly string[], alphabet: Alphabet): ObservationEntropy {
  if (words.length === 0) throw new Error('There are no words to measure predictive entropy on.');
  const wordOf: number[] = [];
  const values: number[] = [];
  for (const [a, b] of chunkRanges(words.length, 256)) {
    const batch = encodeBatch(words.slice(a, b), alphabet);
    const ent = tf.tidy(() => rowEntropy(model.predictiveLogProbs(batch)));
    const e = ent.dataSync();
    ent.dispose();
    for (let i = 0; i < b - a; i++) {
      for (let t = 0; t < (batch.lengths[i] as number); t++) {
        wordOf.push(a + i);
        values.push(e[i * batch.maxLen + t] as number);
      }
    }
  }
  return summarise(words, wordOf, values);
}
