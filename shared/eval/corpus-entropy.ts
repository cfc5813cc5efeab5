/**
 * Reference figures that need no model: the entropy of the corpus's unigram word distribution H(p_data)
 * and a unigram character model (the "no structure at all" floor of the learnability check).
 */
import type { Alphabet, WordCount } from '../data/encode';
import { charsOf } from '../data/encode';

/** p_data(w) = count / total for each entry (validated: positive, finite counts). */
export function dataDistribution(words: readonly WordCount[]): number[] {
  let total = 0;
  for (const w of words) {
    if (!(w.count > 0) || !Number.isFinite(w.count)) {
      throw new Error(`The count of "${w.word}" must be a positive number (got ${w.count}).`);
    }
    total += w.count;
  }
  if (!(total > 0)) throw new Error('The corpus is empty: there is no word to evaluate.');
  return words.map((w) => w.count / total);
}

/** H(p_data) = −Σ_w p_data(w) log p_data(w), in nats. */
export function dataEntropy(words: readonly WordCount[]): number {
  return dataDistribution(words).reduce((h, p) => h - p * Math.log(p), 0);
}

/**
 * Unigram character model with add-one (Laplace) smoothing over the V symbols (characters + EOW),
 * counts weighted by word count: p(c) = (n_c + 1) / (N + V).
 */
export class UnigramCharModel {
  private readonly logP: Map<string, number>;
  readonly logEow: number;

  constructor(train: readonly WordCount[], alphabet: Alphabet) {
    const n = new Map<string, number>(alphabet.chars.map((c) => [c, 0]));
    let eow = 0;
    let total = 0;
    for (const { word, count } of train) {
      for (const c of charsOf(word)) {
        if (!n.has(c)) throw new Error(`The character "${c}" in "${word}" is not in the alphabet; normalise the corpus first.`);
        n.set(c, (n.get(c) as number) + count);
        total += count;
      }
      eow += count;
      total += count;
    }
    const denom = total + alphabet.size;
    this.logP = new Map([...n].map(([c, k]) => [c, Math.log((k + 1) / denom)]));
    this.logEow = Math.log((eow + 1) / denom);
  }

  /** log p(word) in nats (EOW included). */
  logProb(word: string): number {
    let lp = this.logEow;
    for (const c of charsOf(word)) {
      const l = this.logP.get(c);
      if (l === undefined) throw new Error(`The character "${c}" in "${word}" is not in the alphabet of the unigram model.`);
      lp += l;
    }
    return lp;
  }
}
