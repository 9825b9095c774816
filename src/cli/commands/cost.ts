// `rungbook cost FILE --variant CODE --run N`: the costed BOM of one variant for one production run, with its totals,
// as a table, JSON or CSV; with --stock, what comes from the stock on hand and what is still bought. The numbers come
// from the same costing workbook and stock rules the app uses.
import type { Book, Variant } from '../../domain/book.ts';
import type { CostedBom, Result } from '../../domain/costing.ts';
import { isIsoDate } from '../../domain/dates.ts';
import { moneyDigits } from '../../domain/format.ts';
import type { StockCostedBom } from '../../domain/stock-costing.ts';
import { choiceText } from '../../domain/alternates.ts';
import { costedBomCsv, costVariant, frozenCosting, parseExportOptions, runAbout, runSupply } from '../../io/run-export.ts';
import { costWithStock, stockCostCsv, stockCostJson, stockCostRows } from '../../io/stock-cost-export.ts';
import type { ExportOptions, RunCosting, RunFileAbout } from '../../io/run-export.ts';
import { loadBook } from '../book-read.ts';
import { parseArgs } from '../command.ts';
import type { CliCommand, CliIo, CommandIo, ParsedArgs } from '../command.ts';
import { jsonText, shown } from '../terminal.ts';
import { MAINS_CAUTION } from './info.ts';

/** The CSV choices shared by `cost` and `buy`. */
export const CSV_CHOICES = `CSV choices (with --csv):
  --delimiter W    comma (default), semicolon or tab
  --decimal W      point (default) or comma (a decimal comma needs --delimiter semicolon or tab)
  --bom            start the file with a UTF-8 byte-order mark`;

const HELP = `usage: rungbook cost FILE --variant CODE --run N [--stock] [--json | --csv [CSV CHOICES]] [--date YYYY-MM-DD] [--fresh]

Costs one variant of a .rungbook.json Book for a production run of N units: per BOM line the need (with
attrition), the order quantity (MOQ, whole packs, buying up to a cheaper price break), the chosen quote, unit and
extended price, and leftover stock; then material, labour, test and overhead per unit, the unit cost, the price
at the Book's margin, and the run total. Lines of the same part are bought together.

  --variant CODE   the variant's code
  --run N          units in the run (a whole number ≥ 1)
  --json           print {variant, run, currency, lines: [...], material, labour, overhead, unitCost, runTotal, …}
  --csv            print the lines and totals as CSV (RFC 4180; text that could run as a formula is neutralised)
  --date D         decide quote expiry at this date (default: the Book's costing date, else today)
  --fresh          cost with today's quotes even when the Book holds a frozen Run of this variant and quantity
  --stock          cost with the stock on hand: per line the parts taken from stock (all on hand on the costing
                   date; stock the plan sets aside for earlier planned runs is not held back, see rungbook plan)
                   and their value at the Book's stock valuation (last price paid, else today's quote; or today's
                   quote), and what is still bought (the need less stock, with the buy rules, from the supplier
                   the costing chose) with its landed cost: the percentages on its goods, a supplier's amounts per
                   order shared among the lines still bought from it. Run material = stock value + bought + landed.
                   Always today's quotes (as --fresh). --json and --csv give the same figures.
${CSV_CHOICES}

A Run of the Book with this variant and quantity that is frozen is printed as frozen (its prices and quotes as
they were), unless --fresh or --date is given.

A line with approved alternates buys the cheapest approved part that can be had in time (a usable quote whose
lead time reaches the date wanted of a planned Run of this variant and quantity, or stock on hand covering the
need), unless the line pins one; "part chosen" says which and why, and "single source" marks a line with one
approved part. The CSV has the same bytes as the app's export with the same choices.

Money: each line's extended price is rounded to cents in the quote's currency, then converted and rounded to
cents in the base currency; run totals are sums of those. The run pays for all it buys (leftover stock is shown
with its value, not credited). Landed cost (freight, duty, payment and bank charges, in the base currency) is
part of material: percentages of each line's base-currency value, each rounded to cents, and a supplier's
amounts per order shared among its lines by value (largest remainder); the quote's Incoterms 2020 term decides
which of freight and duty are ours (DDP: neither; C terms, DAP, DPU: duty only; E and F terms: both).
Overhead is a percentage of labour; price = unit cost / (1 − margin).
Labour, test and overhead per unit are each rounded to 4 decimals first; the run total is run material plus the
run size × those rounded figures, rounded to cents, so it re-adds from the figures printed (it can differ from
the unrounded rates × run by up to half a ten-thousandth per unit per figure). A part on several lines needs
ceil(its summed per-unit quantity × run × (1 + attrition)), rounded up once.
Exit status: 0 done, 1 some line has no usable quote (listed; totals cover priced lines only), 2 bad arguments
or an unreadable Book file.`;

