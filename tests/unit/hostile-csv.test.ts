// The one CSV writer against hostile cells: RFC 4180 quoting, every delimiter we offer quoted in every file, and
// formula triggers neutralised even behind spaces or in full-width form (OWASP CSV injection guidance).
import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { exportField, exportText, isFormulaLike, textField } from '../../src/io/csv-write.ts';
import type { ExportCell, ExportOptions } from '../../src/io/csv-write.ts';
import { costedBomCsv, purchaseListCsv, runCosting } from '../../src/io/run-export.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { purchaseList } from '../../src/domain/purchase.ts';
import { value } from './costing-fixtures.ts';
import { csvBlocks } from './csv-blocks.ts';

const COMMA: ExportOptions = { delimiter: 'comma', decimal: 'point', bom: false };
const SEMICOLON: ExportOptions = { delimiter: 'semicolon', decimal: 'comma', bom: false };
const TAB: ExportOptions = { delimiter: 'tab', decimal: 'point', bom: false };
const ALL = [COMMA, SEMICOLON, TAB];
const SEP = { comma: ',', semicolon: ';', tab: '\t' } as const;

/** Reads a file back as a spreadsheet program would with the given delimiter (RFC 4180 reader). */
function readAs(text: string, delimiter: string): string[][] {
  const r = Papa.parse<string[]>(text, { delimiter, newline: '\r\n', skipEmptyLines: true });
  expect(r.errors).toEqual([]);
  return r.data;
}

/** A spreadsheet program reads a cell as a formula when, after spaces, it starts with one of these. */
const runsAsFormula = (cell: string): boolean => /^[\s\u3000]*[=+\-@\uFF1D\uFF0B\uFF0D\uFF20]/.test(cell);

describe('one CSV writer', () => {
  it('neutralises a formula: =1+1 → "\'=1+1" (OWASP CSV injection guidance)', () => {
    expect(textField('=1+1')).toBe(`"'=1+1"`);
  });

  it('neutralises every dangerous first character: + - @ tab CR NUL', () => {
    expect(textField('+41')).toBe(`"'+41"`);
    expect(textField('-2')).toBe(`"'-2"`);
    expect(textField('@SUM(A1)')).toBe(`"'@SUM(A1)"`);
    expect(textField('\tx')).toBe(`"'\tx"`);
    expect(textField('\rx')).toBe(`"'\rx"`);
    expect(textField('\0x')).toBe(`"'\0x"`);
  });

  it('neutralises a trigger behind leading spaces, and the full-width ＝ ＋ － ＠ (U+FF1D U+FF0B U+FF0D U+FF20)', () => {
    expect(textField('  =1+1')).toBe(`"'  =1+1"`);
    expect(textField('   -2+3')).toBe(`"'   -2+3"`);
    // The tab is a delimiter too: a program splitting on tabs would start a cell at "@x", so it gets its own '.
    expect(textField(' \t@x')).toBe(`"' \t'@x"`);
    expect(textField('\uFF1DSUM(A1)')).toBe(`"'\uFF1DSUM(A1)"`);
    expect(textField('\uFF0B1')).toBe(`"'\uFF0B1"`);
    expect(textField('\uFF0D1')).toBe(`"'\uFF0D1"`);
    expect(textField('\uFF20x')).toBe(`"'\uFF20x"`);
    expect(textField('\u3000\uFF1D1')).toBe(`"'\u3000\uFF1D1"`);
    // Ordinary text with a sign inside is left alone.
    expect(textField('R1 - R2')).toBe('R1 - R2');
    expect(isFormulaLike('a=b')).toBe(false);
  });

  it('quotes a field with a comma, a quote or a line break, doubling inner quotes (RFC 4180 §2)', () => {
    expect(textField('He said "hi", ok')).toBe(`"He said ""hi"", ok"`);
    expect(textField('two\nlines')).toBe(`"two\nlines"`);
    expect(textField('cr\ronly')).toBe(`"cr\ronly"`);
  });

  it('quotes a field holding any of comma, semicolon and tab, in a file of every delimiter', () => {
    for (const o of ALL) {
      expect(exportField('a,b', o)).toBe('"a,b"');
      expect(exportField('a;b', o)).toBe('"a;b"');
      expect(exportField('a\tb', o)).toBe('"a\tb"');
    }
  });

  it('keeps numbers we write as plain numbers, negative ones too, and empty cells empty', () => {
    expect(exportField({ n: -1.5, kind: 'qty' }, COMMA)).toBe('-1.5');
    expect(exportField({ n: 120, kind: 'qty' }, COMMA)).toBe('120');
    expect(exportField({ n: -12.5, kind: 'money' }, SEMICOLON)).toBe('-12,50');
    expect(exportField({ n: NaN, kind: 'money' }, COMMA)).toBe('');
    expect(exportField(undefined, COMMA)).toBe('');
  });

  it('ends every record with CRLF', () => {
    expect(exportText([['a', { n: 1, kind: 'qty' }], ['b', { n: 2, kind: 'qty' }]], COMMA)).toBe('a,1\r\nb,2\r\n');
  });

  it('round-trips through an RFC 4180 reader with the neutralising quote kept visible', () => {
    const rows: ExportCell[][] = [
      ['designators', 'note', 'qty'],
      ['R1, R2', 'say "x"', { n: 3, kind: 'qty' }],
      ['=HYPERLINK("x")', 'line\r\nbreak', { n: -4, kind: 'qty' }],
    ];
    expect(readAs(exportText(rows, COMMA), ',')).toEqual([
      ['designators', 'note', 'qty'],
      ['R1, R2', 'say "x"', '3'],
      [`'=HYPERLINK("x")`, 'line\r\nbreak', '-4'],
    ]);
  });
});

