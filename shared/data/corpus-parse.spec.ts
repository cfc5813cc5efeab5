// Bad-input handling of the corpus parser: one test per kind of problem, asserting the code, the line
// number and that the message says what to fix. Expected values follow from the file contents by hand.
import { describe, expect, it } from 'vitest';
import { type ParseOptions, parseCorpus } from './corpus-parse';

const enc = (s: string) => new TextEncoder().encode(s);
const parse = (text: string | Uint8Array, fileName: string, opts: ParseOptions = {}) =>
  parseCorpus(typeof text === 'string' ? enc(text) : text, { fileName, ...opts });
const problem = (r: ReturnType<typeof parse>, code: string) => r.problems.find((p) => p.code === code);

describe('parseCorpus — whole-file problems', () => {
  it('empty file (0 bytes)', () => {
    const r = parse('', 'a.txt');
    expect(r.ok).toBe(false);
    expect(problem(r, 'empty-file')).toMatchObject({ line: null, severity: 'error' });
    expect(problem(r, 'empty-file')?.message).toMatch(/empty; upload a file with one word per line/);
  });

  it('file with only blank lines or only a header', () => {
    expect(problem(parse('\n \n\n', 'a.txt'), 'empty-file')?.message).toMatch(/no words.*add one word per line/);
    expect(problem(parse('word\tcount\n', 'a.tsv'), 'empty-file')?.severity).toBe('error');
  });

  it('binary file (zero bytes) names the line of the first zero byte', () => {
    const r = parse(new Uint8Array([0x61, 0x0a, 0x62, 0x0a, 0x00, 0x01]), 'a.txt');
    expect(problem(r, 'binary-file')).toMatchObject({ line: 3, severity: 'error' });
    expect(problem(r, 'binary-file')?.message).toMatch(/not a text file; export the word list as plain UTF-8 text/);
  });

  it('non-UTF-8 (Latin-1 é = 0xE9) names the line and byte of the first bad byte', () => {
    const r = parse(new Uint8Array([0x61, 0x0a, 0x62, 0x0a, 0x63, 0xe9, 0x0a, 0x64]), 'a.txt');
    expect(problem(r, 'not-utf8')).toMatchObject({ line: 3, severity: 'error' });
    expect(problem(r, 'not-utf8')?.message).toMatch(/Line 3 has a byte \(0xE9\).*save the file as UTF-8/);
    // The unreadable line gives no word; the others are read on (their problems are listed too).
    expect(r.words.map((w) => w.word)).toEqual(['a', 'b', 'd']);
    expect(r.ok).toBe(false);
  });

  it('UTF-16 file (byte-order mark FF FE) is refused', () => {
    const r = parse(new Uint8Array([0xff, 0xfe, 0x61, 0x00]), 'a.txt');
    expect(problem(r, 'utf16-file')?.message).toMatch(/UTF-16; save it as UTF-8/);
  });

  it('unknown extension', () => {
    const r = parse('a\n', 'words.xlsx');
    expect(problem(r, 'unknown-format')?.message).toMatch(/"words.xlsx" is not a .txt, .tsv or .csv file/);
  });
});

