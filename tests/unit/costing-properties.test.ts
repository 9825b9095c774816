// Property tests of the costing rules (fast-check): order quantities, buy-up, cheaper quotes, and that every total is
// the exact sum of its parts.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  bestBuy,
  breakPrice,
  buyQty,
  chooseQuote,
  costVariantRun,
  prepareCosting,
  toCents,
  toTenThousandths,
} from '../../src/domain/costing.ts';
import type { PreparedQuote } from '../../src/domain/costing.ts';
import type { PriceBreak } from '../../src/domain/book.ts';
import { NO_LANDED } from '../../src/domain/landed.ts';
import { resolveFixedLines } from '../fixtures/fixed-lines.ts';
import { part, quote, smallBook, value } from './costing-fixtures.ts';
import type { LineSpec, QuoteSpec } from './costing-fixtures.ts';

/** Prices with up to 4 decimals, as suppliers quote them. */
const priceArb = fc.integer({ min: 0, max: 500_000 }).map((n) => n / 10_000);

/** Ascending break quantities with any prices (not necessarily falling: a quote may be odd). */
const breaksArb: fc.Arbitrary<PriceBreak[]> = fc
  .uniqueArray(fc.integer({ min: 1, max: 20_000 }), { minLength: 1, maxLength: 5 })
  .chain((qtys) => {
    const sorted = [...qtys].sort((a, b) => a - b);
    return fc.array(priceArb, { minLength: sorted.length, maxLength: sorted.length }).map((prices) => sorted.map((qty, i) => ({ qty, price: prices[i]! })));
  });

const termsArb = fc.record({
  moq: fc.integer({ min: 0, max: 5000 }),
  pack: fc.integer({ min: 1, max: 500 }),
  breaks: breaksArb,
});

