// Customer price lists as rows and CSV text: one row per list and variant, one price column per run size. The app's
// Price lists page and the CLI's `prices --csv` take their bytes from here (the one CSV writer, csv-write.ts). The
// file is for customers: it carries prices only, no cost.
import type { Book, PriceList } from '../domain/book.ts';
import type { Result } from '../domain/costing.ts';
import { priceTable } from '../domain/price-lists.ts';
import type { CostCell, PriceTable } from '../domain/price-lists.ts';
import { CostingWorkbook, resolutionFromFamily } from '../engine/costing.ts';
import { resolveFamily } from '../engine/family.ts';
import { DEFAULT_EXPORT_OPTIONS, NUMBER_KINDS, exportOptionsProblem, exportText } from './csv-write.ts';
import type { ExportCell, ExportOptions } from './csv-write.ts';

/** Every variant's unit cost at every run size of the Book, from the costing workbook the app and the CLI share. */
export function familyUnitCosts(book: Book, options: { date?: string } = {}): Result<CostCell[]> {
  const opened = CostingWorkbook.open(book, resolutionFromFamily(resolveFamily(book)), options.date === undefined ? {} : { date: options.date });
  if (!opened.ok) return opened;
  try {
    return { ok: true, value: opened.value.allUnitCosts() };
  } finally {
    opened.value.close();
  }
}

/** The tables of the given lists (all the Book's lists when none are named). */
export function priceTables(book: Book, costs: readonly CostCell[], lists: readonly PriceList[] = book.priceLists): PriceTable[] {
  return lists.map((l) => priceTable(l, book, costs));
}

/** Column names: the list, its currency, the variant, then the price at each run size ("price_at_2000"). */
export function priceListHeader(runs: readonly number[]): string[] {
  return ['list', 'currency', 'variant', 'name', ...runs.map((r) => `price_at_${r}`)];
}

/** The lists as rows: the header, then one row per list and variant; a price that cannot be had is left empty. */
export function priceListRows(tables: readonly PriceTable[]): ExportCell[][] {
  const runs = [...new Set(tables.flatMap((t) => t.runs))];
  const rows: ExportCell[][] = [priceListHeader(runs)];
  for (const t of tables) {
    for (const r of t.rows) {
      const at = new Map(r.cells.map((c) => [c.run, c.price] as const));
      rows.push([
        t.list.name,
        t.list.currency,
        r.variant,
        r.name,
        ...runs.map((run): ExportCell => {
          const p = at.get(run);
          return p === undefined ? undefined : { n: p, kind: NUMBER_KINDS.price };
        }),
      ]);
    }
  }
  return rows;
}

/** The price lists CSV text (byte-order mark included when chosen). Clashing choices give a message. */
export function priceListCsv(tables: readonly PriceTable[], o: ExportOptions = DEFAULT_EXPORT_OPTIONS): Result<string> {
  const bad = exportOptionsProblem(o);
  if (bad) return { ok: false, error: bad };
  return { ok: true, value: exportText(priceListRows(tables), o) };
}

/** File name of the price lists export ("tarnwick-price-lists.csv"). */
export function priceListFileName(bookName: string): string {
  const slug = bookName.normalize('NFKD').replace(/[^\w.-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 60).toLowerCase();
  return `${slug || 'rungbook'}-price-lists.csv`;
}