/** Option names every costing command takes, for parseArgs. */
export const COSTING_FLAGS = ['bom', 'fresh'];
export const COSTING_VALUES = ['variant', 'run', 'date', 'delimiter', 'decimal'];

export interface CostJob {
  book: Book;
  variant: Variant;
  run: number;
  bom: CostedBom;
  costing: RunCosting;
  /** CSV choices (defaults when none were given). */
  csv: ExportOptions;
  /** The Run of the Book the files name in their head (the frozen one costed, else the first of this variant and quantity). */
  about: RunFileAbout;
}

/** Reads the CSV choices; they are refused without --csv, so a typo never goes unnoticed. */
export function csvChoices(name: string, parsed: ParsedArgs, io: CliIo): ExportOptions | number {
  const o = parsed.options;
  const given = o.has('delimiter') || o.has('decimal') || o.has('bom');
  if (given && !o.has('csv')) {
    io.err(`rungbook ${name}: --delimiter, --decimal and --bom shape the CSV: give them with --csv`);
    return 2;
  }
  const text = (k: string): string | undefined => {
    const v = o.get(k);
    return typeof v === 'string' ? v : undefined;
  };
  const r = parseExportOptions({ delimiter: text('delimiter'), decimal: text('decimal'), bom: o.has('bom') });
  if (!r.ok) {
    io.err(`rungbook ${name}: ${r.error}`);
    return 2;
  }
  return r.value;
}

/**
 * The shared front half of `cost` and `buy`: reads the file, finds the variant, checks the run size, costs it.
 * Problems are written to `io.err`; the result is then a number (the exit status).
 */
export async function costFromArgs(name: string, parsed: ParsedArgs, help: string, io: CliIo): Promise<CostJob | number> {
  if (parsed.positional.length !== 1) {
    io.err(`rungbook ${name}: give exactly one Book file\n\n${help}`);
    return 2;
  }
  const code = parsed.options.get('variant');
  if (typeof code !== 'string' || code === '') {
    io.err(`rungbook ${name}: give the variant with --variant CODE\n\n${help}`);
    return 2;
  }
  const runText = parsed.options.get('run');
  const run = typeof runText === 'string' && /^\d+$/.test(runText.trim()) ? Number(runText.trim()) : NaN;
  if (!Number.isSafeInteger(run) || run < 1) {
    io.err(`rungbook ${name}: --run must be a whole number of units ≥ 1, got ${typeof runText === 'string' ? runText : 'nothing'}`);
    return 2;
  }
  const date = parsed.options.get('date');
  if (date !== undefined && (typeof date !== 'string' || !isIsoDate(date))) {
    io.err(`rungbook ${name}: --date must be YYYY-MM-DD`);
    return 2;
  }
  const csv = csvChoices(name, parsed, io);
  if (typeof csv === 'number') return csv;
  const read = await loadBook(name, parsed.positional[0]!, io);
  if (!read) return 2;
  const book = read.book;
  const variant = book.variants.find((v) => v.code === code);
  if (!variant) {
    io.err(`rungbook ${name}: no variant with code ${code}; the Book has ${book.variants.map((v) => shown(v.code)).join(', ') || 'no variants'}`);
    return 2;
  }
  const frozenRun = book.runs.find((r) => r.variantId === variant.id && r.quantity === run && r.frozen);
  const useFrozen = frozenRun !== undefined && !parsed.options.has('fresh') && date === undefined;
  // A planned run of this variant and quantity decides which approved alternates can be had in time.
  const planned = book.runs.find((r) => r.variantId === variant.id && r.quantity === run && !r.frozen && r.status !== 'built');
  const supply = planned ? runSupply(book, planned) : {};
  const costing = useFrozen ? frozenCosting(frozenRun) : costVariant(book, variant.id, run, { ...supply, ...(typeof date === 'string' ? { date } : {}) });
  if (!costing.ok) {
    io.err(`rungbook ${name}: ${useFrozen ? `frozen run ${shown(frozenRun.name)}: ` : ''}${shown(costing.error)}`);
    return 2;
  }
  if (useFrozen) io.err(`rungbook ${name}: run ${shown(frozenRun.name)} is frozen (${frozenRun.frozen!.at}): prices and quotes as frozen; give --fresh to cost with today's quotes`);
  const about: RunFileAbout = useFrozen ? { run: frozenRun.name } : runAbout(book, variant.id, run);
  return { book, variant, run, bom: costing.value.bom, costing: costing.value, csv, about };
}

/** What a costing command can print; the table ends with the mains caution, JSON and CSV have it on stderr. */
export interface Outputs {
  json?: () => unknown;
  csv: () => Result<string>;
  table: () => string[];
}

