// The supplier's order document read as the supplier would read it: parsed back with papaparse, it names only what
// they need (no need, designators, base-currency figures, reasons, margins, run costs), is RFC 4180, keeps hostile
// text from running as a formula, and its totals are the sums of its lines.
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import type { Book, Quote } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { orderDocumentOf, purchaseDocuments, quoteUsed, suggestionDocuments } from '../../src/domain/order-doc.ts';
import type { OrderDocument } from '../../src/domain/order-doc.ts';
import { placeOrder } from '../../src/domain/orders.ts';
import { purchaseList } from '../../src/domain/purchase.ts';
import { DRAFT_NUMBER, ORDER_DOC_COLUMNS, orderDocCsv, orderDocFileName } from '../../src/io/order-doc-export.ts';
import type { ExportOptions } from '../../src/io/csv-write.ts';
import { planBook } from '../../src/io/plan-export.ts';
import { purchaseListHeader, runCosting } from '../../src/io/run-export.ts';

const COMMA: ExportOptions = { delimiter: 'comma', decimal: 'point', bom: false };
const SEMICOLON: ExportOptions = { delimiter: 'semicolon', decimal: 'comma', bom: true };

/** The file as a supplier's program reads it (RFC 4180 reader), split into its blocks at the all-empty records. */
function readBlocks(text: string, delimiter = ','): string[][][] {
  const r = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { delimiter, newline: '\r\n' });
  expect(r.errors).toEqual([]);
  const rows = r.data.filter((row, i) => !(i === r.data.length - 1 && row.length === 1 && row[0] === ''));
  const blocks: string[][][] = [[]];
  for (const row of rows) {
    if (row.every((c) => c === '')) blocks.push([]);
    else blocks[blocks.length - 1]!.push(row);
  }
  return blocks;
}

/** The unit price of the highest break at or below `qty` (all-units price breaks), from the quote itself. */
function breakPrice(q: Quote, qty: number): number {
  let p = Number.NaN;
  for (const b of q.breaks) if (b.qty <= qty) p = b.price;
  return p;
}

/** A demo Book with an order placed with the USD supplier, each line priced from its quote's break at the quantity. */
function bookWithOrder(edit: (b: Book) => void = () => {}): { book: Book; quantities: Map<string, number> } {
  const book = demoBook();
  edit(book);
  const quotes = book.quotes.filter((q) => q.supplierId === 'sup_kelvaro' && !q.supersededBy).slice(0, 4);
  expect(quotes.length).toBeGreaterThanOrEqual(2);
  const quantities = new Map(quotes.map((q, i) => [q.id, Math.max(q.moq, q.breaks[0]!.qty) * (i + 3)] as const));
  const placed = placeOrder(book, {
    supplierId: 'sup_kelvaro',
    orderedDate: '2026-10-02',
    dueDate: '2026-11-20',
    lines: quotes.map((q) => ({ partId: q.partId, quantity: quantities.get(q.id)!, price: breakPrice(q, quantities.get(q.id)!), currency: q.currency, quoteId: q.id })),
  });
  if (!placed.ok) throw new Error(placed.error);
  book.orders.push(placed.value.order);
  return { book, quantities };
}

function docOf(book: Book): OrderDocument {
  return orderDocumentOf(book, book.orders[0]!);
}