describe('parseCorpus — accepted with a warning', () => {
  it('UTF-8 byte-order mark is stripped with a warning', () => {
    const r = parse('\ufeffana\nbo\n', 'a.txt');
    expect(r.ok).toBe(true);
    expect(r.words.map((w) => w.word)).toEqual(['ana', 'bo']);
    expect(problem(r, 'bom')).toMatchObject({ line: 1, severity: 'warning' });
  });

  it('CRLF line ends are accepted and noted', () => {
    const r = parse('ana\t2\r\nbo\t3\r\n', 'a.tsv');
    expect(r.ok).toBe(true);
    expect(r.words).toEqual([{ word: 'ana', count: 2 }, { word: 'bo', count: 3 }]);
    expect(problem(r, 'crlf')?.severity).toBe('warning');
  });

  it('trailing blanks are trimmed with a warning naming the lines', () => {
    const r = parse('ana\t2\nbo \t3\t\n', 'a.tsv');
    expect(r.ok).toBe(true);
    expect(r.words).toEqual([{ word: 'ana', count: 2 }, { word: 'bo', count: 3 }]);
    expect(problem(r, 'trailing-blanks')).toMatchObject({ line: 2, severity: 'warning' });
    expect(problem(r, 'trailing-blanks')?.message).toMatch(/1 line had spaces or tabs.*\(line 2\)/);
  });

  it('blank lines are skipped with a note', () => {
    const r = parse('ana\n\nbo\n\n\ncy\n', 'a.txt');
    expect(r.words.map((w) => w.word)).toEqual(['ana', 'bo', 'cy']);
    expect(problem(r, 'blank-lines')).toMatchObject({ line: 2, severity: 'warning' });
    expect(problem(r, 'blank-lines')?.message).toMatch(/3 blank lines were skipped \(lines 2, 4, 5\)/);
  });

  it('header is detected in .tsv and .csv, and absent headers are not invented', () => {
    expect(parse('word\tcount\nana\t2\n', 'a.tsv').header).toEqual(['word', 'count']);
    expect(parse('name,frequency\nana,2\n', 'a.csv').header).toEqual(['name', 'frequency']);
    const r = parse('ana\t2\nbo\t1\n', 'a.tsv');
    expect(r.header).toBeNull();
    expect(r.words).toHaveLength(2);
  });

  it('duplicates are merged (counts added) when asked', () => {
    const r = parse('ana\t2\nbo\t1\nana\t5\n', 'a.tsv', { mergeDuplicates: true });
    expect(r.ok).toBe(true);
    expect(r.words).toEqual([{ word: 'ana', count: 7 }, { word: 'bo', count: 1 }]);
    expect(problem(r, 'duplicates-merged')).toMatchObject({ line: 3, severity: 'warning' });
  });
});