/** Prints as --json or --csv ask, else the table; false when the CSV choices were refused (the reason written). */
export function printOutput(name: string, parsed: ParsedArgs, io: CommandIo, o: Outputs): boolean {
  if (o.json && parsed.options.has('json')) {
    io.out(jsonText(o.json()));
    io.err(MAINS_CAUTION);
  } else if (parsed.options.has('csv')) {
    const text = o.csv();
    if (!text.ok) {
      io.err(`rungbook ${name}: ${text.error}`);
      return false;
    }
    io.data(text.value);
    io.err(MAINS_CAUTION);
  } else io.out(o.table().join('\n'));
  return true;
}

/**
 * Figures in the CLI's tables, ungrouped so a column can be read back: totals and a variant's unit cost by the one money
 * rule (domain/format.ts, to the cent, as every page shows them), prices as quoted, quantities as whole numbers.
 */
export const fmt = {
  money: (n: number): string => moneyDigits(n, 'total'),
  unitCost: (n: number): string => moneyDigits(n, 'unitCost'),
  price: (n: number): string => {
    const s = String(n);
    const dp = s.includes('.') ? s.length - s.indexOf('.') - 1 : 0;
    return n.toFixed(Math.max(2, Math.min(6, dp)));
  },
  qty: (n: number): string => String(n),
};

/** Left-aligned text columns, right-aligned number columns. */
export function table(rows: string[][], numeric: boolean[]): string[] {
  const widths = rows[0]!.map((_, c) => Math.max(...rows.map((r) => [...(r[c] ?? '')].length)));
  return rows.map((r) =>
    r
      .map((cell, c) => (numeric[c] ? cell.padStart(widths[c]!) : c === r.length - 1 ? cell : cell.padEnd(widths[c]!)))
      .join('  ')
      .trimEnd(),
  );
}

/** The JSON shape of `rungbook cost --json`. */
export function costJson(bom: CostedBom): Record<string, unknown> {
  return {
    variant: bom.variant,
    run: bom.run,
    currency: bom.currency,
    date: bom.date,
    lines: bom.lines.map((l) => ({
      designators: l.designators,
      mpn: l.mpn,
      need: l.need,
      buy: l.buy,
      supplier: l.supplier,
      supplierCode: l.supplierCode,
      unitPrice: l.unitPrice,
      currency: l.currency,
      extended: l.extended,
      extendedBase: l.extendedBase,
      incoterm: l.incoterm ?? null,
      freight: l.freight ?? 0,
      duty: l.duty ?? 0,
      charges: l.charges ?? 0,
      leftover: l.leftover,
      leftoverValue: l.leftoverValue,
      partChoice: l.partChoice ?? null,
    })),
    material: bom.material,
    labour: bom.labour,
    test: bom.test,
    overhead: bom.overhead,
    unitCost: bom.unitCost,
    price: bom.price,
    materialRun: bom.materialRun,
    landedRun: bom.landedRun ?? 0,
    runTotal: bom.runTotal,
    leftoverValue: bom.leftoverValue,
    complete: bom.complete,
    problems: bom.problems.map((p) => ({ designators: p.designators ?? '', message: p.message })),
  };
}

function totals(bom: CostedBom, marginPct: number): [string, string][] {
  const c = shown(bom.currency);
  return [
    [`material per unit (${c})`, fmt.unitCost(bom.material)],
    [`labour per unit (${c})`, fmt.unitCost(bom.labour)],
    [`test per unit (${c})`, fmt.unitCost(bom.test)],
    [`overhead per unit (${c})`, fmt.unitCost(bom.overhead)],
    [`unit cost (${c})`, fmt.unitCost(bom.unitCost)],
    [`price at ${marginPct} % margin (${c})`, fmt.unitCost(bom.price)],
    [`run material (${c})`, fmt.money(bom.materialRun)],
    [`  of which landed cost (${c})`, fmt.money(bom.landedRun ?? 0)],
    [`run total (${c})`, fmt.money(bom.runTotal)],
    [`leftover stock value (${c})`, fmt.money(bom.leftoverValue)],
  ];
}