describe('the order document a supplier receives', () => {
  it('names our firm, order number, ship-to, the supplier, their terms and the dates, then the lines and the total', () => {
    const { book } = bookWithOrder();
    const doc = docOf(book);
    const csv = orderDocCsv(doc, COMMA);
    expect(csv.ok).toBe(true);
    const [head, lines, totals] = readBlocks(csv.ok ? csv.value : '');
    const field = new Map(head!.map((r) => [r[0]!, r[1]!] as const));
    const kelvaro = book.suppliers.find((s) => s.id === 'sup_kelvaro')!;
    expect(field.get('purchase order')).toBe(book.orders[0]!.number);
    expect(field.get('from')).toBe(book.settings.company);
    expect(field.get('ship to')).toBe(book.settings.shipTo);
    expect(field.get('ship to')).toContain('\n');
    expect(field.get('supplier')).toBe(kelvaro.name);
    expect(field.get('supplier address')).toBe(kelvaro.address);
    expect(field.get('payment terms')).toBe(kelvaro.paymentTerms);
    expect(field.get('order date')).toBe('2026-10-02');
    expect(field.get('delivery date')).toBe('2026-11-20');
    expect(lines![0]).toEqual([...ORDER_DOC_COLUMNS]);
    expect(lines!.length - 1).toBe(book.orders[0]!.lines.length);
    // Each line: the supplier's code from the quote, our mpn and maker, and the quote named by its source and date.
    for (const [i, l] of book.orders[0]!.lines.entries()) {
      const row = lines![i + 1]!;
      const q = book.quotes.find((x) => x.id === l.quoteId)!;
      const part = book.parts.find((p) => p.id === l.partId)!;
      expect(row[1]).toBe(q.supplierCode);
      expect(row[2]).toBe(part.mpn);
      expect(row[3]).toBe(part.maker);
      expect(row[10]).toContain(q.date);
      expect(row[7]).toBe('USD');
    }
    expect(totals![0]![0]).toBe('order total (USD)');
    expect(orderDocFileName(doc)).toBe(`${book.orders[0]!.number}-Kelvaro-Parts-Direct-order.csv`);
  });

  it('names on the Orders page the quote each line used, as the document does: their part number, source and date', () => {
    const { book } = bookWithOrder();
    const order = book.orders[0]!;
    // One line priced by hand, one whose quote has since been removed.
    const { quoteId: _q, ...byHand } = order.lines[0]!;
    order.lines.push(byHand, { ...order.lines[1]!, quoteId: 'quote_removed' });
    const doc = docOf(book);
    const shown = order.lines.map((l, i) => quoteUsed(l.quoteId, doc.lines[i]!));
    order.lines.slice(0, -2).forEach((l, i) => {
      const q = book.quotes.find((x) => x.id === l.quoteId)!;
      expect(shown[i]).toBe(`${q.supplierCode}, ${doc.lines[i]!.quoteRef}`);
      expect(shown[i]).toContain(q.date);
    });
    expect(shown.slice(-2)).toEqual(['—', 'quote quote_removed, no longer in the Book']);
  });

  it('carries no internal column or value: no need, designators, base-currency figures, reasons, margins or run costs', () => {
    const { book } = bookWithOrder();
    const doc = docOf(book);
    const csv = orderDocCsv(doc, COMMA);
    const text = csv.ok ? csv.value : '';
    const blocks = readBlocks(text);
    const columns = blocks[1]![0]!;
    const labels = blocks.flatMap((b) => b.map((r) => r[0]!));
    // The purchase list's internal columns, base-currency column names included (the buyer's own view).
    const internal = ['need', 'designators', 'order_reason', 'packs', 'moq', 'lead_days', 'latest_order_date', 'line_price_EUR', 'extended_EUR', 'leftover', 'margin'];
    for (const name of internal) {
      expect(columns).not.toContain(name);
      expect(text).not.toContain(name);
    }
    for (const name of purchaseListHeader(book.settings.baseCurrency)) if (!['supplier_code', 'description', 'currency', 'unit_price'].includes(name)) expect(columns).not.toContain(name);
    expect(text).not.toMatch(/\bEUR\b/);
    expect(text).not.toMatch(/margin|run total|unit cost|labour|overhead/i);
    // No build line's designators appear as a cell.
    const cells = new Set(blocks.flat(2));
    for (const line of book.buildLines) if (line.designators) expect(cells.has(line.designators)).toBe(false);
    // No line total converted to the base currency at the Book's rate appears.
    const rate = book.settings.rates['USD']!;
    for (const l of doc.lines) {
      const base = (Math.round(l.lineTotal * rate * 100) / 100).toFixed(2);
      if (base !== l.lineTotal.toFixed(2)) expect(cells.has(base)).toBe(false);
    }
    expect(labels).not.toContain('run');
  });

  it('has totals equal to the sum of its lines, each line priced from its quote’s break at the quantity (all-units breaks)', () => {
    const { book, quantities } = bookWithOrder();
    const csv = orderDocCsv(docOf(book), COMMA);
    const [, lines, totals] = readBlocks(csv.ok ? csv.value : '');
    let cents = 0;
    for (const [id, qty] of quantities) {
      const q = book.quotes.find((x) => x.id === id)!;
      const lineCents = Math.round(qty * breakPrice(q, qty) * 100);
      const row = lines!.find((r) => r[1] === q.supplierCode)!;
      expect(Number(row[5])).toBe(qty);
      expect(Math.round(Number(row[8]) * 100)).toBe(lineCents);
      cents += lineCents;
    }
    expect(Math.round(Number(totals![0]![1]) * 100)).toBe(cents);
    expect(cents).toBeGreaterThan(0);
  });

  it('is RFC 4180: CRLF after every record, the same number of fields in each, quotes doubled, delimiters and line breaks kept in quotes', () => {
    const { book } = bookWithOrder((b) => {
      b.settings.shipTo = 'Goods-in, "Dock 2"\nUnit 9; Weir Row\r\nLowbridge';
      const k = b.suppliers.find((s) => s.id === 'sup_kelvaro')!;
      k.address = 'Kelvaro, Export desk\n\t88 Tern Road';
      k.paymentTerms = '50 % with order; rest 30 days';
    });
    for (const [o, sep] of [
      [COMMA, ','],
      [SEMICOLON, ';'],
    ] as const) {
      const csv = orderDocCsv(docOf(book), o);
      expect(csv.ok).toBe(true);
      const text = csv.ok ? csv.value : '';
      expect(text.startsWith('\uFEFF')).toBe(o.bom);
      expect(text.endsWith('\r\n')).toBe(true);
      const r = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { delimiter: sep, newline: '\r\n', skipEmptyLines: false });
      expect(r.errors).toEqual([]);
      const records = r.data.slice(0, -1);
      const width = records[0]!.length;
      for (const rec of records) expect(rec.length).toBe(width);
      const field = new Map(records.map((rec) => [rec[0]!, rec[1]!] as const));
      expect(field.get('ship to')).toBe('Goods-in, "Dock 2"\nUnit 9; Weir Row\r\nLowbridge');
      expect(field.get('payment terms')).toBe('50 % with order; rest 30 days');
      expect(field.get('supplier address')).toBe('Kelvaro, Export desk\n\t88 Tern Road');
      expect(text).toContain('"Goods-in, ""Dock 2""');
    }
  });

  it('keeps a supplier code, address or terms starting with = + - @ as text (OWASP CSV injection guidance, as csv-write.ts does)', () => {
    const { book } = bookWithOrder((b) => {
      const k = b.suppliers.find((s) => s.id === 'sup_kelvaro')!;
      k.address = '=HYPERLINK("http://example.invalid","x")';
      k.paymentTerms = '+30 days';
      b.settings.shipTo = '@Goods-in\n-Dock 2';
      const q = b.quotes.find((x) => x.supplierId === 'sup_kelvaro' && !x.supersededBy)!;
      q.supplierCode = '-KX-100';
    });
    const csv = orderDocCsv(docOf(book), COMMA);
    const text = csv.ok ? csv.value : '';
    const cells = readBlocks(text).flat(2);
    // A spreadsheet program runs a cell as a formula when, after spaces, it starts with one of these.
    for (const c of cells) expect(/^[\s\u3000]*[=+\-@\uFF1D\uFF0B\uFF0D\uFF20]/.test(c)).toBe(false);
    expect(cells).toContain(`'=HYPERLINK("http://example.invalid","x")`);
    expect(cells).toContain("'+30 days");
    expect(cells).toContain("'@Goods-in\n'-Dock 2");
    expect(cells).toContain("'-KX-100");
  });

  it('refuses clashing CSV choices with a message', () => {
    const { book } = bookWithOrder();
    const csv = orderDocCsv(docOf(book), { delimiter: 'comma', decimal: 'comma', bom: false });
    expect(csv.ok).toBe(false);
  });
});

