// Planning across runs checked against the gross-to-net netting of material requirements planning (Orlicky,
// Material Requirements Planning, 1975, from memory: net = gross − projected on hand − scheduled receipts, not below
// 0; planned order release = need date − lead time), and by hand with the steps shown.
import { describe, expect, it } from 'vitest';
import type { Book, Order, StockMove } from '../../src/domain/book.ts';
import { prepareCosting, variantDemands } from '../../src/domain/costing.ts';
import { checkBook } from '../../src/domain/schema.ts';
import { acceptSuggestions, planRuns, runDemands } from '../../src/domain/planning.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { resolutionFromFamily } from '../../src/engine/costing.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { referenceFamily } from '../fixtures/reference-family.ts';
import type { Plan } from '../../src/domain/planning.ts';
import { fixedResolution } from '../fixtures/fixed-lines.ts';
import { runStatus } from '../../src/io/plan-export.ts';
import { part, smallBook, value } from './costing-fixtures.ts';
import type { QuoteSpec } from './costing-fixtures.ts';

/** Week n of the worked example begins on Monday 2025-01-06 + 7 (n − 1) days. */
function week(n: number): string {
  const d = new Date(Date.UTC(2025, 0, 6 + 7 * (n - 1)));
  return d.toISOString().slice(0, 10);
}

function move(id: string, partId: string, quantity: number, date = '2025-01-02'): StockMove {
  return { id, rev: 1, partId, date, quantity, kind: 'counted', reason: 'count' };
}

function order(id: string, partId: string, quantity: number, due: string, received = 0): Order {
  return {
    id,
    rev: 1,
    number: `T-${id}`,
    supplierId: 'sup_a',
    status: received > 0 ? 'part-received' : 'open',
    orderedDate: '2025-01-02',
    dueDate: due,
    lines: [{ partId, quantity, price: 0.1, currency: 'EUR', received }],
    notes: '',
  };
}

/** One part on one line (1 per unit), no attrition, no kitting or safety days unless given. */
function mrpBook(opts: { quote?: QuoteSpec; runs: { id: string; qty: number; wanted: string }[]; kitting?: number; safety?: number }): Book {
  const book = smallBook({
    parts: [part('p1')],
    quotes: { p1: [opts.quote ?? { breaks: [{ qty: 1, price: 0.1 }], leadDays: 14 }] },
    lines: [{ partId: 'p1', qty: 1 }],
    settings: { kittingDays: opts.kitting ?? 0, safetyDays: opts.safety ?? 0, horizonDays: 120, rates: { EUR: 1, USD: 0.9 } },
  });
  book.runs = opts.runs.map((r) => ({ id: r.id, rev: 1, name: r.id, variantId: 'v1', quantity: r.qty, dateWanted: r.wanted, notes: '' }));
  return book;
}

function plan(book: Book, today: string): Plan {
  const ok = checkBook(book);
  if (!ok.ok) throw new Error(JSON.stringify(ok.problems));
  return value(planRuns(book, value(prepareCosting(book)), fixedResolution(book), { today }));
}

