/**
 * Sequence cross entropy against the corpus's unigram word distribution (MODEL.md §7):
 *   H(p_data, p_model) = −Σ_w p_data(w) log p_model(w),   KL(p_data ‖ p_model) = H(p_data, p_model) − H(p_data)
 * For the state-space model p_model(w) is estimated twice: with one shared set of prior trajectories (one pass
 * over the whole vocabulary) and with the IWAE bound (proposal q), which is tighter for long or rare words.
 * For the baselines the same figures come from exact log-probabilities.
 */
import type { Alphabet, WordCount } from '../data/encode';
import { encodeWord } from '../data/encode';
import { dataDistribution, dataEntropy } from './corpus-entropy';
import type { SsmView } from './model-view';
import { sharedTrajectoryLogProbs } from './shared-trajectories';
import { iwaeLogLikelihoods } from './tight-estimate';
import { natsToBits } from './units';

export interface CrossEntropyFigures {
  /** H(p_data, p_model) in bits (per word). */
  crossEntropyBits: number;
  /** H(p_data) in bits. */
  dataEntropyBits: number;
  /** H(p_data, p_model) − H(p_data) in bits (≥ 0 for exact p_model; an estimate can dip below by noise). */
  klGapBits: number;
  /** Σ_w p_model(w) over the corpus's words (at most 1 for exact p_model). */
  modelMass: number;
  /** log p_model(w) per word, nats. */
  logProbs: Float64Array;
}

/** The figures from any per-word log-probabilities (exact or estimated), in the order of `words`. */
export function crossEntropyFrom(words: readonly WordCount[], logProbs: Float64Array): CrossEntropyFigures {
  const p = dataDistribution(words);
  let h = 0;
  let mass = 0;
  p.forEach((pw, i) => {
    h -= pw * (logProbs[i] as number);
    mass += Math.exp(logProbs[i] as number);
  });
  const hData = dataEntropy(words);
  return {
    crossEntropyBits: natsToBits(h), dataEntropyBits: natsToBits(hData), klGapBits: natsToBits(h - hData),
    modelMass: mass, logProbs,
  };
}

export interface SsmCrossEntropyOptions {
  /** Prior trajectories S for the shared pass. */
  samples: number;
  /** Importance samples K for the second (IWAE) estimate; 0 skips it. */
  iwaeK: number;
  seed: number;
  sampleChunk?: number;
}

export interface SsmCrossEntropy {
  shared: CrossEntropyFigures;
  iwae: CrossEntropyFigures | null;
  samples: number;
  iwaeK: number;
}

export function ssmSequenceCrossEntropy(model: SsmView, words: readonly WordCount[], alphabet: Alphabet,
                                        opts: SsmCrossEntropyOptions): SsmCrossEntropy {
  if (words.length === 0) throw new Error('The corpus has no words to score.');
  const seqs = words.map((w) => encodeWord(w.word, alphabet));
  const shared = crossEntropyFrom(words, sharedTrajectoryLogProbs(model, seqs, {
    samples: opts.samples, seed: opts.seed, sampleChunk: opts.sampleChunk,
  }));
  const iwae = opts.iwaeK > 0
    ? crossEntropyFrom(words, iwaeLogLikelihoods(model, words.map((w) => w.word), alphabet, opts.iwaeK, `${opts.seed}/ce-iwae`))
    : null;
  return { shared, iwae, samples: opts.samples, iwaeK: opts.iwaeK };
}
