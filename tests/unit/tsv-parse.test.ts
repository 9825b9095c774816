// Tab-separated clipboard text: quoting as in RFC 4180 §2 (rules 5–7: a field with a line break or a quote is
// enclosed in double quotes, inner quotes doubled) with the tab as separator, which is how programs write cells to
// the clipboard (common practice); line ends CRLF (RFC 4180 §2 rule 1), LF or CR.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { TSV_LIMITS, formatTsv, guardText, headingKey, matchHeader, parseTsv, tsvCell, unguardText } from '../../src/domain/tsv.ts';

function rows(text: string): string[][] {
  const r = parseTsv(text);
  if (!r.ok) throw new Error(r.error);
  return r.rows;
}

describe('parseTsv', () => {
  it('splits cells on tabs and rows on CRLF, dropping the one final line break', () => {
    expect(rows('code\tname\r\nA1\tFirst\r\nB2\tSecond\r\n')).toEqual([
      ['code', 'name'],
      ['A1', 'First'],
      ['B2', 'Second'],
    ]);
  });

  it('reads LF and lone CR line ends the same way', () => {
    expect(rows('a\tb\nc\td')).toEqual([
      ['a', 'b'],
      ['c', 'd'],
    ]);
    expect(rows('a\tb\rc\td\r')).toEqual([
      ['a', 'b'],
      ['c', 'd'],
    ]);
  });

  it('keeps a quoted cell holding a tab, a CRLF line break and doubled quotes as one cell', () => {
    // RFC 4180 §2 rule 6 and 7: enclosed in quotes; "" inside stands for one quote.
    const text = 'A1\t"two\twords"\t"line one\r\nline two"\t"say ""hi"""\r\nB2\tplain\t\t\r\n';
    expect(rows(text)).toEqual([
      ['A1', 'two\twords', 'line one\r\nline two', 'say "hi"'],
      ['B2', 'plain', '', ''],
    ]);
  });

  it('keeps empty cells, a trailing tab and blank rows inside the text', () => {
    expect(rows('\tb\t\n\nc')).toEqual([['', 'b', ''], [''], ['c']]);
  });

  it('treats a quote that does not open a quoted cell as an ordinary character', () => {
    expect(rows('5" rack\tx')).toEqual([['5" rack', 'x']]);
    expect(rows('"half\tx')).toEqual([['"half', 'x']]);
    expect(rows('"a" b\tx')).toEqual([['"a" b', 'x']]);
  });

  it('gives no rows for empty text and one empty cell for a lone line break', () => {
    expect(rows('')).toEqual([]);
    expect(rows('\r\n')).toEqual([['']]);
  });

  it('refuses text beyond its limits with a message', () => {
    const big = parseTsv('x'.repeat(TSV_LIMITS.chars + 1));
    expect(big.ok).toBe(false);
    if (!big.ok) expect(big.error).toMatch(/characters/);
    const many = parseTsv('\t'.repeat(TSV_LIMITS.cells + 1));
    expect(many.ok).toBe(false);
    if (!many.ok) expect(many.error).toMatch(/cells/);
  });
});

describe('formatTsv', () => {
  it('quotes only cells with a tab, line break or quote, doubling inner quotes', () => {
    expect(tsvCell('plain 4.7 kΩ')).toBe('plain 4.7 kΩ');
    expect(tsvCell('a\tb')).toBe('"a\tb"');
    expect(tsvCell('say "hi"')).toBe('"say ""hi"""');
    expect(formatTsv([['A1', 'x\ny'], ['B2', '']])).toBe('A1\t"x\ny"\nB2\t');
    // A last row of one empty cell would vanish as the final line break, so it is written quoted.
    expect(formatTsv([['A1'], ['']])).toBe('A1\n""');
  });

  it('reads back exactly what it wrote, for any cells (property)', () => {
    const cell = fc.string({ unit: fc.constantFrom('a', 'Ω', ' ', '\t', '\n', '\r', '"', '1', '='), maxLength: 8 });
    const grid = fc.array(fc.array(cell, { minLength: 1, maxLength: 5 }), { minLength: 1, maxLength: 5 });
    fc.assert(
      fc.property(grid, (g) => {
        expect(rows(formatTsv(g))).toEqual(g);
      }),
    );
  });
});

describe('formula guard for copies', () => {
  it('puts an apostrophe before text starting with = + - @ and takes it off again', () => {
    // OWASP CSV injection guidance: such cells would run as formulas in a spreadsheet program.
    for (const t of ['=1+1', '+x', '-y', '@SUM']) {
      expect(guardText(t)).toBe(`'${t}`);
      expect(unguardText(guardText(t))).toBe(t);
    }
    expect(guardText('fan 40 W')).toBe('fan 40 W');
    expect(unguardText("'plain")).toBe("'plain");
  });
});

describe('header rows', () => {
  const known = new Set(['code', 'name', 'steps', 'load_w']);
  it('recognises a row of names with at least one known heading, units in brackets dropped', () => {
    expect(headingKey(' Load_W (W) ')).toBe('load_w');
    expect(matchHeader(['code', 'Name', 'load_w [W]', '', 'r_gate'], known)).toEqual(['code', 'name', 'load_w', undefined, 'r_gate']);
  });
  it('reads a row of data as data', () => {
    expect(matchHeader(['FR3-40', 'Fan 40 W', '40'], known)).toBeUndefined();
    expect(matchHeader(['mosfet', 'dropper'], known)).toBeUndefined();
  });
});