function tableOut(job: CostJob): string[] {
  const { bom } = job;
  const out: string[] = [];
  const cur = shown(bom.currency);
  out.push(`${shown(bom.variant)} — ${shown(job.variant.name)}: run of ${bom.run}, quotes valid on ${shown(bom.date)}, totals in ${cur}`);
  if (job.costing.frozen) out.push(`Frozen ${job.costing.frozen.at}: the prices and quotes of that day, not today's.`);
  out.push('');
  const rows = [
    ['designators', 'mpn', 'need', 'buy', 'supplier', 'break', 'unit price', 'cur', 'extended', `ext ${cur}`, 'term', 'freight', 'duty', 'charges', 'leftover', `value ${cur}`, 'part chosen'],
  ];
  for (const l of bom.lines) {
    rows.push([
      shown(l.designators),
      shown(l.mpn),
      fmt.qty(l.need),
      fmt.qty(l.buy),
      shown(l.supplier),
      fmt.qty(l.breakQty),
      fmt.price(l.unitPrice),
      shown(l.currency),
      fmt.money(l.extended),
      fmt.money(l.extendedBase),
      shown(l.incoterm ?? ''),
      fmt.money(l.freight ?? 0),
      fmt.money(l.duty ?? 0),
      fmt.money(l.charges ?? 0),
      fmt.qty(l.leftover),
      fmt.money(l.leftoverValue),
      choiceText(l.partChoice),
    ]);
  }
  out.push(...table(rows, [false, false, true, true, false, true, true, false, true, true, false, true, true, true, true, true, false]));
  for (const p of bom.problems) out.push(`NOT PRICED ${shown(p.designators || p.lineId || '')}: ${shown(p.message)}`);
  out.push('');
  const t = totals(bom, job.costing.marginPct);
  out.push(...table(t.map(([a, b]) => [a, b]), [false, true]));
  if (!bom.complete) out.push('', 'INCOMPLETE: the lines above marked NOT PRICED are missing from every total.');
  out.push('', MAINS_CAUTION);
  return out;
}

export const command: CliCommand = {
  name: 'cost',
  help: HELP,
  async run(args: string[], io: CommandIo): Promise<number> {
    let parsed: ParsedArgs;
    try {
      parsed = parseArgs(args, { flags: ['json', 'csv', 'stock', ...COSTING_FLAGS], values: COSTING_VALUES });
    } catch (e) {
      io.err(`rungbook cost: ${e instanceof Error ? e.message : String(e)}\n\n${HELP}`);
      return 2;
    }
    if (parsed.options.has('json') && parsed.options.has('csv')) {
      io.err('rungbook cost: choose one of --json and --csv');
      return 2;
    }
    // Stock is today's: its costing is with today's quotes, not a frozen run's.
    if (parsed.options.has('stock')) parsed.options.set('fresh', true);
    const job = await costFromArgs('cost', parsed, HELP, io);
    if (typeof job === 'number') return job;
    if (parsed.options.has('stock')) return stockOut(job, parsed, io);
    const { bom } = job;
    if (!printOutput('cost', parsed, io, { json: () => costJson(bom), csv: () => costedBomCsv(job.costing, job.csv, job.about), table: () => tableOut(job) })) return 2;
    for (const p of bom.problems) io.err(`rungbook cost: not priced: ${shown(p.designators || p.lineId || '')}: ${shown(p.message)}`);
    return bom.complete ? 0 : 1;
  },
};

/** `cost --stock`: the costing with the stock on hand, as a table, JSON or CSV. */
function stockOut(job: CostJob, parsed: ParsedArgs, io: CommandIo): number {
  const r = costWithStock(job.book, job.costing);
  if (!r.ok) {
    io.err(`rungbook cost: ${shown(r.error)}`);
    return 2;
  }
  const c = r.value;
  if (!printOutput('cost', parsed, io, { json: () => stockCostJson(c), csv: () => stockCostCsv(c, job.csv), table: () => stockTableOut(job, c) })) return 2;
  const unpriced = [...job.bom.problems.map((p) => `${p.designators || p.lineId || ''}: ${p.message}`), ...c.lines.filter((l) => l.problem).map((l) => `${l.line.designators}: ${l.problem}`)];
  for (const p of unpriced) io.err(`rungbook cost: not priced: ${shown(p)}`);
  return unpriced.length ? 1 : 0;
}

function stockTableOut(job: CostJob, c: StockCostedBom): string[] {
  const cur = shown(c.bom.currency);
  const valuation = c.valuation === 'lastPaid' ? 'last price paid (else today\'s quote)' : "today's quote";
  const out = [`${shown(c.bom.variant)} — ${shown(job.variant.name)}: run of ${c.bom.run} with the stock on hand on ${shown(c.bom.date)}, stock valued at ${valuation}, totals in ${cur}`, ''];
  const rows = stockCostRows(c);
  const cell = (x: (typeof rows)[number][number]): string => (x === undefined ? '' : typeof x === 'string' ? shown(x) : x.kind === 'qty' ? fmt.qty(x.n) : x.kind === 'price' ? fmt.price(x.n) : x.kind === 'unit' ? fmt.unitCost(x.n) : fmt.money(x.n));
  const lines = rows.slice(0, c.lines.length + 1).map((r) => r.map(cell));
  out.push(...table(lines, [false, false, true, true, true, false, true, true, false, true, false, true, true, false]));
  out.push('');
  const sums = rows.slice(c.lines.length + 1).map((r) => [cell(r[0]), cell(r.find((x, i) => i > 0 && x !== undefined))]);
  out.push(...table(sums, [false, true]));
  out.push('', MAINS_CAUTION);
  return out;
}
