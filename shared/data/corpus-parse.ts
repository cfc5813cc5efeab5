/**
 * Parses an uploaded corpus file into words with counts, a precise per-line problem report, the
 * normalised alphabet and statistics. Pure: bytes in, plain data out (no Node, no DOM). The bytes can be fed
 * in chunks (`CorpusParser`: the server streams an upload from disk, line by line) or in one block
 * (`parseCorpus`); the result, messages and line numbers are the same.
 *
 * Formats:
 * - `.txt`: one word per line, count 1 each.
 * - `.tsv`: word TAB count per line; `.csv`: word,count per line (RFC 4180 quoting, see csv-line.ts;
 *   a first line with ";" and no "," switches the delimiter to ";"). A header line (e.g. `word	count`)
 *   is detected when the first line's count column is text. A .tsv/.csv whose lines all have one column
 *   is read as a plain word list (count 1 each), with a warning.
 *
 * Errors mean nothing can be saved until fixed; warnings do not block saving. Duplicate spellings are
 * errors unless `mergeDuplicates` is set (their counts are then added). Spellings that only become
 * equal through normalisation (e.g. "Ana" and "ana" with lower-casing) are merged with a warning.
 */
import { type Alphabet, type WordCount, buildAlphabet, charsOf } from './encode';
import { type Problem, type ProblemCode, ProblemList, describeChar, plural, quote } from './corpus-problems';
import { UploadLineDecoder } from './decode-upload';
import { type CorpusFormat, type RawRecord, type RecordsRead, RecordReader } from './corpus-records';
import { type CorpusStats, corpusStats } from './corpus-stats';
import {
  DEFAULT_NORMALISE_OPTIONS,
  type NormaliseOptions,
  type NormaliseReport,
  createNormaliser,
  normaliseCorpus,
} from './normalise';

export type { CorpusFormat } from './corpus-records';
export type { Problem, ProblemCode, ProblemSeverity } from './corpus-problems';

export interface ParseOptions {
  /** Format; when absent it is taken from `fileName`'s extension. */
  format?: CorpusFormat;
  fileName?: string;
  /** Add the counts of repeated spellings instead of reporting them as errors (default false). */
  mergeDuplicates?: boolean;
  /** Longest allowed word in characters after normalisation (default 40). */
  maxWordLength?: number;
  /** Longest allowed line in bytes (default 1,000). */
  maxLineBytes?: number;
  normalise?: NormaliseOptions;
  /** At most this many problems are listed (all are counted; default 200). */
  maxProblems?: number;
  /** Number of top words in the statistics (default 20). */
  topN?: number;
}

export interface ParsedCorpus {
  /** True when there are no errors, i.e. the corpus can be saved. */
  ok: boolean;
  format: CorpusFormat | null;
  /** The header line's fields when one was detected. */
  header: string[] | null;
  /** Words to save: normalised, merged, in first-seen order. */
  words: WordCount[];
  alphabet: Alphabet;
  problems: Problem[];
  /** Number of problems of each code, including ones not listed. */
  problemCounts: Partial<Record<ProblemCode, number>>;
  errorCount: number;
  lineCount: number;
  normalisation: NormaliseReport | null;
  stats: CorpusStats;
}

export const DEFAULT_MAX_WORD_LENGTH = 40;
export const DEFAULT_MAX_LINE_BYTES = 1000;

/** The format for a file name, or null when the extension is not one we read. */
export function formatFromFileName(fileName: string): CorpusFormat | null {
  const m = /\.([a-z]+)$/i.exec(fileName.trim());
  const ext = m?.[1]?.toLowerCase();
  return ext === 'txt' || ext === 'tsv' || ext === 'csv' ? ext : ext === 'tab' ? 'tsv' : null;
}

/** "line 10", "lines 3, 4" or "lines 1, 2, 3, 4, 5 and 7 more". */
function lineList(lines: number[], max = 5): string {
  const shown = lines.slice(0, max).join(', ');
  return `${lines.length === 1 ? 'line' : 'lines'} ${lines.length > max ? `${shown} and ${lines.length - max} more` : shown}`;
}

