// Landed cost: freight, duty and payment/bank charges on top of the goods, shared by value within a supplier's
// purchase, the costs each Incoterms 2020 term leaves to the buyer, and the costing workbook agreeing to the cent.
import { describe, expect, it } from 'vitest';
import { costVariantRun, prepareCosting, toCents } from '../../src/domain/costing.ts';
import { allocateCents, buyerShare, INCOTERM_BUYER_SHARE, landedLineCents, landedRates } from '../../src/domain/landed.ts';
import { freezeRun, readSnapshot } from '../../src/domain/freeze.ts';
import { INCOTERMS } from '../../src/domain/schema.ts';
import type { Book, Supplier } from '../../src/domain/book.ts';
import type { Incoterm } from '../../src/domain/schema.ts';
import { CostingWorkbook } from '../../src/engine/costing.ts';
import { fixedResolution, resolveFixedLines } from '../fixtures/fixed-lines.ts';
import { referenceFamily } from '../fixtures/reference-family.ts';
import { part, smallBook, value } from './costing-fixtures.ts';
import { quoteDraft, validateQuote } from '../../src/ui/quote-text.ts';

/**
 * The worked example: two parts bought from one supplier in USD (0.92 EUR per USD), 1,000 units.
 * Goods: 1,000 × 0.50 USD = 500.00 USD = 460.00 EUR; 200 × 1.25 USD = 250.00 USD = 230.00 EUR.
 * Supplier terms: freight 40.00 USD per order and 2 %, duty 3.5 %, charges 15.00 EUR per order and 1 %.
 */
function workedBook(term: Incoterm | undefined): Book {
  const book = smallBook({
    parts: [part('p1'), part('p2')],
    quotes: { p1: [{ supplierId: 'sup_b', currency: 'USD', breaks: [{ qty: 1, price: 0.5 }] }], p2: [{ supplierId: 'sup_b', currency: 'USD', breaks: [{ qty: 1, price: 1.25 }] }] },
    lines: [
      { partId: 'p1', qty: 1, designators: 'Q1' },
      { partId: 'p2', qty: 0.2, designators: 'Q2' },
    ],
    settings: { rates: { EUR: 1, USD: 0.92 }, runSizes: [1000] },
  });
  const b = book.suppliers.find((s) => s.id === 'sup_b')!;
  Object.assign(b, {
    freightPerOrder: { amount: 40, currency: 'USD' },
    freightPct: 2,
    dutyPct: 3.5,
    chargesPerOrder: { amount: 15, currency: 'EUR' },
    chargesPct: 1,
  } satisfies Partial<Supplier>);
  for (const q of book.quotes) if (term !== undefined) q.incoterm = term;
  return book;
}

const bomOf = (book: Book) => value(costVariantRun(value(prepareCosting(book)), book.variants[0]!, resolveFixedLines(book), 1000));

