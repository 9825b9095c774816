// Stock as a ledger and supplier orders: on hand is the sum of movements, counts write their differences, receipts
// move stock and never lose or duplicate a unit, cancelling keeps history, building a run issues its parts, a
// plan never buys less than the net need and buys nothing when stock covers it; bad input changes nothing.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Book, StockMove } from '../../src/domain/book.ts';
import { applyChange } from '../../src/domain/book-ops.ts';
import type { BookChange } from '../../src/domain/book-ops.ts';
import { costVariantRun, prepareCosting } from '../../src/domain/costing.ts';
import { cancelOrder, lastPricePaid, placeOrder, receive, receiveAll } from '../../src/domain/orders.ts';
import { planRuns } from '../../src/domain/planning.ts';
import { checkBook } from '../../src/domain/schema.ts';
import { buildRun, onHand, onHandByPart, partHistory, recordMove, stockCount } from '../../src/domain/stock.ts';
import { stockCostedBom } from '../../src/domain/stock-costing.ts';
import { fixedResolution, resolveFixedLines } from '../fixtures/fixed-lines.ts';
import { part, smallBook, value } from './costing-fixtures.ts';

function book3(): Book {
  const b = smallBook({
    parts: [part('p1'), part('p2'), part('p3')],
    quotes: {
      p1: [{ breaks: [{ qty: 1, price: 0.1 }], leadDays: 5 }],
      p2: [{ breaks: [{ qty: 1, price: 0.2 }], leadDays: 10, moq: 50, pack: 25 }],
      p3: [{ breaks: [{ qty: 1, price: 1 }, { qty: 100, price: 0.8 }], leadDays: 20 }],
    },
    lines: [
      { partId: 'p1', qty: 2 },
      { partId: 'p2', qty: 1 },
      { partId: 'p3', qty: 1 },
    ],
    settings: { rates: { EUR: 1, USD: 0.9 }, kittingDays: 2, safetyDays: 1 },
  });
  return b;
}

/** Applies a change as the app does, and checks the Book still reads. */
function apply(book: Book, change: BookChange): Book {
  const r = applyChange(book, change);
  if (!r.ok) throw new Error('revision conflict');
  const checked = checkBook(r.book);
  if (!checked.ok) throw new Error(JSON.stringify(checked.problems));
  return checked.value;
}

