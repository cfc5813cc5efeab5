/**
 * One line of a delimited file split into fields, following RFC 4180 ("Common Format and MIME Type for
 * Comma-Separated Values (CSV) Files", section 2): fields are separated by the delimiter; a field may be
 * enclosed in double quotes; inside a quoted field a double quote is written twice (""); a field that is
 * not quoted must not contain a double quote. Two deliberate differences: spaces around a quoted field
 * are tolerated (the caller trims fields), and a quoted field may not run onto the next line (RFC 4180
 * 2.6 allows that, but a word cannot contain a line break), so an unclosed quote is reported on its line.
 */

export type CsvLineResult =
  | { ok: true; fields: string[] }
  | { ok: false; code: 'unclosed-quote' | 'stray-quote'; column: number };

export function splitCsvLine(line: string, delimiter: string): CsvLineResult {
  const fields: string[] = [];
  let i = 0;
  const n = line.length;
  for (;;) {
    // Start of a field.
    let j = i;
    while (j < n && line[j] === ' ') j++;
    if (line[j] === '"') {
      let value = '';
      let k = j + 1;
      for (;;) {
        if (k >= n) return { ok: false, code: 'unclosed-quote', column: j + 1 };
        if (line[k] === '"') {
          if (line[k + 1] === '"') {
            value += '"';
            k += 2;
            continue;
          }
          k++;
          break;
        }
        value += line[k];
        k++;
      }
      while (k < n && line[k] === ' ') k++;
      if (k < n && line[k] !== delimiter) return { ok: false, code: 'stray-quote', column: k + 1 };
      fields.push(value);
      if (k >= n) return { ok: true, fields };
      i = k + 1;
      continue;
    }
    const end = line.indexOf(delimiter, i);
    const raw = end < 0 ? line.slice(i) : line.slice(i, end);
    const q = raw.indexOf('"');
    if (q >= 0) return { ok: false, code: 'stray-quote', column: i + q + 1 };
    fields.push(raw);
    if (end < 0) return { ok: true, fields };
    i = end + 1;
  }
}
