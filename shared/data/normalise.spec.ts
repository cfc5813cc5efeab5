import { describe, expect, it } from 'vitest';
import { type NormaliseOptions, normaliseCorpus, normaliseWord } from './normalise';

const base: NormaliseOptions = { lowerCase: false, nfc: true, stripDiacritics: false, outsideAlphabet: 'keep' };
const az = 'abcdefghijklmnopqrstuvwxyz';

describe('normaliseWord — Unicode normalisation (UAX #15 examples)', () => {
  it('composes e + COMBINING ACUTE ACCENT into U+00E9 under NFC', () => {
    // UAX #15 / UnicodeData.txt: U+00E9 has canonical decomposition 0065 0301.
    expect(normaliseWord('e\u0301', base).word).toBe('\u00e9');
  });

  it('maps ANGSTROM SIGN U+212B to U+00C5 (a singleton decomposition shown in UAX #15)', () => {
    expect(normaliseWord('\u212b', base).word).toBe('\u00c5');
  });

  it('keeps U+1E9B U+0323 as is under NFC (worked example in UAX #15: NFC of 1E9B 0323 is 1E9B 0323)', () => {
    expect(normaliseWord('\u1e9b\u0323', base).word).toBe('\u1e9b\u0323');
  });

  it('leaves decomposed text alone when NFC is off', () => {
    expect(normaliseWord('e\u0301', { ...base, nfc: false }).word).toBe('e\u0301');
  });

  it('strips diacritics by canonical decomposition (é -> e, Å -> A) but keeps letters without one (ø)', () => {
    // UnicodeData.txt: 00E9 = 0065 0301, 00C5 = 0041 030A; 00F8 has no decomposition.
    const opts = { ...base, stripDiacritics: true };
    expect(normaliseWord('\u00e9t\u00e9', opts).word).toBe('ete');
    expect(normaliseWord('\u00c5s', opts).word).toBe('As');
    expect(normaliseWord('s\u00f8', opts).word).toBe('s\u00f8');
  });

  it('lower-cases', () => {
    expect(normaliseWord('MarIA', { ...base, lowerCase: true }).word).toBe('maria');
  });
});

describe('normaliseWord — allowed characters', () => {
  const opts = { ...base, lowerCase: true, allowedChars: az };
  it('drops the word, drops the character, or keeps it', () => {
    expect(normaliseWord('zoë', { ...opts, outsideAlphabet: 'drop-word' })).toEqual({ word: null, outside: ['ë'] });
    expect(normaliseWord('zoë', { ...opts, outsideAlphabet: 'drop-char' })).toEqual({ word: 'zo', outside: ['ë'] });
    expect(normaliseWord('zoë', { ...opts, outsideAlphabet: 'keep' })).toEqual({ word: 'zoë', outside: ['ë'] });
    expect(normaliseWord('ëë', { ...opts, outsideAlphabet: 'drop-char' }).word).toBeNull();
  });

  it('applies the same normalisation to the allowed characters (decomposed é in the list allows é)', () => {
    const r = normaliseWord('caf\u00e9', { ...opts, allowedChars: 'acfe\u0301', outsideAlphabet: 'drop-word' });
    expect(r.word).toBe('caf\u00e9');
  });

  it('rejects an unknown policy with a message naming the choices', () => {
    expect(() => normaliseWord('a', { ...base, outsideAlphabet: 'skip' as never })).toThrow(/drop-word, drop-char or keep/);
  });
});

describe('normaliseCorpus', () => {
  it('merges words that become equal, adding counts, and keeps first-seen order', () => {
    const r = normaliseCorpus(
      [
        { word: 'Ana', count: 3 },
        { word: 'bo', count: 1 },
        { word: 'ana', count: 2 },
        { word: 'ANA', count: 5 },
      ],
      { ...base, lowerCase: true },
    );
    expect(r.words).toEqual([
      { word: 'ana', count: 10 },
      { word: 'bo', count: 1 },
    ]);
    expect(r.report.mergedTypes).toBe(1);
    expect(r.report.merges[0]?.from).toEqual(['Ana', 'ana', 'ANA']);
    expect(r.report.changedTypes).toBe(2);
    expect(r.alphabet.chars).toEqual(['a', 'b', 'n', 'o']);
  });

  it('merges a precomposed and a decomposed spelling under NFC (UAX #15 canonical equivalence)', () => {
    const r = normaliseCorpus([{ word: 'caf\u00e9', count: 1 }, { word: 'cafe\u0301', count: 4 }], base);
    expect(r.words).toEqual([{ word: 'caf\u00e9', count: 5 }]);
  });

  it('reports dropped type and token shares', () => {
    const r = normaliseCorpus(
      [
        { word: 'abc', count: 6 },
        { word: 'zoë', count: 3 },
        { word: 'ok', count: 1 },
      ],
      { ...base, allowedChars: az, outsideAlphabet: 'drop-word' },
    );
    expect(r.words.map((w) => w.word)).toEqual(['abc', 'ok']);
    expect(r.report.droppedTypes).toBe(1);
    expect(r.report.droppedTypeShare).toBeCloseTo(1 / 3, 12);
    expect(r.report.droppedTokenShare).toBeCloseTo(3 / 10, 12);
    expect(r.report.outsideChars).toEqual([{ char: 'ë', tokens: 3 }]);
  });

  it('rejects non-positive counts with the word named', () => {
    expect(() => normaliseCorpus([{ word: 'a', count: 0 }], base)).toThrow(/"a" has count 0/);
  });
});
