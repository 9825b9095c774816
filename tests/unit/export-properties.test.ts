// Property test (fast-check, 1,000 random runs): in the exported costed BOM, read back from the file, every total (in
// the totals block after the table) equals the sum of the rows it is made of to the cent, and equals the costing's own
// figure; under every choice.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { costVariantRun, prepareCosting, toCents } from '../../src/domain/costing.ts';
import type { PriceBreak } from '../../src/domain/book.ts';
import { purchaseList } from '../../src/domain/purchase.ts';
import { COSTED_LEFTOVER_COLUMN, COSTED_TOTAL_COLUMN, DELIMITERS, costedBomCsv, costedTotalLabels, purchaseListCsv } from '../../src/io/run-export.ts';
import type { ExportOptions } from '../../src/io/run-export.ts';
import { resolveFixedLines } from '../fixtures/fixed-lines.ts';
import { part, smallBook } from './costing-fixtures.ts';
import type { LineSpec, QuoteSpec } from './costing-fixtures.ts';
import { csvBlocks } from './csv-blocks.ts';

const priceArb = fc.integer({ min: 0, max: 200_000 }).map((n) => n / 10_000);
const breaksArb: fc.Arbitrary<PriceBreak[]> = fc
  .uniqueArray(fc.integer({ min: 1, max: 5000 }), { minLength: 1, maxLength: 4 })
  .chain((qtys) => {
    const sorted = [...qtys].sort((a, b) => a - b);
    return fc.array(priceArb, { minLength: sorted.length, maxLength: sorted.length }).map((prices) => sorted.map((qty, i) => ({ qty, price: prices[i]! })));
  });
const quoteArb: fc.Arbitrary<QuoteSpec> = fc.record({
  supplierId: fc.constantFrom('sup_a', 'sup_b'),
  breaks: breaksArb,
  moq: fc.integer({ min: 0, max: 3000 }),
  pack: fc.integer({ min: 1, max: 250 }),
  leadDays: fc.integer({ min: 0, max: 120 }),
});
const optionsArb: fc.Arbitrary<ExportOptions> = fc.oneof(
  fc.record({ delimiter: fc.constantFrom('comma' as const, 'semicolon' as const, 'tab' as const), decimal: fc.constant('point' as const), bom: fc.boolean() }),
  fc.record({ delimiter: fc.constantFrom('semicolon' as const, 'tab' as const), decimal: fc.constant('comma' as const), bom: fc.boolean() }),
);

const caseArb = fc.record({
  partCount: fc.integer({ min: 1, max: 6 }),
  quotes: fc.array(fc.array(quoteArb, { minLength: 1, maxLength: 3 }), { minLength: 6, maxLength: 6 }),
  lines: fc.array(
    fc.record({ part: fc.integer({ min: 0, max: 5 }), qty: fc.oneof(fc.integer({ min: 1, max: 8 }), fc.constantFrom(0.5, 1.5, 2.25)), attrition: fc.constantFrom(0, 0.01, 0.02, 0.1) }),
    { minLength: 1, maxLength: 8 },
  ),
  run: fc.integer({ min: 1, max: 20_000 }),
  usdRate: fc.integer({ min: 1, max: 30_000 }).map((n) => n / 10_000),
  labourRate: fc.integer({ min: 0, max: 6000 }).map((n) => n / 100),
  minutes: fc.integer({ min: 0, max: 600 }).map((n) => n / 10),
  perPlacement: fc.integer({ min: 0, max: 100 }).map((n) => n / 100),
  test: fc.integer({ min: 0, max: 500 }).map((n) => n / 100),
  overhead: fc.integer({ min: 0, max: 300 }),
  margin: fc.integer({ min: 0, max: 60 }),
  options: optionsArb,
});

/** The file's blocks (head, table, totals), read with the file's own delimiter. */
function parse(text: string, o: ExportOptions): string[][][] {
  expect(text.startsWith('\uFEFF')).toBe(o.bom);
  return csvBlocks(text, DELIMITERS[o.delimiter]);
}

