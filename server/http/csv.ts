/**
 * The one CSV writer of the server: every CSV download goes through `csvCell` / `toCsv`, so every cell is
 * quoted per RFC 4180 and guarded against spreadsheet formulas.
 *
 * Formula guard (OWASP, "CSV Injection"): a spreadsheet treats a cell that begins with `=`, `+`, `-`, `@`,
 * a tab or a carriage return as a formula, so a run name such as `=HYPERLINK(...)` typed by a bench member
 * could act when someone opens the export. Such a cell gets a leading single quote (the spreadsheet then
 * shows it as text) and is always wrapped in double quotes. Plain numbers (`-3.2`, `+4`, `1e-3`) stay numbers.
 */

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
 * One CSV field: formula-guarded, line breaks flattened to spaces (a row stays one line), and quoted when it
 * holds a comma, a quote, edge spaces or was guarded; quotes doubled (RFC 4180 section 2, rules 5–7).
 */
export function csvCell(value: string | number): string {
  const safe = spreadsheetSafe(value);
  const guarded = safe !== String(value);
  const flat = safe.replace(/\r\n|\r|\n/g, ' ');
  return guarded || /[",]|^\s|\s$/.test(flat) ? `"${flat.replace(/"/g, '""')}"` : flat;
}

/** Rows as CSV text: fields joined by commas, every record ended by CRLF (RFC 4180 section 2.1). */
export function toCsv(rows: readonly (readonly (string | number)[])[]): string {
  return rows.map((row) => row.map(csvCell).join(',')).join('\r\n') + '\r\n';
}
