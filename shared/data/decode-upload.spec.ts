import { describe, expect, it } from 'vitest';
import { ProblemList } from './corpus-problems';
import { decodeUpload, firstInvalidUtf8 } from './decode-upload';
import { createRng } from './random';

describe('firstInvalidUtf8', () => {
  it('agrees with the WHATWG UTF-8 decoder (TextDecoder, fatal) on random byte strings', () => {
    // Reference: the platform's TextDecoder('utf-8', { fatal: true }) (WHATWG Encoding Standard).
    const rng = createRng('utf8');
    const decoder = new TextDecoder('utf-8', { fatal: true });
    const pool = [0x41, 0x7f, 0x80, 0xbf, 0xc0, 0xc2, 0xdf, 0xe0, 0xa0, 0xed, 0x9f, 0xee, 0xef, 0xf0, 0x90, 0xf4, 0x8f, 0xf5, 0xff];
    for (let trial = 0; trial < 3000; trial++) {
      const bytes = Uint8Array.from({ length: 1 + rng.int(6) }, () => pool[rng.int(pool.length)] as number);
      let valid = true;
      try {
        decoder.decode(bytes);
      } catch {
        valid = false;
      }
      expect(firstInvalidUtf8(bytes) === -1).toBe(valid);
    }
  });

  it('finds the offset of the first bad byte (RFC 3629: C0 80 is an overlong form)', () => {
    expect(firstInvalidUtf8(new Uint8Array([0x61, 0xc3, 0xa9, 0xc0, 0x80]))).toBe(3);
    expect(firstInvalidUtf8(new TextEncoder().encode('zoë 😀'))).toBe(-1);
  });
});

describe('decodeUpload', () => {
  it('splits LF and CRLF lines and measures UTF-8 bytes per line', () => {
    const problems = new ProblemList(10);
    const d = decodeUpload(new TextEncoder().encode('ab\r\nné\nc'), problems);
    expect(d?.lines).toEqual(['ab', 'né', 'c']);
    expect(d?.lineBytes).toEqual([2, 3, 1]);
    expect(d?.crlfLines).toBe(1);
  });

  it('accepts lone CR line ends with a note', () => {
    const problems = new ProblemList(10);
    const d = decodeUpload(new TextEncoder().encode('ab\rcd\r'), problems);
    expect(d?.lines).toEqual(['ab', 'cd']);
    expect(problems.list()[0]?.message).toMatch(/carriage returns \(CR\)/);
  });
});
