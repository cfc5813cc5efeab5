import { describe, expect, it } from 'vitest';
import { splitCsvLine } from './csv-line';

describe('splitCsvLine (RFC 4180 section 2)', () => {
  it('reads the RFC 4180 example with an escaped quote: "aaa","b""bb","ccc"', () => {
    // RFC 4180, section 2, rule 7 example.
    expect(splitCsvLine('"aaa","b""bb","ccc"', ',')).toEqual({ ok: true, fields: ['aaa', 'b"bb', 'ccc'] });
  });

  it('reads unquoted fields and a quoted field holding the delimiter (rule 6)', () => {
    expect(splitCsvLine('aaa,"b,bb",ccc', ',')).toEqual({ ok: true, fields: ['aaa', 'b,bb', 'ccc'] });
    expect(splitCsvLine('a;b', ';')).toEqual({ ok: true, fields: ['a', 'b'] });
    expect(splitCsvLine('a,', ',')).toEqual({ ok: true, fields: ['a', ''] });
  });

  it('reports an unclosed quote and a quote inside an unquoted field (rule 5)', () => {
    expect(splitCsvLine('"abc,2', ',')).toMatchObject({ ok: false, code: 'unclosed-quote', column: 1 });
    expect(splitCsvLine('ab"c,2', ',')).toMatchObject({ ok: false, code: 'stray-quote', column: 3 });
    expect(splitCsvLine('"ab"c,2', ',')).toMatchObject({ ok: false, code: 'stray-quote', column: 5 });
  });
});

describe('splitCsvLine tolerances', () => {
  it('accepts spaces around a quoted field and keeps the delimiter inside quotes', () => {
    expect(splitCsvLine(' "a b" ,2', ',')).toEqual({ ok: true, fields: ['a b', '2'] });
    expect(splitCsvLine('x,"y,z"', ',')).toEqual({ ok: true, fields: ['x', 'y,z'] });
    expect(splitCsvLine('x,"ab', ',')).toMatchObject({ ok: false, code: 'unclosed-quote', column: 3 });
  });
});
