/**
 * Corpus normalisation (MODEL.md section 1): lower-casing, Unicode NFC (UAX #15), optional removal of
 * diacritics, and an optional allowed-character filter. Words that become equal are merged (counts add).
 *
 * Order of operations per word: strip diacritics (NFD, then drop combining marks, general category Mn)
 * -> lower-case (locale-independent `toLowerCase`) -> NFC. `stripDiacritics` only removes marks that
 * Unicode decomposes (é -> e, å -> a); letters such as ø, ł, æ, ß have no decomposition and stay.
 */
import { type Alphabet, type WordCount, buildAlphabet, charsOf } from './encode';

export type OutsideAlphabetPolicy = 'drop-word' | 'drop-char' | 'keep';

export interface NormaliseOptions {
  lowerCase: boolean;
  nfc: boolean;
  stripDiacritics: boolean;
  /**
   * Characters a word may contain after normalisation (e.g. "abcdefghijklmnopqrstuvwxyz"). Undefined or
   * empty: every character is allowed. The list is NFC-composed (when `nfc`) before use.
   */
  allowedChars?: string;
  /** What to do with a character outside `allowedChars`. `keep` keeps it (and reports it). */
  outsideAlphabet: OutsideAlphabetPolicy;
}

export const DEFAULT_NORMALISE_OPTIONS: Readonly<NormaliseOptions> = Object.freeze({
  lowerCase: true,
  nfc: true,
  stripDiacritics: false,
  outsideAlphabet: 'drop-word',
});

export interface OutsideCharCount {
  char: string;
  /** Tokens (count-weighted occurrences) of the character outside the allowed set. */
  tokens: number;
}

export interface NormaliseReport {
  inputTypes: number;
  inputTokens: number;
  /** Word types removed entirely (outside characters under `drop-word`, or empty after normalisation). */
  droppedTypes: number;
  droppedTokens: number;
  /** droppedTypes / inputTypes and droppedTokens / inputTokens (0 for an empty input). */
  droppedTypeShare: number;
  droppedTokenShare: number;
  /** Input types whose spelling changed (case, composition, diacritics, dropped characters). */
  changedTypes: number;
  /** Output types that absorbed more than one input type, with the input spellings (first 50 shown). */
  merges: { word: string; from: string[] }[];
  mergedTypes: number;
  /** Characters found outside `allowedChars`, most frequent first. */
  outsideChars: OutsideCharCount[];
}

export interface NormaliseResult {
  /** Output words in first-seen order, counts summed over merged spellings. */
  words: WordCount[];
  alphabet: Alphabet;
  report: NormaliseReport;
}

/** The per-word outcome of normalisation. */
export interface NormalisedWord {
  /** Normalised word; null when the word is dropped. */
  word: string | null;
  /** Characters outside the allowed set (in order of appearance, repeats kept). */
  outside: string[];
}

const COMBINING_MARK = /\p{Mn}/gu;
const ASCII = /^[\x00-\x7f]*$/;

/** Validates options and prepares the allowed set. */
function prepare(opts: NormaliseOptions): Set<string> | null {
  if (!['drop-word', 'drop-char', 'keep'].includes(opts.outsideAlphabet)) {
    throw new Error(
      `Unknown setting for characters outside the alphabet: ${JSON.stringify(opts.outsideAlphabet)}; ` +
        'choose drop-word, drop-char or keep.',
    );
  }
  if (!opts.allowedChars) return null;
  let allowed = opts.allowedChars;
  if (opts.stripDiacritics) allowed = allowed.normalize('NFD').replace(COMBINING_MARK, '');
  if (opts.lowerCase) allowed = allowed.toLowerCase();
  if (opts.nfc) allowed = allowed.normalize('NFC');
  return new Set(charsOf(allowed));
}

/** Spelling changes only (no allowed-character filter). */
export function normaliseSpelling(word: string, opts: NormaliseOptions): string {
  // ASCII text has no decompositions and is its own NFC/NFD form (UAX #15), so only case can change.
  const ascii = ASCII.test(word);
  let w = word;
  if (opts.stripDiacritics && !ascii) w = w.normalize('NFD').replace(COMBINING_MARK, '');
  if (opts.lowerCase) w = w.toLowerCase();
  if (opts.nfc && !ascii) w = w.normalize('NFC');
  return w;
}