describe('draft documents from a suggested purchase', () => {
  it('gives one document per supplier of a run’s purchase list, unnumbered, with the list’s own quantities and totals', () => {
    const book = demoBook();
    const run = book.runs[0]!;
    const costing = runCosting(book, run);
    expect(costing.ok).toBe(true);
    if (!costing.ok) return;
    const list = purchaseList(costing.value.bom, { dateWanted: run.dateWanted });
    const docs = purchaseDocuments(book, list.orders, '2026-10-02');
    expect(docs.map((d) => d.supplier.name)).toEqual(list.orders.map((o) => o.supplier));
    for (const [i, doc] of docs.entries()) {
      const o = list.orders[i]!;
      expect(doc.number).toBeUndefined();
      expect(doc.lines.map((l) => l.quantity)).toEqual(o.lines.map((p) => p.line.buy));
      expect(doc.totals).toEqual([{ currency: o.currency, total: o.total }]);
      expect(orderDocFileName(doc)).toBe(`draft-${o.supplier.replace(/ /g, '-')}-${o.currency}-order.csv`);
      const csv = orderDocCsv(doc, COMMA);
      const [head, lines] = readBlocks(csv.ok ? csv.value : '');
      expect(head![0]!.slice(0, 2)).toEqual(['purchase order', DRAFT_NUMBER]);
      expect(lines![0]!.slice(0, ORDER_DOC_COLUMNS.length)).toEqual([...ORDER_DOC_COLUMNS]);
      const cells = new Set(readBlocks(csv.ok ? csv.value : '').flat(2));
      for (const p of o.lines) {
        if (p.line.designators) expect(cells.has(p.line.designators)).toBe(false);
        expect(cells.has(p.reason)).toBe(false);
      }
    }
  });

  it('gives one document per suggested order of the plan, due when the suggestion says', () => {
    const book = demoBook();
    // The demo runs are wanted in spring 2027: a plan made in January sees them within its horizon.
    const plan = planBook(book, { today: '2027-01-11' });
    expect(plan.ok).toBe(true);
    if (!plan.ok) return;
    expect(plan.value.suggestions.length).toBeGreaterThan(0);
    const docs = suggestionDocuments(book, plan.value.suggestions, '2027-01-11');
    for (const [i, doc] of docs.entries()) {
      const s = plan.value.suggestions[i]!;
      expect(doc.dueDate).toBe(s.dueIfPlacedToday);
      expect(doc.lines.map((l) => l.supplierCode)).toEqual(s.lines.map((l) => l.supplierCode));
      expect(doc.totals).toEqual([{ currency: s.currency, total: s.total }]);
    }
  });
});
