// The one text rule: which characters are refused and what the message says (code points from the
// Unicode Standard's C0/C1 control ranges and the bidirectional formatting characters of UAX #9, from memory).
import { describe, expect, it } from 'vitest';
import { signUpSchema } from './schemas';
import { listRunsQuerySchema, updateRunSchema } from './runs';
import { safeText, unsafeTextProblem } from './safe-text';

describe('unsafeTextProblem', () => {
  it('accepts ordinary text of any script, with accents and emoji', () => {
    for (const text of ['Tide pool', 'ärger ß', 'שלום', 'слово', '名前', 'a🙂b', '']) expect(unsafeTextProblem(text)).toBeNull();
  });

  it('refuses NUL, other C0 controls, DEL and C1 controls, naming the code point', () => {
    expect(unsafeTextProblem('a\u0000b')).toMatch(/NUL character \(U\+0000\)/);
    expect(unsafeTextProblem('a\u0007b')).toMatch(/control character U\+0007/);
    expect(unsafeTextProblem('a\u007fb')).toMatch(/U\+007F/);
    expect(unsafeTextProblem('a\u0085b')).toMatch(/U\+0085/);
  });

  it('refuses tabs and line breaks unless the field allows them', () => {
    expect(unsafeTextProblem('a\tb')).toMatch(/tab/);
    expect(unsafeTextProblem('a\tb', { tab: true })).toBeNull();
    expect(unsafeTextProblem('a\nb')).toMatch(/line break/);
    expect(unsafeTextProblem('a\r\nb', { lineBreaks: true })).toBeNull();
    expect(unsafeTextProblem('a\u0000b', { tab: true, lineBreaks: true })).toMatch(/NUL/);
  });

  it('refuses every bidirectional override and isolate (U+202A–U+202E, U+2066–U+2069)', () => {
    for (let cp = 0x202a; cp <= 0x202e; cp++) expect(unsafeTextProblem(`x${String.fromCodePoint(cp)}y`)).toMatch(/direction controls/);
    for (let cp = 0x2066; cp <= 0x2069; cp++) expect(unsafeTextProblem(`x${String.fromCodePoint(cp)}y`)).toMatch(/direction controls/);
    expect(unsafeTextProblem('invoice\u202egpj.exe')).toMatch(/right-to-left override \(U\+202E\)/);
    // The marks U+200E / U+200F are not overrides and stay allowed in names.
    expect(unsafeTextProblem('a\u200fb')).toBeNull();
  });
});

describe('safeText in the shared schemas', () => {
  it('gives the field a message that says what to remove', () => {
    const r = signUpSchema.safeParse({ email: 'a@example.org', password: 'x'.repeat(12), displayName: 'Ann\u0000' });
    expect(r.success).toBe(false);
    expect(r.error?.issues[0]?.path).toEqual(['displayName']);
    expect(r.error?.issues[0]?.message).toMatch(/Remove the NUL character/);
  });

  it('covers run names, status reasons and the run search', () => {
    expect(updateRunSchema.safeParse({ status: 'failed', statusReason: 'out of memory\u0000' }).success).toBe(false);
    expect(updateRunSchema.safeParse({ name: 'run \u2067one' }).success).toBe(false);
    expect(listRunsQuerySchema.safeParse({ q: '\u0000' }).success).toBe(false);
    expect(listRunsQuerySchema.safeParse({ q: '50%_x' }).success).toBe(true);
  });

  it('keeps the required-field message of the field', () => {
    const r = safeText('Give the thing a name.').safeParse(undefined);
    expect(r.error?.issues[0]?.message).toBe('Give the thing a name.');
  });
});
