// Run costing rules checked against worked examples (operations-management and cost-accounting texts, from memory) and by hand, with the steps shown.
import { describe, expect, it } from 'vitest';
import {
  bestBuy,
  breakPrice,
  buyQty,
  chooseQuote,
  costVariantRun,
  needQty,
  prepareCosting,
  priceFor,
  roundMoney,
} from '../../src/domain/costing.ts';
import type { CostedBom, CostingContext } from '../../src/domain/costing.ts';
import { resolveFixedLines } from '../fixtures/fixed-lines.ts';
import { part, smallBook, value } from './costing-fixtures.ts';
import type { LineSpec, QuoteSpec } from './costing-fixtures.ts';
import type { Part, Settings } from '../../src/domain/book.ts';

/** Breaks of the all-units worked example (operations-management texts, from memory). */
const REF_BREAKS = [
  { qty: 1, price: 0.3 },
  { qty: 100, price: 0.2 },
  { qty: 500, price: 0.15 },
  { qty: 1000, price: 0.12 },
  { qty: 2500, price: 0.09 },
];

function costOne(opts: { parts: Part[]; quotes: Record<string, QuoteSpec[]>; lines: LineSpec[]; settings?: Partial<Settings> }, run: number): CostedBom {
  const book = smallBook(opts);
  const ctx: CostingContext = value(prepareCosting(book));
  return value(costVariantRun(ctx, book.variants[0]!, resolveFixedLines(book), run));
}

describe('need quantity', () => {
  it('rounds away the float trap before rounding up (IEEE 754 binary64: 100 × 1.1 = 110.00000000000001)', () => {
    // 1 per unit × 100 units × (1 + 0.10) = 110 exactly; a naive ceil of the double gives 111.
    expect(Math.ceil(1 * 100 * (1 + 0.1))).toBe(111); // the trap itself
    expect(value(needQty(1, 100, 0.1))).toBe(110);
  });
  it('gives 909 for 2 per unit × 450 units with 1 % attrition (all-units worked example, operations-management texts, from memory)', () => {
    // 2 × 450 = 900; × 1.01 = 909.
    expect(value(needQty(2, 450, 0.01))).toBe(909);
  });
  it('rounds a true fraction up: 3 per unit × 333 × 1.015 = 1013.985 → 1014 (by hand)', () => {
    expect(value(needQty(3, 333, 0.015))).toBe(1014);
  });
  it('refuses a fractional run, a negative quantity and attrition of 100 % or more with a message', () => {
    expect(needQty(1, 10.5, 0)).toEqual({ ok: false, error: expect.stringMatching(/run size/) });
    expect(needQty(-1, 10, 0)).toEqual({ ok: false, error: expect.stringMatching(/quantity per unit/) });
    expect(needQty(1, 10, 1)).toEqual({ ok: false, error: expect.stringMatching(/attrition/) });
  });
});

describe('buy quantity', () => {
  it('rounds the need up to whole packs: 909 in packs of 10 → 910 (all-units worked example, operations-management texts, from memory)', () => {
    expect(value(buyQty(909, 1, 10))).toBe(910);
  });
  it('lifts a need below the MOQ to the MOQ, then to whole packs (by hand)', () => {
    // need 30, MOQ 100, pack 1 → max(30, 100) = 100 → 100 / 1 = 100 packs → 100.
    expect(value(buyQty(30, 100, 1))).toBe(100);
    // need 30, MOQ 100, pack 25 → 100 / 25 = 4 packs → 100; MOQ 110 → 110 / 25 = 4.4 → 5 packs → 125.
    expect(value(buyQty(30, 100, 25))).toBe(100);
    expect(value(buyQty(30, 110, 25))).toBe(125);
  });
  it('buys nothing for a need of nothing', () => {
    expect(value(buyQty(0, 100, 10))).toBe(0);
  });
  it('refuses a pack of 0 with a message', () => {
    expect(buyQty(5, 1, 0)).toEqual({ ok: false, error: expect.stringMatching(/pack/) });
  });
});

describe('price breaks (all-units)', () => {
  it('prices exactly at, one below and one above a break (by hand from the all-units break table)', () => {
    expect(value(breakPrice(REF_BREAKS, 99)).price).toBe(0.3); // highest break ≤ 99 is 1
    expect(value(breakPrice(REF_BREAKS, 100)).price).toBe(0.2); // exactly at 100
    expect(value(breakPrice(REF_BREAKS, 101)).price).toBe(0.2); // highest break ≤ 101 is 100
    expect(value(breakPrice(REF_BREAKS, 2500)).price).toBe(0.09);
  });
  it('is an error below the lowest break', () => {
    const r = breakPrice([{ qty: 10, price: 1 }], 9);
    expect(r).toEqual({ ok: false, error: expect.stringMatching(/below the lowest price break \(10\)/) });
  });
  it('refuses breaks that do not rise', () => {
    const r = breakPrice(
      [
        { qty: 10, price: 1 },
        { qty: 10, price: 0.5 },
      ],
      20,
    );
    expect(r.ok).toBe(false);
  });
});