describe('exported totals', () => {
  it('equal the sum of the exported rows to the cent, for 1,000 random runs', () => {
    fc.assert(
      fc.property(caseArb, (c) => {
        const parts = Array.from({ length: c.partCount }, (_, i) => part(`p${i}`));
        const quotes: Record<string, QuoteSpec[]> = {};
        parts.forEach((p, i) => (quotes[p.id] = c.quotes[i]!.map((q) => ({ ...q, currency: q.supplierId === 'sup_b' ? 'USD' : 'EUR' }))));
        const lines: LineSpec[] = c.lines.map((l) => ({ partId: `p${l.part % c.partCount}`, qty: l.qty, attrition: l.attrition }));
        const book = smallBook({
          parts,
          quotes,
          lines,
          settings: {
            rates: { EUR: 1, USD: c.usdRate },
            labourRatePerHour: c.labourRate,
            labourMinutesPerUnit: c.minutes,
            labourMinutesPerPlacement: c.perPlacement,
            testCostPerUnit: c.test,
            overheadPct: c.overhead,
            marginPct: c.margin,
          },
        });
        const ctx = prepareCosting(book);
        if (!ctx.ok) throw new Error(ctx.error);
        const variant = book.variants[0]!;
        const r = costVariantRun(ctx.value, variant, resolveFixedLines(book), c.run);
        if (!r.ok) throw new Error(r.error);
        const bom = r.value;
        const text = costedBomCsv({ bom, marginPct: c.margin, parts }, c.options);
        if (!text.ok) throw new Error(text.error);
        const [, rows = [], totals = []] = parse(text.value, c.options);
        const dec = (cell: string | undefined): number => Number((cell ?? '').replace(',', '.'));
        const cents = (cell: string | undefined): number => Math.round(dec(cell) * 100);
        const tenK = (cell: string | undefined): number => Math.round(dec(cell) * 10_000);
        const labels = costedTotalLabels('EUR', c.margin);
        // A total is its label and its value, in the block after the table.
        const row = (label: string): string[] => {
          const r = totals.find((x) => x[0] === label)!;
          const cells = new Array<string>(COSTED_LEFTOVER_COLUMN + 1).fill('');
          cells[COSTED_TOTAL_COLUMN] = cells[COSTED_LEFTOVER_COLUMN] = r[1]!;
          return cells;
        };
        const body = rows.slice(1, 1 + bom.lines.length);
        const T = COSTED_TOTAL_COLUMN;

        expect(cents(row(labels.materialRun)[T])).toBe(body.reduce((s, x) => s + cents(x[T]), 0));
        expect(cents(row(labels.materialRun)[T])).toBe(toCents(bom.materialRun));
        expect(cents(row(labels.leftoverValue)[COSTED_LEFTOVER_COLUMN])).toBe(body.reduce((s, x) => s + cents(x[COSTED_LEFTOVER_COLUMN]), 0));
        expect(cents(row(labels.runTotal)[T])).toBe(cents(row(labels.materialRun)[T]) + cents(row(labels.conversionRun)[T]));
        expect(cents(row(labels.runTotal)[T])).toBe(toCents(bom.runTotal));
        expect(tenK(row(labels.unitCost)[T])).toBe(
          tenK(row(labels.material)[T]) + tenK(row(labels.labour)[T]) + tenK(row(labels.test)[T]) + tenK(row(labels.overhead)[T]),
        );
        // The purchase list of the same run sums to the same run material.
        const list = purchaseListCsv({ bom, marginPct: c.margin, parts }, purchaseList(bom, { dateWanted: '2026-01-15' }), c.options);
        if (!list.ok) throw new Error(list.error);
        const [, lrows = []] = parse(list.value, c.options);
        const at = lrows[0]!.indexOf('line_price_EUR');
        expect(lrows.slice(1).reduce((s, x) => s + cents(x[at]), 0)).toBe(toCents(bom.materialRun));
      }),
      { numRuns: 1000 },
    );
  });
});
