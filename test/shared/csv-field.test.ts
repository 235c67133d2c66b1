import { describe, expect, it } from 'vitest';
import { csvField, csvLine } from '../../shared/csv/csv-field';

describe('CSV fields (RFC 4180, neutralised against spreadsheet formulas)', () => {
  it('prefixes a single quote to text that a spreadsheet would run as a formula: =, +, -, @, tab, carriage return', () => {
    expect(csvField('=HYPERLINK("http://x.example","click")')).toBe(`"'=HYPERLINK(""http://x.example"",""click"")"`);
    expect(csvField('+1+1')).toBe("'+1+1");
    expect(csvField('-2+3')).toBe("'-2+3");
    expect(csvField('@SUM(A1:A2)')).toBe("'@SUM(A1:A2)");
    expect(csvField('\t=1')).toBe("'\t=1");
    expect(csvField('\r=1')).toBe(`"'\r=1"`);
  });

  it('keeps numbers numbers: a negative value is written as it is', () => {
    expect(csvField(-3.2)).toBe('-3.2');
    expect(csvField(-0.001)).toBe('-0.001');
    expect(csvField(0)).toBe('0');
    expect(csvField(1e21)).toBe('1e+21');
  });

  it('neutralises text even when it looks like a number, since only typed numbers are numbers', () => {
    expect(csvField('-3.2')).toBe("'-3.2");
  });

  it('leaves other text alone and quotes per RFC 4180 (comma, quote, line break)', () => {
    expect(csvField('settled')).toBe('settled');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(csvField('2026-06-10T08:00:00.000Z')).toBe('2026-06-10T08:00:00.000Z');
    expect(csvField(' =1')).toBe(' =1');
  });

  it('writes missing values as empty cells, never 0', () => {
    expect(csvField(null)).toBe('');
    expect(csvField(undefined)).toBe('');
    expect(csvField(Number.NaN)).toBe('');
    expect(csvField(Number.POSITIVE_INFINITY)).toBe('');
    expect(csvField('')).toBe('');
  });

  it('joins a line with commas and ends it with CRLF', () => {
    expect(csvLine(['=cmd', -1, null, 'a,b'])).toBe(`'=cmd,-1,,"a,b"\r\n`);
  });
});