describe('gross to net, with the lead-time offset', () => {
  it('nets 500 in week 6 against 120 on hand and 100 due in week 4 to 280, released in week 4 (Orlicky, 1975, from memory)', () => {
    // Gross 500 in week 6; projected on hand 120 + scheduled receipt 100 (week 4) = 220 → net 280.
    // Lead time 2 weeks: release (order by) = week 6 − 14 days = week 4.
    const book = mrpBook({ runs: [{ id: 'r1', qty: 500, wanted: week(6) }] });
    book.stockMoves = [move('m1', 'p1', 120)];
    book.orders = [order('o1', 'p1', 100, week(4))];
    const p = plan(book, week(1));
    const pp = p.parts[0]!;
    expect([pp.grossTotal, pp.onHand, pp.fromOrders, pp.net]).toEqual([500, 120, 100, 280]);
    expect(pp.gross[0]).toMatchObject({ date: week(6), qty: 500, fromStock: 120, fromOrders: 100, net: 280 });
    expect(pp.buy).toMatchObject({ net: 280, buy: 280, needDate: week(6), orderBy: week(4), late: false, pastDue: false });
  });

  it('offsets the need date by the kitting and safety days before the lead time (by hand)', () => {
    // Wanted week 6 (2025-02-10); kitting 5 + safety 2 days → parts in by 2025-02-03 (week 5); lead 14 → order by week 3.
    const book = mrpBook({ runs: [{ id: 'r1', qty: 500, wanted: week(6) }], kitting: 5, safety: 2 });
    const p = plan(book, week(1));
    expect(p.runs[0]!.needDate).toBe(week(5));
    expect(p.parts[0]!.buy).toMatchObject({ needDate: week(5), orderBy: week(3), buy: 500 });
  });

  it('works a three-period record by hand: stock to the first need, a receipt in time for the second, buy the rest', () => {
    // Periods (weeks) 3, 5, 8; gross 150, 200, 250; on hand 180; receipt 100 due week 5; receipt 300 due week 9 (late).
    //   week 3: 150 from stock (30 left)            net 0
    //   week 5: 30 from stock + 100 received = 130  net 70
    //   week 8: nothing left, the week-9 receipt is after it   net 250
    // Net 320, to order by week 3 − … : the first net need is week 5, lead 14 days → order by week 3.
    const book = mrpBook({
      runs: [
        { id: 'r1', qty: 150, wanted: week(3) },
        { id: 'r2', qty: 200, wanted: week(5) },
        { id: 'r3', qty: 250, wanted: week(8) },
      ],
    });
    book.stockMoves = [move('m1', 'p1', 180)];
    book.orders = [order('o1', 'p1', 100, week(5)), order('o2', 'p1', 300, week(9))];
    const pp = plan(book, week(1)).parts[0]!;
    expect(pp.gross.map((g) => [g.qty, g.fromStock, g.fromOrders, g.net])).toEqual([
      [150, 150, 0, 0],
      [200, 30, 100, 70],
      [250, 0, 0, 250],
    ]);
    expect(pp.net).toBe(320);
    expect(pp.lateReceipts.map((r) => r.number)).toEqual(['T-o2']);
    expect(pp.buy).toMatchObject({ net: 320, buy: 320, needDate: week(5), orderBy: week(3) });
  });

  it('applies MOQ, pack and buying up to a cheaper break to the combined net need of the runs (all-units breaks, operations-management texts, from memory)', () => {
    // Two runs of 450 and 459 need 909 together; pack 10 → 910 × 0.15 = 136.50, but 1000 × 0.12 = 120.00 → buy 1000.
    const book = mrpBook({
      quote: {
        pack: 10,
        leadDays: 7,
        breaks: [
          { qty: 1, price: 0.3 },
          { qty: 100, price: 0.2 },
          { qty: 500, price: 0.15 },
          { qty: 1000, price: 0.12 },
          { qty: 2500, price: 0.09 },
        ],
      },
      runs: [
        { id: 'r1', qty: 450, wanted: week(4) },
        { id: 'r2', qty: 459, wanted: week(6) },
      ],
    });
    const p = plan(book, week(1));
    expect(p.parts[0]!.buy).toMatchObject({ net: 909, buy: 1000, unitPrice: 0.12, extendedBase: 120 });
    expect(p.suggestions).toHaveLength(1);
    expect(p.suggestions[0]).toMatchObject({ supplierId: 'sup_a', totalBase: 120, orderBy: daysBeforeIso(week(4), 7) });
  });

  it('marks a part late when its order-by date has passed, and past due when its need date has', () => {
    const book = mrpBook({ runs: [{ id: 'r1', qty: 10, wanted: week(3) }, { id: 'r2', qty: 10, wanted: week(8) }] });
    // Today week 2: week 3 − 14 days = week 1 has passed → late, not past due.
    expect(plan(book, week(2)).parts[0]!.buy).toMatchObject({ late: true, pastDue: false });
    // Today week 4: the week-3 need date itself has passed.
    const later = plan(book, week(4));
    expect(later.parts[0]!.buy).toMatchObject({ late: true, pastDue: true });
    expect(later.runs[0]).toMatchObject({ pastDue: true });
  });

  it('names the part that limits each run and the earliest date it can then be wanted', () => {
    // p1: in stock (in today). p2: to buy with 30 days' lead → in on today + 30; + kitting 5 + safety 2.
    const book = smallBook({
      parts: [part('p1'), part('p2')],
      quotes: { p1: [{ breaks: [{ qty: 1, price: 0.1 }], leadDays: 3 }], p2: [{ breaks: [{ qty: 1, price: 0.1 }], leadDays: 30 }] },
      lines: [
        { partId: 'p1', qty: 1 },
        { partId: 'p2', qty: 1 },
      ],
      settings: { kittingDays: 5, safetyDays: 2, rates: { EUR: 1, USD: 0.9 } },
    });
    book.runs = [{ id: 'r1', rev: 1, name: 'r1', variantId: 'v1', quantity: 100, dateWanted: '2025-02-01', notes: '' }];
    book.stockMoves = [move('m1', 'p1', 100)];
    const r = plan(book, '2025-01-10').runs[0]!;
    expect(r.limiting).toEqual({ partId: 'p2', mpn: 'TST-P2', inDate: '2025-02-09', earliestWanted: '2025-02-16' });
    expect(r.late).toBe(true);
  });

  it('makes a part the run still has to buy and no quote can be used for its limiting problem: late, never "in today"', () => {
    // p1 is in stock (in today) and p3 has a quote with 30 days' lead (in 2025-02-09, wanted 2025-03-01: in time);
    // p2 has no quote: a run that must buy it cannot be built until a quote can be used, whatever p1 and p3 say.
    // r1's 100 of p2 come from stock (100); r2 has its 100 to buy, so r2 is limited by p2 and r1 by p3.
    const book = smallBook({
      parts: [part('p1'), part('p2'), part('p3')],
      quotes: { p1: [{ breaks: [{ qty: 1, price: 0.1 }], leadDays: 3 }], p3: [{ breaks: [{ qty: 1, price: 0.1 }], leadDays: 30 }] },
      lines: [
        { partId: 'p1', qty: 1 },
        { partId: 'p2', qty: 1 },
        { partId: 'p3', qty: 1 },
      ],
      settings: { kittingDays: 0, safetyDays: 0, rates: { EUR: 1, USD: 0.9 } },
    });
    book.runs = [
      { id: 'r1', rev: 1, name: 'r1', variantId: 'v1', quantity: 100, dateWanted: '2025-03-01', notes: '' },
      { id: 'r2', rev: 1, name: 'r2', variantId: 'v1', quantity: 100, dateWanted: '2025-03-10', notes: '' },
    ];
    book.stockMoves = [move('m1', 'p1', 500), move('m2', 'p2', 100)];
    const p = plan(book, '2025-01-10');
    const [r1, r2] = p.runs;
    const p2 = p.parts.find((x) => x.partId === 'p2')!;
    expect(p2.problem).toMatch(/no quote for TST-P2/);
    // r1's 100 come from stock (in today); r2's 100 are to buy and cannot be had: no date.
    expect(p2.gross.map((g) => [g.runId, g.fromStock, g.net, g.inDate])).toEqual([
      ['r1', 100, 0, '2025-01-10'],
      ['r2', 0, 100, undefined],
    ]);
    expect(r1!.limiting).toEqual({ partId: 'p3', mpn: 'TST-P3', inDate: '2025-02-09', earliestWanted: '2025-02-09' });
    expect(r1!.late).toBe(false);
    expect(r1!.problems).toEqual([]);
    expect(r2!.limiting).toEqual({ partId: 'p2', mpn: 'TST-P2', problem: p2.problem });
    expect(r2!.late).toBe(true);
    expect(r2!.problems).toEqual([{ partId: 'p2', message: `cannot be bought: ${p2.problem}` }]);
    // The Plan page's status column says the same.
    expect([runStatus(r1!), runStatus(r2!)]).toEqual(['in time', `cannot be bought: ${p2.problem}`]);
  });

  it('leaves runs wanted after the horizon and built runs out of the plan', () => {
    const book = mrpBook({ runs: [{ id: 'r1', qty: 10, wanted: week(6) }, { id: 'r2', qty: 10, wanted: '2026-06-01' }] });
    book.runs.push({ id: 'r3', rev: 1, name: 'r3', variantId: 'v1', quantity: 99, dateWanted: week(5), notes: '', status: 'built', builtDate: week(1) });
    const p = plan(book, week(1));
    expect(p.runs.map((r) => [r.run.id, r.inHorizon])).toEqual([
      ['r1', true],
      ['r2', false],
    ]);
    expect(p.parts[0]!.grossTotal).toBe(10);
  });

  it('turns the accepted suggestions into open orders with consecutive numbers, and the next plan orders nothing more', () => {
    const book = mrpBook({ runs: [{ id: 'r1', qty: 500, wanted: week(6) }] });
    book.settings = { ...book.settings, orderPrefix: 'T-', nextOrderNumber: 41 };
    const p = plan(book, week(1));
    const accepted = value(acceptSuggestions(book, p.suggestions, week(1)));
    expect(accepted.orders.map((o) => [o.number, o.status, o.dueDate, o.lines[0]!.quantity])).toEqual([['T-41', 'open', week(3), 500]]);
    expect(accepted.change.settings!.nextOrderNumber).toBe(42);
    const after: Book = { ...book, orders: accepted.orders.map((o) => ({ ...o, rev: 1 })), settings: { ...accepted.change.settings!, rev: 2 } };
    const again = plan(after, week(1));
    expect(again.parts[0]!.net).toBe(0);
    expect(again.suggestions).toEqual([]);
  });

  it('refuses a bad plan date or horizon with a message', () => {
    const book = mrpBook({ runs: [] });
    const ctx = value(prepareCosting(book));
    expect(planRuns(book, ctx, fixedResolution(book), { today: '2025-13-01' })).toEqual({ ok: false, error: expect.stringMatching(/plan date/) });
    expect(planRuns(book, ctx, fixedResolution(book), { today: '2025-01-01', horizonDays: 0 })).toEqual({ ok: false, error: expect.stringMatching(/horizon/) });
  });
});

describe('a run\'s needs for planning', () => {
  it('are the costed BOM\'s needs (variantDemands), part by part, for the demo Book and the reference family', () => {
    const ref = referenceFamily({ variants: 30, lines: 40 });
    const demo = demoBook();
    for (const [book, lines] of [
      [ref.book, ref.resolution],
      [demo, resolutionFromFamily(resolveFamily(demo))],
    ] as const) {
      const ctx = value(prepareCosting(book));
      for (const v of book.variants) {
        for (const run of [1, 333, 2000]) {
          const key = (d: { partId: string; pinnedSupplierId: string | undefined; need: number }): string => `${d.partId}/${d.pinnedSupplierId ?? ''}=${d.need}`;
          const fast = runDemands(ctx, lines.get(v.id) ?? [], run);
          const full = variantDemands(ctx, lines.get(v.id) ?? [], run);
          expect(fast.demands.map(key).sort()).toEqual(full.demands.map(key).sort());
          expect(fast.problems).toEqual(full.problems);
        }
      }
    }
  });
});

function daysBeforeIso(date: string, days: number): string {
  return new Date(Date.parse(`${date}T00:00:00Z`) - days * 86_400_000).toISOString().slice(0, 10);
}