describe('best buy from one quote', () => {
  it('buys up to 1000 when that costs less (operations-management texts, from memory: 910 × 0.15 = 136.50 but 1000 × 0.12 = 120.00)', () => {
    const need = value(needQty(2, 450, 0.01)); // 909
    const b = value(bestBuy({ moq: 1, pack: 10, breaks: REF_BREAKS }, need));
    // Candidates: 910 × 0.15 = 136.50; 1000 × 0.12 = 120.00; 2500 × 0.09 = 225.00 → 1000 wins.
    expect(b.buy).toBe(1000);
    expect(b.unitPrice).toBe(0.12);
    expect(b.extended).toBe(120);
    // The worked example counts 90 spare against the 910 pack-rounded order; our leftover is buy − need = 1000 − 909.
    expect(b.leftover).toBe(91);
  });
  it('stays at the plain quantity when buying up costs more (by hand)', () => {
    // need 300: 300 × 0.20 = 60.00; 500 × 0.15 = 75.00; 1000 × 0.12 = 120.00 → 300.
    const b = value(bestBuy({ moq: 1, pack: 1, breaks: REF_BREAKS }, 300));
    expect([b.buy, b.extended, b.leftover]).toEqual([300, 60, 0]);
  });
  it('one below a break buys up to it when that is cheaper, at the break it stays (by hand)', () => {
    // need 499: 499 × 0.20 = 99.80; 500 × 0.15 = 75.00 → 500, 1 left over.
    const below = value(bestBuy({ moq: 1, pack: 1, breaks: REF_BREAKS }, 499));
    expect([below.buy, below.extended, below.leftover]).toEqual([500, 75, 1]);
    // need 500: 500 × 0.15 = 75.00 exactly at the break.
    const at = value(bestBuy({ moq: 1, pack: 1, breaks: REF_BREAKS }, 500));
    expect([at.buy, at.extended]).toEqual([500, 75]);
    // need 501: 501 × 0.15 = 75.15; 1000 × 0.12 = 120.00 → 501.
    const above = value(bestBuy({ moq: 1, pack: 1, breaks: REF_BREAKS }, 501));
    expect([above.buy, above.extended]).toEqual([501, 75.15]);
  });
  it('reaches the lowest break when MOQ and need are below it', () => {
    // Lowest break 100 @ 0.05, need 7, MOQ 1: 7 is below every break, so buy 100 → 5.00.
    const b = value(bestBuy({ moq: 1, pack: 1, breaks: [{ qty: 100, price: 0.05 }] }, 7));
    expect([b.buy, b.extended, b.leftover]).toEqual([100, 5, 93]);
  });
  it('rounds the extended cost half up to cents despite float error (1.005 × 100 is 100.49999… in doubles)', () => {
    // 1 × 1.005 = 1.005 → half up → 1.01; a naive Math.round(1.005 × 100) / 100 gives 1.00.
    expect(Math.round(1.005 * 100) / 100).toBe(1); // the trap itself
    expect(roundMoney(1 * 1.005)).toBe(1.01);
    // 3 × 1.115 = 3.345 exactly on paper, 3.3449999999999998 in doubles → 3.35.
    expect(roundMoney(3 * 1.115)).toBe(3.35);
  });
});

