/**
 * Turns an uploaded file's bytes into text lines, detecting files that are not UTF-8 text. The bytes can come
 * in chunks of any size (`UploadLineDecoder`: the server reads an upload from disk as a stream) or in one block
 * (`decodeUpload`: the browser and the command line); both give the same lines, line numbers and messages.
 * UTF-8 validity is checked with `TextDecoder('utf-8', { fatal: true })` a block of whole lines at a time; when
 * it fails, our own scan (RFC 3629, section 4 byte sequences) finds the first bad byte so we can name its line.
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

/** Receives each line: its text (empty for an unreadable line), UTF-8 byte length and 1-based number. */
export type LineSink = (text: string, bytes: number, line: number) => void;

/**
 * Decodes an upload fed in chunks and hands each line to `sink` as soon as it is complete: only the unfinished
 * last line is held between chunks. Problems of the bytes (empty, UTF-16, zero bytes, not UTF-8, byte-order
 * mark, line ends) go to `problems`; line ends LF, CRLF and lone CR are all accepted, also when a CRLF is cut
 * between two chunks.
 */
export class UploadLineDecoder {
  private pending: Uint8Array = new Uint8Array(0);
  private seen = 0;
  private line = 0;
  private crlf = 0;
  private loneCr = 0;
  private started = false;
  private stopped = false;
  private readonly zeroLines: number[] = [];
  private readonly fatal = new TextDecoder('utf-8', { fatal: true, ignoreBOM: true });
  private readonly lenient = new TextDecoder('utf-8', { fatal: false, ignoreBOM: true });
  readonly unreadableLines: number[] = [];
  hadBom = false;

  constructor(private readonly problems: ProblemList, private readonly sink: LineSink) {}

  /** Lines handed to the sink so far. */
  get lineCount(): number {
    return this.line;
  }

  /** Lines that ended with CRLF. */
  get crlfLines(): number {
    return this.crlf;
  }

  /** True when the file cannot be read at all (empty or UTF-16); no line was or will be handed on. */
  get failed(): boolean {
    return this.stopped;
  }

  push(chunk: Uint8Array): void {
    if (this.stopped || chunk.length === 0) return;
    this.seen += chunk.length;
    const data = this.pending.length === 0 ? chunk : concat(this.pending, chunk);
    if (!this.started) {
      if (data.length < 2) {
        this.pending = data.slice();
        return;
      }
      if (!this.start(data)) return;
    }
    // Whole lines only; a CR at the very end may be the first half of a CRLF, so it waits for the next chunk.
    const usable = data[data.length - 1] === RETURN ? data.length - 1 : data.length;
    let cut = usable - 1;
    while (cut >= 0 && data[cut] !== NEWLINE && data[cut] !== RETURN) cut--;
    if (cut >= 0) this.block(data.subarray(0, cut + 1), false);
    this.pending = data.slice(cut + 1);
  }

  /** Ends the input: the last line (without a line end) is handed on, and the file-wide problems are added. */
  end(): void {
    if (this.stopped) return;
    if (!this.started) {
      if (this.seen === 0) {
        this.stopped = true;
        this.problems.error(null, 'empty-file', 'The file is empty; upload a file with one word per line (or word and count).');
        return;
      }
      if (!this.start(this.pending)) return;
    }
    if (this.pending.length > 0) this.block(this.pending, true);
    this.pending = new Uint8Array(0);
    if (this.zeroLines.length > 0) {
      const z = this.zeroLines;
      const where = z.length === 1 ? `line ${z[0]}` : `lines ${z.slice(0, 5).join(', ')}${z.length > 5 ? ` and ${z.length - 5} more` : ''}`;
      this.problems.error(
        z[0] ?? null,
        'binary-file',
        `The file contains zero bytes (${where}), so it is not a text file; export the word list as plain UTF-8 text (.txt, .tsv or .csv).`,
      );
    }
    if (this.hadBom) this.problems.warning(1, 'bom', 'The file starts with a byte-order mark; it was removed. Nothing to fix.');
    if (this.crlf > 0) {
      this.problems.warning(null, 'crlf', 'The file uses Windows line ends (CRLF); they were accepted. Nothing to fix.');
    }
    if (this.loneCr > 0) {
      this.problems.warning(null, 'crlf', 'The file uses carriage returns (CR) as line ends; they were accepted. Nothing to fix.');
    }
  }

