// `rungbook buy FILE --variant CODE --run N`: the purchase list of a production run, grouped by supplier, with order
// quantities in packs and units, prices, lead times and the latest date to order each line.
import type { Book, Variant } from '../../domain/book.ts';
import { isIsoDate } from '../../domain/dates.ts';
import { purchaseList } from '../../domain/purchase.ts';
import { purchaseListCsv } from '../../io/run-export.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CommandIo, ParsedArgs } from '../command.ts';
import { shown } from '../terminal.ts';
import { COSTING_FLAGS, COSTING_VALUES, CSV_CHOICES, costFromArgs, fmt, printOutput, table } from './cost.ts';
import { MAINS_CAUTION } from './info.ts';

const HELP = `usage: rungbook buy FILE --variant CODE --run N [--wanted YYYY-MM-DD] [--csv [CSV CHOICES]] [--date YYYY-MM-DD] [--fresh]

The purchase list for a production run of one variant, grouped by supplier: each part's order in packs and
units (MOQ and whole packs applied, bought up to a cheaper price break where that costs less), unit and line
price in the supplier's currency and in the base currency, lead time, and the latest order date = the date the
run's units are wanted − the lead time in days.

  --variant CODE   the variant's code
  --run N          units in the run (a whole number ≥ 1)
  --wanted D       date the finished units are wanted (default: a Run of the Book for this variant and quantity)
  --csv            print the list as CSV (RFC 4180; text that could run as a formula is neutralised)
  --date D         decide quote expiry at this date (default: the Book's costing date, else today)
  --fresh          cost with today's quotes even when the Book holds a frozen Run of this variant and quantity
${CSV_CHOICES}

A frozen Run of this variant and quantity is listed with its frozen prices and quotes (unless --fresh or --date).
The CSV has the same bytes as the app's purchase list export with the same choices.

Exit status: 0 done, 1 some line has no usable quote (listed, not on the list), 2 bad arguments or an
unreadable Book file.`;

/** The date wanted: --wanted, else the first Run of the Book for this variant and quantity, else none. */
function wantedDate(book: Book, variant: Variant, run: number, parsed: ParsedArgs): string | undefined {
  const given = parsed.options.get('wanted');
  if (typeof given === 'string') return given;
  return book.runs.find((r) => r.variantId === variant.id && r.quantity === run)?.dateWanted;
}

export const command: CliCommand = {
  name: 'buy',
  help: HELP,
  async run(args: string[], io: CommandIo): Promise<number> {
    let parsed: ParsedArgs;
    try {
      parsed = parseArgs(args, { flags: ['csv', ...COSTING_FLAGS], values: [...COSTING_VALUES, 'wanted'] });
    } catch (e) {
      io.err(`rungbook buy: ${e instanceof Error ? e.message : String(e)}\n\n${HELP}`);
      return 2;
    }
    const given = parsed.options.get('wanted');
    if (given !== undefined && (typeof given !== 'string' || !isIsoDate(given))) {
      io.err('rungbook buy: --wanted must be a date YYYY-MM-DD');
      return 2;
    }
    const job = await costFromArgs('buy', parsed, HELP, io);
    if (typeof job === 'number') return job;
    const { bom } = job;
    const wanted = wantedDate(job.book, job.variant, job.run, parsed);
    const list = purchaseList(bom, { dateWanted: wanted });
    const tableLines = (): string[] => {
      const out: string[] = [];
      const cur = shown(bom.currency);
      out.push(`Purchase list for ${shown(bom.variant)} — ${shown(job.variant.name)}: run of ${bom.run}, quotes valid on ${shown(bom.date)}`);
      if (job.costing.frozen) out.push(`Frozen ${job.costing.frozen.at}: the prices and quotes of that day, not today's.`);
      out.push(wanted === undefined ? 'No date wanted (give --wanted YYYY-MM-DD, or add a Run to the Book): latest order dates are left out.' : `Units wanted by ${wanted}; latest order date = that date − lead time.`);
      for (const o of list.orders) {
        out.push('', `${shown(o.supplier)} (${shown(o.currency)})${o.orderBy ? `, order by ${o.orderBy}` : ''}`);
        const rows = [['code', 'mpn', 'packs × pack', 'order qty', 'moq', 'unit price', 'line price', `in ${cur}`, 'lead days', 'order by', 'why']];
        for (const p of o.lines) {
          const l = p.line;
          rows.push([shown(l.supplierCode), shown(l.mpn), `${p.packs} × ${l.pack}`, fmt.qty(l.buy), fmt.qty(l.moq), fmt.price(l.unitPrice), fmt.money(l.extended), fmt.money(l.extendedBase), fmt.qty(l.leadDays), p.latestOrderDate ?? '', shown(p.reason)]);
        }
        rows.push(['total', '', '', '', '', '', fmt.money(o.total), fmt.money(o.totalBase), '', '', '']);
        out.push(...table(rows, [false, false, true, true, true, true, true, true, true, false, false]).map((x) => `  ${x}`));
      }
      out.push('', `all suppliers (${cur})  ${fmt.money(list.totalBase)}`);
      for (const p of bom.problems) out.push(`NOT ON THE LIST ${shown(p.designators || p.lineId || '')}: ${shown(p.message)}`);
      out.push('', MAINS_CAUTION);
      return out;
    };
    if (!printOutput('buy', parsed, io, { csv: () => purchaseListCsv(job.costing, list, job.csv, job.about), table: tableLines })) return 2;
    for (const p of bom.problems) io.err(`rungbook buy: not priced: ${shown(p.designators || p.lineId || '')}: ${shown(p.message)}`);
    return bom.complete ? 0 : 1;
  },
};
