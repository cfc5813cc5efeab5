import { describe, expect, it } from 'vitest';
import { caseInsensitiveGlob } from './word-search';

// Expected patterns worked out by hand from SQLite's GLOB rules (sqlite.org/lang_expr.html, "The GLOB
// operator": `*` any run, `?` one character, `[...]` a class; case-sensitive, whole UTF-8 characters).
describe('caseInsensitiveGlob', () => {
  it('turns each letter into a class of its case forms', () => {
    expect(caseInsensitiveGlob('HARB')).toBe('*[Hh][Aa][Rr][Bb]*');
    expect(caseInsensitiveGlob('är')).toBe('*[äÄ][rR]*');
    // ß has no one-character upper-case form (its upper case is "SS"), so it stays literal.
    expect(caseInsensitiveGlob('aße')).toBe('*[aA]ß[eE]*');
  });

  it('keeps digits and marks literal, and wraps GLOB wildcards in a class', () => {
    expect(caseInsensitiveGlob("o'1-")).toBe("*[oO]'1-*");
    expect(caseInsensitiveGlob('a*?[b]')).toBe('*[aA][*][?][[][bB]]*');
  });

  it('normalises the search text to NFC, as the words are stored', () => {
    expect(caseInsensitiveGlob('e\u0301')).toBe(caseInsensitiveGlob('\u00e9'));
  });
});
