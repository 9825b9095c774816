// The awkward-file corpus for reading: delimiters, line endings, quoting (RFC 4180 §2), lines before the header,
// trailing blank rows, duplicate and missing headers, inert formula-looking and HTML text, very long fields.
import { describe, expect, it } from 'vitest';
import { LIMITS } from '../../src/domain/schema.ts';
import { readPriceTable } from '../../src/io/price-read.ts';
import { analyse } from './import-helpers.ts';

function table(text: string) {
  const r = readPriceTable(text);
  if (!r.ok) throw new Error(`expected a table, got ${JSON.stringify(r.problems)}`);
  return r.table;
}

describe('reading price files: delimiters', () => {
  const rows = [
    ['MPN', 'Order code', 'Qty', 'Price'],
    ['QT-R10K-06', 'QS-1001', '100', '0.05'],
  ];
  for (const [name, d] of [
    ['comma', ','],
    ['semicolon', ';'],
    ['tab', '\t'],
    ['pipe', '|'],
  ] as const) {
    it(`detects a ${name}-separated file`, () => {
      const t = table(rows.map((r) => r.join(d)).join('\n'));
      expect(t.delimiter).toBe(d);
      expect(t.headers).toEqual(rows[0]);
      expect(t.rows.map((r) => r.cells)).toEqual([rows[1]]);
    });
  }

  it('chooses semicolon over comma when decimal commas make the data look comma-separated', () => {
    const text = 'MPN;Price;Qty\nQT-R10K-06;0,05;100\nQT-C100N-50;1,25;10\n';
    const t = table(text);
    expect(t.delimiter).toBe(';');
    expect(t.rows[1]!.cells).toEqual(['QT-C100N-50', '1,25', '10']);
  });
});

describe('reading price files: lines and quoting', () => {
  it('reads CRLF and LF files alike', () => {
    const lf = table('MPN,Price\nA-1,1\nB-2,2\n');
    const crlf = table('MPN,Price\r\nA-1,1\r\nB-2,2\r\n');
    expect(crlf.rows.map((r) => r.cells)).toEqual(lf.rows.map((r) => r.cells));
    expect(crlf.rows.map((r) => r.line)).toEqual([2, 3]);
  });

  it('reads a file with old lone-CR line ends', () => {
    const t = table('MPN,Price\rA-1,1\rB-2,2\r');
    expect(t.rows.map((r) => [r.line, r.cells[0]])).toEqual([
      [2, 'A-1'],
      [3, 'B-2'],
    ]);
  });

  it('keeps delimiters, doubled quotes and line breaks inside quoted fields (RFC 4180 §2 rules 5–7)', () => {
    const text = 'MPN,Description,Price\r\n"QT-R10K-06","10 k, 1 %, ""thin film""\r\nsecond line",0.05\r\nQT-C100N-50,plain,0.10\r\n';
    const t = table(text);
    expect(t.rows[0]!.cells).toEqual(['QT-R10K-06', '10 k, 1 %, "thin film"\r\nsecond line', '0.05']);
    // The second record starts on file line 4 because the first spans lines 2 and 3.
    expect(t.rows.map((r) => r.line)).toEqual([2, 4]);
  });

  it('finds the header below title, blank and comment lines and numbers rows by file line', () => {
    const text = [
      'Quillmoor Test Supply — price list',
      '# generated 2026-11-30',
      '',
      '// all prices net',
      'MPN,Qty,Price',
      'QT-R10K-06,100,0.05',
    ].join('\n');
    const t = table(text);
    expect(t.headerLine).toBe(5);
    expect(t.rows).toEqual([{ line: 6, cells: ['QT-R10K-06', '100', '0.05'] }]);
    expect(t.notes.join(' ')).toMatch(/header found on line 5/);
  });

  it('ignores blank lines between rows and trailing empty rows, including rows of empty cells', () => {
    const t = table('MPN,Qty,Price\nA-1,1,1\n\nB-2,1,2\n,,\n\n\n,,\n');
    expect(t.rows.map((r) => [r.line, r.cells[0]])).toEqual([
      [2, 'A-1'],
      [4, 'B-2'],
    ]);
  });

  it('reports a row with more cells than the header (an unquoted delimiter) as a problem', () => {
    const t = table('MPN,Qty,Price\nA-1,1,0,05\n');
    expect(t.problems).toEqual([
      { row: 2, column: '', value: '05', reason: expect.stringMatching(/4 cells but the header has 3.*double quotes/) },
    ]);
  });

  it('reports an unclosed quote', () => {
    const t = table('MPN,Description,Price\nA-1,"open ended,1\n');
    expect(t.problems[0]).toMatchObject({ row: 2, reason: expect.stringMatching(/quoted field is not closed/) });
  });
});

