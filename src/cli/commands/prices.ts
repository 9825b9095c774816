// `rungbook prices FILE [--list NAME]`: the Book's customer price lists, each variant's price at each run size, as a
// table or CSV. The unit costs come from the same costing workbook the app uses; the prices from domain/price-lists.ts.
import { isIsoDate } from '../../domain/dates.ts';
import { familyUnitCosts, priceListCsv, priceTables } from '../../io/price-list-export.ts';
import { loadBook } from '../book-read.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CommandIo, ParsedArgs } from '../command.ts';
import { shown } from '../terminal.ts';
import { CSV_CHOICES, csvChoices, fmt, table } from './cost.ts';

const HELP = `usage: rungbook prices FILE [--list NAME] [--csv [CSV CHOICES]] [--date YYYY-MM-DD]

Prices every variant of a .rungbook.json Book at each of its run sizes on each customer price list (or the
one named): the unit cost in the base currency, priced at the list's margin (price = cost / (1 − margin)) or
markup (price = cost × (1 + markup)), converted to the list's currency at the Book's rate, then rounded once:
to the cent, half away from zero, or to the list's step (nearest, or up).

  --list NAME      only the price list of this name
  --csv            print the prices as CSV (RFC 4180; text that could run as a formula is neutralised): one
                   row per list and variant, one price column per run size; no cost, it is for customers
  --date D         decide quote expiry at this date (default: the Book's costing date, else today)
${CSV_CHOICES}

Exit status: 0 done, 1 some price cannot be had (its unit cost cannot be computed; listed), 2 bad arguments or
an unreadable Book file.`;

export const command: CliCommand = {
  name: 'prices',
  help: HELP,
  async run(args: string[], io: CommandIo): Promise<number> {
    let parsed: ParsedArgs;
    try {
      parsed = parseArgs(args, { flags: ['csv', 'bom'], values: ['list', 'date', 'delimiter', 'decimal'] });
    } catch (e) {
      io.err(`rungbook prices: ${e instanceof Error ? e.message : String(e)}\n\n${HELP}`);
      return 2;
    }
    if (parsed.positional.length !== 1) {
      io.err(`rungbook prices: give exactly one Book file\n\n${HELP}`);
      return 2;
    }
    const date = parsed.options.get('date');
    if (date !== undefined && (typeof date !== 'string' || !isIsoDate(date))) {
      io.err('rungbook prices: --date must be YYYY-MM-DD');
      return 2;
    }
    const csv = csvChoices('prices', parsed, io);
    if (typeof csv === 'number') return csv;
    const read = await loadBook('prices', parsed.positional[0]!, io);
    if (!read) return 2;
    const book = read.book;
    const name = parsed.options.get('list');
    if (name !== undefined && typeof name !== 'string') {
      io.err('rungbook prices: give the list with --list NAME');
      return 2;
    }
    const lists = name === undefined ? book.priceLists : book.priceLists.filter((l) => l.name.trim().toLowerCase() === name.trim().toLowerCase());
    if (lists.length === 0) {
      io.err(
        name === undefined
          ? 'rungbook prices: the Book has no price lists; add one on the Price lists page'
          : `rungbook prices: no price list called ${shown(name)}; the Book has ${book.priceLists.map((l) => shown(l.name)).join(', ') || 'none'}`,
      );
      return 2;
    }
    const costs = familyUnitCosts(book, typeof date === 'string' ? { date } : {});
    if (!costs.ok) {
      io.err(`rungbook prices: ${shown(costs.error)}`);
      return 2;
    }
    const tables = priceTables(book, costs.value, lists);
    if (parsed.options.has('csv')) {
      const text = priceListCsv(tables, csv);
      if (!text.ok) {
        io.err(`rungbook prices: ${text.error}`);
        return 2;
      }
      io.data(text.value);
    } else {
      const out: string[] = [];
      for (const t of tables) {
        const l = t.list;
        const rule = l.rounding ? `rounded ${l.rounding.mode === 'up' ? 'up' : 'to the nearest'} ${l.rounding.step}` : 'rounded to the cent';
        out.push(`${shown(l.name)}: ${l.pct} % ${l.basis} on the unit cost in ${shown(t.base)}, in ${shown(l.currency)}, ${rule}`);
        const rows = [['variant', 'name', ...t.runs.map((r) => `at ${r}`)]];
        for (const r of t.rows) {
          const at = new Map(r.cells.map((c) => [c.run, c.price] as const));
          rows.push([shown(r.variant), shown(r.name), ...t.runs.map((run) => {
            const p = at.get(run);
            return p === undefined ? '—' : fmt.price(p);
          })]);
        }
        out.push(...table(rows, [false, false, ...t.runs.map(() => true)]), '');
      }
      io.out(out.join('\n').trimEnd());
    }
    let missing = 0;
    for (const t of tables) {
      for (const r of t.rows) {
        for (const c of r.cells) {
          if (c.price !== undefined) continue;
          missing++;
          io.err(`rungbook prices: ${shown(t.list.name)}: ${shown(r.variant)} at ${c.run}: ${shown(c.error ?? 'no price')}`);
        }
      }
    }
    return missing > 0 ? 1 : 0;
  },
};
