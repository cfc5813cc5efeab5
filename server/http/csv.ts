/**
 * The one CSV writer of the server: every CSV download goes through `toCsv`, which writes with the
 * `csv-stringify` package (RFC 4180 quoting) and applies the formula guard below as its cast, so every cell is
 * guarded against spreadsheet formulas.
 *
 * Formula guard (OWASP, "CSV Injection"): a spreadsheet treats a cell that begins with `=`, `+`, `-`, `@`,
 * a tab or a carriage return as a formula, so a run name such as `=HYPERLINK(...)` typed by a bench member
 * could act when someone opens the export. Such a cell gets a leading single quote (the spreadsheet then
 * shows it as text) and is always wrapped in double quotes. Plain numbers (`-3.2`, `+4`, `1e-3`) stay numbers.
 */

import type { CastReturnObject } from 'csv-stringify';
import { stringify, type Options } from 'csv-stringify/sync';

/** A decimal number as JavaScript's `String(n)` or a person writes it: optional sign, digits, point, exponent. */
const PLAIN_NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** First characters that start a formula in common spreadsheets (OWASP "CSV Injection"). */
const FORMULA_START = /^[=+\-@\t\r]/;

/** The text of a cell made safe to open in a spreadsheet: formula-like text gets a leading `'`. */
export function spreadsheetSafe(value: string | number): string {
  const text = String(value);
  if (typeof value === 'number' || PLAIN_NUMBER.test(text)) return text;
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/**
 * The cast `csv-stringify` applies to every cell: formula guard, line breaks flattened to spaces (a row stays
 * one line), and quotes forced on a guarded cell or one with edge spaces; the package quotes commas and quotes
 * and doubles inner quotes (RFC 4180 section 2, rules 5–7).
 */
function castCell(value: string | number): CastReturnObject {
  const safe = spreadsheetSafe(value);
  const guarded = safe !== String(value);
  const flat = safe.replace(/\r\n|\r|\n/g, ' ');
  return { value: flat, quoted: guarded || /^\s|\s$/.test(flat) };
}

const OPTIONS: Options = {
  record_delimiter: 'windows',
  eof: true,
  cast: { string: (v) => castCell(v), number: (v) => castCell(v) },
};

/** One CSV field as it appears in `toCsv`'s output. */
export function csvCell(value: string | number): string {
  return stringify([[value]], { ...OPTIONS, eof: false });
}

/** Rows as CSV text: fields joined by commas, every record ended by CRLF (RFC 4180 section 2.1). */
export function toCsv(rows: readonly (readonly (string | number)[])[]): string {
  return stringify(rows.map((r) => [...r]), OPTIONS);
}