describe('choice of quote', () => {
  it('converts currencies with the Book rates and picks the lowest base cost (by hand)', () => {
    // need 333. Quote A: EUR 0.10 → 33.30 EUR. Quote B: USD 0.10 → 33.30 USD × 0.90 = 29.97 EUR. B wins.
    const bom = costOne(
      {
        parts: [part('p1')],
        quotes: {
          p1: [
            { id: 'qa', supplierId: 'sup_a', currency: 'EUR', breaks: [{ qty: 1, price: 0.1 }] },
            { id: 'qb', supplierId: 'sup_b', currency: 'USD', breaks: [{ qty: 1, price: 0.1 }] },
          ],
        },
        lines: [{ partId: 'p1', qty: 1 }],
        settings: { rates: { EUR: 1, USD: 0.9 } },
      },
      333,
    );
    const line = bom.lines[0]!;
    expect(line.quoteId).toBe('qb');
    expect(line.extended).toBe(33.3);
    expect(line.currency).toBe('USD');
    expect(line.extendedBase).toBe(29.97);
    expect(bom.materialRun).toBe(29.97);
  });
  it('honours a pinned supplier even when another is cheaper', () => {
    const bom = costOne(
      {
        parts: [part('p1')],
        quotes: {
          p1: [
            { id: 'qa', supplierId: 'sup_a', breaks: [{ qty: 1, price: 0.2 }] },
            { id: 'qb', supplierId: 'sup_b', breaks: [{ qty: 1, price: 0.1 }] },
          ],
        },
        lines: [{ partId: 'p1', qty: 1, pinnedSupplierId: 'sup_a' }],
      },
      100,
    );
    expect(bom.lines[0]!.quoteId).toBe('qa');
    expect(bom.lines[0]!.extendedBase).toBe(20);
  });
  it('skips expired and superseded quotes and lists a line with no usable quote as a problem', () => {
    const bom = costOne(
      {
        parts: [part('p1'), part('p2')],
        quotes: {
          p1: [
            { id: 'old', breaks: [{ qty: 1, price: 0.01 }], expires: '2025-05-31' },
            { id: 'gone', breaks: [{ qty: 1, price: 0.01 }], supersededBy: 'cur' },
            { id: 'cur', breaks: [{ qty: 1, price: 0.5 }] },
          ],
          p2: [{ id: 'only', breaks: [{ qty: 1, price: 1 }], expires: '2025-01-31' }],
        },
        lines: [
          { partId: 'p1', qty: 1 },
          { partId: 'p2', qty: 1, designators: 'U9' },
        ],
      },
      10,
    );
    expect(bom.lines.map((l) => l.quoteId)).toEqual(['cur']);
    expect(bom.complete).toBe(false);
    expect(bom.problems).toHaveLength(1);
    expect(bom.problems[0]!.designators).toBe('U9');
    expect(bom.problems[0]!.message).toMatch(/expired 2025-01-31/);
    expect(bom.materialRun).toBe(5); // 10 × 0.50 from the one priced line
  });
  it('a quote that expires on the costing date is still valid that day', () => {
    const book = smallBook({
      parts: [part('p1')],
      quotes: { p1: [{ id: 'q', breaks: [{ qty: 1, price: 1 }], expires: '2025-06-01' }] },
      lines: [{ partId: 'p1', qty: 1 }],
    });
    const ctx = value(prepareCosting(book));
    expect(value(chooseQuote(ctx.quotesByPart.get('p1')!, 5, 'p1')).prepared.quote.id).toBe('q');
  });
});

