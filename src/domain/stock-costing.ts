// A run's costing that knows the stock: over the costed BOM (not a second costing), each line's need is taken
// from stock on hand first and only the rest is bought, with the same buy rules and the supplier the costing
// chose. Parts from stock are valued at the rule the Book sets: the last price paid for them, or today's quote.
import type { Book, StockValuation } from './book.ts';
import { chooseQuote, perUnitFromCents, rateOf, toCents } from './costing.ts';
import type { CostedBom, CostedLine, CostingContext } from './costing.ts';
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
  /** Base currency, to the cent. */
  boughtBase: number;
  leftover: number;
  /** Why the rest could not be priced. */
  problem?: string;
}

export interface StockCostedBom {
  bom: CostedBom;
  valuation: StockValuation;
  lines: StockCostedLine[];
  /** Base currency, to the cent: bought, valued from stock, and their sum. */
  boughtRun: number;
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
    const out: StockCostedLine = { line, fromStock, stockValue: stockValue / 100, valuedAt, toBuy, buy: 0, unitPrice: 0, boughtBase: 0, leftover: 0 };
    if (toBuy > 0) {
      const quotes = (ctx.quotesByPart.get(line.partId) ?? []).filter((p) => p.quote.supplierId === line.supplierId);
      const choice = chooseQuote(quotes, toBuy, line.mpn);
      if (choice.ok) {
        out.buy = choice.value.buy.buy;
        out.unitPrice = choice.value.buy.unitPrice;
        out.boughtBase = choice.value.extendedBase;
        out.leftover = choice.value.buy.leftover;
        bought += toCents(choice.value.extendedBase);
      } else out.problem = choice.error;
    }
    stock += stockValue;
    lines.push(out);
  }
  return {
    bom,
    valuation,
    lines,
    boughtRun: bought / 100,
    stockRun: stock / 100,
    materialRun: (bought + stock) / 100,
    material: perUnitFromCents(bought + stock, bom.run),
  };
}