describe('parseCorpus — errors with line numbers', () => {
  it('wrong column count in .tsv and a tab in .txt', () => {
    const r = parse('ana\t2\nbo\t3\t4\ncy\n', 'a.tsv');
    const wrong = r.problems.filter((p) => p.code === 'wrong-column-count');
    expect(wrong.map((p) => p.line)).toEqual([2, 3]);
    expect(wrong[0]?.message).toMatch(/Line 2 has 3 columns separated by tab; it needs 2 columns \(word, count\)/);
    // Line 4 ("cy") has one column: said in the singular.
    expect(wrong[1]?.message).toMatch(/^Line 3 has 1 column \(no tab\); it needs 2 columns/);
    const t = parse('ana\nbo\t3\n', 'a.txt');
    expect(problem(t, 'wrong-column-count')).toMatchObject({ line: 2, severity: 'error' });
    expect(problem(t, 'wrong-column-count')?.message).toMatch(/upload the file as .tsv/);
  });

  it('non-integer, negative, zero and huge counts', () => {
    const r = parse('word,count\nana,1.5\nbo,-3\ncy,0\ndu,many\nel,99999999999999999999\nfy,4\n', 'a.csv');
    expect(problem(r, 'count-not-integer')).toMatchObject({ line: 2 });
    expect(problem(r, 'count-not-integer')?.message).toMatch(/"1.5" of "ana" is not a whole number; write it as a whole number/);
    expect(problem(r, 'count-negative')).toMatchObject({ line: 3 });
    expect(problem(r, 'count-negative')?.message).toMatch(/"bo" has a negative count \(-3\)/);
    expect(problem(r, 'count-zero')).toMatchObject({ line: 4 });
    expect(problem(r, 'count-zero')?.message).toMatch(/count of at least 1 or remove the line/);
    expect(r.problems.filter((p) => p.code === 'count-not-integer').map((p) => p.line)).toEqual([2, 5]);
    expect(problem(r, 'count-too-large')).toMatchObject({ line: 6 });
    expect(r.ok).toBe(false);
    expect(r.errorCount).toBe(5);
  });

  it('duplicate words name both lines', () => {
    const r = parse('ana\nbo\nana\n', 'a.txt');
    expect(problem(r, 'duplicate-word')).toMatchObject({ line: 3, severity: 'error' });
    expect(problem(r, 'duplicate-word')?.message).toMatch(/Line 3 repeats "ana" from line 1;.*merging of duplicates/);
  });

  it('over-long lines (> 1,000 bytes)', () => {
    const r = parse(`ana\n${'x'.repeat(1001)}\nbo\n`, 'a.txt');
    expect(problem(r, 'line-too-long')).toMatchObject({ line: 2, severity: 'error' });
    expect(problem(r, 'line-too-long')?.message).toMatch(/1001 bytes long \(limit 1000\)/);
    // Bytes, not characters: 501 two-byte characters are 1,002 bytes.
    expect(problem(parse(`${'é'.repeat(501)}\n`, 'a.txt'), 'line-too-long')?.line).toBe(1);
  });

  it('words longer than the maximum (default 40 characters, configurable)', () => {
    const long = 'a'.repeat(41);
    const r = parse(`ana\n${long}\n`, 'a.txt');
    expect(problem(r, 'word-too-long')).toMatchObject({ line: 2, severity: 'error' });
    expect(problem(r, 'word-too-long')?.message).toMatch(/41 characters \(limit 40\).*raise the maximum word length/);
    expect(parse(`${long}\n`, 'a.txt', { maxWordLength: 41 }).ok).toBe(true);
  });

  it('characters outside the allowed alphabet follow the normalisation policy', () => {
    const normalise = { lowerCase: true, nfc: true, stripDiacritics: false, allowedChars: 'abcdefghijklmnopqrstuvwxyz' };
    const drop = parse('ana\nzoë\n', 'a.txt', { normalise: { ...normalise, outsideAlphabet: 'drop-word' } });
    expect(problem(drop, 'outside-alphabet')).toMatchObject({ line: 2, severity: 'warning' });
    expect(problem(drop, 'outside-alphabet')?.message).toMatch(/"ë" \(U\+00EB\).*the word was left out/);
    expect(drop.words.map((w) => w.word)).toEqual(['ana']);
    const cut = parse('ana\nzoë\n', 'a.txt', { normalise: { ...normalise, outsideAlphabet: 'drop-char' } });
    expect(cut.words.map((w) => w.word)).toEqual(['ana', 'zo']);
    expect(problem(cut, 'outside-alphabet')?.message).toMatch(/giving "zo"/);
    const none = parse('zoë\n', 'a.txt', { normalise: { ...normalise, outsideAlphabet: 'drop-word' } });
    expect(problem(none, 'no-words-left')?.severity).toBe('error');
  });

  it('empty word, space inside a word, control character', () => {
    const r = parse('\t3\nnew york\t2\na\u0007b\t1\n', 'a.tsv');
    expect(problem(r, 'empty-word')).toMatchObject({ line: 1 });
    expect(problem(r, 'space-in-word')).toMatchObject({ line: 2 });
    expect(problem(r, 'space-in-word')?.message).toMatch(/"new york" contains a space/);
    expect(problem(r, 'control-character')).toMatchObject({ line: 3 });
    expect(problem(r, 'control-character')?.message).toMatch(/U\+0007; remove it/);
  });

  it('CSV quoting: unclosed quote and stray quote', () => {
    const r = parse('"ana",2\n"bo,3\nc"y,4\n', 'a.csv');
    expect(problem(r, 'unclosed-quote')).toMatchObject({ line: 2 });
    expect(problem(r, 'stray-quote')).toMatchObject({ line: 3 });
    expect(r.words).toEqual([{ word: 'ana', count: 2 }]);
  });

  it('lists at most maxProblems problems but counts them all', () => {
    const text = Array.from({ length: 30 }, (_, i) => `w${'abcdefghijklmnopqrstuvwxyz'[i % 26]}${i}\t0`).join('\n');
    const r = parse(text, 'a.tsv', { maxProblems: 10 });
    expect(r.problemCounts['count-zero']).toBe(30);
    expect(r.problems).toHaveLength(11);
    expect(r.problems[10]).toMatchObject({ code: 'more-problems', severity: 'error' });
    expect(r.problems[10]?.message).toMatch(/20 more problems are not listed/);
  });
});

