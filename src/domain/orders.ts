// Supplier orders: numbering from the settings, placing an order, receiving it whole or in part (each receipt a
// stock movement on its order line) and cancelling it (the order and what came on it stay as history). Each step
// is a Book change checked first; bad input gives a message and changes nothing.
import { newId } from './book.ts';
import type { Book, Order, OrderLine, OrderStatus, StockMove } from './book.ts';
import type { BookChange } from './book-ops.ts';
import { isIsoDate } from './dates.ts';
import { LIMITS } from './schema.ts';
import type { Outcome } from './stock.ts';
import { newMove } from './stock.ts';

const fail = <T>(error: string): Outcome<T> => ({ ok: false, error });

/** The number the next order gets, from the settings (prefix and next number). */
export function nextOrderNumber(book: Book): string {
  return `${book.settings.orderPrefix}${book.settings.nextOrderNumber}`;
}

/** Parts still to come on a line. */
export function outstanding(line: OrderLine): number {
  return Math.max(0, line.quantity - line.received);
}

/** An order's status from what its lines received (a cancelled order stays cancelled). */
export function statusOf(order: Pick<Order, 'status' | 'lines'>): OrderStatus {
  if (order.status === 'cancelled') return 'cancelled';
  if (order.lines.length > 0 && order.lines.every((l) => l.received >= l.quantity)) return 'received';
  return order.lines.some((l) => l.received > 0) ? 'part-received' : 'open';
}

/** True while parts are still to come on the order. */
export function isOpen(order: Order): boolean {
  return order.status === 'open' || order.status === 'part-received';
}

export interface OrderInput {
  supplierId: string;
  orderedDate: string;
  dueDate: string;
  lines: { partId: string; quantity: number; price: number; currency: string; quoteId?: string }[];
  notes?: string;
}

/** Places an order: the next order number, the settings' counter moved on by one, the order open. */
export function placeOrder(book: Book, input: OrderInput): Outcome<{ change: BookChange; order: Order }> {
  if (!book.suppliers.some((s) => s.id === input.supplierId)) return fail(`no supplier with id ${input.supplierId} in the Book`);
  if (!isIsoDate(input.orderedDate) || !isIsoDate(input.dueDate)) return fail('the order and due dates must be written YYYY-MM-DD');
  if (input.dueDate < input.orderedDate) return fail(`the due date ${input.dueDate} is before the order date ${input.orderedDate}`);
  if (input.lines.length === 0) return fail('an order needs at least one line');
  if (input.lines.length > LIMITS.orderLines) return fail(`an order may have at most ${LIMITS.orderLines} lines`);
  const parts = new Set(book.parts.map((p) => p.id));
  for (const [i, l] of input.lines.entries()) {
    if (!parts.has(l.partId)) return fail(`line ${i + 1}: no part with id ${l.partId} in the Book`);
    if (!Number.isInteger(l.quantity) || l.quantity < 1 || l.quantity > LIMITS.quantity) return fail(`line ${i + 1}: the quantity must be a whole number ≥ 1, not ${l.quantity}`);
    if (!Number.isFinite(l.price) || l.price < 0 || l.price > LIMITS.price) return fail(`line ${i + 1}: the price must be a number ≥ 0, not ${l.price}`);
    if (l.currency !== book.settings.baseCurrency && !Object.hasOwn(book.settings.rates, l.currency)) {
      return fail(`line ${i + 1}: the Book has no exchange rate for ${l.currency}`);
    }
  }
  const number = nextOrderNumber(book);
  if (book.orders.some((o) => o.number === number)) {
    return fail(`the order number ${number} is taken; set the next order number in the settings past it`);
  }
  const order: Order = {
    id: newId('order'),
    rev: 0,
    number,
    supplierId: input.supplierId,
    status: 'open',
    orderedDate: input.orderedDate,
    dueDate: input.dueDate,
    lines: input.lines.map((l) => {
      const line: OrderLine = { partId: l.partId, quantity: l.quantity, price: l.price, currency: l.currency, received: 0 };
      if (l.quoteId !== undefined) line.quoteId = l.quoteId;
      return line;
    }),
    notes: input.notes ?? '',
  };
  const settings = { ...book.settings, nextOrderNumber: book.settings.nextOrderNumber + 1 };
  return { ok: true, value: { change: { put: { orders: [order] }, settings }, order } };
}