  /** Checks the first bytes; false (with an error) for a UTF-16 file, whose bytes are then ignored. */
  private start(data: Uint8Array): boolean {
    this.started = true;
    if ((data[0] === 0xff && data[1] === 0xfe) || (data[0] === 0xfe && data[1] === 0xff)) {
      this.stopped = true;
      this.pending = new Uint8Array(0);
      this.problems.error(1, 'utf16-file', 'The file is saved as UTF-16; save it as UTF-8 text and upload it again.');
      return false;
    }
    return true;
  }

  /** Whole lines (each ends with a line end, except the file's last one when `last`). */
  private block(bytes: Uint8Array, last: boolean): void {
    let text: string | null = null;
    if (bytes.indexOf(0) < 0) {
      try {
        text = this.fatal.decode(bytes);
      } catch {
        text = null;
      }
    }
    if (text === null) {
      this.lineByLine(bytes);
      return;
    }
    const parts = text.split(/\r\n|\n|\r/);
    // After the last line end comes an empty piece, which is not a line; the file's last line may have no end.
    if (!last || parts[parts.length - 1] === '') parts.pop();
    for (let i = 0; i < text.length; i++) {
      const c = text.charCodeAt(i);
      if (c === RETURN) {
        if (text.charCodeAt(i + 1) === NEWLINE) {
          this.crlf++;
          i++;
        } else this.loneCr++;
      }
    }
    for (const part of parts) this.emit(part);
  }

  private emit(text: string): void {
    this.line++;
    if (this.line === 1 && text.charCodeAt(0) === 0xfeff) {
      this.hadBom = true;
      text = text.slice(1);
    }
    this.sink(text, utf8Length(text), this.line);
  }

  /**
   * A block that is not clean UTF-8 text: each line with a zero byte ('binary-file') or bytes that are not
   * UTF-8 ('not-utf8') is reported and read as an empty line, so reading can go on and list the other lines'
   * problems.
   */
  private lineByLine(bytes: Uint8Array): void {
    let start = 0;
    const take = (end: number) => {
      const slice = bytes.subarray(start, end);
      const line = this.line + 1;
      const hasZero = slice.indexOf(0) >= 0;
      if (hasZero) this.zeroLines.push(line);
      const clean = hasZero ? slice.filter((b) => b !== 0) : slice;
      const at = firstInvalidUtf8(clean);
      if (at >= 0) {
        const byte = (clean[at] ?? 0).toString(16).toUpperCase().padStart(2, '0');
        this.problems.error(
          line,
          'not-utf8',
          `Line ${line} has a byte (0x${byte}) that is not valid UTF-8; save the file as UTF-8 (not Latin-1 or Windows-1252) and upload it again.`,
        );
      }
      if (at >= 0 || hasZero) {
        this.unreadableLines.push(line);
        this.line++;
        this.sink('', 0, line);
      } else this.emit(this.lenient.decode(slice));
    };
    for (let i = 0; i < bytes.length; i++) {
      if (bytes[i] === NEWLINE) {
        const crlf = i > start && bytes[i - 1] === RETURN;
        if (crlf) this.crlf++;
        take(crlf ? i - 1 : i);
        start = i + 1;
      } else if (bytes[i] === RETURN && bytes[i + 1] !== NEWLINE) {
        this.loneCr++;
        take(i);
        start = i + 1;
      }
    }
    if (start < bytes.length) take(bytes.length);
  }
}

function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  const out = new Uint8Array(a.length + b.length);
  out.set(a, 0);
  out.set(b, a.length);
  return out;
}

/**
 * Decodes bytes to lines in one block. Returns null (with an error in `problems`) only for an empty or UTF-16
 * file; lines with zero bytes or bytes that are not UTF-8 are reported one by one and the rest is read on.
 * Strips a UTF-8 byte-order mark with a warning; accepts CRLF and lone-LF line ends.
 */
export function decodeUpload(bytes: Uint8Array, problems: ProblemList): DecodedLines | null {
  const lines: string[] = [];
  const lineBytes: number[] = [];
  const decoder = new UploadLineDecoder(problems, (text, n) => {
    lines.push(text);
    lineBytes.push(n);
  });
  decoder.push(bytes);
  decoder.end();
  if (decoder.failed) return null;
  return { lines, lineBytes, crlfLines: decoder.crlfLines, hadBom: decoder.hadBom, unreadableLines: decoder.unreadableLines };
}
