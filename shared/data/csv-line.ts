/**
 * One line of a delimited file split into fields with the `csv-parse` package — its browser build
 * `csv-parse/browser/esm/sync`, which carries its own Buffer shim (the plain `sync` entry needs Node's Buffer,
 * and this code also runs in the browser) — following RFC 4180 ("Common Format and MIME Type for Comma-Separated Values (CSV) Files", section 2): fields
 * are separated by the delimiter; a field may be enclosed in double quotes; inside a quoted field a double quote
 * is written twice (""); a field that is not quoted must not contain a double quote. Two deliberate
 * differences: spaces around a quoted field are tolerated (the caller trims fields), and a quoted field may not
 * run onto the next line (a word cannot contain a line break), so an unclosed quote is reported on its line.
 * The parser finds the problem; `fieldStart` only locates its column for the message.
 */
import { parse } from 'csv-parse/browser/esm/sync';

export type CsvLineResult =
  | { ok: true; fields: string[] }
  | { ok: false; code: 'unclosed-quote' | 'stray-quote'; column: number };

interface CsvError { code?: string; column?: number | string; field?: string }

function parseLine(line: string, delimiter: string, trim: boolean): string[] {
  const rows = parse(line, { delimiter, quote: '"', escape: '"', trim, relax_quotes: false, record_delimiter: ['\n'] }) as string[][];
  return rows[0] ?? [''];
}

/** Character offset where field `k` begins (delimiters inside quotes skipped); used for error columns only. */
function fieldStart(line: string, k: number, delimiter: string): number {
  let field = 0;
  let quoted = false;
  for (let i = 0; i < line.length && field < k; i++) {
    if (line[i] === '"') quoted = !quoted;
    else if (!quoted && line[i] === delimiter) { field++; if (field === k) return i + 1; }
  }
  return 0;
}

export function splitCsvLine(line: string, delimiter: string): CsvLineResult {
  if (line === '') return { ok: true, fields: [''] };
  try {
    return { ok: true, fields: parseLine(line, delimiter, false) };
  } catch (first) {
    const e = first as CsvError;
    const start = fieldStart(line, typeof e.column === 'number' ? e.column : 0, delimiter);
    if (e.code === 'CSV_QUOTE_NOT_CLOSED') return { ok: false, code: 'unclosed-quote', column: line.indexOf('"', start) + 1 };
    // Spaces around a quoted field: accepted (csv-parse's trim removes exactly those around the quotes).
    try {
      const fields = parseLine(line, delimiter, true);
      if (/^ *"/.test(line.slice(start))) return { ok: true, fields };
    } catch { /* report the first error below */ }
    if (e.code === 'INVALID_OPENING_QUOTE') return { ok: false, code: 'stray-quote', column: start + (e.field ?? '').length + 1 };
    // A closing quote followed by something else: the column just after the closing quote.
    const open = line.indexOf('"', start);
    let k = open + 1;
    while (k < line.length) {
      if (line[k] === '"' && line[k + 1] === '"') k += 2;
      else if (line[k] === '"') break;
      else k++;
    }
    let after = k + 1;
    while (line[after] === ' ') after++;
    return { ok: false, code: 'stray-quote', column: after + 1 };
  }
}
