// A parse fed in chunks (as the server reads an upload from disk) must give exactly what a parse of the whole
// file gives: the same words, problems, messages and line numbers, wherever the chunks are cut — inside a
// multi-byte character, between the CR and LF of a line end, inside a byte-order mark or a UTF-16 mark.
import { describe, expect, it } from 'vitest';
import { CorpusParser, type ParseOptions, parseCorpus } from './corpus-parse';
import { UploadLineDecoder } from './decode-upload';
import { ProblemList } from './corpus-problems';

const enc = (text: string) => new TextEncoder().encode(text);
const bytesOf = (...parts: (string | number[])[]) => {
  const chunks = parts.map((p) => (typeof p === 'string' ? enc(p) : new Uint8Array(p)));
  const out = new Uint8Array(chunks.reduce((n, c) => n + c.length, 0));
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.length;
  }
  return out;
};

function parseInChunks(bytes: Uint8Array, cuts: number[], opts: ParseOptions) {
  const parser = new CorpusParser(opts);
  let start = 0;
  for (const cut of [...cuts, bytes.length]) {
    parser.push(bytes.subarray(start, cut));
    start = cut;
  }
  return parser.finish();
}

/** Files chosen for the places where a chunk boundary can go wrong. */
const files: { what: string; name: string; bytes: Uint8Array; opts?: ParseOptions }[] = [
  { what: 'CRLF line ends and accented words', name: 'w.tsv', bytes: enc('word\tcount\r\nnoé\t3\r\nzoë\t2\r\nçà\t1\r\n') },
  { what: 'lone CR line ends, the last one at the very end', name: 'w.txt', bytes: enc('ab\rcd\ref\r') },
  { what: 'a byte-order mark and a last line without a line end', name: 'w.csv', bytes: enc('\ufeffword;count\nalba;3\nbrin;2') },
  { what: 'a byte-order mark alone', name: 'w.txt', bytes: enc('\ufeff') },
  { what: 'a UTF-16 file', name: 'w.txt', bytes: bytesOf([0xff, 0xfe, 0x61, 0x00, 0x0a, 0x00]) },
  { what: 'Latin-1 bytes and zero bytes among good lines', name: 'w.txt', bytes: bytesOf('anna\ncaf', [0xe9], '\nbo', [0x00], 'b\nzoë\n\u00e9t\u00e9\n') },
  { what: 'four-byte characters and blank lines', name: 'w.txt', bytes: enc('a😀b\n\n  \nc𝄞\n') },
  { what: 'many errors, more than are listed', name: 'w.tsv', bytes: enc(Array.from({ length: 40 }, (_, i) => `w${i}\t${i % 3 === 0 ? '-1' : 'x'}\n`).join('')), opts: { maxProblems: 7 } },
  { what: 'duplicates, a quoted csv line and an over-long line', name: 'w.csv', bytes: enc(`"al,ba",3\nbrin,2\nbrin,4\n${'x'.repeat(1200)},1\n"open,1\n`) },
];

describe('a parse fed in chunks', () => {
  it.each(files.map((f) => [f.what, f] as const))('gives the same result as the whole file for %s, at every cut', (_what, f) => {
    const opts = { fileName: f.name, ...f.opts };
    const whole = parseCorpus(f.bytes, opts);
    for (let size = 1; size <= 7; size++) {
      const cuts = Array.from({ length: Math.ceil(f.bytes.length / size) - 1 }, (_, k) => (k + 1) * size);
      expect(parseInChunks(f.bytes, cuts, opts), `chunks of ${size} bytes`).toEqual(whole);
    }
    for (let cut = 0; cut <= f.bytes.length; cut++) {
      expect(parseInChunks(f.bytes, [cut], opts), `one cut at byte ${cut}`).toEqual(whole);
    }
  });

  it('names the same lines as the whole file for bad bytes (the result is not just equal, it is right)', () => {
    const f = files[5]!;
    const parsed = parseInChunks(f.bytes, [9, 10, 14], { fileName: f.name });
    expect(parsed.problems.filter((p) => p.severity === 'error').map((p) => [p.line, p.code])).toEqual([
      [2, 'not-utf8'],
      [3, 'binary-file'],
    ]);
    expect(parsed.words.map((w) => w.word)).toEqual(['anna', 'zoë', 'été']);
    expect(parsed.lineCount).toBe(5);
  });

  it('holds back only the unfinished line between chunks', () => {
    const lines: string[] = [];
    const decoder = new UploadLineDecoder(new ProblemList(10), (text) => lines.push(text));
    decoder.push(enc('alba\nbri'));
    expect(lines).toEqual(['alba']);
    decoder.push(enc('n\r'));
    expect(lines).toEqual(['alba']); // the CR may be the first half of a CRLF
    decoder.push(enc('\ncorr'));
    expect(lines).toEqual(['alba', 'brin']);
    decoder.end();
    expect(lines).toEqual(['alba', 'brin', 'corr']);
    expect(decoder.crlfLines).toBe(1);
  });
});
