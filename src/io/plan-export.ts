// Planning as the app and the command line both take them: the plan of a Book (the family resolver
// gives each variant's lines, the costing rules its needs), and the plan as rows and CSV through the one CSV writer.
import type { Book, Run } from '../domain/book.ts';
import { prepareCosting } from '../domain/costing.ts';
import type { Result } from '../domain/costing.ts';
import { plannedRuns, planRuns, runPlanDemands } from '../domain/planning.ts';
import { onHandByPart } from '../domain/stock.ts';
import type { Limiting, Plan, PlanOptions } from '../domain/planning.ts';
import { resolutionFromFamily } from '../engine/costing.ts';
import { resolveFamily } from '../engine/family.ts';
import type { FamilyResolution } from '../engine/family.ts';
import { DEFAULT_EXPORT_OPTIONS, NUMBER_KINDS, exportOptionsProblem, exportText } from './csv-write.ts';
import type { ExportCell, ExportOptions, NumberCell } from './csv-write.ts';

const qty = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.qty });
const money = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.money });
const price = (n: number): NumberCell => ({ n, kind: NUMBER_KINDS.price });

/**
 * The plan of a Book's planned runs, with each variant's lines from the family resolver — or from `resolved`, the
 * family as already resolved (the app's live figures, worked out off the page's thread), so the plan itself is
 * the only work.
 */
export function planBook(book: Book, options: PlanOptions, resolved?: FamilyResolution): Result<Plan> {
  const ctx = prepareCosting(book, { date: options.today });
  if (!ctx.ok) return ctx;
  return planRuns(book, ctx.value, resolutionFromFamily(resolved ?? resolveFamily(book)), options);
}

/**
 * What building a run takes from stock: its need per part id, as the plan gives it (runPlanDemands): by the
 * costing's rule, and among approved alternates the part the plan chose at the run's need date with the stock the
 * planned runs before it leave. Lines that fail give an error.
 */
export function runNeeds(book: Book, run: Run, today: string): Result<Map<string, number>> {
  const ctx = prepareCosting(book, { date: today });
  if (!ctx.ok) return ctx;
  if (!book.variants.some((v) => v.id === run.variantId)) return { ok: false, error: `the run's variant ${run.variantId} is not in the Book` };
  // The planned runs up to this one, in plan order: those before it take their stock first.
  const order = plannedRuns([...book.runs.filter((r) => r.id !== run.id), { ...run, status: 'planned' }]);
  const upTo = order.slice(0, order.findIndex((r) => r.id === run.id) + 1);
  const wanted = new Set(upTo.map((r) => r.variantId));
  const lines = resolutionFromFamily(resolveFamily({ ...book, variants: book.variants.filter((v) => wanted.has(v.id)) }));
  const stock = onHandByPart(book.stockMoves);
  let last: ReturnType<typeof runPlanDemands> = { demands: [], problems: [] };
  for (const r of upTo) if (lines.has(r.variantId)) last = runPlanDemands(ctx.value, book.settings, lines.get(r.variantId) ?? [], r, stock);
  const { demands, problems } = last;
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
    'limits_runs',
  ];
}

/** A part's state in words: late (order-by passed), past due (need date passed), no quote, or in time. */
export function partStatus(p: Plan['parts'][number]): string {
  if (p.problem) return 'no usable quote';
  if (!p.buy) return p.net > 0 ? 'to buy' : 'covered';
  if (p.buy.pastDue) return 'past due';
  return p.buy.late ? 'late' : 'in time';
}

/** A run's state in words: after the horizon, its first problem (a line, or a part that cannot be bought), past due, late or in time. */
export function runStatus(r: Plan['runs'][number]): string {
  if (!r.inHorizon) return 'after the horizon';
  if (r.problems.length) return r.problems[0]!.message;
  if (r.pastDue) return 'past due';
  return r.late ? 'late' : 'in time';
}

/** What limits a run in words: the part and when it is in, or that it cannot be bought. */
export function limitText(l: Limiting): string {
  return 'problem' in l ? `${l.mpn}, which cannot be bought` : `${l.mpn}, in ${l.inDate}, earliest wanted ${l.earliestWanted}`;
}

/** Per part id: the names of the runs it limits. */
function limitedRuns(plan: Plan): Map<string, string[]> {
  const out = new Map<string, string[]>();
  for (const r of plan.runs) {
    if (!r.limiting) continue;
    const list = out.get(r.limiting.partId);
    const name = r.run.name || r.run.id;
    if (list) list.push(name);
    else out.set(r.limiting.partId, [name]);
  }
  return out;
}

/** The plan as rows: one per part with a gross need in the horizon, with its suggested order line and the runs it limits. */
export function planRows(plan: Plan, currency: string): ExportCell[][] {
  const rows: ExportCell[][] = [planHeader(currency)];
  const limits = limitedRuns(plan);
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
      (limits.get(p.partId) ?? []).join('; '),
    ]);
  }
  return rows;
}

export function planCsv(plan: Plan, currency: string, o: ExportOptions = DEFAULT_EXPORT_OPTIONS): Result<string> {
  const bad = exportOptionsProblem(o);
  if (bad) return { ok: false, error: bad };
  return { ok: true, value: exportText(planRows(plan, currency), o) };
}
