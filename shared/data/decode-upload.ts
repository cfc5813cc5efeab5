/**
 * Turns an uploaded file's bytes into text lines, detecting files that are not UTF-8 text.
 * UTF-8 validity is checked with `TextDecoder('utf-8', { fatal: true })`; when it fails, our own
 * scan (RFC 3629, section 4 byte sequences) finds the first bad byte so we can name its line.
 */
import { ProblemList } from './corpus-problems';

export interface DecodedLines {
  /** Lines without their terminators; a final empty line after the last terminator is not included. */
  lines: string[];
  /** UTF-8 byte length of each line (without terminator). */
  lineBytes: number[];
  crlfLines: number;
  hadBom: boolean;
  /** Lines with a zero byte or bytes that are not UTF-8 (reported as errors); they are read as empty lines. */
  unreadableLines: number[];
}

const NEWLINE = 0x0a;
const RETURN = 0x0d;

/** Byte offset of the first byte that is not part of a well-formed UTF-8 sequence, or -1. */
export function firstInvalidUtf8(bytes: Uint8Array): number {
  let i = 0;
  const n = bytes.length;
  while (i < n) {
    const b = bytes[i] as number;
    if (b < 0x80) {
      i++;
      continue;
    }
    let need = 0;
    let lo = 0x80;
    let hi = 0xbf;
    if (b >= 0xc2 && b <= 0xdf) need = 1;
    else if (b === 0xe0) [need, lo] = [2, 0xa0];
    else if (b >= 0xe1 && b <= 0xec) need = 2;
    else if (b === 0xed) [need, hi] = [2, 0x9f];
    else if (b >= 0xee && b <= 0xef) need = 2;
    else if (b === 0xf0) [need, lo] = [3, 0x90];
    else if (b >= 0xf1 && b <= 0xf3) need = 3;
    else if (b === 0xf4) [need, hi] = [3, 0x8f];
    else return i;
    for (let k = 1; k <= need; k++) {
      const c = bytes[i + k];
      if (c === undefined) return i;
      const [l, h] = k === 1 ? [lo, hi] : [0x80, 0xbf];
      if (c < l || c > h) return i;
    }
    i += need + 1;
  }
  return -1;
}

/** UTF-8 byte length of a string (well-formed after decoding, so surrogates come in pairs). */
export function utf8Length(text: string): number {
  let n = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0x80) n += 1;
    else if (c < 0x800) n += 2;
    else if (c >= 0xd800 && c <= 0xdbff) {
      n += 4;
      i++;
    } else n += 3;
  }
  return n;
}

/**
 * Reports each line that holds a zero byte ('binary-file') or bytes that are not UTF-8 ('not-utf8'), and
 * returns the text with those lines left empty, so reading can go on and list the other lines' problems.
 */
function readBadLines(bytes: Uint8Array, problems: ProblemList, unreadable: number[]): string {
  const lenient = new TextDecoder('utf-8', { fatal: false, ignoreBOM: true });
  const zeroLines: number[] = [];
  const parts: string[] = [];
  let line = 1;
  let start = 0;
  const take = (end: number, terminator: string) => {
    const slice = bytes.subarray(start, end);
    if (slice.indexOf(0) >= 0) zeroLines.push(line);
    const at = firstInvalidUtf8(slice.indexOf(0) >= 0 ? slice.filter((b) => b !== 0) : slice);
    const bad = at >= 0 || slice.indexOf(0) >= 0;
    if (bad) unreadable.push(line);
    if (at >= 0) {
      const clean = slice.filter((b) => b !== 0);
      const byte = (clean[at] ?? 0).toString(16).toUpperCase().padStart(2, '0');
      problems.error(
        line,
        'not-utf8',
        `Line ${line} has a byte (0x${byte}) that is not valid UTF-8; save the file as UTF-8 (not Latin-1 or Windows-1252) and upload it again.`,
      );
    }
    parts.push(bad ? '' : lenient.decode(slice), terminator);
    line++;
  };
  for (let i = 0; i < bytes.length; i++) {
    if (bytes[i] === NEWLINE) {
      take(i > start && bytes[i - 1] === RETURN ? i - 1 : i, bytes[i - 1] === RETURN ? '\r\n' : '\n');
      start = i + 1;
    } else if (bytes[i] === RETURN && bytes[i + 1] !== NEWLINE) {
      take(i, '\r');
      start = i + 1;
    }
  }
  if (start < bytes.length) take(bytes.length, '');
  if (zeroLines.length > 0) {
    const where = zeroLines.length === 1 ? `line ${zeroLines[0]}` : `lines ${zeroLines.slice(0, 5).join(', ')}${zeroLines.length > 5 ? ` and ${zeroLines.length - 5} more` : ''}`;
    problems.error(
      zeroLines[0] ?? null,
      'binary-file',
      `The file contains zero bytes (${where}), so it is not a text file; export the word list as plain UTF-8 text (.txt, .tsv or .csv).`,
    );
  }
  return parts.join('');
}

/**
 * Decodes bytes to lines. Returns null (with an error in `problems`) only for an empty or UTF-16 file; lines with
 * zero bytes or bytes that are not UTF-8 are reported one by one and the rest is read on. Strips a UTF-8 byte-order mark with a warning; accepts CRLF and lone-LF line ends.
 */
export function decodeUpload(bytes: Uint8Array, problems: ProblemList): DecodedLines | null {
  if (bytes.length === 0) {
    problems.error(null, 'empty-file', 'The file is empty; upload a file with one word per line (or word and count).');
    return null;
  }
  if ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff)) {
    problems.error(1, 'utf16-file', 'The file is saved as UTF-16; save it as UTF-8 text and upload it again.');
    return null;
  }
  let text: string;
  const unreadableLines: number[] = [];
  try {
    if (bytes.indexOf(0) >= 0) throw new Error('zero byte');
    text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(bytes);
  } catch {
    // Not clean UTF-8 text: name every line with a zero byte or a bad byte, and read on so the other problems
    // of the file are listed too (the file cannot be saved while any error remains).
    text = readBadLines(bytes, problems, unreadableLines);
  }
  let hadBom = false;
  if (text.charCodeAt(0) === 0xfeff) {
    hadBom = true;
    text = text.slice(1);
    problems.warning(1, 'bom', 'The file starts with a byte-order mark; it was removed. Nothing to fix.');
  }
  // Line ends: LF, CRLF, and lone CR (old Mac files) are all accepted.
  const raw = text.split(/\r\n|\n|\r/);
  if (raw.length > 1 && raw[raw.length - 1] === '') raw.pop();
  const crlfLines = (text.match(/\r\n/g) ?? []).length;
  const loneCr = (text.match(/\r(?!\n)/g) ?? []).length;
  const lines = raw;
  if (crlfLines > 0) {
    problems.warning(null, 'crlf', 'The file uses Windows line ends (CRLF); they were accepted. Nothing to fix.');
  }
  if (loneCr > 0) {
    problems.warning(null, 'crlf', 'The file uses carriage returns (CR) as line ends; they were accepted. Nothing to fix.');
  }
  const lineBytes = lines.map(utf8Length);
  return { lines, lineBytes, crlfLines, hadBom, unreadableLines };
}
