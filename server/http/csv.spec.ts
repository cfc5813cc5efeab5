import { describe, expect, it } from 'vitest';
import { csvCell, spreadsheetSafe, toCsv } from './csv';

// Source for the guard: OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection): cells that
// begin with =, +, -, @, tab (0x09) or carriage return (0x0D) are read as formulas; prepend a single quote,
// and wrap the cell in double quotes with inner quotes doubled. Quoting rules: RFC 4180 section 2.
describe('spreadsheetSafe (OWASP "CSV Injection")', () => {
  it.each(['=1+1', '+A1', '-2+3', '@SUM(A1:A2)', '\tcmd', '\rcmd', '=HYPERLINK("http://example.org","x")'])('guards %j with a leading quote', (text) => {
    expect(spreadsheetSafe(text)).toBe(`'${text}`);
  });

  it.each(['harbour', 'a=b', ' =1', "'already", '3-2', ''])('leaves %j as it is', (text) => {
    expect(spreadsheetSafe(text)).toBe(text);
  });

  it('keeps plain numbers as numbers, also negative ones and those written as text', () => {
    expect(spreadsheetSafe(-3.2)).toBe('-3.2');
    expect(spreadsheetSafe(-1e-7)).toBe('-1e-7');
    expect(spreadsheetSafe('-3.2')).toBe('-3.2');
    expect(spreadsheetSafe('+4')).toBe('+4');
    expect(spreadsheetSafe('-.5')).toBe('-.5');
    expect(spreadsheetSafe('-2E+3')).toBe('-2E+3');
    // Not a plain number: a formula hiding behind a number.
    expect(spreadsheetSafe('-3.2+cmd')).toBe("'-3.2+cmd");
    expect(spreadsheetSafe('-')).toBe("'-");
    expect(spreadsheetSafe('-Infinity')).toBe("'-Infinity");
  });
});

describe('csvCell and toCsv (RFC 4180 section 2)', () => {
  it('quotes guarded cells and doubles their quotes', () => {
    expect(csvCell('=HYPERLINK("http://example.org","x")')).toBe('"\'=HYPERLINK(""http://example.org"",""x"")"');
    expect(csvCell('@x')).toBe('"\'@x"');
  });

  it('quotes commas, quotes and edge spaces; flattens line breaks; leaves plain text bare', () => {
    expect(csvCell('a,b')).toBe('"a,b"');
    expect(csvCell('say "hi"')).toBe('"say ""hi"""');
    expect(csvCell(' padded')).toBe('" padded"');
    expect(csvCell('two\r\nlines')).toBe('two lines');
    expect(csvCell('\r\n=1')).toBe('"\' =1"');
    expect(csvCell('plain')).toBe('plain');
    expect(csvCell(-0.25)).toBe('-0.25');
  });

  it('writes one CRLF-ended record per row', () => {
    expect(toCsv([['a', 'b'], ['-1', '=x']])).toBe('a,b\r\n-1,"\'=x"\r\n');
  });
});
