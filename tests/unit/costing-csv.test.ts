// CSV export writer: RFC 4180 quoting and formula-injection neutralising (RFC 4180 §2; OWASP CSV injection guidance).
import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { csvField, toCsv } from '../../src/io/csv-write.ts';

describe('csv writer', () => {
  it('neutralises a formula: =1+1 → "\'=1+1" (OWASP CSV injection guidance)', () => {
    expect(csvField('=1+1')).toBe(`"'=1+1"`);
  });
  it('neutralises every dangerous first character: + - @ tab CR NUL', () => {
    expect(csvField('+41')).toBe(`"'+41"`);
    expect(csvField('-2')).toBe(`"'-2"`);
    expect(csvField('@SUM(A1)')).toBe(`"'@SUM(A1)"`);
    expect(csvField('\tx')).toBe(`"'\tx"`);
    expect(csvField('\rx')).toBe(`"'\rx"`);
    expect(csvField('\0x')).toBe(`"'\0x"`);
  });
  it('quotes a field with a comma and doubles inner quotes (RFC 4180 §2)', () => {
    expect(csvField('He said "hi", ok')).toBe(`"He said ""hi"", ok"`);
    expect(csvField('two\nlines')).toBe(`"two\nlines"`);
  });
  it('keeps numbers we write as plain numbers, negative ones too', () => {
    expect(csvField(-1.5)).toBe('-1.5');
    expect(csvField(120)).toBe('120');
    expect(csvField(NaN)).toBe('');
    expect(csvField(null)).toBe('');
  });
  it('ends every record with CRLF', () => {
    expect(toCsv([['a', 1], ['b', 2]])).toBe('a,1\r\nb,2\r\n');
  });
  it('round-trips through an RFC 4180 reader with the neutralising quote kept visible', () => {
    const rows = [
      ['designators', 'note', 'qty'],
      ['R1, R2', 'say "x"', 3],
      ['=HYPERLINK("x")', 'line\r\nbreak', -4],
    ];
    const parsed = Papa.parse<string[]>(toCsv(rows), { newline: '\r\n', skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data).toEqual([
      ['designators', 'note', 'qty'],
      ['R1, R2', 'say "x"', '3'],
      [`'=HYPERLINK("x")`, 'line\r\nbreak', '-4'],
    ]);
  });
});