describe('injection in the middle of a cell', () => {
  // Cells that hide a formula behind another delimiter or a line break, and how they read back whole: a ' before
  // each place a cell could start, as at the start of a cell.
  const hostile: [string, string][] = [
    [`X;=cmd|' /C calc'!A0;Y`, `X;'=cmd|' /C calc'!A0;Y`],
    [`X,=cmd|' /C calc'!A0,Y`, `X,'=cmd|' /C calc'!A0,Y`],
    [`X\t=cmd|' /C calc'!A0`, `X\t'=cmd|' /C calc'!A0`],
    [`X;  +1;Y`, `X;'  +1;Y`],
    [`X;\uFF1D1`, `X;'\uFF1D1`],
    [`note\r\n@SUM(A1)`, `note\r\n'@SUM(A1)`],
    [`a, b; c\td`, `a, b; c\td`],
  ];
  const cells = hostile.map(([h]) => h);
  const written = hostile.map(([, w]) => w);

  /** Every way a program may read the file: RFC 4180 with each delimiter, and a naive split that ignores quotes. */
  function everyReading(text: string): string[] {
    const out: string[] = [];
    for (const d of [',', ';', '\t']) {
      out.push(...Papa.parse<string[]>(text, { delimiter: d, newline: '\r\n', skipEmptyLines: true }).data.flat());
      for (const line of text.split(/\r\n|\r|\n/)) out.push(...line.split(d).map((c) => c.replace(/^"+/, '')));
    }
    return out;
  }

  it('never gives a cell that runs as a formula, however a file of any delimiter is split', () => {
    for (const o of ALL) {
      const text = exportText([['before', ...cells, 'after']], o);
      for (const cell of everyReading(text)) expect(runsAsFormula(cell), `${o.delimiter} file: ${JSON.stringify(cell)}`).toBe(false);
      // Read with its own delimiter, every cell comes back whole.
      expect(readAs(text, SEP[o.delimiter])).toEqual([['before', ...written, 'after']]);
    }
  });

  it('is neutralised in the costed BOM and purchase list of a Book whose part descriptions carry it', () => {
    const book = demoBook();
    const costing = value(runCosting(book, book.runs[0]!));
    const ids = costing.bom.lines.slice(0, cells.length).map((l) => l.partId);
    ids.forEach((id, i) => (book.parts.find((p) => p.id === id)!.description = cells[i]!));
    const c = value(runCosting(book, book.runs[0]!));
    for (const o of ALL) {
      const files = [value(costedBomCsv(c, o)), value(purchaseListCsv(c, purchaseList(c.bom, { dateWanted: book.runs[0]!.dateWanted }), o))];
      for (const text of files) {
        // The table block, between the head and the totals.
        const rows = csvBlocks(text, SEP[o.delimiter])[1]!;
        const descriptions = rows.slice(1).map((r) => r[rows[0]!.indexOf('description')]);
        for (const w of written) expect(descriptions).toContain(w);
        for (const cell of everyReading(text)) expect(runsAsFormula(cell), `${o.delimiter}: ${JSON.stringify(cell)}`).toBe(false);
      }
    }
  });
});