describe('the stock ledger', () => {
  it('gives on hand as the sum of movements, with a running balance per part (by hand)', () => {
    let b = book3();
    b = apply(b, value(recordMove(b, { partId: 'p1', date: '2025-01-05', quantity: 100, kind: 'adjusted', reason: 'found' })));
    b = apply(b, value(recordMove(b, { partId: 'p1', date: '2025-01-03', quantity: 40, kind: 'counted' })));
    b = apply(b, value(recordMove(b, { partId: 'p1', date: '2025-01-07', quantity: -15, kind: 'scrapped', reason: 'bent' })));
    // 40 (Jan 3) + 100 (Jan 5) − 15 (Jan 7) = 125.
    expect(onHand(b.stockMoves, 'p1')).toBe(125);
    expect(onHand(b.stockMoves, 'p1', '2025-01-05')).toBe(140);
    expect(partHistory(b.stockMoves, 'p1').map((h) => [h.move.date, h.balance])).toEqual([
      ['2025-01-03', 40],
      ['2025-01-05', 140],
      ['2025-01-07', 125],
    ]);
  });

  it('writes a stock count as the differences from the ledger, and nothing for a part that agrees', () => {
    let b = book3();
    b = apply(b, value(recordMove(b, { partId: 'p1', date: '2025-01-01', quantity: 300, kind: 'adjusted' })));
    b = apply(b, value(recordMove(b, { partId: 'p2', date: '2025-01-01', quantity: 50, kind: 'adjusted' })));
    const count = value(stockCount(b, '2025-02-01', [
      { partId: 'p1', counted: 288 },
      { partId: 'p2', counted: 50 },
      { partId: 'p3', counted: 7 },
    ]));
    expect(count.lines.map((l) => [l.partId, l.before, l.difference])).toEqual([
      ['p1', 300, -12],
      ['p2', 50, 0],
      ['p3', 0, 7],
    ]);
    b = apply(b, count.change);
    expect(Object.fromEntries(onHandByPart(b.stockMoves))).toEqual({ p1: 288, p2: 50, p3: 7 });
    expect(b.stockMoves.filter((m) => m.kind === 'counted')).toHaveLength(2);
  });

  it('refuses bad movements and counts with a message, changing nothing', () => {
    const b = book3();
    const before = structuredClone(b);
    expect(recordMove(b, { partId: 'nope', date: '2025-01-01', quantity: 1, kind: 'adjusted' })).toEqual({ ok: false, error: expect.stringMatching(/no part/) });
    expect(recordMove(b, { partId: 'p1', date: '2025-01-01', quantity: 5, kind: 'scrapped' })).toEqual({ ok: false, error: expect.stringMatching(/takes from stock/) });
    expect(recordMove(b, { partId: 'p1', date: '2025-01-01', quantity: 1.5, kind: 'adjusted' })).toEqual({ ok: false, error: expect.stringMatching(/whole number/) });
    expect(recordMove(b, { partId: 'p1', date: '1 Jan', quantity: 1, kind: 'adjusted' })).toEqual({ ok: false, error: expect.stringMatching(/YYYY-MM-DD/) });
    const twice = stockCount(b, '2025-01-01', [
      { partId: 'p1', counted: 1 },
      { partId: 'p1', counted: 2 },
      { partId: 'p2', counted: -1 },
    ]);
    expect(twice).toEqual({ ok: false, error: expect.stringMatching(/counted twice.*whole number/) });
    expect(b).toStrictEqual(before);
  });

  it('is refused by the Book schema where a movement has the wrong sign or names nothing', () => {
    const b = book3();
    b.stockMoves = [
      { id: 'm1', rev: 1, partId: 'p1', date: '2025-01-01', quantity: -3, kind: 'received', reason: '' },
      { id: 'm2', rev: 1, partId: 'zz', date: '2025-01-01', quantity: 0, kind: 'adjusted', reason: '', runId: 'r9' },
    ];
    const r = checkBook(b);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.problems.map((p) => p.path)).toEqual(['stockMoves[0].quantity', 'stockMoves[1].partId', 'stockMoves[1].quantity', 'stockMoves[1].runId']);
    }
  });
});

