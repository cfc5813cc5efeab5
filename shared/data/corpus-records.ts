/**
 * Lines of an uploaded corpus -> raw records (word, count, line number), with per-line problems.
 * Used by `corpus-parse.ts`; see there for the file formats.
 */
import { type ProblemList, describeChar, quote } from './corpus-problems';
import { splitCsvLine } from './csv-line';

export type CorpusFormat = 'txt' | 'tsv' | 'csv';

export interface RawRecord {
  line: number;
  word: string;
  count: number;
}

export interface RecordOptions {
  format: CorpusFormat;
  maxLineBytes: number;
}

export interface RecordsResult {
  records: RawRecord[];
  header: string[] | null;
  delimiter: string | null;
  /** Number of columns the data lines have (1 or 2). */
  columns: number;
}

const INTEGER = /^\d+$/;
const PLUS_INTEGER = /^\+\d+$/;
/** Characters that do not show: zero-width space / non-joiner / joiner, word joiner, soft hyphen, LRM / RLM. */
const INVISIBLE = /[\u200b\u200c\u200d\u2060\u00ad\u200e\u200f]/;
const INVISIBLE_NAMES: Record<string, string> = {
  '\u200b': 'zero-width space',
  '\u200c': 'zero-width non-joiner',
  '\u200d': 'zero-width joiner',
  '\u2060': 'word joiner',
  '\u00ad': 'soft hyphen',
  '\u200e': 'left-to-right mark',
  '\u200f': 'right-to-left mark',
};
const BIDI_CONTROL = /[\u202a-\u202e\u2066-\u2069]/;
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/;
const EDGE_BLANK = /^[ \t\u00a0]|[ \t\u00a0]$/;
const NEGATIVE_INTEGER = /^-\d+$/;
const NUMBERISH = /^[+-]?(\d[\d,_ ]*)?(\.\d*)?([eE][+-]?\d+)?$/;

/** Parses a count field; returns the count or adds an error and returns null. */
function parseCount(text: string, line: number, word: string, problems: ProblemList): number | null {
  if (PLUS_INTEGER.test(text)) {
    problems.error(line, 'count-not-integer', `Line ${line}: the count ${quote(text)} of ${quote(word)} starts with "+"; write the count without a sign.`);
    return null;
  }
  if (INTEGER.test(text)) {
    const value = Number(text);
    if (!Number.isSafeInteger(value)) {
      problems.error(line, 'count-too-large', `Line ${line}: the count ${quote(text)} is too large; counts must be below 9,007,199,254,740,992.`);
      return null;
    }
    if (value === 0) {
      problems.error(line, 'count-zero', `Line ${line}: ${quote(word)} has count 0; give it a count of at least 1 or remove the line.`);
      return null;
    }
    return value;
  }
  if (NEGATIVE_INTEGER.test(text)) {
    problems.error(line, 'count-negative', `Line ${line}: ${quote(word)} has a negative count (${text}); counts must be whole numbers of at least 1.`);
    return null;
  }
  const fix = text !== '' && NUMBERISH.test(text)
    ? 'write it as a whole number of at least 1, without decimals, exponents or thousands separators'
    : 'write a whole number of at least 1';
  problems.error(line, 'count-not-integer', `Line ${line}: the count ${quote(text)} of ${quote(word)} is not a whole number; ${fix}.`);
  return null;
}

function checkWord(word: string, line: number, problems: ProblemList): boolean {
  if (word === '') {
    problems.error(line, 'empty-word', `Line ${line} has no word; put the word in the first column or remove the line.`);
    return false;
  }
  const control = word.match(CONTROL); // general category Cc is exactly U+0000–001F and U+007F–009F
  if (control) {
    problems.error(line, 'control-character', `Line ${line}: ${quote(word)} contains the control character ${describeChar(control[0])}; remove it.`);
    return false;
  }
  if (word.includes('\ufeff')) {
    problems.error(line, 'bom-in-line', `Line ${line}: ${quote(word)} has a byte-order mark inside the line (U+FEFF); remove it (it is only allowed at the very start of the file).`);
    return false;
  }
  const bidi = word.match(BIDI_CONTROL);
  if (bidi) {
    problems.error(line, 'direction-control', `Line ${line}: ${quote(word)} contains the direction control ${describeChar(bidi[0])}; remove it (it makes the word read differently from what it holds).`);
    return false;
  }
  const invisible = word.match(INVISIBLE);
  if (invisible) {
    problems.error(line, 'invisible-character', `Line ${line}: ${quote(word)} contains an invisible ${INVISIBLE_NAMES[invisible[0]]} (${describeChar(invisible[0])}); remove it, or the word is stored apart from the same word without it.`);
    return false;
  }
  if (/\s/u.test(word)) {
    problems.error(line, 'space-in-word', `Line ${line}: ${quote(word)} contains a space; a word cannot contain spaces — join the parts or put each word on its own line.`);
    return false;
  }
  return true;
}

const WORD_HEADERS = /^(word|words|name|names|token|tokens|type|types|form|item|string|entry)$/i;
const COUNT_HEADERS = /^(count|counts|freq|frequency|frequencies|n|number|occurrences|tokens|total|weight)$/i;

/**
 * A first line is a header when its count column is not a number and one of its columns is a usual
 * column name (word/name/…, count/freq/…). Otherwise a bad first count is reported as an error rather
 * than silently skipped.
 */
