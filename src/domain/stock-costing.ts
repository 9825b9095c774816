// A run's costing that knows the stock: over the costed BOM (not a second costing), each line's need is taken
// from stock on hand first and only the rest is bought, with the same buy rules and the supplier the costing
// chose. Parts from stock are valued at the rule the Book sets: the last price paid for them, or today's quote. What is
// still bought carries its landed cost (freight, duty, charges) by the costing's own rules (domain/landed.ts): the
// percentages on its goods value, a supplier's amounts per order shared among the lines still bought from it.
import type { Book, StockValuation } from './book.ts';
import { chooseQuote, perUnitFromCents, rateOf, shareOrderAmounts, toCents } from './costing.ts';
import type { CostedBom, CostedLine, CostingContext } from './costing.ts';
import { landedLineCents } from './landed.ts';
import { lastPricePaid } from './orders.ts';

export interface StockCostedLine {
  line: CostedLine;
  /** Parts taken from stock on hand. */
  fromStock: number;
  /** Value of those parts, base currency, cents; how it was valued. */
  stockValue: number;
  valuedAt: 'last price paid' | "today's quote";
  /** What is still bought (the need less stock), with the buy rules applied; 0 when stock covers it all. */
  toBuy: number;
  buy: number;
  unitPrice: number;
  /** Base currency, to the cent: the goods, and the landed cost on them (freight + duty + charges). */
  boughtBase: number;
  landedBase: number;
  leftover: number;
  /** Why the rest could not be priced. */
  problem?: string;
}

export interface StockCostedBom {
  bom: CostedBom;
  valuation: StockValuation;
  lines: StockCostedLine[];
  /** Base currency, to the cent: bought (goods and landed cost), valued from stock, and their sum. */
  boughtRun: number;
  /** Of what is bought, the landed cost. */
  landedRun: number;
  stockRun: number;
  materialRun: number;
  /** Material per unit, 4 decimals. */
  material: number;
}

/**
 * The costed BOM with stock taken into account. `available` gives, per part id, how many parts this run may take
 * from stock (the plan allocates stock on hand to runs in date order); the costing's chosen supplier is kept for
 * what is still bought.
 */
export function stockCostedBom(
  book: Book,
  ctx: CostingContext,
  bom: CostedBom,
  available: ReadonlyMap<string, number>,
  valuation: StockValuation = book.settings.stockValuation,
): StockCostedBom {
  const left = new Map(available);
  // What is still bought, as costed lines, for the landed cost per order to be shared among them.
  const boughtLines: { at: number; line: CostedLine }[] = [];
  const lines: StockCostedLine[] = [];
  let bought = 0;
  let stock = 0;
  for (const line of bom.lines) {
    const fromStock = Math.max(0, Math.min(left.get(line.partId) ?? 0, line.need));
    left.set(line.partId, (left.get(line.partId) ?? 0) - fromStock);
    const toBuy = line.need - fromStock;
    const rate = rateOf(ctx.settings, line.currency) ?? 1;
    const quoteUnitBase = line.unitPrice * rate;
    let unitBase = quoteUnitBase;
    let valuedAt: StockCostedLine['valuedAt'] = "today's quote";
    if (valuation === 'lastPaid') {
      const paid = lastPricePaid(book, line.partId);
      const paidRate = paid ? rateOf(ctx.settings, paid.currency) : undefined;
      if (paid && paidRate !== undefined) {
        unitBase = paid.price * paidRate;
        valuedAt = 'last price paid';
      }
    }
    const stockValue = toCents(fromStock * unitBase);
    const out: StockCostedLine = { line, fromStock, stockValue: stockValue / 100, valuedAt, toBuy, buy: 0, unitPrice: 0, boughtBase: 0, landedBase: 0, leftover: 0 };
    if (toBuy > 0) {
      const quotes = (ctx.quotesByPart.get(line.partId) ?? []).filter((p) => p.quote.supplierId === line.supplierId);
      const choice = chooseQuote(quotes, toBuy, line.mpn);
      if (choice.ok) {
        out.buy = choice.value.buy.buy;
        out.unitPrice = choice.value.buy.unitPrice;
        out.boughtBase = choice.value.extendedBase;
        out.leftover = choice.value.buy.leftover;
        const landed = landedLineCents(toCents(choice.value.extendedBase), choice.value.prepared.landed);
        boughtLines.push({ at: lines.length, line: { ...line, quoteId: choice.value.prepared.quote.id, extendedBase: choice.value.extendedBase, freight: landed.freight / 100, duty: landed.duty / 100, charges: landed.charges / 100 } });
      } else out.problem = choice.error;
    }
    stock += stockValue;
    lines.push(out);
  }
  const shared = boughtLines.map((b) => b.line);
  shareOrderAmounts(ctx, shared); // an amount in a currency without a rate is already a problem of the costed BOM
  let landedRun = 0;
  boughtLines.forEach((b, i) => {
    const l = shared[i]!;
    const landed = toCents(l.freight ?? 0) + toCents(l.duty ?? 0) + toCents(l.charges ?? 0);
    lines[b.at]!.landedBase = landed / 100;
    landedRun += landed;
    bought += toCents(l.extendedBase) + landed;
  });
  return {
    bom,
    valuation,
    lines,
    boughtRun: bought / 100,
    landedRun: landedRun / 100,
    stockRun: stock / 100,
    materialRun: (bought + stock) / 100,
    material: perUnitFromCents(bought + stock, bom.run),
  };
}