describe('orders', () => {
  function placed(): { book: Book; orderId: string } {
    const b = book3();
    const r = value(placeOrder(b, {
      supplierId: 'sup_a',
      orderedDate: '2025-01-10',
      dueDate: '2025-01-20',
      lines: [
        { partId: 'p1', quantity: 500, price: 0.09, currency: 'EUR', quoteId: 'q1' },
        { partId: 'p2', quantity: 100, price: 0.21, currency: 'USD' },
      ],
    }));
    return { book: apply(b, r.change), orderId: r.order.id };
  }

  it('numbers orders from the settings and moves the counter on', () => {
    const { book } = placed();
    expect(book.orders[0]!.number).toBe('ORD-1');
    expect(book.settings.nextOrderNumber).toBe(2);
  });

  it('receives in part, then the rest: stock follows, the status follows, and the last price paid is the line price', () => {
    const placedOrder = placed();
    let book = placedOrder.book;
    const orderId = placedOrder.orderId;
    book = apply(book, value(receive(book, orderId, '2025-01-18', [{ line: 0, quantity: 200 }])));
    expect(book.orders[0]!.status).toBe('part-received');
    expect(onHand(book.stockMoves, 'p1')).toBe(200);
    book = apply(book, value(receiveAll(book, orderId, '2025-01-21')));
    expect(book.orders[0]!.status).toBe('received');
    expect(book.orders[0]!.lines.map((l) => l.received)).toEqual([500, 100]);
    expect(Object.fromEntries(onHandByPart(book.stockMoves))).toEqual({ p1: 500, p2: 100 });
    expect(lastPricePaid(book, 'p2')).toEqual({ price: 0.21, currency: 'USD', date: '2025-01-21' });
  });

  it('refuses a receipt above what is still to come, on a cancelled order, or of no parts, changing nothing', () => {
    const placedOrder = placed();
    let book = placedOrder.book;
    const orderId = placedOrder.orderId;
    const before = structuredClone(book);
    expect(receive(book, orderId, '2025-01-18', [{ line: 0, quantity: 501 }])).toEqual({ ok: false, error: expect.stringMatching(/more than the 500 still to come/) });
    expect(receive(book, orderId, '2025-01-18', [{ line: 5, quantity: 1 }])).toEqual({ ok: false, error: expect.stringMatching(/no line 6/) });
    expect(receive(book, orderId, '2025-01-18', [{ line: 0, quantity: 0 }])).toEqual({ ok: false, error: expect.stringMatching(/whole number of parts ≥ 1/) });
    expect(book).toStrictEqual(before);
    book = apply(book, value(receive(book, orderId, '2025-01-18', [{ line: 1, quantity: 40 }])));
    book = apply(book, value(cancelOrder(book, orderId, 'supplier out of stock')));
    expect(book.orders[0]).toMatchObject({ status: 'cancelled', notes: 'supplier out of stock' });
    // History stays: the 40 received remain on the line and in stock.
    expect(book.orders[0]!.lines[1]!.received).toBe(40);
    expect(onHand(book.stockMoves, 'p2')).toBe(40);
    expect(receive(book, orderId, '2025-01-19', [{ line: 0, quantity: 1 }])).toEqual({ ok: false, error: expect.stringMatching(/cancelled/) });
  });

  it('never loses or duplicates a unit: orders of several lines received in several partial receipts keep each line received = its receipts ≤ ordered', () => {
    const line = fc.record({ part: fc.integer({ min: 1, max: 3 }), qty: fc.integer({ min: 1, max: 300 }) });
    // Mostly receipts that can be taken (a line of the order, part of what is to come), now and then one that cannot.
    const receipt = fc.record({
      line: fc.oneof({ arbitrary: fc.integer({ min: 0, max: 3 }), weight: 9 }, { arbitrary: fc.constantFrom(-1, 7), weight: 1 }),
      quantity: fc.oneof({ arbitrary: fc.integer({ min: 1, max: 60 }), weight: 8 }, { arbitrary: fc.integer({ min: -5, max: 0 }), weight: 1 }, { arbitrary: fc.integer({ min: 301, max: 400 }), weight: 1 }),
    });
    const step = fc.record({ order: fc.integer({ min: 0, max: 2 }), receipts: fc.array(receipt, { minLength: 1, maxLength: 3 }), cancel: fc.integer({ min: 0, max: 19 }) });
    /** Runs in which two or more receipts were taken while some line was still only partly in. */
    let severalPartial = 0;
    fc.assert(
      fc.property(fc.array(fc.array(line, { minLength: 2, maxLength: 4 }), { minLength: 1, maxLength: 3 }), fc.array(step, { minLength: 1, maxLength: 16 }), (orders, steps) => {
        let book = book3();
        const ids: string[] = [];
        for (const lines of orders) {
          const r = value(placeOrder(book, {
            supplierId: 'sup_a',
            orderedDate: '2025-01-10',
            dueDate: '2025-01-20',
            lines: lines.map((l) => ({ partId: `p${l.part}`, quantity: l.qty, price: 0.1, currency: 'EUR' })),
          }));
          book = apply(book, r.change);
          ids.push(r.order.id);
        }
        // The model, kept apart from the domain: what each line has received, and which orders are cancelled.
        const got = orders.map((lines) => lines.map(() => 0));
        const cancelled = orders.map(() => false);
        let partial = 0;
        for (const s of steps) {
          const k = s.order % orders.length;
          const lines = orders[k]!;
          if (s.cancel === 0 && !cancelled[k] && !got[k]!.every((n, i) => n >= lines[i]!.qty)) {
            book = apply(book, value(cancelOrder(book, ids[k]!)));
            cancelled[k] = true;
            continue;
          }
          // A receipt is taken whole or not at all: every line in range, each quantity ≥ 1 and, added up per line,
          // no more than is still to come, on an order neither cancelled nor received in full.
          const next = [...got[k]!];
          let fits = !cancelled[k] && !got[k]!.every((n, i) => n >= lines[i]!.qty);
          for (const r of s.receipts) {
            if (r.line < 0 || r.line >= lines.length || r.quantity < 1 || next[r.line]! + r.quantity > lines[r.line]!.qty) fits = false;
            else next[r.line]! += r.quantity;
          }
          const before = book;
          const r = receive(book, ids[k]!, '2025-01-15', s.receipts);
          expect(r.ok).toBe(fits);
          if (r.ok) {
            book = apply(book, r.value);
            got[k] = next;
            if (next.some((n, i) => n > 0 && n < lines[i]!.qty)) partial++;
          } else expect(book).toBe(before);
        }
        const perPart = new Map<string, number>();
        orders.forEach((lines, k) => {
          const order = book.orders.find((o) => o.id === ids[k])!;
          const full = got[k]!.every((n, i) => n >= lines[i]!.qty);
          expect(order.status).toBe(cancelled[k] ? 'cancelled' : full ? 'received' : got[k]!.some((n) => n > 0) ? 'part-received' : 'open');
          lines.forEach((l, i) => {
            const moved = book.stockMoves.filter((m) => m.orderId === ids[k] && m.orderLine === i);
            expect(moved.every((m) => m.kind === 'received' && m.quantity > 0 && m.partId === `p${l.part}`)).toBe(true);
            expect(moved.reduce((n, m) => n + m.quantity, 0)).toBe(got[k]![i]);
            expect(order.lines[i]!.received).toBe(got[k]![i]);
            expect(order.lines[i]!.received).toBeLessThanOrEqual(l.qty);
            perPart.set(`p${l.part}`, (perPart.get(`p${l.part}`) ?? 0) + got[k]![i]!);
          });
        });
        for (const p of ['p1', 'p2', 'p3']) expect(onHand(book.stockMoves, p)).toBe(perPart.get(p) ?? 0);
        if (partial >= 2) severalPartial++;
      }),
      { numRuns: 80 },
    );
    // The runs above do exercise several partial receipts, not only whole ones or refusals.
    expect(severalPartial).toBeGreaterThan(20);
  });

  it('receives several lines in several partial receipts (by hand)', () => {
    let book = book3();
    const r = value(placeOrder(book, {
      supplierId: 'sup_a',
      orderedDate: '2025-01-10',
      dueDate: '2025-01-20',
      lines: [
        { partId: 'p1', quantity: 100, price: 0.1, currency: 'EUR' },
        { partId: 'p2', quantity: 50, price: 0.2, currency: 'EUR' },
        { partId: 'p1', quantity: 30, price: 0.1, currency: 'EUR' },
      ],
    }));
    book = apply(book, r.change);
    const id = r.order.id;
    book = apply(book, value(receive(book, id, '2025-01-12', [{ line: 0, quantity: 40 }, { line: 1, quantity: 10 }, { line: 0, quantity: 20 }])));
    book = apply(book, value(receive(book, id, '2025-01-14', [{ line: 2, quantity: 30 }, { line: 1, quantity: 15 }])));
    // Line 1 has 25 still to come: 26 refuses the whole receipt, the 40 on line 0 too.
    expect(receive(book, id, '2025-01-15', [{ line: 0, quantity: 40 }, { line: 1, quantity: 26 }])).toEqual({ ok: false, error: expect.stringMatching(/line 2: 26 received is more than the 25 still to come/) });
    expect(book.orders[0]!.lines.map((l) => l.received)).toEqual([60, 25, 30]);
    expect(book.orders[0]!.status).toBe('part-received');
    // p1: 40 + 20 + 30 = 90; p2: 10 + 15 = 25.
    expect(Object.fromEntries(onHandByPart(book.stockMoves))).toEqual({ p1: 90, p2: 25 });
    book = apply(book, value(receive(book, id, '2025-01-16', [{ line: 0, quantity: 40 }, { line: 1, quantity: 25 }])));
    expect(book.orders[0]!.status).toBe('received');
    expect(Object.fromEntries(onHandByPart(book.stockMoves))).toEqual({ p1: 130, p2: 50 });
  });
});

