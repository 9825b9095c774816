// Planning and stock counts as the app and the command line both take them: the plan of a Book (the family resolver
// gives each variant's lines, the costing rules its needs), the plan as rows and CSV through the one CSV writer, and
// a stock count read from CSV text (decoded as price files are, split by papaparse) into counted lines.
import type { Book, Run } from '../domain/book.ts';
import { prepareCosting } from '../domain/costing.ts';
import type { Result } from '../domain/costing.ts';
import { planRuns, runDemands } from '../domain/planning.ts';
import type { Plan, PlanOptions } from '../domain/planning.ts';
import { LIMITS } from '../domain/schema.ts';
import { partByMpn } from '../domain/stock.ts';
import type { CountLine } from '../domain/stock.ts';
import { resolutionFromFamily } from '../engine/costing.ts';
import { resolveFamily } from '../engine/family.ts';
import { DEFAULT_EXPORT_OPTIONS, NUMBER_KINDS, exportOptionsProblem, exportText } from './csv-write.ts';
import type { ExportCell, ExportOptions, NumberCell } from './csv-write.ts';
import Papa from 'papaparse';
import { decodePriceBytes } from './price-decode.ts';

const qty = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.qty });
const money = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.money });
const price = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.price });

/** The plan of a Book's planned runs, with each variant's lines from the family resolver. */
export function planBook(book: Book, options: PlanOptions): Result<Plan> {
  const ctx = prepareCosting(book, { date: options.today });
  if (!ctx.ok) return ctx;
  return planRuns(book, ctx.value, resolutionFromFamily(resolveFamily(book)), options);
}

/** What building a run takes from stock: its need per part id, by the costing's rule. Lines that fail give an error. */
export function runNeeds(book: Book, run: Run, today: string): Result<Map<string, number>> {
  const ctx = prepareCosting(book, { date: today });
  if (!ctx.ok) return ctx;
  const variant = book.variants.find((v) => v.id === run.variantId);
  if (!variant) return { ok: false, error: `the run's variant ${run.variantId} is not in the Book` };
  const lines = resolveFamily({ ...book, variants: [variant] }).variants[0]?.lines ?? [];
  const { demands, problems } = runDemands(ctx.value, lines, run.quantity);
  if (problems.length) return { ok: false, error: `${problems[0]!.designators || problems[0]!.lineId || 'a line'}: ${problems[0]!.message}` };
  const needs = new Map<string, number>();
  for (const d of demands) needs.set(d.partId, (needs.get(d.partId) ?? 0) + d.need);
  return { ok: true, value: needs };
}

export function planHeader(currency: string): string[] {
  return [
    'mpn',
    'description',
    'gross_need',
    'on_hand',
    'on_order_in_time',
    'net_need',
    'supplier',
    'supplier_code',
    'order_qty',
    'moq',
    'pack',
    'unit_price',
    'currency',
    'line_price',
    `line_price_${currency}`,
    'lead_days',
    'need_date',
    'order_by',
    'status',
  ];
}

/** A part's state in words: late (order-by passed), past due (need date passed), no quote, or in time. */
export function partStatus(p: Plan['parts'][number]): string {
  if (p.problem) return 'no usable quote';
  if (!p.buy) return p.net > 0 ? 'to buy' : 'covered';
  if (p.buy.pastDue) return 'past due';
  return p.buy.late ? 'late' : 'in time';
}