describe('reading price files: headers', () => {
  it('says so when the file has a header but no data rows', () => {
    const r = readPriceTable('MPN,Qty,Price\r\n\r\n');
    expect(r.ok).toBe(false);
    expect(!r.ok && r.problems[0]).toMatchObject({ row: 1, reason: 'the file has a header row (line 1) but no data rows' });
  });

  it('says so when no line looks like a header', () => {
    const r = readPriceTable('hello,world\n1,2\n3,4\n');
    expect(r.ok).toBe(false);
    expect(!r.ok && r.problems[0]!.reason).toMatch(/no header row found.*'MPN'/);
  });

  it('blocks a duplicate header that a field depends on, naming it', async () => {
    const a = await analyse('MPN,Price,Price\nQT-R10K-06,0.05,0.06\n');
    expect(a.offers).toEqual([]);
    expect(a.problems).toContainEqual({ row: 1, column: 'Price', value: 'Price', reason: expect.stringMatching(/duplicate column header/) });
  });

  it('only notes a duplicate header the import does not read', async () => {
    const a = await analyse('MPN,Price,Remark,Remark\nQT-R10K-06,0.05,a,b\n');
    expect(a.problems).toEqual([]);
    expect(a.notes.join(' ')).toMatch(/duplicate column headers not used by the import: Remark/);
  });

  it('uses a saved mapping to find a header whose words it would not guess', () => {
    const r = readPriceTable('Artikel;Preis\nQT-R10K-06;0,05\n', { mapping: { columns: { mpn: 'Artikel', price: 'Preis' }, layout: 'long' } });
    expect(r.ok && r.table.headers).toEqual(['Artikel', 'Preis']);
  });
});

describe('reading price files: hostile and unusual cell text stays inert text', () => {
  it('keeps formula-looking text exactly as written', async () => {
    const a = await analyse('MPN,Description,Order code,Price\nQT-R10K-06,=1+2,@SUM(A1),0.05\n');
    expect(a.problems).toEqual([]);
    expect(a.offers[0]).toMatchObject({ description: '=1+2', supplierCode: '@SUM(A1)' });
  });

  it('keeps HTML in a description as plain text', async () => {
    const html = '<img src=x onerror="alert(1)"><b>bold</b>';
    const a = await analyse(`MPN,Description,Price\nQT-R10K-06,"${html.replace(/"/g, '""')}",0.05\n`);
    expect(a.offers[0]!.description).toBe(html);
  });

  it('reads a description as long as the Book allows whole, and names a longer one as a problem of its row', async () => {
    const long = 'x'.repeat(LIMITS.description);
    const a = await analyse(`MPN,Description,Price\nQT-R10K-06,"${long}",0.05\nQT-C100N-50,short,0.10\n`);
    expect(a.problems).toEqual([]);
    expect(a.offers[0]!.description).toHaveLength(LIMITS.description);
    expect(a.offers[1]!.line).toBe(3);
    const over = await analyse(`MPN,Description,Price\nQT-R10K-06,"${'x'.repeat(10_000)}",0.05\nQT-C100N-50,short,0.10\n`);
    expect(over.problems).toEqual([
      expect.objectContaining({ row: 2, column: 'Description', reason: 'is 10,000 characters long; at most 4,000 are allowed' }),
    ]);
    expect(over.problems[0]!.value.length).toBeLessThanOrEqual(200);
    expect(over.offers.map((o) => o.line)).toEqual([3]);
  });
});