function looksLikeHeader(fields: string[]): boolean {
  const word = fields[0] ?? '';
  if (fields.length < 2) return WORD_HEADERS.test(word);
  const count = fields[1] ?? '';
  return !INTEGER.test(count) && !NEGATIVE_INTEGER.test(count) && (WORD_HEADERS.test(word) || COUNT_HEADERS.test(count));
}

/** The delimiter of a format; a .csv file's first non-blank line with ";" and no "," switches it to ";". */
function pickDelimiter(format: CorpusFormat, firstLine: string): string | null {
  if (format === 'txt') return null;
  if (format === 'tsv') return '\t';
  return !firstLine.includes(',') && firstLine.includes(';') ? ';' : ',';
}

export type RecordsRead = RecordsResult & { blankLines: number[]; trimmedLines: number[] };

/**
 * Splits lines into records as they come (`line` once per line, in order, then `result`). Blank lines and
 * trailing blanks are counted in `blankLines`/`trimmedLines`.
 */
export class RecordReader {
  private readonly records: RawRecord[] = [];
  private readonly blankLines: number[] = [];
  private readonly trimmedLines: number[] = [];
  private header: string[] | null = null;
  private columns = 0;
  private seenData = false;
  private delimiter: string | null | undefined = undefined;

  constructor(private readonly opts: RecordOptions, private readonly problems: ProblemList) {}

  line(text: string, bytes: number, line: number): void {
    const { opts, problems } = this;
    if (this.delimiter === undefined && (opts.format !== 'csv' || text.trim() !== '')) this.delimiter = pickDelimiter(opts.format, text);
    const delimiter = this.delimiter ?? null;
    if (bytes > opts.maxLineBytes) {
      problems.error(line, 'line-too-long', `Line ${line} is ${bytes} bytes long (limit ${opts.maxLineBytes}); a line holds one word and its count — check for a missing line break.`);
      this.seenData = true;
      return;
    }
    if (text.trim() === '') {
      this.blankLines.push(line);
      return;
    }
    // Blanks at the ends of the line (a trailing tab too) and around fields are trimmed with a warning.
    // A leading tab is kept in .tsv files: it means the word column is empty.
    const leading = opts.format === 'tsv' ? /^[ \u00a0]+/ : /^[ \t\u00a0]+/;
    const core = text.replace(/[ \t\u00a0]+$/, '').replace(leading, '');
    let fields: string[];
    if (delimiter === null) {
      fields = [core];
    } else if (opts.format === 'csv') {
      const r = splitCsvLine(core, delimiter);
      if (!r.ok) {
        const what = r.code === 'unclosed-quote'
          ? `opens a quote that is not closed on the same line; close the quote (words cannot contain line breaks)`
          : `has a double quote outside a quoted field; put the whole field in quotes and write an inner quote as ""`;
        problems.error(line, r.code, `Line ${line} ${what}.`);
        this.seenData = true;
        return;
      }
      fields = r.fields;
    } else {
      fields = core.split(delimiter);
    }
    const trimmed = fields.map((f) => (EDGE_BLANK.test(f) ? f.replace(/^[ \t\u00a0]+|[ \t\u00a0]+$/g, '') : f));
    if (core !== text || trimmed.some((f, k) => f !== fields[k])) this.trimmedLines.push(line);
    if (!this.seenData && delimiter !== null && looksLikeHeader(trimmed)) {
      this.header = trimmed;
      this.seenData = true;
      return;
    }
    this.seenData = true;
    if (delimiter === null) {
      if (text.includes('\t')) {
        problems.error(line, 'wrong-column-count', `Line ${line} contains a tab; a .txt file holds one word per line — upload the file as .tsv if the second column is a count.`);
        return;
      }
    } else {
      if (this.columns === 0) this.columns = trimmed.length === 1 ? 1 : 2;
      if (trimmed.length !== this.columns) {
        const want = this.columns === 2 ? '2 columns (word, count)' : '1 column (word), like the lines before it';
        const sep = delimiter === '\t' ? 'tab' : `"${delimiter}"`;
        const has = trimmed.length === 1 ? `1 column (no ${sep})` : `${trimmed.length} columns separated by ${sep}`;
        problems.error(line, 'wrong-column-count', `Line ${line} has ${has}; it needs ${want}.`);
        return;
      }
    }
    const word = trimmed[0] ?? '';
    if (!checkWord(word, line, problems)) return;
    if (this.columns === 2) {
      const count = parseCount(trimmed[1] ?? '', line, word, problems);
      if (count !== null) this.records.push({ line, word, count });
    } else {
      this.records.push({ line, word, count: 1 });
    }
  }

  result(): RecordsRead {
    const delimiter = this.delimiter === undefined ? pickDelimiter(this.opts.format, '') : this.delimiter;
    return {
      records: this.records,
      header: this.header,
      delimiter,
      columns: delimiter === null ? 1 : this.columns,
      blankLines: this.blankLines,
      trimmedLines: this.trimmedLines,
    };
  }
}

/** Splits whole lines into records (see `RecordReader`). */
export function readRecords(lines: string[], lineBytes: number[], opts: RecordOptions, problems: ProblemList): RecordsRead {
  const reader = new RecordReader(opts, problems);
  lines.forEach((text, i) => reader.line(text, lineBytes[i] ?? 0, i + 1));
  return reader.result();
}
