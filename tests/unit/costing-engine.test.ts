// The costing workbook gives the same numbers as the pure costing rules, to the cent, and live edits behave.
import { describe, expect, it } from 'vitest';
import { fixedResolution } from '../fixtures/fixed-lines.ts';
import { referenceFamily } from '../fixtures/reference-family.ts';
import { costVariantRun, prepareCosting } from '../../src/domain/costing.ts';
import type { CostingContext, ResolvedLine } from '../../src/domain/costing.ts';
import { CostingWorkbook, resolutionFromFamily } from '../../src/engine/costing.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import type { Book } from '../../src/domain/book.ts';
import { part, smallBook, value } from './costing-fixtures.ts';

function pureUnitCosts(book: Book, resolution: Map<string, readonly ResolvedLine[]>, ctx?: CostingContext): Map<string, number> {
  const c = ctx ?? value(prepareCosting(book));
  const out = new Map<string, number>();
  for (const v of book.variants) {
    for (const run of book.settings.runSizes) {
      const bom = value(costVariantRun(c, v, resolution.get(v.id) ?? [], run));
      out.set(`${v.id}@${run}`, bom.complete ? bom.unitCost : NaN);
    }
  }
  return out;
}

function engineUnitCosts(wb: CostingWorkbook): Map<string, number> {
  return new Map(wb.allUnitCosts().map((r) => [`${r.variantId}@${r.run}`, r.unitCost] as const));
}

/** Reference family small enough for a unit test, with every line shape of the full one. */
const SMALL_REF = { variants: 40, lines: 30 };

