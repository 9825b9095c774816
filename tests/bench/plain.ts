// The plain TypeScript baseline of the benchmark: the costing workbook's arithmetic as a loop, on the same plan
// (distinct demands computed once, then summed per variant), so engine_vs_plain compares equal work.
import type { Book } from '../../src/domain/book.ts';
import {
  baseCents,
  bestBuyUnchecked,
  candidateQuotes,
  labourUnit,
  overheadPerUnit,
  perUnitFromCents,
  placementsPerUnit,
  prepareCosting,
  priceFor,
  quoteProblem,
  roundUnit,
  unitCostOf,
  variantDemands,
} from '../../src/domain/costing.ts';
import type { ResolvedLine } from '../../src/domain/costing.ts';

interface PlainQuote {
  currency: string;
  moq: number;
  pack: number;
  qtys: Float64Array;
  prices: Float64Array;
}

export interface PlainPlan {
  runSizes: number[];
  /** Distinct demands: quotes to choose from and the need. */
  demands: { quotes: PlainQuote[]; need: number }[];
  /** Per variant: placements, and per run size the demand indexes (or -1 when a line has no usable quote). */
  variants: { id: string; placements: number; runs: Int32Array[] }[];
}

/** Plans the loop once (as the workbook plans its cells once at open). */
export function planPlain(book: Book, resolution: Map<string, readonly ResolvedLine[]>): PlainPlan {
  const prepared = prepareCosting(book);
  if (!prepared.ok) throw new Error(prepared.error);
  const ctx = prepared.value;
  const runSizes = [...book.settings.runSizes];
  const index = new Map<string, number>();
  const demands: PlainPlan['demands'] = [];
  const variants: PlainPlan['variants'] = [];
  for (const v of book.variants) {
    const lines = resolution.get(v.id) ?? [];
    const runs = runSizes.map((run) => {
      const { demands: ds } = variantDemands(ctx, lines, run);
      return Int32Array.from(
        ds.map((d) => {
          const key = `${d.partId}\u0000${d.pinnedSupplierId ?? ''}\u0000${d.need}`;
          let i = index.get(key);
          if (i === undefined) {
            i = demands.length;
            index.set(key, i);
            const quotes = candidateQuotes(ctx, d.partId, d.pinnedSupplierId)
              .filter((p) => quoteProblem(p.quote, ctx.date, 1) === undefined) // as the workbook: a missing rate is decided live
              .map((p) => ({
                currency: p.quote.currency,
                moq: p.quote.moq,
                pack: p.quote.pack,
                qtys: Float64Array.from(p.quote.breaks.map((b) => b.qty)),
                prices: Float64Array.from(p.quote.breaks.map((b) => b.price)),
              }));
            demands.push({ quotes, need: d.need });
          }
          return i;
        }),
      );
    });
    variants.push({ id: v.id, placements: placementsPerUnit(ctx, lines), runs });
  }
  return { runSizes, demands, variants };
}

/** Every unit cost, variant-major then run size, computed by the loop with the given settings and rates. */
export function plainUnitCosts(plan: PlainPlan, book: Book, rates: Record<string, number>): Float64Array {
  const s = book.settings;
  const cents = new Float64Array(plan.demands.length);
  for (let i = 0; i < plan.demands.length; i++) {
    const d = plan.demands[i]!;
    let best = Infinity;
    for (const q of d.quotes) {
      const rate = q.currency === s.baseCurrency ? 1 : rates[q.currency];
      if (!(rate! > 0)) continue;
      const b = bestBuyUnchecked(d.need, q.moq, q.pack, q.qtys, q.prices, q.qtys.length);
      if (!b) continue;
      const c = baseCents(b.cents, rate!);
      if (c < best) best = c;
    }
    cents[i] = best;
  }
  const out = new Float64Array(plan.variants.length * plan.runSizes.length);
  const test = roundUnit(s.testCostPerUnit);
  let k = 0;
  for (const v of plan.variants) {
    const labour = labourUnit(s.labourRatePerHour, s.labourMinutesPerUnit, s.labourMinutesPerPlacement, v.placements);
    const overhead = overheadPerUnit(labour, s.overheadPct);
    for (let r = 0; r < plan.runSizes.length; r++) {
      let sum = 0;
      for (const i of v.runs[r]!) sum += cents[i]!;
      const material = perUnitFromCents(sum, plan.runSizes[r]!);
      const unit = unitCostOf(material, labour, test, overhead);
      // The price is part of the work the workbook does, so the loop does it too.
      out[k++] = priceFor(unit, s.marginPct) > -1 ? unit : NaN;
    }
  }
  return out;
}
