/**
 * Corpus statistics for the corpus page and reports (docs/MODEL.md section 1).
 *
 * - Unigram word entropy H(p_data) in bits, with p_data(w) = count(w) / tokens.
 * - Letter entropy in bits: entropy of the token-weighted character distribution, i.e. every character
 *   occurrence in every token counts once. The end-of-word symbol is NOT included, so the figure is
 *   comparable with published single-letter entropies of running text without spaces (e.g. Shannon's
 *   first-order estimate for English). A model's bits per character include EOW and are not directly
 *   comparable with it.
 * - Lengths are in characters (Unicode code points), without EOW.
 */
import type { WordCount } from './encode';

export interface LengthBin {
  length: number;
  types: number;
  tokens: number;
}

export interface CharFrequency {
  char: string;
  /** Token-weighted occurrences. */
  count: number;
  share: number;
}

export interface TopWord {
  word: string;
  count: number;
  share: number;
}

export interface CorpusStats {
  types: number;
  tokens: number;
  /** Types seen once (count 1). */
  singletonTypes: number;
  alphabetSize: number;
  /** Mean characters per type and per token. */
  meanLengthTypes: number;
  meanLengthTokens: number;
  minLength: number;
  maxLength: number;
  /** One bin per length from minLength to maxLength (empty bins included). */
  lengthHistogram: LengthBin[];
  /** Token-weighted character frequencies, most frequent first (ties by code point). */
  charFrequencies: CharFrequency[];
  unigramEntropyBits: number;
  letterEntropyBits: number;
  /** Most frequent words (ties in input order). */
  topWords: TopWord[];
}

/** Entropy in bits of the distribution proportional to non-negative counts (zero counts ignored). */
export function entropyBits(counts: Iterable<number>): number {
  const list = [...counts].filter((c) => c > 0);
  const total = list.reduce((s, c) => s + c, 0);
  if (total <= 0) return 0;
  let h = 0;
  for (const c of list) {
    const p = c / total;
    h -= p * Math.log2(p);
  }
  return h;
}

/** Token-weighted character counts (EOW excluded). */
export function characterCounts(words: readonly WordCount[]): Map<string, number> {
  const counts = new Map<string, number>();
  for (const { word, count } of words) for (const c of word) counts.set(c, (counts.get(c) ?? 0) + count);
  return counts;
}

/** Letter entropy in bits of the token-weighted character distribution (EOW excluded). */
export function letterEntropyBits(words: readonly WordCount[]): number {
  return entropyBits(characterCounts(words).values());
}

/** Statistics of a corpus of word types with positive counts. */
export function corpusStats(words: readonly WordCount[], opts: { topN?: number } = {}): CorpusStats {
  const topN = opts.topN ?? 20;
  let tokens = 0;
  let singletonTypes = 0;
  let lengthSumTypes = 0;
  let lengthSumTokens = 0;
  let minLength = Number.POSITIVE_INFINITY;
  let maxLength = 0;
  const bins = new Map<number, LengthBin>();
  for (const { word, count } of words) {
    if (!Number.isFinite(count) || count <= 0) {
      throw new Error(`Word ${JSON.stringify(word)} has count ${count}; every count must be a positive number.`);
    }
    let len = 0;
    for (const _ of word) len++;
    tokens += count;
    if (count === 1) singletonTypes++;
    lengthSumTypes += len;
    lengthSumTokens += len * count;
    minLength = Math.min(minLength, len);
    maxLength = Math.max(maxLength, len);
    const bin = bins.get(len) ?? { length: len, types: 0, tokens: 0 };
    bin.types++;
    bin.tokens += count;
    bins.set(len, bin);
  }
  const types = words.length;
  const lengthHistogram: LengthBin[] = [];
  if (types > 0) {
    for (let len = minLength; len <= maxLength; len++) {
      lengthHistogram.push(bins.get(len) ?? { length: len, types: 0, tokens: 0 });
    }
  }
  const charCounts = characterCounts(words);
  const charTotal = [...charCounts.values()].reduce((s, c) => s + c, 0);
  const charFrequencies = [...charCounts]
    .map(([char, count]) => ({ char, count, share: count / charTotal }))
    .sort((a, b) => b.count - a.count || (a.char.codePointAt(0) ?? 0) - (b.char.codePointAt(0) ?? 0));
  const order = words.map((w, i) => ({ w, i })).sort((a, b) => b.w.count - a.w.count || a.i - b.i);
  const topWords = order.slice(0, topN).map(({ w }) => ({ word: w.word, count: w.count, share: w.count / tokens }));
  return {
    types,
    tokens,
    singletonTypes,
    alphabetSize: charCounts.size,
    meanLengthTypes: types > 0 ? lengthSumTypes / types : 0,
    meanLengthTokens: tokens > 0 ? lengthSumTokens / tokens : 0,
    minLength: types > 0 ? minLength : 0,
    maxLength,
    lengthHistogram,
    charFrequencies,
    unigramEntropyBits: entropyBits(words.map((w) => w.count)),
    letterEntropyBits: entropyBits(charCounts.values()),
    topWords,
  };
}
