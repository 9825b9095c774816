// Purchase list: orders grouped by supplier, packs × pack = order quantity, the MOQ and buy-up noted, supplier totals
// equal to their lines, latest order date = date wanted − lead days.
import { describe, expect, it } from 'vitest';
import { costVariantRun, prepareCosting, toCents } from '../../src/domain/costing.ts';
import type { Book } from '../../src/domain/book.ts';
import { daysBefore, isIsoDate } from '../../src/domain/dates.ts';
import { orderReason, purchaseList } from '../../src/domain/purchase.ts';
import { resolveFixedLines } from '../fixtures/fixed-lines.ts';
import { part, smallBook } from './costing-fixtures.ts';

function costed(book: Book, run: number) {
  const ctx = prepareCosting(book);
  if (!ctx.ok) throw new Error(ctx.error);
  const v = book.variants[0]!;
  const r = costVariantRun(ctx.value, v, resolveFixedLines(book), run);
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

// All-units price breaks (operations-management texts, from memory): 2 per unit × 450 units × 1.01 = 909,
// pack 10 → 910; 910 × 0.15 = 136.50 but 1000 × 0.12 = 120.00, so buy 1000 (90 spare).
const textbookBreaks = [
  { qty: 1, price: 0.3 },
  { qty: 100, price: 0.2 },
  { qty: 500, price: 0.15 },
  { qty: 1000, price: 0.12 },
  { qty: 2500, price: 0.09 },
];

function book(): Book {
  return smallBook({
    parts: [part('brk'), part('moq'), part('pck'), part('usd')],
    quotes: {
      brk: [{ supplierId: 'sup_a', breaks: textbookBreaks, moq: 1, pack: 10, leadDays: 42 }],
      moq: [{ supplierId: 'sup_a', breaks: [{ qty: 1, price: 0.5 }], moq: 500, pack: 100, leadDays: 10 }],
      pck: [{ supplierId: 'sup_a', breaks: [{ qty: 1, price: 0.05 }], moq: 1, pack: 50, leadDays: 15 }],
      usd: [{ supplierId: 'sup_b', currency: 'USD', breaks: [{ qty: 1, price: 1.25 }], moq: 1, pack: 1, leadDays: 5 }],
    },
    lines: [
      { partId: 'brk', qty: 2, attrition: 0.01, designators: 'R1, R2' },
      { partId: 'moq', qty: 0.25, designators: 'C1' },
      { partId: 'pck', qty: 1, attrition: 0.01, designators: 'F1' },
      { partId: 'usd', qty: 1, designators: 'U1' },
    ],
    settings: { rates: { EUR: 1, USD: 0.92 } },
  });
}

describe('purchase list', () => {
  const bom = costed(book(), 450);
  const list = purchaseList(bom, { dateWanted: '2027-03-15', today: '2027-02-10' });
  const line = (partId: string) => list.orders.flatMap((o) => o.lines).find((p) => p.line.partId === partId)!;

  it('buys up to the cheaper break of the textbook example and says why', () => {
    const p = line('brk');
    expect(p.line.need).toBe(909);
    expect(p.line.buy).toBe(1000);
    expect(p.line.extended).toBe(120);
    expect(p.packs).toBe(100);
    expect(p.reason).toBe('break');
  });

  it('applies the MOQ in whole packs: 0.25 × 450 = 112.5 → 113 needed, MOQ 500 in packs of 100 → 500', () => {
    const p = line('moq');
    expect(p.line.need).toBe(113);
    expect(p.line.buy).toBe(500);
    expect(p.packs * p.line.pack).toBe(500);
    expect(p.reason).toBe('moq');
  });

  it('rounds up to whole packs: 450 × 1.01 = 454.5 → 455 needed, packs of 50 → 10 × 50 = 500', () => {
    const p = line('pck');
    expect(p.line.need).toBe(455);
    expect(p.packs).toBe(10);
    expect(p.line.buy).toBe(500);
    expect(p.reason).toBe('pack');
    expect(line('usd').reason).toBe('need');
  });

  it('groups by supplier, suppliers by name, with totals that are the exact sum of their lines', () => {
    expect(list.orders.map((o) => o.supplier)).toEqual(['Alder Components', 'Birch Electronic Supply']);
    const alder = list.orders[0]!;
    expect(alder.lines.map((p) => p.line.partId).sort()).toEqual(['brk', 'moq', 'pck']);
    // By hand: 120.00 + 500 × 0.50 = 250.00 + 500 × 0.05 = 25.00 → 395.00 EUR.
    expect(alder.total).toBe(395);
    expect(alder.totalBase).toBe(395);
    const birch = list.orders[1]!;
    expect(birch.currency).toBe('USD');
    // By hand: 450 × 1.25 = 562.50 USD; × 0.92 = 517.50 EUR.
    expect(birch.total).toBe(562.5);
    expect(birch.totalBase).toBe(517.5);
    expect(list.totalBase).toBe(912.5);
    expect(toCents(list.totalBase)).toBe(toCents(bom.materialRun));
  });

  it('dates each order back from the date wanted by its lead time and marks lines already late', () => {
    // By hand: 2027-03-15 − 42 days = 2027-02-01 (14 days to 03-01, 15 to 02-28, 27 more to 02-01).
    expect(line('brk').latestOrderDate).toBe('2027-02-01');
    expect(line('brk').late).toBe(true);
    // 2027-03-15 − 10 days = 2027-03-05; − 15 days = 2027-02-28 (2027 is not a leap year).
    expect(line('moq').latestOrderDate).toBe('2027-03-05');
    expect(line('pck').latestOrderDate).toBe('2027-02-28');
    expect(line('moq').late).toBe(false);
    expect(list.orders[0]!.orderBy).toBe('2027-02-01');
    expect(list.orders[0]!.leadDays).toBe(42);
    expect(list.orders[0]!.late).toBe(true);
    expect(list.orders[1]!.late).toBe(false);
  });

  it('leaves order dates out without a usable date wanted', () => {
    for (const dateWanted of [undefined, '2027-02-30', 'soon']) {
      const l = purchaseList(bom, { dateWanted });
      expect(l.dateWanted).toBeUndefined();
      expect(l.orders.flatMap((o) => o.lines).every((p) => p.latestOrderDate === undefined && !p.late)).toBe(true);
    }
  });

  it('judges the reason from the quote terms alone', () => {
    const base = bom.lines[0]!;
    expect(orderReason({ ...base, need: 10, buy: 10, moq: 1, pack: 1 })).toBe('need');
    expect(orderReason({ ...base, need: 10, buy: 100, moq: 100, pack: 50 })).toBe('moq');
    expect(orderReason({ ...base, need: 10, buy: 25, moq: 1, pack: 25 })).toBe('pack');
    expect(orderReason({ ...base, need: 10, buy: 500, moq: 1, pack: 25 })).toBe('break');
  });
});

describe('calendar dates', () => {
  it('counts back whole days across months and leap years (Gregorian calendar, by hand)', () => {
    expect(daysBefore('2028-03-01', 1)).toBe('2028-02-29');
    expect(daysBefore('2026-03-01', 1)).toBe('2026-02-28');
    expect(daysBefore('2027-01-05', 10)).toBe('2026-12-26');
    expect(daysBefore('2027-01-05', 0)).toBe('2027-01-05');
    expect(daysBefore('2027-02-29', 1)).toBeUndefined();
    expect(daysBefore('2027-01-05', 1.5)).toBeUndefined();
    expect(isIsoDate('2028-02-29')).toBe(true);
    expect(isIsoDate('2100-02-29')).toBe(false);
  });
});