describe('landed cost', () => {
  it('works the example by hand: percentages per line, amounts per order shared by value (landed cost = price + freight + duty + fees, common practice)', () => {
    const bom = bomOf(workedBook('FCA'));
    const [l1, l2] = bom.lines;
    expect(l1!.extendedBase).toBe(460);
    expect(l2!.extendedBase).toBe(230);
    // Freight: 2 % of 460.00 = 9.20 and of 230.00 = 4.60; 40.00 USD per order = 36.80 EUR shared 460 : 230 →
    // 24.533… and 12.266…: floors 24.53 and 12.26, the odd cent to the larger remainder (line 2) → 24.53 and 12.27.
    expect(l1!.freight).toBe(33.73);
    expect(l2!.freight).toBe(16.87);
    // Duty 3.5 %: 16.10 and 8.05.
    expect(l1!.duty).toBe(16.1);
    expect(l2!.duty).toBe(8.05);
    // Charges 1 %: 4.60 and 2.30; 15.00 per order shared 2 : 1 → 10.00 and 5.00.
    expect(l1!.charges).toBe(14.6);
    expect(l2!.charges).toBe(7.3);
    // Landed 64.43 + 32.22 = 96.65; run material 690.00 + 96.65 = 786.65; per unit 0.78665 → 0.7867 (half away from zero).
    expect(bom.landedRun).toBe(96.65);
    expect(bom.materialRun).toBe(786.65);
    expect(bom.material).toBe(0.7867);
    expect(bom.unitCost).toBe(0.7867);
    expect(l1!.incoterm).toBe('FCA');
  });

  it('leaves to the buyer what each Incoterms 2020 group says (ICC Incoterms 2020, from memory), worked on the example', () => {
    // Sums of the example's landed costs by what falls to us: all 96.65; duty and charges 24.15 + 21.90 = 46.05;
    // charges only 21.90 (payment is not an Incoterms matter, so charges stay ours under every term).
    const all = 96.65;
    const dutyAndCharges = 46.05;
    const chargesOnly = 21.9;
    const expected: Record<Incoterm, number> = {
      EXW: all, // E: the buyer collects and pays carriage and duty
      FCA: all, // F: the main carriage and duty are the buyer's
      FAS: all,
      FOB: all,
      CPT: dutyAndCharges, // C: the seller pays the main carriage, the buyer the duty
      CIP: dutyAndCharges,
      CFR: dutyAndCharges,
      CIF: dutyAndCharges,
      DAP: dutyAndCharges, // D: delivered at the place, duty unpaid
      DPU: dutyAndCharges,
      DDP: chargesOnly, // D: delivered duty paid
    };
    for (const term of INCOTERMS) expect(bomOf(workedBook(term)).landedRun, term).toBe(expected[term]);
    // No term on the quote: every landed cost the supplier's terms name is ours.
    expect(bomOf(workedBook(undefined)).landedRun).toBe(all);
    expect(Object.keys(INCOTERM_BUYER_SHARE).sort()).toEqual([...INCOTERMS].sort());
    expect(buyerShare('DDP')).toEqual({ group: 'D', carriage: false, duty: false });
    expect(buyerShare('EXW')).toEqual({ group: 'E', carriage: true, duty: true });
  });

  it('shares an amount so that the shares add up to it exactly (largest remainder, by hand)', () => {
    expect(allocateCents(3680, [46000, 23000])).toEqual([2453, 1227]);
    expect(allocateCents(100, [1, 1, 1])).toEqual([34, 33, 33]);
    expect(allocateCents(5, [0, 0])).toEqual([3, 2]);
    expect(allocateCents(0, [10, 20])).toEqual([0, 0]);
    expect(allocateCents(7, [])).toEqual([]);
    const shares = allocateCents(99_999, [3, 7, 11, 13, 17]);
    expect(shares.reduce((s, x) => s + x, 0)).toBe(99_999);
  });

  it('rounds each percentage to the cent on its own (half away from zero)', () => {
    const r = landedRates({ id: 's', rev: 1, name: 'S', currency: 'EUR', notes: '', freightPct: 2.5, dutyPct: 0.5, chargesPct: 1 }, 'FOB');
    // 2.5 % of 1.01 = 0.02525 → 0.03; 0.5 % → 0.00505 → 0.01; 1 % → 0.0101 → 0.01.
    expect(landedLineCents(101, r)).toEqual({ freight: 3, duty: 1, charges: 1 });
  });

  it('chooses the quote with the lower landed cost, not the lower price', () => {
    // 1,000 × 1.00 EUR from sup_a (no landed cost) against 1,000 × 0.95 from sup_b at 10 % duty: 1,000.00 < 1,045.00.
    const book = smallBook({
      parts: [part('p1')],
      quotes: { p1: [{ id: 'qa', breaks: [{ qty: 1, price: 1 }] }, { id: 'qb', supplierId: 'sup_b', breaks: [{ qty: 1, price: 0.95 }] }] },
      lines: [{ partId: 'p1', qty: 1 }],
      settings: { runSizes: [1000] },
    });
    expect(bomOf(book).lines[0]!.quoteId).toBe('qb');
    book.suppliers[1]!.dutyPct = 10;
    expect(bomOf(book).lines[0]!.quoteId).toBe('qa');
  });

  it('names a supplier whose amount per order has no exchange rate, and the costing is not complete', () => {
    const book = workedBook('EXW');
    book.suppliers[1]!.chargesPerOrder = { amount: 15, currency: 'GBP' };
    const bom = bomOf(book);
    expect(bom.complete).toBe(false);
    expect(bom.problems[0]!.message).toMatch(/charges per order is in GBP, which has no exchange rate/);
  });

  it('gives the costing workbook the same unit costs with landed terms, after price and rate edits too', () => {
    const { book, resolution } = referenceFamily({ variants: 24, lines: 24 });
    const terms: (Incoterm | undefined)[] = [undefined, 'EXW', 'FCA', 'CIF', 'DAP', 'DDP'];
    book.quotes.forEach((q, i) => {
      const t = terms[i % terms.length];
      if (t !== undefined) q.incoterm = t;
    });
    book.suppliers.forEach((s, i) => {
      s.freightPct = (i % 3) * 1.5;
      s.dutyPct = i % 2 === 0 ? 3.7 : 0;
      s.chargesPct = 0.25 * i;
      if (i % 2 === 0) s.freightPerOrder = { amount: 35 + i, currency: 'USD' };
      if (i % 3 !== 2) s.chargesPerOrder = { amount: 12.5, currency: book.settings.baseCurrency };
    });
    const wb = value(CostingWorkbook.open(book, resolution));
    const check = (b: Book): void => {
      const ctx = value(prepareCosting(b));
      for (const v of b.variants) {
        for (const run of b.settings.runSizes) {
          const bom = value(costVariantRun(ctx, v, resolution.get(v.id) ?? [], run));
          expect(bom.complete, `${v.code}@${run}`).toBe(true);
          expect(bom.landedRun!, `${v.code}@${run}`).toBeGreaterThan(0);
          expect(wb.unitCost(v.id, run), `${v.code}@${run}`).toBe(bom.unitCost);
          // The costed BOM's lines add up to its run material, landed columns included.
          const cents = bom.lines.reduce((s, l) => s + toCents(l.extendedBase) + toCents(l.freight!) + toCents(l.duty!) + toCents(l.charges!), 0);
          expect(cents).toBe(toCents(bom.materialRun));
        }
      }
    };
    check(book);
    const edited: Book = structuredClone(book);
    for (const q of edited.quotes.slice(0, 12)) {
      q.breaks[0]!.price = Math.round(q.breaks[0]!.price * 0.7 * 10_000) / 10_000;
      value(wb.setQuotePrice(q.id, 0, q.breaks[0]!.price));
    }
    edited.settings.rates['USD'] = 1.21;
    value(wb.setRate('USD', 1.21));
    check(edited);
    wb.close();
  });

  it('keeps landed cost in a frozen run, and a snapshot frozen before landed cost existed still opens', () => {
    const book = workedBook('FCA');
    const bom = bomOf(book);
    const run = { id: 'r1', rev: 1, name: 'R1', variantId: 'v1', quantity: 1000, dateWanted: '2025-09-01', notes: '', status: 'planned' as const };
    const frozen = value(freezeRun(run as Book['runs'][number], bom, book));
    const read = value(readSnapshot(frozen.frozen!));
    expect(read.bom.landedRun).toBe(96.65);
    expect(read.bom.lines[0]!.freight).toBe(33.73);
    const old = structuredClone(frozen.frozen!);
    delete old.snapshot.bom.landedRun;
    for (const l of old.snapshot.bom.lines) {
      delete l.freight;
      delete l.duty;
      delete l.charges;
      delete l.incoterm;
    }
    const back = value(readSnapshot(old));
    expect(back.bom.lines[0]!.freight).toBeUndefined();
    expect(back.bom.materialRun).toBe(786.65);
  });

  it("takes a quote's delivery term from the quote form, and names a code that is not an Incoterms 2020 rule", () => {
    const book = workedBook(undefined);
    const q = book.quotes[0]!;
    const draft = quoteDraft(q, '2025-06-01');
    const dap = validateQuote({ ...draft, incoterm: 'dap' }, book, q, () => 'x');
    expect(dap.ok && dap.quote.incoterm).toBe('DAP');
    const none = validateQuote({ ...draft, incoterm: '' }, book, q, () => 'x');
    expect(none.ok && 'incoterm' in none.quote).toBe(false);
    const bad = validateQuote({ ...draft, incoterm: 'DAT' }, book, q, () => 'x');
    expect(!bad.ok && bad.problems.incoterm).toMatch(/an Incoterms 2020 code \(EXW, FCA/i);
  });

  it('costs the one-line example in the workbook as in the pure rules', () => {
    const book = workedBook('FCA');
    const wb = value(CostingWorkbook.open(book, fixedResolution(book)));
    expect(wb.unitCost('v1', 1000)).toBe(0.7867);
    wb.close();
  });
});
