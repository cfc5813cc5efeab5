/**
 * Problems found in an uploaded corpus. Errors mean "nothing can be saved until this is fixed";
 * warnings do not block saving. Every message is a sentence that says what to fix.
 */

export type ProblemSeverity = 'error' | 'warning';

export type ProblemCode =
  | 'empty-file'
  | 'binary-file'
  | 'utf16-file'
  | 'not-utf8'
  | 'unknown-format'
  | 'bom'
  | 'crlf'
  | 'blank-lines'
  | 'trailing-blanks'
  | 'line-too-long'
  | 'wrong-column-count'
  | 'no-counts'
  | 'unclosed-quote'
  | 'stray-quote'
  | 'line-break-in-word'
  | 'empty-word'
  | 'space-in-word'
  | 'control-character'
  | 'bom-in-line'
  | 'direction-control'
  | 'invisible-character'
  | 'count-not-integer'
  | 'count-negative'
  | 'count-zero'
  | 'count-too-large'
  | 'duplicate-word'
  | 'duplicates-merged'
  | 'word-too-long'
  | 'outside-alphabet'
  | 'merged-by-normalisation'
  | 'no-words-left'
  | 'more-problems';

export interface Problem {
  /** 1-based line number in the uploaded file, or null for a problem of the whole file. */
  line: number | null;
  code: ProblemCode;
  message: string;
  severity: ProblemSeverity;
}

/**
 * Collects problems, listing at most `limit` of them but counting all of them per code. Errors are
 * listed before warnings when the limit is reached, so warnings never hide an error.
 */
export class ProblemList {
  private readonly errors: { p: Problem; i: number }[] = [];
  private readonly warnings: { p: Problem; i: number }[] = [];
  readonly counts: Partial<Record<ProblemCode, number>> = {};
  private total = 0;
  private errorTotal = 0;

  constructor(private readonly limit: number) {}

  add(line: number | null, code: ProblemCode, severity: ProblemSeverity, message: string): void {
    this.counts[code] = (this.counts[code] ?? 0) + 1;
    const bucket = severity === 'error' ? this.errors : this.warnings;
    if (severity === 'error') this.errorTotal++;
    if (bucket.length < this.limit) bucket.push({ p: { line, code, severity, message }, i: this.total });
    this.total++;
  }

  error(line: number | null, code: ProblemCode, message: string): void {
    this.add(line, code, 'error', message);
  }

  warning(line: number | null, code: ProblemCode, message: string): void {
    this.add(line, code, 'warning', message);
  }

  get errorCount(): number {
    return this.errorTotal;
  }

  /**
   * Adds another list's problems after this one's, as if they had been added here in that order (a streamed
   * parse collects the problems of the bytes and those of the lines apart, and joins them in the order a
   * parse of the whole file adds them).
   */
  append(other: ProblemList): void {
    const offset = this.total;
    for (const { p, i } of other.errors) if (this.errors.length < this.limit) this.errors.push({ p, i: i + offset });
    for (const { p, i } of other.warnings) if (this.warnings.length < this.limit) this.warnings.push({ p, i: i + offset });
    for (const [code, n] of Object.entries(other.counts) as [ProblemCode, number][]) this.counts[code] = (this.counts[code] ?? 0) + n;
    this.total += other.total;
    this.errorTotal += other.errorTotal;
  }

  /** The listed problems, sorted by line (file-wide problems first), plus a closing note when capped. */
  list(): Problem[] {
    const chosen = [...this.errors, ...this.warnings.slice(0, Math.max(0, this.limit - this.errors.length))];
    const out = chosen.sort((a, b) => (a.p.line ?? 0) - (b.p.line ?? 0) || a.i - b.i).map(({ p }) => p);
    const hidden = this.total - out.length;
    if (hidden > 0) {
      out.push({
        line: null,
        code: 'more-problems',
        severity: this.errorTotal > out.filter((p) => p.severity === 'error').length ? 'error' : 'warning',
        message: `${plural(hidden, 'more problem is', 'more problems are')} not listed; fix the ones above and upload the file again to see the rest.`,
      });
    }
    return out;
  }
}

/** A word or character shown inside a message. */
export function quote(text: string, max = 60): string {
  const shown = text.length > max ? `${text.slice(0, max)}…` : text;
  return JSON.stringify(shown);
}

export function describeChar(c: string): string {
  const cp = c.codePointAt(0) ?? 0;
  const hex = `U+${cp.toString(16).toUpperCase().padStart(4, '0')}`;
  return /\p{C}/u.test(c) ? hex : `"${c}" (${hex})`;
}

/** "1 line", "3 lines". */
export function plural(n: number, noun: string, nouns = `${noun}s`): string {
  return `${n} ${n === 1 ? noun : nouns}`;
}
