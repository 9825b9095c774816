// Costed BOM and purchase list CSV: read back with an RFC 4180 reader, every value equals the costing's; the
// delimiter, decimal and byte-order-mark choices; formula-injection neutralising with numbers left as numbers.
import { beforeAll, describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { demoBook } from '../../src/domain/demo-book.ts';
import type { Book, Run } from '../../src/domain/book.ts';
import { toCents, toTenThousandths } from '../../src/domain/costing.ts';
import { freezeRun } from '../../src/domain/freeze.ts';
import { MAINS_CAUTION } from '../../src/domain/mains-caution.ts';
import { purchaseList } from '../../src/domain/purchase.ts';
import {
  COSTED_LEFTOVER_COLUMN,
  COSTED_TOTAL_COLUMN,
  costedBomCsv,
  costedBomHeader,
  costedTotalLabels,
  exportBytes,
  exportField,
  exportText,
  numberText,
  parseExportOptions,
  purchaseListCsv,
  runCosting,
} from '../../src/io/run-export.ts';
import type { ExportOptions, RunCosting } from '../../src/io/run-export.ts';
import { value } from './costing-fixtures.ts';
import { csvBlocks, csvRecords, labelled } from './csv-blocks.ts';

/** The table block of a run file: its header row, then one row per line. */
function parse(text: string, delimiter = ','): string[][] {
  return csvBlocks(text, delimiter)[1]!;
}

/** A CSV amount back to integer cents / quantity, from point or comma decimals. */
const num = (cell: string, decimal: ',' | '.' = '.'): number => Number(decimal === ',' ? cell.replace(',', '.') : cell);
const cents = (cell: string, decimal: ',' | '.' = '.'): number => Math.round(num(cell, decimal) * 100);

let book: Book;
let run: Run;
let costing: RunCosting;

beforeAll(() => {
  book = demoBook();
  run = book.runs[0]!;
  costing = value(runCosting(book, run));
});

describe('costed BOM CSV', () => {
  it('reads back with every line value equal to the costing: quantities exactly, money to the cent', () => {
    const rows = parse(value(costedBomCsv(costing)));
    const head = rows[0]!;
    expect(head).toEqual(costedBomHeader('EUR'));
    const at = (name: string): number => head.indexOf(name);
    const lines = costing.bom.lines;
    expect(lines.length).toBeGreaterThan(10);
    for (let i = 0; i < lines.length; i++) {
      const l = lines[i]!;
      const r = rows[i + 1]!;
      expect(r.length).toBe(head.length);
      expect(r[at('designators')]).toBe(l.designators);
      expect(r[at('mpn')]).toBe(l.mpn);
      expect(r[at('description')]).toBe(l.description);
      expect(r[at('supplier')]).toBe(l.supplier);
      expect(r[at('supplier_code')]).toBe(l.supplierCode);
      expect(r[at('currency')]).toBe(l.currency);
      expect(num(r[at('need')]!)).toBe(l.need);
      expect(num(r[at('buy')]!)).toBe(l.buy);
      expect(num(r[at('qty_per_unit')]!)).toBe(l.qtyPerUnit);
      expect(num(r[at('break_qty')]!)).toBe(l.breakQty);
      expect(num(r[at('leftover')]!)).toBe(l.leftover);
      // Unit prices are written as quoted, so they read back as the very same number.
      expect(num(r[at('unit_price')]!)).toBe(l.unitPrice);
      expect(cents(r[at('extended')]!)).toBe(toCents(l.extended));
      expect(cents(r[at('extended_EUR')]!)).toBe(toCents(l.extendedBase));
      expect(cents(r[at('freight_EUR')]!)).toBe(toCents(l.freight ?? 0));
      expect(cents(r[at('duty_EUR')]!)).toBe(toCents(l.duty ?? 0));
      expect(cents(r[at('charges_EUR')]!)).toBe(toCents(l.charges ?? 0));
      expect(r[at('incoterm')]).toBe(l.incoterm ?? '');
      expect(cents(r[at('leftover_value_EUR')]!)).toBe(toCents(l.leftoverValue));
    }
  });

  it('ends with a totals block of its own, equal to the costing and to the sum of the exported rows, to the cent', () => {
    const text = value(costedBomCsv(costing));
    const rows = parse(text);
    const totals = csvBlocks(text)[2]!;
    const labels = costedTotalLabels('EUR', book.settings.marginPct);
    // The totals are label and value; no total sits among the lines.
    const total = (label: string): string => {
      const r = totals.find((x) => x[0] === label);
      if (!r) throw new Error(`no row ${label}`);
      return r[1]!;
    };
    for (const label of Object.values(labels)) expect(rows.some((r) => r[0] === label)).toBe(false);
    const bom = costing.bom;
    expect(rows.length).toBe(1 + bom.lines.length + bom.problems.length);
    const body = rows.slice(1, 1 + bom.lines.length);
    const sumCents = (col: number): number => body.reduce((s, r) => s + cents(r[col]!), 0);
    expect(cents(total(labels.materialRun))).toBe(toCents(bom.materialRun));
    expect(cents(total(labels.materialRun))).toBe(sumCents(COSTED_TOTAL_COLUMN));
    expect(cents(total(labels.leftoverValue))).toBe(sumCents(COSTED_LEFTOVER_COLUMN));
    expect(cents(total(labels.runTotal))).toBe(toCents(bom.runTotal));
    expect(cents(total(labels.runTotal))).toBe(
      cents(total(labels.materialRun)) + cents(total(labels.conversionRun)),
    );
    const tt = (label: string): number => Math.round(num(total(label)) * 10_000);
    expect(tt(labels.unitCost)).toBe(toTenThousandths(bom.unitCost));
    expect(tt(labels.unitCost)).toBe(tt(labels.material) + tt(labels.labour) + tt(labels.test) + tt(labels.overhead));
    expect(tt(labels.price)).toBe(toTenThousandths(bom.price));
  });

  it('writes semicolons and decimal commas when asked, with the same values', () => {
    const o: ExportOptions = { delimiter: 'semicolon', decimal: 'comma', bom: false };
    const text = value(costedBomCsv(costing, o));
    const rows = parse(text, ';');
    const at = rows[0]!.indexOf('extended_EUR');
    costing.bom.lines.forEach((l, i) => {
      expect(rows[i + 1]![at]).toMatch(/^\d+,\d{2}$/);
      expect(cents(rows[i + 1]![at]!, ',')).toBe(toCents(l.extendedBase));
    });
    // A description holding a comma is quoted even here: a program that guesses a comma delimiter keeps it whole.
    expect(text).toContain('"Fuse 1.6 A time-lag, 250 V AC, radial";');
  });

  it('writes tabs, quoting fields that hold any delimiter (tab, comma, semicolon), a quote or a line break', () => {
    const text = exportText([['a\tb', 'c, d', 'e'], [{ n: 2, kind: 'qty' }, 'say "x"', undefined]], { delimiter: 'tab', decimal: 'point', bom: false });
    expect(text).toBe('"a\tb"\t"c, d"\te\r\n2\t"say ""x"""\t\r\n');
  });

  it('starts with the UTF-8 byte-order mark EF BB BF only when asked (Unicode standard §23.8)', () => {
    const plain = exportBytes(value(costedBomCsv(costing)));
    const marked = exportBytes(value(costedBomCsv(costing, { delimiter: 'comma', decimal: 'point', bom: true })));
    expect([...marked.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    expect(plain[0]).toBe('f'.charCodeAt(0));
    expect(marked.length).toBe(plain.length + 3);
    expect(Buffer.from(marked.slice(3)).equals(Buffer.from(plain))).toBe(true);
  });

  it('refuses a decimal comma with a comma delimiter, and unknown words, with a message', () => {
    expect(costedBomCsv(costing, { delimiter: 'comma', decimal: 'comma', bom: false })).toEqual({
      ok: false,
      error: expect.stringMatching(/decimal comma.*semicolon or tab/) as unknown as string,
    });
    expect(parseExportOptions({ delimiter: 'pipe' })).toMatchObject({ ok: false, error: expect.stringMatching(/delimiter must be one of comma, semicolon, tab/) });
    expect(parseExportOptions({ decimal: 'dot' })).toMatchObject({ ok: false, error: expect.stringMatching(/decimal style must be one of point, comma/) });
    expect(parseExportOptions({ delimiter: 'Semicolon', decimal: 'comma', bom: true })).toEqual({ ok: true, value: { delimiter: 'semicolon', decimal: 'comma', bom: true } });
  });
});

describe('the head and the blocks of a run file', () => {
  it('names the file, the run, its variant and quantity, the freeze, the quotes’ date and the rates used, above the table', () => {
    const text = value(costedBomCsv(costing, undefined, { run: run.name }));
    const [head, table, totals] = csvBlocks(text);
    const h = labelled(head!);
    expect(h.get('file')).toBe('costed BOM');
    expect(h.get('run')).toBe(run.name);
    expect(h.get('variant')).toBe(costing.bom.variant);
    expect(Number(h.get('quantity'))).toBe(run.quantity);
    expect(h.get('frozen')).toMatch(/^no/);
    expect(h.get('quotes valid on')).toBe(costing.bom.date);
    expect(h.get('base currency')).toBe('EUR');
    // The demo prices lines in USD and GBP: their rates, as the Book holds them.
    for (const cur of ['GBP', 'USD']) expect(Number(h.get(`rate ${cur} (EUR for one ${cur})`))).toBe(book.settings.rates[cur]);
    expect(table![0]).toEqual(costedBomHeader('EUR'));
    expect(totals!.length).toBeGreaterThan(5);
  });

  it('carries the mains caution in full in the head of both run files, the very text the app shows', () => {
    const list = purchaseList(costing.bom, { dateWanted: run.dateWanted });
    for (const o of [undefined, { delimiter: 'semicolon', decimal: 'comma', bom: false }] as (ExportOptions | undefined)[]) {
      const sep = o?.delimiter === 'semicolon' ? ';' : ',';
      for (const text of [value(costedBomCsv(costing, o, { run: run.name })), value(purchaseListCsv(costing, list, o, { run: run.name }))]) {
        const head = labelled(csvBlocks(text, sep)[0]!);
        expect(head.get('mains caution')).toBe(MAINS_CAUTION);
        expect(MAINS_CAUTION).toMatch(/can kill.*not a certification.*local electrical codes.*qualified person/);
      }
    }
  });

  it('gives a frozen run’s freeze time and its frozen rates, not today’s', () => {
    const frozenRun = { ...run, frozen: undefined };
    const b2: Book = { ...book, settings: { ...book.settings, rates: { ...book.settings.rates, USD: 0.5 } } };
    const snap = value(runCosting(book, frozenRun));
    const frozen = value(freezeRun(frozenRun, snap.bom, book, new Date('2026-09-01T10:00:00Z')));
    const c = value(runCosting(b2, frozen));
    const h = labelled(csvBlocks(value(costedBomCsv(c, undefined, { run: frozen.name })))[0]!);
    expect(h.get('frozen')).toBe(frozen.frozen!.at);
    expect(Number(h.get('rate USD (EUR for one USD)'))).toBe(book.settings.rates['USD']);
  });

  it('keeps RFC 4180 in both files: every record as wide as the others, one empty record between blocks, CRLF after each', () => {
    for (const o of [
      { delimiter: 'comma', decimal: 'point', bom: false },
      { delimiter: 'semicolon', decimal: 'comma', bom: true },
    ] as ExportOptions[]) {
      const sep = o.delimiter === 'comma' ? ',' : ';';
      const files = [value(costedBomCsv(costing, o)), value(purchaseListCsv(costing, purchaseList(costing.bom, { dateWanted: run.dateWanted }), o))];
      for (const text of files) {
        expect(text.endsWith('\r\n')).toBe(true);
        expect(text.replace(/\r\n/g, '').includes('\n')).toBe(false);
        const records = csvRecords(text, sep);
        for (const r of records) expect(r.length).toBe(records[0]!.length);
        expect(records.filter((r) => r.every((c) => c === '')).length).toBe(2);
        expect(csvBlocks(text, sep)).toHaveLength(3);
      }
    }
  });

  it('ends the purchase list with each supplier’s totals and all suppliers’, equal to the sums of its lines', () => {
    const list = purchaseList(costing.bom, { dateWanted: run.dateWanted });
    const [head, table, totals] = csvBlocks(value(purchaseListCsv(costing, list, undefined, { run: run.name })));
    expect(labelled(head!).get('date wanted')).toBe(run.dateWanted);
    const at = table![0]!.indexOf('line_price_EUR');
    const t = labelled(totals!);
    let all = 0;
    for (const o of list.orders) {
      const mine = table!.slice(1).filter((r) => r[0] === o.supplier && r[table![0]!.indexOf('currency')] === o.currency);
      const base = mine.reduce((s, r) => s + cents(r[at]!), 0);
      const own = mine.reduce((s, r) => s + cents(r[table![0]!.indexOf('line_price')]!), 0);
      expect(cents(t.get(`total ${o.supplier} (${o.currency})`)!)).toBe(own);
      expect(cents(t.get(`total ${o.supplier} (EUR)`)!)).toBe(base);
      all += base;
    }
    expect(cents(t.get('all suppliers (EUR)')!)).toBe(all);
  });
});

describe('formula-injection safety (OWASP CSV injection guidance; OWASP ASVS 5.0 1.2.10)', () => {
  const dangerous = ['=', '+', '-', '@', '\t', '\r'];

  it('neutralises parts whose descriptions start with each dangerous character, in both files', () => {
    const b = demoBook();
    const used = costing.bom.lines.slice(0, dangerous.length).map((l) => l.partId);
    used.forEach((id, i) => {
      const part = b.parts.find((p) => p.id === id)!;
      part.description = `${dangerous[i]}1+2 cmd|' /C calc'!A0`;
    });
    const c = value(runCosting(b, b.runs[0]!));
    for (const o of [
      { delimiter: 'comma', decimal: 'point', bom: false },
      { delimiter: 'semicolon', decimal: 'comma', bom: false },
      { delimiter: 'tab', decimal: 'point', bom: false },
    ] as ExportOptions[]) {
      const sep = { comma: ',', semicolon: ';', tab: '\t' }[o.delimiter];
      const files = [value(costedBomCsv(c, o)), value(purchaseListCsv(c, purchaseList(c.bom, { dateWanted: b.runs[0]!.dateWanted }), o))];
      for (const text of files) {
        const rows = parse(text, sep);
        const head = rows[0]!;
        const descriptions = rows.slice(1).map((r) => r[head.indexOf('description')]!);
        for (const ch of dangerous) {
          const cell = descriptions.find((d) => d.startsWith(`'${ch}1+2`));
          // Kept as text behind a leading apostrophe, quoted, the original after it untouched.
          expect(cell, `${JSON.stringify(ch)} in ${o.delimiter}`).toBe(`'${ch}1+2 cmd|' /C calc'!A0`);
          expect(descriptions.some((d) => d.startsWith(ch))).toBe(false);
        }
      }
    }
  });

  it('leaves a negative number as a plain number while a text that looks like one is neutralised', () => {
    const o: ExportOptions = { delimiter: 'comma', decimal: 'point', bom: false };
    expect(exportField({ n: -12.5, kind: 'money' }, o)).toBe('-12.50');
    expect(exportField({ n: -3, kind: 'qty' }, o)).toBe('-3');
    expect(exportField({ n: -0.0035, kind: 'price' }, o)).toBe('-0.0035');
    expect(exportField('-3', o)).toBe(`"'-3"`);
    expect(exportField({ n: -12.5, kind: 'money' }, { delimiter: 'semicolon', decimal: 'comma', bom: false })).toBe('-12,50');
    const rows = Papa.parse<unknown[]>(exportText([['delta', { n: -12.5, kind: 'money' }, '-3']], o), { dynamicTyping: true }).data;
    expect(rows[0]).toEqual(['delta', -12.5, "'-3"]);
  });
});

describe('number writing', () => {
  it('writes amounts from integer cents so binary float error never shows (1.005 rounds to 1.01, costing rule)', () => {
    expect(numberText({ n: 1.005, kind: 'money' })).toBe('1.01');
    expect(numberText({ n: 0.1 + 0.2, kind: 'money' })).toBe('0.30');
    expect(numberText({ n: 7.91825, kind: 'unit' })).toBe('7.9183');
    expect(numberText({ n: 1234567.8, kind: 'money' })).toBe('1234567.80');
  });
  it('writes prices as quoted, never in exponent form', () => {
    expect(numberText({ n: 0.0035, kind: 'price' })).toBe('0.0035');
    expect(numberText({ n: 2, kind: 'price' })).toBe('2.00');
    expect(numberText({ n: 0.1, kind: 'price' })).toBe('0.10');
    expect(numberText({ n: 1e-7, kind: 'price' })).toBe('0.0000001');
    expect(numberText({ n: NaN, kind: 'price' })).toBe('');
  });
});
