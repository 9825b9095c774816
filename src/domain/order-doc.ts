// The order document a supplier receives: one per supplier, made from an open order or from a suggested purchase (a
// run's purchase list, a plan's suggestion). It holds only what the supplier needs to deliver and invoice — our firm,
// order number, ship-to address, their name, address and payment terms, dates, their part numbers and ours, the quote
// each price came from, quantities, prices in their currency, line totals, the order total and the delivery term —
// and nothing of our own workings (need, designators, base-currency figures, why more is bought, margins, run costs).
import type { Book, Order } from './book.ts';
import { toCents } from './costing.ts';
import { daysAfter } from './dates.ts';
import type { SupplierOrder } from './purchase.ts';
import type { SupplierSuggestion } from './planning.ts';

export interface OrderDocLine {
  /** 1, 2, 3… in document order. */
  line: number;
  supplierCode: string;
  mpn: string;
  maker: string;
  description: string;
  quantity: number;
  /** Unit price in `currency`, as quoted or agreed. */
  unitPrice: number;
  currency: string;
  /** quantity × unit price, rounded to cents (the costing module's rule), in `currency`. */
  lineTotal: number;
  /** Incoterms 2020 code of the quote, or ''. */
  deliveryTerm: string;
  /** Which quote the price came from: its source and date, or ''. */
  quoteRef: string;
}

export interface OrderDocument {
  /** Our order number; undefined on a draft (a suggested purchase not yet placed). */
  number: string | undefined;
  company: string;
  shipTo: string;
  supplier: { name: string; address: string; paymentTerms: string };
  orderedDate: string;
  dueDate: string;
  lines: OrderDocLine[];
  /** Per currency of the lines, the sum of their line totals in integer cents, divided back: one entry as a rule. */
  totals: { currency: string; total: number }[];
  /** The distinct delivery terms of the lines, in line order. */
  deliveryTerms: string[];
}

/** One line as the sources give it: the part, quantity, price and the quote used. */
export interface OrderDocInput {
  partId: string;
  quantity: number;
  unitPrice: number;
  currency: string;
  quoteId?: string | undefined;
  /** The supplier's code when the source carries it; else the quote's. */
  supplierCode?: string | undefined;
}

/** How a quote is named to the supplier who gave it: its file (or "quote") and date. */
export function quoteReference(quote: { source: string; date: string } | undefined): string {
  if (!quote) return '';
  const source = quote.source.trim();
  return source === '' || source === 'manual' ? `quote of ${quote.date}` : `${source} of ${quote.date}`;
}

/**
 * The quote an order line's price came from, as the Orders page shows it beside the line: the supplier's part number
 * and the quote as the document names it (quoteReference), "—" for a price that came from no quote, or that the
 * quote is no longer in the Book.
 */
export function quoteUsed(quoteId: string | undefined, line: Pick<OrderDocLine, 'supplierCode' | 'quoteRef'>): string {
  if (quoteId === undefined) return '—';
  if (line.quoteRef === '') return `quote ${quoteId}, no longer in the Book`;
  return line.supplierCode ? `${line.supplierCode}, ${line.quoteRef}` : line.quoteRef;
}

/** The document for one supplier from lines, dates and the Book's records. */
export function orderDocument(
  book: Book,
  head: { number: string | undefined; supplierId: string; supplierName?: string; orderedDate: string; dueDate: string },
  inputs: readonly OrderDocInput[],
): OrderDocument {
  const parts = new Map(book.parts.map((p) => [p.id, p] as const));
  const quotes = new Map(book.quotes.map((q) => [q.id, q] as const));
  const supplier = book.suppliers.find((s) => s.id === head.supplierId);
  const cents = new Map<string, number>();
  const terms: string[] = [];
  const lines = inputs.map((l, i): OrderDocLine => {
    const part = parts.get(l.partId);
    const quote = l.quoteId === undefined ? undefined : quotes.get(l.quoteId);
    const lineCents = toCents(l.quantity * l.unitPrice);
    cents.set(l.currency, (cents.get(l.currency) ?? 0) + lineCents);
    const term = quote?.incoterm ?? '';
    if (term !== '' && !terms.includes(term)) terms.push(term);
    return {
      line: i + 1,
      supplierCode: l.supplierCode ?? quote?.supplierCode ?? '',
      mpn: part?.mpn ?? l.partId,
      maker: part?.maker ?? '',
      description: part?.description ?? '',
      quantity: l.quantity,
      unitPrice: l.unitPrice,
      currency: l.currency,
      lineTotal: lineCents / 100,
      deliveryTerm: term,
      quoteRef: quoteReference(quote),
    };
  });
  return {
    number: head.number,
    company: book.settings.company,
    shipTo: book.settings.shipTo ?? '',
    supplier: { name: supplier?.name ?? head.supplierName ?? head.supplierId, address: supplier?.address ?? '', paymentTerms: supplier?.paymentTerms ?? '' },
    orderedDate: head.orderedDate,
    dueDate: head.dueDate,
    lines,
    totals: [...cents].map(([currency, c]) => ({ currency, total: c / 100 })),
    deliveryTerms: terms,
  };
}

/** The document of an order placed with a supplier. */
export function orderDocumentOf(book: Book, order: Order): OrderDocument {
  return orderDocument(
    book,
    { number: order.number, supplierId: order.supplierId, orderedDate: order.orderedDate, dueDate: order.dueDate },
    order.lines.map((l) => ({ partId: l.partId, quantity: l.quantity, unitPrice: l.price, currency: l.currency, quoteId: l.quoteId })),
  );
}

/**
 * Draft documents of a run's purchase list, one per supplier (and quote currency): dated `today`, due when the
 * slowest line arrives if ordered today. Unnumbered until the order is placed.
 */
export function purchaseDocuments(book: Book, orders: readonly SupplierOrder[], today: string): OrderDocument[] {
  return orders.map((o) =>
    orderDocument(
      book,
      { number: undefined, supplierId: o.supplierId, supplierName: o.supplier, orderedDate: today, dueDate: daysAfter(today, o.leadDays) ?? today },
      o.lines.map((p) => ({ partId: p.line.partId, quantity: p.line.buy, unitPrice: p.line.unitPrice, currency: p.line.currency, quoteId: p.line.quoteId, supplierCode: p.line.supplierCode })),
    ),
  );
}

/** Draft documents of a plan's suggested orders, one per supplier (and currency), as they would be placed `today`. */
export function suggestionDocuments(book: Book, suggestions: readonly SupplierSuggestion[], today: string): OrderDocument[] {
  return suggestions.map((s) =>
    orderDocument(
      book,
      { number: undefined, supplierId: s.supplierId, supplierName: s.supplier, orderedDate: today, dueDate: s.dueIfPlacedToday },
      s.lines.map((l) => ({ partId: l.partId, quantity: l.buy, unitPrice: l.unitPrice, currency: l.currency, quoteId: l.quoteId, supplierCode: l.supplierCode })),
    ),
  );
}