describe('building a run', () => {
  it('issues the costed need of each part, keeps the leftovers, and refuses when a part is short', () => {
    let b = book3();
    b.runs = [{ id: 'r1', rev: 1, name: 'First', variantId: 'v1', quantity: 100, dateWanted: '2025-03-01', notes: '' }];
    const needs = new Map([
      ['p1', 200],
      ['p2', 100],
      ['p3', 100],
    ]);
    expect(buildRun(b, b.runs[0]!, '2025-02-25', needs)).toEqual({ ok: false, error: expect.stringMatching(/TST-P1: 200 needed, 0 on hand/) });
    b = apply(b, value(stockCount(b, '2025-02-01', [
      { partId: 'p1', counted: 250 },
      { partId: 'p2', counted: 100 },
      { partId: 'p3', counted: 130 },
    ])).change);
    b = apply(b, value(buildRun(b, b.runs[0]!, '2025-02-25', needs)));
    expect(b.runs[0]).toMatchObject({ status: 'built', builtDate: '2025-02-25' });
    expect(Object.fromEntries(onHandByPart(b.stockMoves))).toEqual({ p1: 50, p2: 0, p3: 30 });
    expect(buildRun(b, b.runs[0]!, '2025-02-26', needs)).toEqual({ ok: false, error: expect.stringMatching(/built already/) });
  });
});