function normaliseWithSet(word: string, opts: NormaliseOptions, allowed: Set<string> | null): NormalisedWord {
  const spelled = normaliseSpelling(word, opts);
  if (spelled.length === 0) return { word: null, outside: [] };
  if (!allowed) return { word: spelled, outside: [] };
  const chars = charsOf(spelled);
  const outside = chars.filter((c) => !allowed.has(c));
  if (outside.length === 0) return { word: spelled, outside };
  switch (opts.outsideAlphabet) {
    case 'drop-word':
      return { word: null, outside };
    case 'drop-char': {
      const kept = chars.filter((c) => allowed.has(c)).join('');
      return { word: kept.length > 0 ? kept : null, outside };
    }
    case 'keep':
      return { word: spelled, outside };
  }
}

/** Normalises one word. */
export function normaliseWord(word: string, opts: NormaliseOptions = DEFAULT_NORMALISE_OPTIONS): NormalisedWord {
  return normaliseWithSet(word, opts, prepare(opts));
}

/** A reusable per-word normaliser (options validated once). */
export function createNormaliser(opts: NormaliseOptions = DEFAULT_NORMALISE_OPTIONS): (word: string) => NormalisedWord {
  const allowed = prepare(opts);
  return (word) => normaliseWithSet(word, opts, allowed);
}

/**
 * Normalises a corpus, merging words that become equal, and reports what changed and what was dropped.
 * `onWord`, when given, sees each input word's outcome (used by the parser for per-line reports).
 */
export function normaliseCorpus(
  words: readonly WordCount[],
  opts: NormaliseOptions = DEFAULT_NORMALISE_OPTIONS,
  onWord?: (index: number, result: NormalisedWord) => void,
): NormaliseResult {
  const allowed = prepare(opts);
  const out = new Map<string, { count: number; from: string[] }>();
  const outsideTokens = new Map<string, number>();
  let inputTokens = 0;
  let droppedTypes = 0;
  let droppedTokens = 0;
  let changedTypes = 0;
  for (let index = 0; index < words.length; index++) {
    const { word, count } = words[index] as WordCount;
    if (!Number.isFinite(count) || count <= 0) {
      throw new Error(`Word ${JSON.stringify(word)} has count ${count}; every count must be a positive number.`);
    }
    inputTokens += count;
    const n = normaliseWithSet(word, opts, allowed);
    onWord?.(index, n);
    for (const c of n.outside) outsideTokens.set(c, (outsideTokens.get(c) ?? 0) + count);
    if (n.word === null) {
      droppedTypes++;
      droppedTokens += count;
      continue;
    }
    if (n.word !== word) changedTypes++;
    const entry = out.get(n.word);
    if (entry) {
      entry.count += count;
      entry.from.push(word);
    } else {
      out.set(n.word, { count, from: [word] });
    }
  }
  const result: WordCount[] = [];
  const merges: { word: string; from: string[] }[] = [];
  let mergedTypes = 0;
  for (const [word, { count, from }] of out) {
    result.push({ word, count });
    if (from.length > 1) {
      mergedTypes++;
      if (merges.length < 50) merges.push({ word, from });
    }
  }
  const inputTypes = words.length;
  const outsideChars = [...outsideTokens]
    .map(([char, tokens]) => ({ char, tokens }))
    .sort((a, b) => b.tokens - a.tokens || (a.char < b.char ? -1 : 1));
  return {
    words: result,
    alphabet: buildAlphabet(result.map((w) => w.word)),
    report: {
      inputTypes,
      inputTokens,
      droppedTypes,
      droppedTokens,
      droppedTypeShare: inputTypes > 0 ? droppedTypes / inputTypes : 0,
      droppedTokenShare: inputTokens > 0 ? droppedTokens / inputTokens : 0,
      changedTypes,
      merges,
      mergedTypes,
      outsideChars,
    },
  };
}