describe('costed BOM', () => {
  it('reproduces the standard-cost example: 1.85 + 1.80 + 1.80 = 5.45 (cost-accounting texts, from memory)', () => {
    // Material 1.85 per unit: one part at 1.85, run 1000, no attrition → 1850.00 / 1000 = 1.85.
    // Labour 0.12 h × 15.00/h = 1.80: 0.12 h = 7.2 minutes per unit, no placement minutes.
    // Overhead 240,000 / 16,000 h = 15.00 per labour hour; on our labour-cost base that is 15.00 / 15.00 = 100 %
    // of labour → 1.80. Unit cost = 1.85 + 1.80 + 1.80 = 5.45. (Yield is not modelled: attrition covers scrap.)
    const bom = costOne(
      {
        parts: [part('p1')],
        quotes: { p1: [{ breaks: [{ qty: 1, price: 1.85 }] }] },
        lines: [{ partId: 'p1', qty: 1 }],
        settings: { labourRatePerHour: 15, labourMinutesPerUnit: 7.2, labourMinutesPerPlacement: 0, overheadPct: 100 },
      },
      1000,
    );
    expect(bom.material).toBe(1.85);
    expect(bom.labour).toBe(1.8);
    expect(bom.overhead).toBe(1.8);
    expect(bom.unitCost).toBe(5.45);
    // Run total = 1850.00 material + 1000 × (1.80 + 0 + 1.80) = 5450.00.
    expect(bom.runTotal).toBe(5450);
  });
  it('prices with a gross margin on price: 5.45 / (1 − 0.20) = 6.8125 (common practice)', () => {
    expect(priceFor(5.45, 20)).toBe(6.8125);
  });
  it('works a two-line run by hand: attrition, pack, MOQ, placements and test cost', () => {
    // Line 1: 4 resistors per unit, run 250, attrition 2 % → 4 × 250 × 1.02 = 1020; pack 100 → 1100.
    //   Breaks 100 @ 0.010, 1000 @ 0.008, 5000 @ 0.004: 1100 × 0.008 = 8.80; 5000 × 0.004 = 20.00 → 1100, 8.80.
    // Line 2: 1 controller per unit, attrition 0 → 250; MOQ 300 → 300 × 0.75 = 225.00, 50 left over (37.50).
    // Material run = 8.80 + 225.00 = 233.80 → per unit 233.80 / 250 = 0.9352.
    // Placements per unit = 4 × 1 + 1 × 1 = 5; labour = (1 + 0.1 × 5) min / 60 × 30.00/h = 0.75.
    // Test 0.20; overhead 50 % of labour = 0.375. Unit cost = 0.9352 + 0.75 + 0.20 + 0.375 = 2.2602.
    const bom = costOne(
      {
        parts: [part('r'), part('u', { kind: 'ic' })],
        quotes: {
          r: [
            {
              pack: 100,
              breaks: [
                { qty: 100, price: 0.01 },
                { qty: 1000, price: 0.008 },
                { qty: 5000, price: 0.004 },
              ],
            },
          ],
          u: [{ moq: 300, breaks: [{ qty: 1, price: 0.75 }] }],
        },
        lines: [
          { partId: 'r', qty: 4, attrition: 0.02 },
          { partId: 'u', qty: 1 },
        ],
        settings: {
          labourRatePerHour: 30,
          labourMinutesPerUnit: 1,
          labourMinutesPerPlacement: 0.1,
          testCostPerUnit: 0.2,
          overheadPct: 50,
        },
      },
      250,
    );
    expect(bom.lines.map((l) => [l.need, l.buy, l.extendedBase, l.leftover])).toEqual([
      [1020, 1100, 8.8, 80],
      [250, 300, 225, 50],
    ]);
    expect(bom.lines[1]!.leftoverValue).toBe(37.5);
    expect(bom.materialRun).toBe(233.8);
    expect(bom.material).toBe(0.9352);
    expect(bom.placements).toBe(5);
    expect(bom.labour).toBe(0.75);
    expect(bom.test).toBe(0.2);
    expect(bom.overhead).toBe(0.375);
    expect(bom.unitCost).toBe(2.2602);
    // Run total = 233.80 + 250 × (0.75 + 0.20 + 0.375) = 233.80 + 331.25 = 565.05.
    expect(bom.runTotal).toBe(565.05);
  });
  it('merges lines of the same part into one purchase (designators joined, needs summed)', () => {
    // R1: 1 per unit, R2: 2 per unit, run 100 → 100 + 200 = 300 bought once at the 250 break (0.02) = 6.00.
    const bom = costOne(
      {
        parts: [part('p1')],
        quotes: {
          p1: [
            {
              breaks: [
                { qty: 1, price: 0.05 },
                { qty: 250, price: 0.02 },
              ],
            },
          ],
        },
        lines: [
          { partId: 'p1', qty: 1, designators: 'R1' },
          { partId: 'p1', qty: 2, designators: 'R2, R3' },
        ],
      },
      100,
    );
    expect(bom.lines).toHaveLength(1);
    expect(bom.lines[0]!.designators).toBe('R1, R2, R3');
    expect([bom.lines[0]!.need, bom.lines[0]!.buy, bom.lines[0]!.extendedBase]).toEqual([300, 300, 6]);
  });
  it('gives a part on two lines the need of its summed per-unit quantity, rounded up once (NEED_QTY rule)', () => {
    // 1 + 2 per unit = 3 per unit, run 777, attrition 1.5 %: 3 × 777 × 1.015 = 2365.965 → 2366 (by hand).
    // Rounding each line first would give ceil(788.655) + ceil(1577.31) = 789 + 1578 = 2367: one part too many.
    expect(value(needQty(3, 777, 0.015))).toBe(2366);
    const bom = costOne(
      {
        parts: [part('p1')],
        quotes: { p1: [{ breaks: [{ qty: 1, price: 0.01 }] }] },
        lines: [
          { partId: 'p1', qty: 1, designators: 'R1', attrition: 0.015 },
          { partId: 'p1', qty: 2, designators: 'R2, R3', attrition: 0.015 },
        ],
      },
      777,
    );
    expect(bom.lines).toHaveLength(1);
    expect(bom.lines[0]!.need).toBe(2366);
  });
  it('refuses a bad run size and bad settings with a message', () => {
    const book = smallBook({ parts: [part('p1')], quotes: {}, lines: [] });
    const ctx = value(prepareCosting(book));
    expect(costVariantRun(ctx, book.variants[0]!, [], 0)).toEqual({ ok: false, error: expect.stringMatching(/run size/) });
    book.settings.marginPct = 100;
    expect(prepareCosting(book)).toEqual({ ok: false, error: expect.stringMatching(/margin/) });
  });
});