describe('costing workbook', () => {
  it('gives every unit cost of the seeded reference family equal to the pure rules, to the cent', () => {
    const { book, resolution } = referenceFamily(SMALL_REF);
    const wb = value(CostingWorkbook.open(book, resolution));
    const engine = engineUnitCosts(wb);
    const pure = pureUnitCosts(book, resolution);
    expect(engine.size).toBe(SMALL_REF.variants * 3);
    for (const [k, u] of pure) {
      expect(Number.isFinite(u), k).toBe(true);
      expect(Math.round(engine.get(k)! * 100), k).toBe(Math.round(u * 100));
      // The rules share one rounding, so they agree exactly, not just to the cent.
      expect(engine.get(k), k).toBe(u);
    }
    wb.close();
  });

  it('gives every unit cost of the demo Book equal to the pure rules, to the cent, with no unpriced line', () => {
    const book = demoBook();
    const resolution = resolutionFromFamily(resolveFamily(book));
    const wb = value(CostingWorkbook.open(book, resolution));
    const engine = engineUnitCosts(wb);
    const pure = pureUnitCosts(book, resolution);
    expect(engine.size).toBe(book.variants.length * book.settings.runSizes.length);
    for (const [k, u] of pure) {
      expect(Number.isFinite(u), `${k}: ${wb.problem(k.split('@')[0]!, 'unitCost', Number(k.split('@')[1]))}`).toBe(true);
      expect(Math.round(engine.get(k)! * 100), k).toBe(Math.round(u * 100));
      expect(engine.get(k), k).toBe(u);
    }
    wb.close();
  });

  it('follows a quote price edit and a rate edit exactly as the pure rules do with the edited Book', () => {
    const { book, resolution } = referenceFamily(SMALL_REF);
    const wb = value(CostingWorkbook.open(book, resolution));
    const edited: Book = structuredClone(book);
    // Edit the first break of three quotes in different currencies, and the USD rate.
    const picks = [edited.quotes[0]!, edited.quotes.find((q) => q.currency === 'USD')!, edited.quotes.find((q) => q.currency === 'GBP')!];
    for (const q of picks) {
      const newPrice = Math.round(q.breaks[0]!.price * 0.5 * 10_000) / 10_000;
      q.breaks[0]!.price = newPrice;
      value(wb.setQuotePrice(q.id, 0, newPrice));
    }
    edited.settings.rates['USD'] = 1.05;
    const changed = value(wb.setRate('USD', 1.05));
    expect(changed.length).toBeGreaterThan(0);
    const engine = engineUnitCosts(wb);
    for (const [k, u] of pureUnitCosts(edited, resolution)) expect(engine.get(k), k).toBe(u);
    // The costed BOM detail follows the live prices too.
    const v = edited.variants[0]!;
    const bom = value(wb.costedBom(v.id, 2000));
    expect(bom.unitCost).toBe(engine.get(`${v.id}@2000`));
    wb.close();
  });

  it('reports which unit costs a price edit changed, and only those', () => {
    const { book, resolution } = referenceFamily(SMALL_REF);
    const wb = value(CostingWorkbook.open(book, resolution));
    const before = engineUnitCosts(wb);
    // The quote the first variant buys its first line from, made nearly free at the break it buys at.
    const line = value(wb.costedBom(book.variants[0]!.id, 500)).lines[0]!;
    const q = book.quotes.find((x) => x.id === line.quoteId)!;
    const breakIndex = q.breaks.findIndex((b) => b.qty === line.breakQty);
    const changed = value(wb.setQuotePrice(q.id, breakIndex, 0.0001));
    expect(changed.length).toBeGreaterThan(0);
    const after = engineUnitCosts(wb);
    const reallyChanged = [...after].filter(([k, u]) => before.get(k) !== u).map(([k]) => k);
    expect(changed.map((c) => `${c.variantId}@${c.run}`).sort()).toEqual(reallyChanged.sort());
    wb.close();
  });

  it('refuses bad edits with a message and changes nothing', () => {
    const { book, resolution } = referenceFamily(SMALL_REF);
    const wb = value(CostingWorkbook.open(book, resolution));
    const before = engineUnitCosts(wb);
    const q = book.quotes[0]!;
    expect(wb.setQuotePrice(q.id, 0, -1)).toEqual({ ok: false, error: expect.stringMatching(/≥ 0/) });
    expect(wb.setQuotePrice(q.id, 99, 1)).toEqual({ ok: false, error: expect.stringMatching(/breaks/) });
    expect(wb.setQuotePrice('nope', 0, 1)).toEqual({ ok: false, error: expect.stringMatching(/no quote/) });
    expect(wb.setRate('USD', 0)).toEqual({ ok: false, error: expect.stringMatching(/> 0/) });
    expect(wb.setRate('XYZ', 1)).toEqual({ ok: false, error: expect.stringMatching(/XYZ/) });
    const v = book.variants[0]!.id;
    expect(wb.setOverride(v, 'material', '=1+', 500)).toEqual({ ok: false, error: expect.stringMatching(/does not parse/) });
    expect(wb.setOverride(v, 'material', '=1/0', 500)).toEqual({ ok: false, error: expect.stringMatching(/nothing changed/) });
    expect(wb.setOverride(v, 'material', 'abc', 500).ok).toBe(false);
    expect(wb.setOverride(v, 'material', '=1', 777).ok).toBe(false);
    expect(engineUnitCosts(wb)).toEqual(before);
    wb.close();
  });

  it('lets a user override a cost cell with a formula, and the unit cost and price follow', () => {
    // Material 1.85, labour 0.12 h × 15.00 = 1.80, overhead 100 % of labour = 1.80 → 5.45 (standard cost, cost-accounting texts, from memory).
    const book = smallBook({
      parts: [part('p1')],
      quotes: { p1: [{ breaks: [{ qty: 1, price: 1.85 }] }] },
      lines: [{ partId: 'p1', qty: 1 }],
      settings: { runSizes: [1000], labourRatePerHour: 15, labourMinutesPerUnit: 7.2, overheadPct: 100, marginPct: 20 },
    });
    const wb = value(CostingWorkbook.open(book, fixedResolution(book)));
    expect(wb.unitCost('v1', 1000)).toBe(5.45);
    // Override material with a formula: 1.85 + 0.15 = 2.00 → unit cost 2.00 + 1.80 + 1.80 = 5.60; price 5.60 / 0.8 = 7.00.
    value(wb.setOverride('v1', 'material', '=1.85+0.15', 1000));
    expect(wb.unitCost('v1', 1000)).toBe(5.6);
    expect(wb.value('v1', 'price', 1000)).toBe(7);
    expect(value(wb.costedBom('v1', 1000)).material).toBe(2);
    value(wb.clearOverride('v1', 'material', 1000));
    expect(wb.unitCost('v1', 1000)).toBe(5.45);
    // A cost setting edit reaches every variant: labour rate 20.00 → labour 2.40, overhead 2.40 → 1.85 + 4.80 = 6.65.
    value(wb.setCostSetting('labourRatePerHour', 20));
    expect(wb.unitCost('v1', 1000)).toBe(6.65);
    expect(book.settings.labourRatePerHour).toBe(15); // the caller's Book is untouched
    wb.close();
  });

  it('shows a variant with an unpriced line as an error naming the line, not as a lower cost', () => {
    const book = smallBook({
      parts: [part('p1'), part('p2')],
      quotes: { p1: [{ breaks: [{ qty: 1, price: 1 }] }], p2: [{ breaks: [{ qty: 1, price: 1 }], expires: '2020-01-01' }] },
      lines: [
        { partId: 'p1', qty: 1 },
        { partId: 'p2', qty: 1, designators: 'U7' },
      ],
      settings: { runSizes: [100] },
    });
    const wb = value(CostingWorkbook.open(book, fixedResolution(book)));
    expect(wb.unitCost('v1', 100)).toBeNaN();
    expect(wb.problem('v1', 'unitCost', 100)).toMatch(/U7: no usable quote/);
    wb.close();
  });

  it('prices a part on two lines from its summed per-unit need, as the pure rules do', () => {
    // 1 + 2 per unit at 1.5 % attrition, run 777: 3 × 777 × 1.015 = 2365.965 → 2366 parts at 0.01 = 23.66.
    const book = smallBook({
      parts: [part('p1')],
      quotes: { p1: [{ breaks: [{ qty: 1, price: 0.01 }] }] },
      lines: [
        { partId: 'p1', qty: 1, attrition: 0.015 },
        { partId: 'p1', qty: 2, attrition: 0.015 },
      ],
      settings: { runSizes: [777] },
    });
    const wb = value(CostingWorkbook.open(book, fixedResolution(book)));
    const pure = pureUnitCosts(book, fixedResolution(book));
    expect(wb.unitCost('v1', 777)).toBe(pure.get('v1@777'));
    expect(value(wb.costedBom('v1', 777)).materialRun).toBe(23.66);
    wb.close();
  });

  it('refuses to open with bad run sizes', () => {
    const book = smallBook({ parts: [], quotes: {}, lines: [], settings: { runSizes: [100, 0] } });
    expect(CostingWorkbook.open(book, fixedResolution(book))).toEqual({ ok: false, error: expect.stringMatching(/run sizes/) });
  });
});
