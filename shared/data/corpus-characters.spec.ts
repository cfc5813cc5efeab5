// Characters that do not show or that change reading direction, a byte-order mark inside a line, and a
// leading "+" on a count: each is an error on its line with a message that says what to remove.
import { describe, expect, it } from 'vitest';
import { parseCorpus } from './corpus-parse';

const parse = (text: string, fileName = 'a.txt') => parseCorpus(new TextEncoder().encode(text), { fileName });
const problem = (r: ReturnType<typeof parse>, code: string) => r.problems.find((p) => p.code === code);

describe('invisible characters in words', () => {
  it.each([
    ['\u200b', 'zero-width space'],
    ['\u200c', 'zero-width non-joiner'],
    ['\u200d', 'zero-width joiner'],
    ['\u2060', 'word joiner'],
    ['\u00ad', 'soft hyphen'],
  ])('%j is reported by line as %s, and the word is not stored', (ch, name) => {
    const r = parse(`alpha\nbe${ch}ta\ngamma\n`);
    expect(r.ok).toBe(false);
    const p = problem(r, 'invisible-character');
    expect(p).toMatchObject({ line: 2, severity: 'error' });
    expect(p?.message).toContain(name);
    expect(p?.message).toMatch(/remove it/);
    expect(r.words.map((w) => w.word)).not.toContain(`be${ch}ta`);
  });
});

describe('direction controls in words', () => {
  it('the right-to-left override U+202E is an error on its line', () => {
    const r = parse('alpha\nbeta\u202e\n');
    expect(problem(r, 'direction-control')).toMatchObject({ line: 2, severity: 'error' });
    expect(problem(r, 'direction-control')?.message).toMatch(/U\+202E/);
  });

  it('isolates U+2066–U+2069 too', () => {
    const r = parse('\u2066alpha\u2069\n');
    expect(problem(r, 'direction-control')).toMatchObject({ line: 1 });
  });
});

describe('byte-order mark', () => {
  it('inside a line is named as such (not "contains a space")', () => {
    const r = parse('alpha\nbe\ufeffta\n');
    const p = problem(r, 'bom-in-line');
    expect(p).toMatchObject({ line: 2, severity: 'error' });
    expect(p?.message).toMatch(/byte-order mark inside the line/);
    expect(problem(r, 'space-in-word')).toBeUndefined();
  });

  it('at the start of the file is still only a warning', () => {
    const r = parse('\ufeffalpha\nbeta\n');
    expect(r.ok).toBe(true);
    expect(problem(r, 'bom')?.severity).toBe('warning');
  });
});

describe('counts', () => {
  it('refuses a leading + and says to drop the sign', () => {
    const r = parse('word\tcount\nalpha\t+3\nbeta\t2\n', 'a.tsv');
    expect(r.ok).toBe(false);
    const p = problem(r, 'count-not-integer');
    expect(p).toMatchObject({ line: 2 });
    expect(p?.message).toMatch(/starts with "\+"; write the count without a sign/);
  });

  it('still accepts a plain count', () => {
    const r = parse('word\tcount\nalpha\t3\n', 'a.tsv');
    expect(r.ok).toBe(true);
    expect(r.words[0]).toMatchObject({ word: 'alpha', count: 3 });
  });
});