function emptyResult(problems: ProblemList, format: CorpusFormat | null, lineCount: number): ParsedCorpus {
  return {
    ok: false,
    format,
    header: null,
    words: [],
    alphabet: buildAlphabet([]),
    problems: problems.list(),
    problemCounts: problems.counts,
    errorCount: problems.errorCount,
    lineCount,
    normalisation: null,
    stats: corpusStats([]),
  };
}

/** Resolves repeated spellings: errors (default) or summed counts. */
function resolveDuplicates(records: RawRecord[], merge: boolean, problems: ProblemList): RawRecord[] {
  const first = new Map<string, { line: number; entry: RawRecord }>();
  const out: RawRecord[] = [];
  const mergedLines: number[] = [];
  for (const r of records) {
    const seen = first.get(r.word);
    if (!seen) {
      const entry = { word: r.word, count: r.count, line: r.line };
      first.set(r.word, { line: r.line, entry });
      out.push(entry);
    } else if (merge) {
      seen.entry.count += r.count;
      mergedLines.push(r.line);
    } else {
      problems.error(
        r.line,
        'duplicate-word',
        `Line ${r.line} repeats ${quote(r.word)} from line ${seen.line}; remove one of the two lines, or switch on merging of duplicates to add their counts.`,
      );
    }
  }
  if (mergedLines.length > 0) {
    problems.warning(mergedLines[0] ?? null, 'duplicates-merged', `${plural(mergedLines.length, 'repeated word was', 'repeated words were')} merged into their first line by adding the counts (${lineList(mergedLines)}).`);
  }
  return out;
}

/**
 * A parse fed in chunks: `push` each chunk of the file in order, then `finish`. Lines are checked as soon as
 * they are complete, so only the records (word, count, line) are kept, never the whole file. Throws only for
 * invalid options (in the constructor); bad content is reported in the result.
 */
export class CorpusParser {
  private readonly problems: ProblemList;
  /** Problems of the bytes and of the lines, collected apart and joined in `finish` (see ProblemList.append). */
  private readonly byteProblems: ProblemList;
  private readonly lineProblems: ProblemList;
  private readonly format: CorpusFormat | null;
  private readonly decoder: UploadLineDecoder | null = null;
  private readonly reader: RecordReader | null = null;

  constructor(private readonly opts: ParseOptions = {}) {
    const limit = opts.maxProblems ?? 200;
    this.problems = new ProblemList(limit);
    this.byteProblems = new ProblemList(limit);
    this.lineProblems = new ProblemList(limit);
    createNormaliser(opts.normalise ?? DEFAULT_NORMALISE_OPTIONS); // throws on invalid options before any work
    const maxWordLength = opts.maxWordLength ?? DEFAULT_MAX_WORD_LENGTH;
    const maxLineBytes = opts.maxLineBytes ?? DEFAULT_MAX_LINE_BYTES;
    if (!Number.isInteger(maxWordLength) || maxWordLength < 1) throw new Error('The maximum word length must be a whole number of at least 1.');
    if (!Number.isInteger(maxLineBytes) || maxLineBytes < 1) throw new Error('The maximum line length must be a whole number of at least 1.');
    this.format = opts.format ?? (opts.fileName ? formatFromFileName(opts.fileName) : null);
    if (this.format) {
      const reader = new RecordReader({ format: this.format, maxLineBytes }, this.lineProblems);
      this.reader = reader;
      this.decoder = new UploadLineDecoder(this.byteProblems, (text, bytes, line) => reader.line(text, bytes, line));
    }
  }

  /** Reads the next chunk of the file (a file of an unknown format is not read). */
  push(chunk: Uint8Array): void {
    this.decoder?.push(chunk);
  }

  /** Ends the file and returns the parse. */
  finish(): ParsedCorpus {
    const { opts, problems, format, decoder, reader } = this;
    if (!format || !decoder || !reader) {
      const name = opts.fileName ? quote(opts.fileName) : 'The file';
      problems.error(null, 'unknown-format', `${name} is not a .txt, .tsv or .csv file; rename it with one of these extensions or choose the format.`);
      return emptyResult(problems, null, 0);
    }
    decoder.end();
    problems.append(this.byteProblems);
    problems.append(this.lineProblems);
    if (decoder.failed) return emptyResult(problems, format, 0);
    return finishParse(reader.result(), decoder.unreadableLines, decoder.lineCount, format, opts, problems);
  }
}

