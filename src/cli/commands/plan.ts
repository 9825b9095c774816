// `rungbook plan FILE`: the plan across the Book's planned runs — per part the gross need, on hand, open orders in
// time and the net need, and the orders to place per supplier — as a table, JSON or CSV.
import type { Book } from '../../domain/book.ts';
import { isIsoDate, todayIso } from '../../domain/dates.ts';
import { acceptSuggestions } from '../../domain/planning.ts';
import type { Plan } from '../../domain/planning.ts';
import { parseExportOptions } from '../../io/csv-write.ts';
import { limitText, planBook, planCsv, partStatus } from '../../io/plan-export.ts';
import { loadBook } from '../book-read.ts';
import { writeChange } from '../book-write.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CommandIo } from '../command.ts';
import { jsonText, shown } from '../terminal.ts';
import { CSV_CHOICES } from './cost.ts';
import { MAINS_CAUTION } from './info.ts';

const HELP = `usage: rungbook plan FILE [--horizon DAYS] [--date YYYY-MM-DD] [--json | --csv [CSV CHOICES]] [--place [--out NEW]]

Plans the Book's planned runs (those not marked built) wanted within the horizon together: per part the gross
need (each run's need with attrition, as its costed BOM gives it), the stock on hand (the sum of its stock
movements), open orders due in time and the net need; then the orders to place per supplier, with the buy rules
(MOQ, whole packs, buying up to a cheaper price break) applied to each part's combined net need.

Dates: a run's parts must be in by its date wanted less the Book's kitting and safety days; an order must go by
that date less the supplier's lead time. Needs are netted in date order: stock first, then open orders due by
the need date. A part whose order-by date has passed is late; one whose need date has passed is past due. Each
run names the part that limits its date; a part it still has to buy that no quote can be used for comes first, and
the run is then late (it cannot be built until the part can be bought).

  --horizon DAYS   plan runs wanted within this many days of the plan date (default: the Book's horizon)
  --date D         the plan date (default: today); quotes are judged at this date
  --json           print the plan as JSON {today, horizonEnd, runs, parts, suggestions}
  --csv            print one row per part, with the runs it limits (RFC 4180; text that could run as a formula
                   is neutralised)
  --place          place every suggested order: each becomes an open order with the next order number, dated
                   the plan date, due after its longest lead time; the Book file is rewritten (or --out NEW)
${CSV_CHOICES}

Exit status: 0 done, 1 some part has no usable quote (listed) or the orders could not be written, 2 bad
arguments or an unreadable Book file.`;

function table(plan: Plan, currency: string): string {
  const out: string[] = [`plan of ${plan.today}, runs wanted up to ${plan.horizonEnd}`, ''];
  out.push('runs');
  for (const r of plan.runs) {
    const where = r.inHorizon ? '' : ' (after the horizon)';
    const lim = r.limiting ? `; limited by ${shown(limitText(r.limiting))}${r.late ? ' — LATE' : ''}` : '';
    const bad = r.problems.map((x) => `\n    ✗ ${shown(x.message)}`).join('');
    out.push(`  ${shown(r.run.name || r.run.id)}: ${r.run.quantity} wanted ${r.run.dateWanted}, parts in by ${r.needDate}${r.pastDue ? ' — PAST DUE' : ''}${lim}${where}${bad}`);
  }
  out.push('', 'parts (gross, on hand, on order in time, net)');
  for (const p of plan.parts) {
    out.push(`  ${shown(p.mpn)}: ${p.grossTotal}, ${p.onHand}, ${p.fromOrders}, ${p.net} — ${partStatus(p)}${p.problem ? `: ${shown(p.problem)}` : ''}`);
  }
  out.push('', `orders to place (${currency})`);
  if (plan.suggestions.length === 0) out.push('  none: stock and open orders cover every need');
  for (const s of plan.suggestions) {
    out.push(`  ${shown(s.supplier)} (${s.currency}): order by ${s.orderBy}${s.late ? ' — LATE' : ''}, due ${s.dueIfPlacedToday} if placed today, ${s.total.toFixed(2)} ${s.currency} = ${s.totalBase.toFixed(2)} ${currency}`);
    for (const l of s.lines) out.push(`    ${shown(l.mpn)}: net ${l.net}, order ${l.buy} @ ${l.unitPrice} (${l.supplierCode ? shown(l.supplierCode) : 'no code'}), by ${l.orderBy}`);
  }
  out.push('', MAINS_CAUTION);
  return out.join('\n');
}

