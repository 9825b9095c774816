// `rungbook buy FILE --variant CODE --run N`: the purchase list of a production run, grouped by supplier, with order
// quantities in packs and units, prices, lead times and the latest date to order each line.
import type { Book, Variant } from '../../domain/book.ts';
import type { CostedBom, CostedLine } from '../../domain/costing.ts';
import { toCsv } from '../../io/csv-write.ts';
import type { CsvCell } from '../../io/csv-write.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CliIo, ParsedArgs } from '../command.ts';
import { costFromArgs, fmt, table } from './cost.ts';
import { MAINS_CAUTION } from './info.ts';

const HELP = `usage: rungbook buy FILE --variant CODE --run N [--wanted YYYY-MM-DD] [--csv] [--date YYYY-MM-DD]

The purchase list for a production run of one variant, grouped by supplier: each part's order in packs and
units (MOQ and whole packs applied, bought up to a cheaper price break where that costs less), unit and line
price in the supplier's currency and in the base currency, lead time, and the latest order date = the date the
run's units are wanted − the lead time in days.

  --variant CODE   the variant's code
  --run N          units in the run (a whole number ≥ 1)
  --wanted D       date the finished units are wanted (default: a Run of the Book for this variant and quantity)
  --csv            print the list as CSV (RFC 4180; text that could run as a formula is neutralised)
  --date D         decide quote expiry at this date (default: the Book's costing date, else today)

Exit status: 0 done, 1 some line has no usable quote (listed, not on the list), 2 bad arguments or an
unreadable Book file.`;

const ISO = /^\d{4}-\d{2}-\d{2}$/;

/** date − days as an ISO date (calendar days, UTC so no daylight-saving step). Undefined for a bad date. */
export function daysBefore(date: string, days: number): string | undefined {
  if (!ISO.test(date)) return undefined;
  const t = Date.parse(`${date}T00:00:00Z`);
  if (Number.isNaN(t)) return undefined;
  const d = new Date(t - days * 86_400_000);
  if (d.toISOString().slice(0, 10) === 'Invalid Date') return undefined;
  return d.toISOString().slice(0, 10);
}

export interface SupplierOrder {
  supplierId: string;
  supplier: string;
  currency: string;
  lines: CostedLine[];
  /** Sum of line prices in the supplier's quote currency (cents). */
  total: number;
  totalBase: number;
}

/** The costed lines grouped by supplier, suppliers by name, lines by mpn. */
export function ordersBySupplier(bom: CostedBom): SupplierOrder[] {
  const by = new Map<string, SupplierOrder>();
  for (const l of bom.lines) {
    const key = `${l.supplierId}\u0000${l.currency}`;
    let o = by.get(key);
    if (!o) {
      o = { supplierId: l.supplierId, supplier: l.supplier, currency: l.currency, lines: [], total: 0, totalBase: 0 };
      by.set(key, o);
    }
    o.lines.push(l);
  }
  const out = [...by.values()].sort((a, b) => a.supplier.localeCompare(b.supplier));
  for (const o of out) {
    o.lines.sort((a, b) => a.mpn.localeCompare(b.mpn));
    // Integer cents so a supplier's total is exactly the sum of its lines.
    o.total = o.lines.reduce((s, l) => s + Math.round(l.extended * 100), 0) / 100;
    o.totalBase = o.lines.reduce((s, l) => s + Math.round(l.extendedBase * 100), 0) / 100;
  }
  return out;
}

function wantedDate(book: Book, variant: Variant, run: number, parsed: ParsedArgs): string | undefined | Error {
  const given = parsed.options.get('wanted');
  if (typeof given === 'string') return ISO.test(given) && daysBefore(given, 0) !== undefined ? given : new Error('--wanted must be YYYY-MM-DD');
  return book.runs.find((r) => r.variantId === variant.id && r.quantity === run)?.dateWanted;
}

export const command: CliCommand = {
  name: 'buy',
  help: HELP,
  async run(args: string[], io: CliIo): Promise<number> {
    let parsed: ParsedArgs;
    try {
      parsed = parseArgs(args, { flags: ['csv'], values: ['variant', 'run', 'date', 'wanted'] });
    } catch (e) {
      io.err(`rungbook buy: ${e instanceof Error ? e.message : String(e)}\n\n${HELP}`);
      return 2;
    }
    const given = parsed.options.get('wanted');
    if (given !== undefined && (typeof given !== 'string' || daysBefore(given, 0) === undefined)) {
      io.err('rungbook buy: --wanted must be a date YYYY-MM-DD');
      return 2;
    }
    const job = await costFromArgs('buy', parsed, HELP, io);
    if (typeof job === 'number') return job;
    const { bom } = job;
    const wanted = wantedDate(job.book, job.variant, job.run, parsed);
    if (wanted instanceof Error) {
      io.err(`rungbook buy: ${wanted.message}`);
      return 2;
    }
    const orders = ordersBySupplier(bom);
    const latest = (l: CostedLine): string => (wanted === undefined ? '' : daysBefore(wanted, l.leadDays) ?? '');
    if (parsed.options.has('csv')) {
      const rows: CsvCell[][] = [
        ['supplier', 'supplier_code', 'mpn', 'description', 'designators', 'need', 'packs', 'pack', 'order_qty', 'moq', 'unit_price', 'currency', 'line_price', `line_price_${bom.currency}`, 'lead_days', 'latest_order_date'],
      ];
      for (const o of orders) {
        for (const l of o.lines) {
          rows.push([o.supplier, l.supplierCode, l.mpn, l.description, l.designators, l.need, l.buy / l.pack, l.pack, l.buy, l.moq, l.unitPrice, l.currency, l.extended, l.extendedBase, l.leadDays, latest(l)]);
        }
      }
      io.out(toCsv(rows));
      io.err(MAINS_CAUTION);
    } else {
      const out: string[] = [];
      out.push(`Purchase list for ${bom.variant} — ${job.variant.name}: run of ${bom.run}, quotes valid on ${bom.date}`);
      out.push(wanted === undefined ? 'No date wanted (give --wanted YYYY-MM-DD, or add a Run to the Book): latest order dates are left out.' : `Units wanted by ${wanted}; latest order date = that date − lead time.`);
      for (const o of orders) {
        out.push('', `${o.supplier} (${o.currency})`);
        const rows = [['code', 'mpn', 'packs × pack', 'order qty', 'moq', 'unit price', 'line price', `in ${bom.currency}`, 'lead days', 'order by']];
        for (const l of o.lines) {
          rows.push([l.supplierCode, l.mpn, `${l.buy / l.pack} × ${l.pack}`, fmt.qty(l.buy), fmt.qty(l.moq), fmt.price(l.unitPrice), fmt.money(l.extended), fmt.money(l.extendedBase), fmt.qty(l.leadDays), latest(l)]);
        }
        rows.push(['total', '', '', '', '', '', fmt.money(o.total), fmt.money(o.totalBase), '', '']);
        out.push(...table(rows, [false, false, true, true, true, true, true, true, true, false]).map((x) => `  ${x}`));
      }
      const grand = orders.reduce((s, o) => s + Math.round(o.totalBase * 100), 0) / 100;
      out.push('', `all suppliers (${bom.currency})  ${fmt.money(grand)}`);
      for (const p of bom.problems) out.push(`NOT ON THE LIST ${p.designators || p.lineId || ''}: ${p.message}`);
      out.push('', MAINS_CAUTION);
      io.out(out.join('\n'));
    }
    for (const p of bom.problems) io.err(`rungbook buy: not priced: ${p.designators || p.lineId || ''}: ${p.message}`);
    return bom.complete ? 0 : 1;
  },
};