describe('costing properties', () => {
  it('buy ≥ need, ≥ MOQ, a whole number of packs, and less than one pack above the larger of them', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), fc.integer({ min: 0, max: 100_000 }), fc.integer({ min: 1, max: 1000 }), (need, moq, pack) => {
        const buy = value(buyQty(need, moq, pack));
        expect(buy).toBeGreaterThanOrEqual(need);
        expect(buy).toBeGreaterThanOrEqual(moq);
        expect(buy % pack).toBe(0);
        expect(buy).toBeLessThan(Math.max(need, moq) + pack);
      }),
    );
  });

  it('the best buy is ≥ need, ≥ MOQ, whole packs, priced at its break, and never dearer than the plain buy', () => {
    fc.assert(
      fc.property(termsArb, fc.integer({ min: 1, max: 30_000 }), (terms, need) => {
        const b = value(bestBuy(terms, need));
        expect(b.buy).toBeGreaterThanOrEqual(need);
        expect(b.buy).toBeGreaterThanOrEqual(terms.moq);
        expect(b.buy % terms.pack).toBe(0);
        expect(b.leftover).toBe(b.buy - need);
        expect(b.unitPrice).toBe(value(breakPrice(terms.breaks, b.buy)).price);
        expect(toCents(b.extended)).toBe(toCents(b.buy * b.unitPrice));
        const plain = value(buyQty(need, terms.moq, terms.pack));
        const plainPrice = breakPrice(terms.breaks, plain);
        if (plainPrice.ok) expect(toCents(b.extended)).toBeLessThanOrEqual(toCents(plain * plainPrice.value.price));
      }),
    );
  });

  it('a cheaper price at any break never raises the extended cost', () => {
    fc.assert(
      fc.property(termsArb, fc.integer({ min: 1, max: 30_000 }), fc.nat(), fc.double({ min: 0, max: 1, noNaN: true }), (terms, need, at, factor) => {
        const before = value(bestBuy(terms, need)).extended;
        const i = at % terms.breaks.length;
        const cheaper = terms.breaks.map((b, k) => (k === i ? { ...b, price: Math.floor(b.price * factor * 10_000) / 10_000 } : b));
        const after = value(bestBuy({ ...terms, breaks: cheaper }, need)).extended;
        expect(after).toBeLessThanOrEqual(before);
      }),
    );
  });

  it('a cheaper quote added to the choice never raises the chosen base cost', () => {
    fc.assert(
      fc.property(termsArb, termsArb, fc.integer({ min: 1, max: 30_000 }), fc.double({ min: 0.5, max: 2, noNaN: true }), (a, b, need, rate) => {
        const prep = (t: typeof a, id: string, r: number): PreparedQuote => ({
          quote: quote('p', { id, breaks: t.breaks, moq: t.moq, pack: t.pack }, 1),
          supplier: undefined,
          rate: r,
          landed: NO_LANDED,
        });
        const one = value(chooseQuote([prep(a, 'qa', 1)], need, 'p'));
        const two = value(chooseQuote([prep(a, 'qa', 1), prep(b, 'qb', rate)], need, 'p'));
        expect(two.extendedBase).toBeLessThanOrEqual(one.extendedBase);
      }),
    );
  });

  const bookArb = fc
    .record({
      parts: fc.integer({ min: 1, max: 4 }),
      quotes: fc.array(fc.record({ terms: termsArb, usd: fc.boolean() }), { minLength: 1, maxLength: 8 }),
      lines: fc.array(fc.record({ part: fc.nat(), halves: fc.integer({ min: 0, max: 20 }), attrition: fc.integer({ min: 0, max: 50 }) }), { minLength: 1, maxLength: 6 }),
      run: fc.integer({ min: 1, max: 20_000 }),
      usd: fc.integer({ min: 5000, max: 15000 }).map((n) => n / 10_000),
      labourRatePerHour: fc.integer({ min: 0, max: 6000 }).map((n) => n / 100),
      labourMinutesPerUnit: fc.integer({ min: 0, max: 300 }).map((n) => n / 10),
      labourMinutesPerPlacement: fc.integer({ min: 0, max: 100 }).map((n) => n / 100),
      testCostPerUnit: fc.integer({ min: 0, max: 500 }).map((n) => n / 100),
      overheadPct: fc.integer({ min: 0, max: 300 }),
      marginPct: fc.integer({ min: 0, max: 80 }),
    })
    .map((g) => {
      const parts = Array.from({ length: g.parts }, (_, i) => part(`p${i}`, { placements: i % 3 }));
      const quotes: Record<string, QuoteSpec[]> = {};
      g.quotes.forEach((q, i) => {
        const p = `p${i % g.parts}`;
        (quotes[p] ??= []).push({ ...q.terms, id: `q${i}`, currency: q.usd ? 'USD' : 'EUR', supplierId: q.usd ? 'sup_b' : 'sup_a' });
      });
      const lines: LineSpec[] = g.lines.map((l, i) => ({ partId: `p${l.part % g.parts}`, qty: l.halves / 2, attrition: l.attrition / 1000, designators: `Z${i}` }));
      const book = smallBook({
        parts,
        quotes,
        lines,
        settings: {
          rates: { EUR: 1, USD: g.usd },
          labourRatePerHour: g.labourRatePerHour,
          labourMinutesPerUnit: g.labourMinutesPerUnit,
          labourMinutesPerPlacement: g.labourMinutesPerPlacement,
          testCostPerUnit: g.testCostPerUnit,
          overheadPct: g.overheadPct,
          marginPct: g.marginPct,
        },
      });
      return { book, run: g.run };
    });

  it('the unit cost is the exact sum of material, labour, test and overhead', () => {
    fc.assert(
      fc.property(bookArb, ({ book, run }) => {
        const bom = value(costVariantRun(value(prepareCosting(book)), book.variants[0]!, resolveFixedLines(book), run));
        const parts = toTenThousandths(bom.material) + toTenThousandths(bom.labour) + toTenThousandths(bom.test) + toTenThousandths(bom.overhead);
        expect(toTenThousandths(bom.unitCost)).toBe(parts);
        // The material share is the run's material spread over the run, to 4 decimals: at most half a
        // ten-thousandth away, compared in ten-thousandths so float noise on large amounts cannot tip it.
        expect(Math.abs(toTenThousandths(bom.material) - (toCents(bom.materialRun) * 100) / run)).toBeLessThanOrEqual(0.5 + 1e-9);
      }),
    );
  });

  it('run material equals the sum of the line amounts to the cent, and the run total adds the conversion cost', () => {
    fc.assert(
      fc.property(bookArb, ({ book, run }) => {
        const bom = value(costVariantRun(value(prepareCosting(book)), book.variants[0]!, resolveFixedLines(book), run));
        const lineCents = bom.lines.reduce((s, l) => s + toCents(l.extendedBase), 0);
        expect(toCents(bom.materialRun)).toBe(lineCents);
        const conversion = toTenThousandths(bom.labour) + toTenThousandths(bom.test) + toTenThousandths(bom.overhead);
        expect(toCents(bom.runTotal)).toBe(lineCents + Math.round((conversion * run) / 100));
        for (const l of bom.lines) {
          expect(l.buy).toBeGreaterThanOrEqual(l.need);
          expect(l.buy).toBeGreaterThanOrEqual(l.moq);
          expect(l.buy % l.pack).toBe(0);
          // Every amount is a whole number of cents.
          expect(Number.isInteger(Math.round(l.extended * 100))).toBe(true);
          expect(Math.abs(l.extended * 100 - Math.round(l.extended * 100))).toBeLessThan(1e-6);
        }
      }),
    );
  });
});
