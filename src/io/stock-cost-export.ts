// A run costed with the stock on hand, as rows for a table or a CSV (through the one CSV writer) and as JSON: per line
// what comes from stock and its value, what is still bought with its landed cost, and the run's material from both.
import type { Book } from '../domain/book.ts';
import type { Result } from '../domain/costing.ts';
import { prepareCosting, toCents } from '../domain/costing.ts';
import { onHandByPart } from '../domain/stock.ts';
import { stockCostedBom } from '../domain/stock-costing.ts';
import type { StockCostedBom } from '../domain/stock-costing.ts';
import { NUMBER_KINDS, exportOptionsProblem, exportText } from './csv-write.ts';
import type { ExportCell, ExportOptions, NumberCell } from './csv-write.ts';
import type { RunCosting } from './run-export.ts';

const qty = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.qty });
const money = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.money });
const price = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.price });
const unit = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.unit });

/**
 * The costing with stock: every part's stock on hand on the costing date (movements dated up to it) is this run's to
 * take. Stock the plan sets aside for earlier planned runs is not held back here (the Plan page and `rungbook plan`
 * allocate it run by run).
 */
export function costWithStock(book: Book, costing: RunCosting): Result<StockCostedBom> {
  const date = costing.bom.date;
  const ctx = prepareCosting(book, { date });
  if (!ctx.ok) return ctx;
  const available = onHandByPart(book.stockMoves.filter((m) => m.date <= date));
  return { ok: true, value: stockCostedBom(book, ctx.value, costing.bom, available) };
}

export function stockCostHeader(base: string): string[] {
  return ['designators', 'mpn', 'need', 'from_stock', `stock_value_${base}`, 'valued_at', 'to_buy', 'order_qty', 'supplier', 'unit_price', 'currency', `bought_${base}`, `landed_${base}`, 'problem'];
}

/** One row per line, then the totals (label in the first column, amount in the last number column it sums). */
export function stockCostRows(c: StockCostedBom): ExportCell[][] {
  const base = c.bom.currency;
  const rows: ExportCell[][] = [stockCostHeader(base)];
  for (const l of c.lines) {
    const bought = l.toBuy > 0 && !l.problem;
    rows.push([
      l.line.designators,
      l.line.mpn,
      qty(l.line.need),
      qty(l.fromStock),
      money(l.stockValue),
      l.fromStock > 0 ? l.valuedAt : '',
      qty(l.toBuy),
      bought ? qty(l.buy) : undefined,
      bought ? l.line.supplier : '',
      bought ? price(l.unitPrice) : undefined,
      bought ? l.line.currency : '',
      money(l.boughtBase),
      money(l.landedBase),
      l.problem ?? '',
    ]);
  }
  const blank = (n: number): undefined[] => Array.from({ length: n }, () => undefined);
  rows.push([`from stock (${base})`, ...blank(3), money(c.stockRun), ...blank(9)]);
  rows.push([`bought, goods (${base})`, ...blank(10), money((toCents(c.boughtRun) - toCents(c.landedRun)) / 100), ...blank(2)]);
  rows.push([`bought, landed cost (${base})`, ...blank(11), money(c.landedRun), undefined]);
  rows.push([`run material (${base})`, ...blank(10), money(c.materialRun), ...blank(2)]);
  rows.push([`material per unit (${base})`, ...blank(10), unit(c.material), ...blank(2)]);
  return rows;
}

export function stockCostCsv(c: StockCostedBom, o: ExportOptions): Result<string> {
  const bad = exportOptionsProblem(o);
  if (bad) return { ok: false, error: bad };
  return { ok: true, value: exportText(stockCostRows(c), o) };
}

/** The JSON shape of `rungbook cost --stock --json`. */
export function stockCostJson(c: StockCostedBom): Record<string, unknown> {
  return {
    variant: c.bom.variant,
    run: c.bom.run,
    currency: c.bom.currency,
    date: c.bom.date,
    valuation: c.valuation,
    lines: c.lines.map((l) => ({
      designators: l.line.designators,
      mpn: l.line.mpn,
      need: l.line.need,
      fromStock: l.fromStock,
      stockValue: l.stockValue,
      valuedAt: l.valuedAt,
      toBuy: l.toBuy,
      buy: l.buy,
      supplier: l.line.supplier,
      unitPrice: l.unitPrice,
      currency: l.line.currency,
      boughtBase: l.boughtBase,
      landedBase: l.landedBase,
      leftover: l.leftover,
      problem: l.problem ?? null,
    })),
    stockRun: c.stockRun,
    boughtRun: c.boughtRun,
    landedRun: c.landedRun,
    materialRun: c.materialRun,
    material: c.material,
  };
}
