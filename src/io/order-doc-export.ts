// The supplier's order document as CSV, through the one CSV writer (csv-write.ts: RFC 4180, formula text neutralised,
// the delimiter, decimal and byte-order-mark choices). Three blocks, one empty record between them: who and where
// (label, value), the lines (a header row, then one row per line), and the totals (label, value). The app's download
// and the CLI's `order-doc` both take their bytes from here.
import type { Result } from '../domain/costing.ts';
import type { OrderDocument } from '../domain/order-doc.ts';
import { DEFAULT_EXPORT_OPTIONS, NUMBER_KINDS, blockRows, exportOptionsProblem, exportText } from './csv-write.ts';
import type { ExportCell, ExportOptions, NumberCell } from './csv-write.ts';
import { fileSlug } from './run-export.ts';

const qty = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.qty });
const money = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.money });
const price = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.price });

/** What the document says in place of a number while it is a draft. */
export const DRAFT_NUMBER = 'draft: not yet placed, numbered when placed';

/** Column names of the document's lines: only what the supplier needs. */
export const ORDER_DOC_COLUMNS = [
  'line',
  'supplier_code',
  'our_part_number',
  'maker',
  'description',
  'quantity',
  'unit_price',
  'currency',
  'line_total',
  'delivery_term',
  'quote_reference',
] as const;

/** Labels of the document's head, in file and page order, with their values. */
export function orderDocHead(doc: OrderDocument): [string, string][] {
  return [
    ['purchase order', doc.number ?? DRAFT_NUMBER],
    ['from', doc.company],
    ['ship to', doc.shipTo],
    ['supplier', doc.supplier.name],
    ['supplier address', doc.supplier.address],
    ['payment terms', doc.supplier.paymentTerms],
    ['order date', doc.orderedDate],
    ['delivery date', doc.dueDate],
    ['delivery terms (Incoterms 2020)', doc.deliveryTerms.join(', ')],
  ];
}

/** The label of an order total line. */
export function orderTotalLabel(currency: string): string {
  return `order total (${currency})`;
}

/** The document as rows: the head block, the lines block and the totals block. */
export function orderDocRows(doc: OrderDocument): ExportCell[][] {
  const lines: ExportCell[][] = [[...ORDER_DOC_COLUMNS]];
  for (const l of doc.lines) {
    lines.push([qty(l.line), l.supplierCode, l.mpn, l.maker, l.description, qty(l.quantity), price(l.unitPrice), l.currency, money(l.lineTotal), l.deliveryTerm, l.quoteRef]);
  }
  const totals: ExportCell[][] = doc.totals.map((t) => [orderTotalLabel(t.currency), money(t.total)]);
  return blockRows([orderDocHead(doc), lines, totals]);
}

/** The document's CSV text (byte-order mark included when chosen). Clashing choices give a message. */
export function orderDocCsv(doc: OrderDocument, o: ExportOptions = DEFAULT_EXPORT_OPTIONS): Result<string> {
  const bad = exportOptionsProblem(o);
  if (bad) return { ok: false, error: bad };
  return { ok: true, value: exportText(orderDocRows(doc), o) };
}

/**
 * File name of a document: our order number and the supplier ("TAC-7-Halvern-Component-Supply-order.csv"); a draft
 * names its currency too, since a supplier quoting in two currencies gets a draft for each
 * ("draft-Kelvaro-Parts-Direct-USD-order.csv").
 */
export function orderDocFileName(doc: OrderDocument): string {
  const currency = doc.number === undefined && doc.totals.length > 0 ? `-${fileSlug(doc.totals.map((t) => t.currency).join('-'))}` : '';
  return `${fileSlug(doc.number ?? 'draft')}-${fileSlug(doc.supplier.name)}${currency}-order.csv`;
}
