/**
 * Upload → words: the one path every corpus takes into the database (uploads, previews and the demo
 * seed). It runs the shared parser (shared/data/corpus-parse.ts: decoding, per-line checks,
 * normalisation, statistics) and the shared deterministic split (shared/data/split.ts).
 */
import { PREVIEW_WORDS, type CorpusOptions, type CorpusPreview } from '../../../shared/api/corpora';
import { parseCorpus, type ParseOptions, type ParsedCorpus } from '../../../shared/data/corpus-parse';
import { SPLIT_NAMES, splitCorpus, type SplitCount, type SplitName, type SplitShares } from '../../../shared/data/split';
import { charsOf, type WordCount } from '../../../shared/data/encode';

export interface AnalysedUpload {
  fileName: string;
  options: CorpusOptions;
  parsed: ParsedCorpus;
  shares: SplitShares;
  splitCounts: Record<SplitName, SplitCount>;
  splitParts: Record<SplitName, WordCount[]>;
}

export function sharesOf(options: CorpusOptions): SplitShares {
  return { train: options.split.train, validation: options.split.validation, test: options.split.test };
}

/** The shared parser's options for an upload's options. */
export function parseOptionsOf(fileName: string, options: CorpusOptions): ParseOptions {
  return {
    fileName,
    format: options.format,
    mergeDuplicates: options.mergeDuplicates,
    maxWordLength: options.maxWordLength,
    normalise: {
      lowerCase: options.normalise.lowerCase,
      nfc: options.normalise.nfc,
      stripDiacritics: options.normalise.stripDiacritics,
      allowedChars: options.normalise.allowedChars || undefined,
      outsideAlphabet: options.normalise.outsideAlphabet,
    },
  };
}

/** Splits a parsed upload (the parse may have been fed in chunks, see `CorpusParser`). */
export function analyseParsed(parsed: ParsedCorpus, fileName: string, options: CorpusOptions): AnalysedUpload {
  const shares = sharesOf(options);
  const { counts, parts } = splitCorpus(parsed.words, options.split.seed, shares);
  return { fileName, options, parsed, shares, splitCounts: counts, splitParts: parts };
}

/** Parses and splits an upload held in memory. Never throws for bad file content: problems are in `parsed.problems`. */
export function analyseUpload(bytes: Uint8Array, fileName: string, options: CorpusOptions): AnalysedUpload {
  return analyseParsed(parseCorpus(bytes, parseOptionsOf(fileName, options)), fileName, options);
}

export function toPreview(a: AnalysedUpload): CorpusPreview {
  const p = a.parsed;
  return {
    ok: p.ok,
    fileName: a.fileName,
    format: p.format,
    header: p.header,
    lineCount: p.lineCount,
    errorCount: p.errorCount,
    problems: p.problems,
    problemCounts: p.problemCounts,
    alphabet: p.alphabet.chars,
    normalisation: p.normalisation,
    stats: p.stats,
    splitCounts: a.splitCounts,
    sample: p.words.slice(0, PREVIEW_WORDS).map((w) => ({ word: w.word, count: w.count, length: charsOf(w.word).length })),
    options: a.options,
  };
}

/**
 * The rows to store: one per word with its split (from `splitCorpus`) and length in characters, in word
 * order. Rows written in the order of the (corpus, word) index append to it instead of landing all over it:
 * the insert of a large corpus takes about half the time (measured on 150,000 words). No reader depends on
 * the order the rows were written in.
 */
export function wordRows(a: AnalysedUpload): { word: string; count: number; split: SplitName; length: number }[] {
  const rows = SPLIT_NAMES.flatMap((split) =>
    a.splitParts[split].map(({ word, count }) => ({ word, count, split, length: charsOf(word).length })),
  );
  return rows.sort((x, y) => (x.word < y.word ? -1 : x.word > y.word ? 1 : 0));
}
