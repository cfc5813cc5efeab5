/**
 * Variational bounds from log importance weights (MODEL.md section 5), natural logs throughout.
 * ELBO = mean_k log W_k; IWAE bound L_K = logsumexp_k log W_k - log K (Burda, Grosse & Salakhutdinov 2016).
 */
import * as tf from '@tensorflow/tfjs-core';

/** Per-word IWAE bound from log-weights [B, K] -> [B]. Never exponentiates a log-weight on its own. */
export function iwaeBound(logW: tf.Tensor2D): tf.Tensor1D {
  return tf.tidy(() => tf.sub(tf.logSumExp(logW, 1), Math.log(logW.shape[1])) as tf.Tensor1D);
}

/** Per-word ELBO estimate from log-weights [B, K] -> [B] (the mean log-weight). */
export function elbo(logW: tf.Tensor2D): tf.Tensor1D {
  return tf.tidy(() => tf.mean(logW, 1) as tf.Tensor1D);
}

export const natsToBits = (nats: number): number => nats / Math.LN2;

/** Per-character figure of per-word values: divide each word's value by its length T (EOW included). */
export function perCharacter(perWord: tf.Tensor1D, lengths: Int32Array): tf.Tensor1D {
  if (lengths.length !== perWord.shape[0]) {
    throw new Error(`Got ${lengths.length} word lengths for ${perWord.shape[0]} words; pass one length per word.`);
  }
  return tf.tidy(() => tf.div(perWord, tf.tensor1d(lengths, 'float32')) as tf.Tensor1D);
}

export interface BoundSummary {
  /** Mean bound per word, nats (a log-likelihood bound, so negative). */
  natsPerWord: number;
  bitsPerWord: number;
  /** Total bound over all words divided by total characters (EOW included), in bits. */
  bitsPerChar: number;
}

/** Summarises per-word values (nats) as corpus figures; bits per character are token-weighted. */
export function summariseBound(perWord: ArrayLike<number>, lengths: Int32Array): BoundSummary {
  let sum = 0;
  let chars = 0;
  for (let i = 0; i < perWord.length; i++) {
    sum += perWord[i] as number;
    chars += lengths[i] as number;
  }
  const natsPerWord = sum / perWord.length;
  return { natsPerWord, bitsPerWord: natsToBits(natsPerWord), bitsPerChar: natsToBits(sum / chars) };
}