describe('parseCorpus — results', () => {
  it('a one-column .tsv is read as counts of 1 with a warning', () => {
    const r = parse('ana\nbo\n', 'a.tsv');
    expect(r.words).toEqual([{ word: 'ana', count: 1 }, { word: 'bo', count: 1 }]);
    expect(problem(r, 'no-counts')?.severity).toBe('warning');
  });

  it('semicolon CSV and quoted words per RFC 4180', () => {
    const r = parse('word;count\n"ana";2\nbo;3\n', 'a.csv');
    expect(r.words).toEqual([{ word: 'ana', count: 2 }, { word: 'bo', count: 3 }]);
  });

  it('gives alphabet and statistics of the normalised words', () => {
    const r = parse('Ana\t3\nana\t1\nbob\t4\n', 'a.tsv');
    expect(r.words).toEqual([{ word: 'ana', count: 4 }, { word: 'bob', count: 4 }]);
    expect(r.alphabet.chars).toEqual(['a', 'b', 'n', 'o']);
    expect(r.stats.tokens).toBe(8);
    // Two words with equal counts: unigram entropy exactly 1 bit (closed form).
    expect(r.stats.unigramEntropyBits).toBeCloseTo(1, 12);
    expect(problem(r, 'merged-by-normalisation')?.message).toMatch(/"Ana" \+ "ana" -> "ana"/);
  });
});

describe('parseCorpus — header detection and problem listing edge cases', () => {
  it('a bad count on the first line is an error, not a silently skipped header', () => {
    const r = parse('ana\tmany\nbo\t2\n', 'a.tsv');
    expect(r.header).toBeNull();
    expect(problem(r, 'count-not-integer')).toMatchObject({ line: 1, severity: 'error' });
  });

  it('warnings never crowd errors out of a capped list', () => {
    const lines = Array.from({ length: 20 }, (_, i) => `zoë${'abcdefghijklmnopqrst'[i]}`);
    lines.push('ana', 'ana');
    const r = parse(`${lines.join('\n')}\n`, 'a.txt', {
      maxProblems: 5,
      normalise: { lowerCase: true, nfc: true, stripDiacritics: false, allowedChars: 'abcdefghijklmnopqrstuvwxyz', outsideAlphabet: 'drop-word' },
    });
    expect(problem(r, 'duplicate-word')).toMatchObject({ line: 22 });
    expect(r.problems.at(-1)).toMatchObject({ code: 'more-problems', severity: 'warning' });
    expect(r.problems.at(-1)?.message).toMatch(/16 more problems are not listed/);
  });
});

describe('parseCorpus — every problem of a file that is not clean UTF-8', () => {
  it('lists a zero byte, a bad byte and the ordinary problems of the other lines together', () => {
    // Line 2 holds a zero byte, line 4 a Latin-1 é (0xE9), line 5 a tab in a .txt file, line 6 is blank.
    const bytes = new Uint8Array([...enc('ana\nb'), 0x00, ...enc('o\ncy\nd'), 0xe9, ...enc('\nel\tfy\n\nga\n')]);
    const r = parse(bytes, 'a.txt');
    expect(r.ok).toBe(false);
    expect(problem(r, 'binary-file')).toMatchObject({ line: 2, severity: 'error' });
    expect(problem(r, 'binary-file')?.message).toMatch(/zero bytes \(line 2\), so it is not a text file/);
    expect(problem(r, 'not-utf8')).toMatchObject({ line: 4, severity: 'error' });
    expect(problem(r, 'not-utf8')?.message).toMatch(/Line 4 has a byte \(0xE9\)/);
    expect(problem(r, 'wrong-column-count')).toMatchObject({ line: 5, severity: 'error' });
    expect(problem(r, 'blank-lines')?.message).toMatch(/1 blank line was skipped \(line 6\)/);
    expect(r.lineCount).toBe(7);
  });

  it('names every line with a bad byte, not only the first', () => {
    const r = parse(new Uint8Array([0x61, 0xe9, 0x0a, 0x62, 0x0a, 0x63, 0xff, 0x0a]), 'a.txt');
    expect(r.problems.filter((p) => p.code === 'not-utf8').map((p) => p.line)).toEqual([1, 3]);
  });
});