/** Parts received on one line of an order. */
export interface Receipt {
  line: number;
  quantity: number;
}

/**
 * Receives parts on an order: one 'received' movement per line received, the lines' received counts and the
 * order's status updated together. More than is outstanding on a line, a cancelled or fully received order, or a
 * quantity that is not a whole number ≥ 1 refuses the whole receipt.
 */
export function receive(book: Book, orderId: string, date: string, receipts: readonly Receipt[], reason = ''): Outcome<BookChange> {
  const order = book.orders.find((o) => o.id === orderId);
  if (!order) return fail(`no order with id ${orderId} in the Book`);
  if (order.status === 'cancelled') return fail(`order ${order.number} is cancelled; nothing can be received on it`);
  if (order.status === 'received') return fail(`order ${order.number} is received in full already`);
  if (!isIsoDate(date)) return fail(`the date received must be written YYYY-MM-DD, not ${JSON.stringify(date)}`);
  if (receipts.length === 0) return fail('the receipt lists no lines');
  const lines = order.lines.map((l) => ({ ...l }));
  const moves: StockMove[] = [];
  for (const r of receipts) {
    const line = Number.isInteger(r.line) ? lines[r.line] : undefined;
    if (!line) return fail(`order ${order.number} has lines 1 to ${lines.length}; there is no line ${r.line + 1}`);
    if (!Number.isInteger(r.quantity) || r.quantity < 1) return fail(`line ${r.line + 1}: a receipt is a whole number of parts ≥ 1, not ${r.quantity}`);
    if (r.quantity > outstanding(line)) {
      return fail(`line ${r.line + 1}: ${r.quantity} received is more than the ${outstanding(line)} still to come of the ${line.quantity} ordered`);
    }
    line.received += r.quantity;
    const m = newMove({ partId: line.partId, date, quantity: r.quantity, kind: 'received', reason: reason || order.number });
    m.orderId = order.id;
    m.orderLine = r.line;
    moves.push(m);
  }
  const next: Order = { ...order, lines };
  next.status = statusOf(next);
  return { ok: true, value: { put: { orders: [next], stockMoves: moves } } };
}

/** Receives everything still to come on an order. */
export function receiveAll(book: Book, orderId: string, date: string): Outcome<BookChange> {
  const order = book.orders.find((o) => o.id === orderId);
  if (!order) return fail(`no order with id ${orderId} in the Book`);
  const receipts = order.lines.map((l, line) => ({ line, quantity: outstanding(l) })).filter((r) => r.quantity > 0);
  return receive(book, orderId, date, receipts);
}

/** Cancels what is still to come on an order; the order, its lines and its receipts stay as they were. */
export function cancelOrder(book: Book, orderId: string, note?: string): Outcome<BookChange> {
  const order = book.orders.find((o) => o.id === orderId);
  if (!order) return fail(`no order with id ${orderId} in the Book`);
  if (!isOpen(order)) return fail(`order ${order.number} is ${order.status}; only an open or part-received order can be cancelled`);
  const notes = note ? (order.notes ? `${order.notes}\n${note}` : note).slice(0, LIMITS.notes) : order.notes;
  return { ok: true, value: { put: { orders: [{ ...order, status: 'cancelled', notes }] } } };
}

/** The last price paid for a part, in base currency per part: the price of the latest receipt's order line. */
export function lastPricePaid(book: Book, partId: string): { price: number; currency: string; date: string } | undefined {
  const orders = new Map(book.orders.map((o) => [o.id, o] as const));
  let best: { price: number; currency: string; date: string } | undefined;
  for (const m of book.stockMoves) {
    if (m.kind !== 'received' || m.partId !== partId || m.orderId === undefined || m.orderLine === undefined) continue;
    const line = orders.get(m.orderId)?.lines[m.orderLine];
    if (line && (best === undefined || m.date >= best.date)) best = { price: line.price, currency: line.currency, date: m.date };
  }
  return best;
}