describe('run costing that knows the stock', () => {
  it('takes the need from stock first, buys the rest with the same supplier, and values stock at the chosen rule (by hand)', () => {
    let b = book3();
    // p3: need 100; 40 in stock (received at 0.75 on an order), 60 to buy: 60 × 1.00 = 60.00 (below the 100 break).
    const o = value(placeOrder(b, { supplierId: 'sup_a', orderedDate: '2025-01-01', dueDate: '2025-01-05', lines: [{ partId: 'p3', quantity: 40, price: 0.75, currency: 'EUR' }] }));
    b = apply(b, o.change);
    b = apply(b, value(receiveAll(b, o.order.id, '2025-01-04')));
    const ctx = value(prepareCosting(b));
    const bom = value(costVariantRun(ctx, b.variants[0]!, resolveFixedLines(b), 100));
    const have = onHandByPart(b.stockMoves);
    const paid = stockCostedBom(b, ctx, bom, have, 'lastPaid');
    const p3 = paid.lines.find((l) => l.line.partId === 'p3')!;
    expect([p3.fromStock, p3.toBuy, p3.buy, p3.boughtBase, p3.stockValue, p3.valuedAt]).toEqual([40, 60, 60, 60, 30, 'last price paid']);
    // Today's quote for the full need of 100 is the 100 break, 0.80: 40 × 0.80 = 32.00.
    const quoted = stockCostedBom(b, ctx, bom, have, 'quote');
    expect(quoted.lines.find((l) => l.line.partId === 'p3')!.stockValue).toBe(32);
    // Material = bought + stock value, to the cent.
    expect(Math.round(paid.materialRun * 100)).toBe(Math.round(paid.boughtRun * 100) + Math.round(paid.stockRun * 100));
  });
});

