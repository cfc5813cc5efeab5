import { describe, expect, it } from 'vitest';
import { EOW_ID, alphabetFromChars, buildAlphabet, decodeIds, encodeBatch, encodeWord } from './encode';

describe('buildAlphabet', () => {
  it('collects distinct characters sorted by code point, with EOW as id 0', () => {
    const a = buildAlphabet(['cab', 'bad', 'Zoë']);
    // Code points (Unicode code charts): Z=U+005A, a..o < U+00EB (ë).
    expect(a.chars).toEqual(['Z', 'a', 'b', 'c', 'd', 'o', 'ë']);
    expect(a.size).toBe(a.chars.length + 1);
    expect(EOW_ID).toBe(0);
  });

  it('treats a surrogate pair as one character and sorts it by its code point, not by UTF-16 unit', () => {
    // U+1F600 (surrogates D83D DE00) must sort after U+FF21 (Ａ) by code point, though D83D < FF21 as a UTF-16 unit.
    const a = buildAlphabet(['\u{1F600}\uFF21']);
    expect(a.chars).toEqual(['\uFF21', '\u{1F600}']);
  });

  it('keeps the given order in an explicit alphabet (ids must match a stored model)', () => {
    const a = alphabetFromChars(['b', 'a']);
    expect(a).toEqual({ chars: ['b', 'a'], size: 3 });
    expect([...encodeWord('ab', a)]).toEqual([2, 1, 0]);
  });

  it('rejects a multi-character or repeated entry in an explicit alphabet', () => {
    expect(() => alphabetFromChars(['a', 'bc'])).toThrow(/not a single character/);
    expect(() => alphabetFromChars(['a', 'a'])).toThrow(/twice/);
  });
});

describe('encodeBatch / decodeIds', () => {
  const alphabet = buildAlphabet(['abc']);

  it('pads with EOW, masks t < length and sets length = characters + 1 (MODEL.md section 1)', () => {
    const b = encodeBatch(['cab', 'a'], alphabet);
    expect(b.batchSize).toBe(2);
    expect(b.maxLen).toBe(4);
    expect([...b.lengths]).toEqual([4, 2]);
    // c=3 a=1 b=2 then EOW; second row a EOW + padding.
    expect([...b.ids]).toEqual([3, 1, 2, 0, 1, 0, 0, 0]);
    expect([...b.mask]).toEqual([1, 1, 1, 1, 1, 1, 0, 0]);
  });

  it('round-trips words through ids', () => {
    const b = encodeBatch(['cab', 'a', 'bb'], alphabet);
    for (let i = 0; i < b.batchSize; i++) {
      expect(decodeIds(b.ids.subarray(i * b.maxLen, (i + 1) * b.maxLen), alphabet)).toBe(b.words[i]);
    }
  });

  it('decoding stops at the first EOW', () => {
    expect(decodeIds([1, 2, 0, 3, 3], alphabet)).toBe('ab');
  });

  it('names the unknown character and the word', () => {
    expect(() => encodeBatch(['abz'], alphabet)).toThrow(/"abz".*"z" \(U\+007A\).*not in the model's alphabet/);
    expect(() => encodeWord('a', { chars: [], size: 1 })).toThrow(/not in the model's alphabet/);
  });

  it('rejects an empty batch and ids outside the alphabet', () => {
    expect(() => encodeBatch([], alphabet)).toThrow(/empty batch/);
    expect(() => decodeIds([1, 9], alphabet)).toThrow(/Id 9 at position 1/);
  });
});