/** Parses uploaded bytes in one block; never throws for bad content (only for invalid options). */
export function parseCorpus(bytes: Uint8Array, opts: ParseOptions = {}): ParsedCorpus {
  const parser = new CorpusParser(opts);
  parser.push(bytes);
  return parser.finish();
}

/** The checks of the whole file once every line is read: blank lines, duplicates, normalisation, statistics. */
function finishParse(
  read: RecordsRead,
  unreadableLines: number[],
  lineCount: number,
  format: CorpusFormat,
  opts: ParseOptions,
  problems: ProblemList,
): ParsedCorpus {
  const normalise = opts.normalise ?? DEFAULT_NORMALISE_OPTIONS;
  const maxWordLength = opts.maxWordLength ?? DEFAULT_MAX_WORD_LENGTH;
  if (read.trimmedLines.length > 0) {
    problems.warning(read.trimmedLines[0] ?? null, 'trailing-blanks', `${plural(read.trimmedLines.length, 'line', 'lines')} had spaces or tabs at the start or end of a field; they were removed (${lineList(read.trimmedLines)}).`);
  }
  const unreadable = new Set(unreadableLines);
  const blankLines = read.blankLines.filter((l) => !unreadable.has(l));
  if (blankLines.length > 0 && blankLines.length < lineCount) {
    problems.warning(blankLines[0] ?? null, 'blank-lines', `${plural(blankLines.length, 'blank line was', 'blank lines were')} skipped (${lineList(blankLines)}).`);
  }
  if (format !== 'txt' && read.columns === 1 && read.records.length > 0) {
    problems.warning(null, 'no-counts', 'The lines have no count column, so every word counts once; add a count column (word, count) if the words have frequencies.');
  }
  if (read.records.length === 0 && problems.errorCount === 0) {
    problems.error(null, 'empty-file', 'The file has no words (only blank lines or a header); add one word per line.');
    return emptyResult(problems, format, lineCount);
  }
  const unique = resolveDuplicates(read.records, opts.mergeDuplicates ?? false, problems);

  // One normalisation pass; per-line checks of each spelling's outcome (named by its first line).
  const normalised = normaliseCorpus(unique, normalise, (index, n) => {
    const { word, line } = unique[index] as RawRecord;
    if (n.outside.length > 0) {
      const chars = [...new Set(n.outside)].map(describeChar).join(', ');
      const outcome = n.word === null
        ? normalise.outsideAlphabet === 'drop-char' ? 'nothing is left, so the word was left out' : 'the word was left out'
        : normalise.outsideAlphabet === 'drop-char' ? `the characters were removed, giving ${quote(n.word)}` : 'the word was kept';
      problems.warning(line, 'outside-alphabet', `Line ${line}: ${quote(word)} has ${chars}, outside the allowed characters; ${outcome}. Add the characters to the allowed set to keep them.`);
    }
    if (n.word !== null && n.word.length > maxWordLength) {
      const length = charsOf(n.word).length; // code points; .length (UTF-16 units) is only a quick upper bound
      if (length > maxWordLength) {
        problems.error(line, 'word-too-long', `Line ${line}: ${quote(word)} has ${length} characters (limit ${maxWordLength}); shorten or remove it, or raise the maximum word length.`);
      }
    }
  });
  const report = normalised.report;
  if (report.mergedTypes > 0) {
    const examples = report.merges.slice(0, 3).map((m) => `${m.from.map((f) => quote(f)).join(' + ')} -> ${quote(m.word)}`).join('; ');
    problems.warning(null, 'merged-by-normalisation', `${plural(report.mergedTypes, 'word stands', 'words stand')} for several spellings that became equal after normalisation; their counts were added (${examples}).`);
  }
  if (normalised.words.length === 0 && problems.errorCount === 0) {
    problems.error(null, 'no-words-left', 'No words are left after normalisation; allow more characters or choose to drop only the characters outside the alphabet.');
  }
  return {
    ok: problems.errorCount === 0,
    format,
    header: read.header,
    words: normalised.words,
    alphabet: normalised.alphabet,
    problems: problems.list(),
    problemCounts: problems.counts,
    errorCount: problems.errorCount,
    lineCount,
    normalisation: report,
    stats: corpusStats(normalised.words, { topN: opts.topN }),
  };
}