describe('plans, as properties', () => {
  const scenario = fc.record({
    runs: fc.array(fc.record({ qty: fc.integer({ min: 1, max: 3000 }), day: fc.integer({ min: 0, max: 80 }) }), { minLength: 1, maxLength: 5 }),
    stock: fc.array(fc.integer({ min: 0, max: 5000 }), { minLength: 3, maxLength: 3 }),
    orders: fc.array(fc.record({ part: fc.integer({ min: 0, max: 2 }), qty: fc.integer({ min: 1, max: 2000 }), day: fc.integer({ min: 0, max: 90 }) }), { maxLength: 4 }),
  });

  function scenarioBook(sc: { runs: { qty: number; day: number }[]; stock: number[]; orders: { part: number; qty: number; day: number }[] }): Book {
    const b = book3();
    const day = (n: number): string => new Date(Date.UTC(2025, 0, 10 + n)).toISOString().slice(0, 10);
    b.runs = sc.runs.map((r, i) => ({ id: `r${i}`, rev: 1, name: `run ${i}`, variantId: 'v1', quantity: r.qty, dateWanted: day(r.day), notes: '' }));
    b.stockMoves = sc.stock.flatMap((n, i): StockMove[] => (n > 0 ? [{ id: `m${i}`, rev: 1, partId: `p${i + 1}`, date: '2025-01-01', quantity: n, kind: 'counted', reason: '' }] : []));
    b.orders = sc.orders.map((o, i) => ({
      id: `o${i}`, rev: 1, number: `N${i}`, supplierId: 'sup_a', status: 'open', orderedDate: '2025-01-01', dueDate: day(o.day),
      lines: [{ partId: `p${o.part + 1}`, quantity: o.qty, price: 0.1, currency: 'EUR', received: 0 }], notes: '',
    }));
    return b;
  }

  it('never orders less than the net need, and the net need is the gross less stock and orders in time', () => {
    fc.assert(
      fc.property(scenario, (sc) => {
        const b = scenarioBook(sc);
        const plan = value(planRuns(b, value(prepareCosting(b)), fixedResolution(b), { today: '2025-01-10' }));
        for (const p of plan.parts) {
          for (const g of p.gross) expect(g.net).toBe(g.qty - g.fromStock - g.fromOrders);
          expect(p.gross.reduce((n, g) => n + g.fromStock, 0)).toBeLessThanOrEqual(Math.max(0, p.onHand));
          if (p.net > 0) expect(p.buy!.buy).toBeGreaterThanOrEqual(p.net);
          else expect(p.buy).toBeUndefined();
        }
        const lines = plan.suggestions.flatMap((s) => s.lines);
        expect(lines.length).toBe(plan.parts.filter((p) => p.net > 0).length);
      }),
      { numRuns: 80 },
    );
  });

  it('orders nothing when stock on hand covers every need', () => {
    fc.assert(
      fc.property(scenario, (sc) => {
        const b = scenarioBook(sc);
        const total = sc.runs.reduce((n, r) => n + r.qty, 0);
        // 2 of p1 per unit, 1 of p2 and p3, no attrition: stock of at least that covers it all.
        b.stockMoves = ['p1', 'p2', 'p3'].map((partId, i) => ({ id: `big${i}`, rev: 1, partId, date: '2025-01-01', quantity: (partId === 'p1' ? 2 : 1) * total, kind: 'counted', reason: '' }));
        const plan = value(planRuns(b, value(prepareCosting(b)), fixedResolution(b), { today: '2025-01-10' }));
        expect(plan.suggestions).toEqual([]);
        expect(plan.parts.every((p) => p.net === 0)).toBe(true);
      }),
      { numRuns: 40 },
    );
  });

  it('gives on hand as the sum of movements of every kind, signed as the ledger defines, as an independent fold does', () => {
    type Kind = StockMove['kind'];
    /** The signs each kind may carry: a receipt adds, an issue and scrap take away, a count or an adjustment either. */
    const SIGNS: Record<Kind, readonly number[]> = { received: [1], issued: [-1], scrapped: [-1], counted: [1, -1], adjusted: [1, -1] };
    const KINDS = Object.keys(SIGNS) as Kind[];
    const stepOf = (kind: Kind) => fc.record({ kind: fc.constant(kind), part: fc.integer({ min: 1, max: 3 }), n: fc.integer({ min: 0, max: 500 }), down: fc.boolean(), day: fc.integer({ min: 1, max: 28 }) });
    // Every kind at least once, then any mix, on dates in any order.
    const steps = fc.tuple(fc.tuple(...KINDS.map(stepOf)), fc.array(fc.oneof(...KINDS.map(stepOf)), { maxLength: 25 })).map(([each, more]) => [...each, ...more]);
    fc.assert(
      fc.property(steps, (list) => {
        let b = book3();
        // Receipts come through an order: one line per part, more than can ever be received.
        const placedOrder = value(placeOrder(b, {
          supplierId: 'sup_a',
          orderedDate: '2025-01-01',
          dueDate: '2025-01-31',
          lines: ['p1', 'p2', 'p3'].map((partId) => ({ partId, quantity: 100_000, price: 0.1, currency: 'EUR' })),
        }));
        b = apply(b, placedOrder.change);
        /** The ledger as this test keeps it: part, date, kind and signed quantity of each movement, in order. */
        const ledger: { partId: string; date: string; kind: Kind; q: number }[] = [];
        const fold = (partId: string, asOf?: string): number => ledger.reduce((n, e) => (e.partId === partId && (asOf === undefined || e.date <= asOf) ? n + e.q : n), 0);
        for (const s of list) {
          const partId = `p${s.part}`;
          const date = `2025-02-${String(s.day).padStart(2, '0')}`;
          const n = Math.max(1, s.n);
          if (s.kind === 'received') {
            b = apply(b, value(receive(b, placedOrder.order.id, date, [{ line: s.part - 1, quantity: n }])));
            ledger.push({ partId, date, kind: 'received', q: n });
          } else if (s.kind === 'counted') {
            // n parts found on the shelf that day: the count writes what the fold lacks, or nothing when it agrees.
            const difference = s.n - fold(partId, date);
            b = apply(b, value(stockCount(b, date, [{ partId, counted: s.n }])).change);
            if (difference !== 0) ledger.push({ partId, date, kind: 'counted', q: difference });
          } else {
            const q = s.kind === 'adjusted' && !s.down ? n : -n;
            b = apply(b, value(recordMove(b, { partId, date, quantity: q, kind: s.kind, reason: s.kind })));
            ledger.push({ partId, date, kind: s.kind, q });
          }
        }
        expect(b.stockMoves.map((m) => ({ partId: m.partId, date: m.date, kind: m.kind, q: m.quantity }))).toEqual(ledger);
        for (const m of b.stockMoves) expect(SIGNS[m.kind]).toContain(Math.sign(m.quantity));
        const byPart = onHandByPart(b.stockMoves);
        for (const p of ['p1', 'p2', 'p3']) {
          expect(onHand(b.stockMoves, p)).toBe(fold(p));
          expect(byPart.get(p) ?? 0).toBe(fold(p));
          expect(partHistory(b.stockMoves, p).at(-1)?.balance ?? 0).toBe(fold(p));
          for (const day of ['2025-02-01', '2025-02-10', '2025-02-20', '2025-02-28']) expect(onHand(b.stockMoves, p, day)).toBe(fold(p, day));
        }
      }),
      { numRuns: 60 },
    );
  });
});