/** Places every suggested order and writes the Book; the exit status. */
async function place(book: Book, plan: Plan, out: string, today: string, io: CommandIo): Promise<number> {
  if (plan.suggestions.length === 0) {
    io.err('rungbook plan: no order to place: stock and open orders cover every need');
    return 0;
  }
  const accepted = acceptSuggestions(book, plan.suggestions, today);
  if (!accepted.ok) {
    io.err(`rungbook plan: no order placed: ${shown(accepted.error)}`);
    return 1;
  }
  const written = await writeChange(book, accepted.value.change, out);
  if (!written.ok) {
    io.err(`rungbook plan: no order placed: ${written.why}`);
    return 1;
  }
  for (const order of accepted.value.orders) io.err(`rungbook plan: placed order ${shown(order.number)} (${order.lines.length} lines, due ${order.dueDate})`);
  io.err(`rungbook plan: written to ${out}`);
  return 0;
}

async function run(args: string[], io: CommandIo): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs(args, { flags: ['json', 'csv', 'bom', 'place'], values: ['horizon', 'date', 'delimiter', 'decimal', 'out'] });
  } catch (e) {
    io.err(`rungbook plan: ${(e as Error).message}\n\n${HELP}`);
    return 2;
  }
  const o = parsed.options;
  if (parsed.positional.length !== 1) {
    io.err(`rungbook plan: give exactly one Book file\n\n${HELP}`);
    return 2;
  }
  if (o.has('json') && o.has('csv')) {
    io.err('rungbook plan: give --json or --csv, not both');
    return 2;
  }
  const h = o.get('horizon');
  const horizon = typeof h === 'string' && /^\d+$/.test(h.trim()) ? Number(h.trim()) : undefined;
  if (h !== undefined && (horizon === undefined || horizon < 1 || horizon > 3650)) {
    io.err(`rungbook plan: --horizon must be a whole number of days from 1 to 3650, got ${typeof h === 'string' ? shown(h) : 'nothing'}`);
    return 2;
  }
  const d = o.get('date');
  if (d !== undefined && (typeof d !== 'string' || !isIsoDate(d))) {
    io.err('rungbook plan: --date must be YYYY-MM-DD');
    return 2;
  }
  if (o.has('out') && !o.has('place')) {
    io.err('rungbook plan: --out names where placed orders are written: give it with --place');
    return 2;
  }
  const csvGiven = o.has('delimiter') || o.has('decimal') || o.has('bom');
  if (csvGiven && !o.has('csv')) {
    io.err('rungbook plan: --delimiter, --decimal and --bom shape the CSV: give them with --csv');
    return 2;
  }
  const text = (k: string): string | undefined => (typeof o.get(k) === 'string' ? (o.get(k) as string) : undefined);
  const csv = parseExportOptions({ delimiter: text('delimiter'), decimal: text('decimal'), bom: o.has('bom') });
  if (!csv.ok) {
    io.err(`rungbook plan: ${csv.error}`);
    return 2;
  }
  const read = await loadBook('plan', parsed.positional[0]!, io);
  if (!read) return 2;
  const book = read.book;
  const today = typeof d === 'string' ? d : todayIso();
  const plan = planBook(book, horizon === undefined ? { today } : { today, horizonDays: horizon });
  if (!plan.ok) {
    io.err(`rungbook plan: ${shown(plan.error)}`);
    return 2;
  }
  const p = plan.value;
  const currency = book.settings.baseCurrency;
  if (o.has('csv')) {
    const c = planCsv(p, currency, csv.value);
    if (!c.ok) {
      io.err(`rungbook plan: ${c.error}`);
      return 2;
    }
    io.data(c.value);
    io.err(MAINS_CAUTION);
  } else if (o.has('json')) {
    io.out(jsonText({ ...p, runs: p.runs.map((r) => ({ ...r, needs: Object.fromEntries(r.needs) })) }));
    io.err(MAINS_CAUTION);
  } else io.out(table(p, currency));
  if (o.has('place')) {
    const placed = await place(book, p, typeof o.get('out') === 'string' ? (o.get('out') as string) : parsed.positional[0]!, today, io);
    if (placed !== 0) return placed;
  }
  const unpriced = p.parts.filter((x) => x.problem);
  for (const x of unpriced) io.err(`rungbook plan: ${shown(x.mpn)}: ${shown(x.problem!)}`);
  return unpriced.length ? 1 : 0;
}

export const command: CliCommand = { name: 'plan', help: HELP, run };