/** The plan as rows: one per part with a gross need in the horizon, with its suggested order line. */
export function planRows(plan: Plan, currency: string): ExportCell[][] {
  const rows: ExportCell[][] = [planHeader(currency)];
  for (const p of plan.parts) {
    const b = p.buy;
    rows.push([
      p.mpn,
      p.description,
      qty(p.grossTotal),
      qty(p.onHand),
      qty(p.fromOrders),
      qty(p.net),
      b?.supplier ?? '',
      b?.supplierCode ?? '',
      b ? qty(b.buy) : undefined,
      b ? qty(b.moq) : undefined,
      b ? qty(b.pack) : undefined,
      b ? price(b.unitPrice) : undefined,
      b?.currency ?? '',
      b ? money(b.extended) : undefined,
      b ? money(b.extendedBase) : undefined,
      b ? qty(b.leadDays) : undefined,
      b?.needDate ?? p.gross[0]?.date ?? '',
      b?.orderBy ?? '',
      partStatus(p),
    ]);
  }
  return rows;
}

export function planCsv(plan: Plan, currency: string, o: ExportOptions = DEFAULT_EXPORT_OPTIONS): Result<string> {
  const bad = exportOptionsProblem(o);
  if (bad) return { ok: false, error: bad };
  return { ok: true, value: exportText(planRows(plan, currency), o) };
}

// ---------------------------------------------------------------------------------------------------------------
// Stock counts from CSV

const MPN_HEADERS = ['mpn', 'part', 'part number', 'maker part number', 'mfr part number'];
const COUNT_HEADERS = ['counted', 'count', 'quantity', 'qty', 'on hand'];
const norm = (h: string): string => h.trim().toLowerCase().replace(/[_\-.]+/g, ' ').replace(/\s+/g, ' ');

/**
 * A stock count file: a column of maker part numbers (mpn, part…) and a column of counts (counted, count, qty…).
 * Every row must name a part of the Book and a whole count ≥ 0; any problem refuses the whole file, each problem
 * with its line.
 */
export function readStockCount(book: Book, bytes: Uint8Array): Result<CountLine[]> {
  const decoded = decodePriceBytes(bytes);
  if (!decoded.ok) return { ok: false, error: decoded.reason };
  const parsed = Papa.parse<string[]>(decoded.text.replace(/^\uFEFF/, ''), { delimitersToGuess: [',', ';', '\t'], skipEmptyLines: false });
  const all = parsed.data.map((cells, i) => ({ line: i + 1, cells }));
  const body = all.filter((r) => r.cells.some((c) => c.trim() !== ''));
  if (body.length > LIMITS.parts + 1) return { ok: false, error: `a stock count may list at most ${LIMITS.parts.toLocaleString('en-GB')} parts` };
  const headers = (body[0]?.cells ?? []).map(norm);
  const mpnCol = headers.findIndex((h) => MPN_HEADERS.includes(h));
  const countCol = headers.findIndex((h) => COUNT_HEADERS.includes(h));
  if (mpnCol < 0 || countCol < 0) {
    return { ok: false, error: `a stock count needs a column of part numbers (headed ${MPN_HEADERS[0]}) and one of counts (headed ${COUNT_HEADERS[0]}); the first line has ${(body[0]?.cells ?? []).join(', ') || 'nothing'}` };
  }
  const t = { rows: body.slice(1) };
  const problems: string[] = [];
  const lines: CountLine[] = [];
  for (const row of t.rows) {
    const mpn = (row.cells[mpnCol] ?? '').trim();
    const text = (row.cells[countCol] ?? '').trim();
    if (mpn === '' && text === '') continue;
    const part = partByMpn(book.parts, mpn);
    const counted = /^\d+$/.test(text) ? Number(text) : NaN;
    if (!part) problems.push(`line ${row.line}: no part ${JSON.stringify(mpn)} in the Book`);
    else if (!Number.isSafeInteger(counted)) problems.push(`line ${row.line}: the count ${JSON.stringify(text)} is not a whole number ≥ 0`);
    else lines.push({ partId: part.id, counted });
  }
  if (problems.length) {
    return { ok: false, error: `nothing counted: ${problems.slice(0, 5).join('; ')}${problems.length > 5 ? `; and ${problems.length - 5} more` : ''}` };
  }
  if (lines.length === 0) return { ok: false, error: 'the file counts no parts' };
  return { ok: true, value: lines };
}
