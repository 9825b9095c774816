// Planning across runs (material requirements planning, gross to net): the planned runs wanted within the horizon,
// each part's gross need by the date it must be in, what is on hand and on order in time, the net need, and the
// orders to place per supplier with the buy rules (MOQ, pack, buying up to a cheaper break) applied to the
// combined net need. Derived, never stored: a suggestion becomes an order only when a person accepts it.
//
// Dates: parts must be in by  date wanted − kitting and assembly days − safety days  (the need date), and an order
// must go by  need date − the supplier's lead time  (the order-by date). Netting takes the needs in date order:
// stock on hand first, then open orders due by the need date; what is left is the net need.
import type { Book, Order, Run, Settings } from './book.ts';
import type { BookChange } from './book-ops.ts';
import { attritionFor, candidateQuotes, ceilNeed, chooseQuote, toCents, variantDemands } from './costing.ts';
import type { CostingContext, CostProblem, ResolvedLine, SupplyOptions } from './costing.ts';
import { daysAfter, daysBefore } from './dates.ts';
import { isOpen, outstanding, placeOrder } from './orders.ts';
import type { OrderInput } from './orders.ts';
import { onHandByPart } from './stock.ts';
import type { Outcome } from './stock.ts';

/** One run's need of one part. */
export interface GrossNeed {
  runId: string;
  /** The date the parts must be in. */
  date: string;
  qty: number;
  /** Taken from stock on hand, from open orders due in time, and left to buy (net). */
  fromStock: number;
  fromOrders: number;
  net: number;
  /**
   * When these parts are in: today from stock, an order's due date, or today + the lead time when bought now.
   * Absent when part of the need is to be bought and no quote can be used: the parts cannot be had at all.
   */
  inDate?: string;
}

/** Parts still to come on one open order line. */
export interface ScheduledReceipt {
  orderId: string;
  number: string;
  line: number;
  due: string;
  qty: number;
}

export interface PartPlan {
  partId: string;
  mpn: string;
  description: string;
  onHand: number;
  /** Needs of the runs in the horizon, in date order. */
  gross: GrossNeed[];
  grossTotal: number;
  /** Open order lines for the part (all of them; `inTime` of the needs counts those due by each need date). */
  receipts: ScheduledReceipt[];
  /** Open order quantity that arrived in time for some need and was used. */
  fromOrders: number;
  net: number;
  /** Open orders that come after the need they could have covered: expedite them or buy again. */
  lateReceipts: ScheduledReceipt[];
  /** The suggested purchase; absent when nothing is to be bought or no quote can be used (`problem`). */
  buy?: SuggestedLine;
  problem?: string;
}

/** A part to order: the buy rules applied to the part's combined net need. */
export interface SuggestedLine {
  partId: string;
  mpn: string;
  net: number;
  /** Order quantity: ≥ net, ≥ MOQ, whole packs, possibly bought up to a cheaper break. */
  buy: number;
  supplierId: string;
  supplier: string;
  supplierCode: string;
  quoteId: string;
  currency: string;
  unitPrice: number;
  /** buy × unit price, quote currency, cents. */
  extended: number;
  /** Base currency, cents. */
  extendedBase: number;
  leadDays: number;
  moq: number;
  pack: number;
  /** Earliest need date of the part with a net need. */
  needDate: string;
  orderBy: string;
  /** The order-by date has passed: ordered today it arrives after the need date. */
  late: boolean;
  /** The need date itself has passed: the parts should already be in. */
  pastDue: boolean;
}

/** The suggested order to one supplier (in one currency). */
export interface SupplierSuggestion {
  key: string;
  supplierId: string;
  supplier: string;
  currency: string;
  lines: SuggestedLine[];
  total: number;
  totalBase: number;
  /** The earliest order-by date of its lines. */
  orderBy: string;
  /** The date it is due if placed today: today + the longest lead time of its lines. */
  dueIfPlacedToday: string;
  late: boolean;
}

/** What limits a run's date: a part in by a date, or a part that cannot be bought (no usable quote). */
export type Limiting = { partId: string; mpn: string; inDate: string; earliestWanted: string } | { partId: string; mpn: string; problem: string };

export interface RunPlan {
  run: Run;
  inHorizon: boolean;
  /** Date wanted − kitting − safety days: the date its parts must be in. */
  needDate: string;
  /** The date wanted has passed. */
  pastDue: boolean;
  /**
   * The part that arrives last, when it is in, and the earliest date the run can then be wanted; or, before any
   * dated part, a part the run still has to buy that no quote can be used for (`problem`): then it cannot be built.
   */
  limiting?: Limiting;
  /** The earliest date it can be wanted is after its date wanted, or some part it still needs cannot be bought. */
  late: boolean;
  /** Per part id: the run's need. */
  needs: Map<string, number>;
  problems: CostProblem[];
}

/** Per part id: how much of a run's need the plan takes from stock on hand (for the run's costing from stock). */
export function runFromStock(plan: Plan, runId: string): Map<string, number> {
  const out = new Map<string, number>();
  for (const p of plan.parts) for (const g of p.gross) if (g.runId === runId && g.fromStock > 0) out.set(p.partId, (out.get(p.partId) ?? 0) + g.fromStock);
  return out;
}

export interface Plan {
  today: string;
  horizonEnd: string;
  runs: RunPlan[];
  parts: PartPlan[];
  suggestions: SupplierSuggestion[];
}

export interface PlanOptions {
  /** The plan date (ISO). */
  today: string;
  /** Days ahead; default the Book's horizon. */
  horizonDays?: number;
}

/** Each variant's resolved lines (from the family resolver). */
export type RunLines = ReadonlyMap<string, readonly ResolvedLine[]>;

/** Why plan options cannot be used, or undefined. */
export function planOptionsProblem(o: PlanOptions): string | undefined {
  if (daysAfter(o.today, 0) === undefined) return `the plan date must be written YYYY-MM-DD, not ${JSON.stringify(o.today)}`;
  const h = o.horizonDays;
  if (h !== undefined && (!Number.isInteger(h) || h < 1 || h > 3650)) return `the horizon must be a whole number of days from 1 to 3,650, not ${h}`;
  return undefined;
}

/** The plan for the Book's planned runs (runs not built) wanted within the horizon. */
export function planRuns(book: Book, ctx: CostingContext, lines: RunLines, options: PlanOptions): Outcome<Plan> {
  const bad = planOptionsProblem(options);
  if (bad) return { ok: false, error: bad };
  const s = book.settings;
  const today = options.today;
  const horizonEnd = shiftDays(1, today, options.horizonDays ?? s.horizonDays)!;
  const lag = s.kittingDays + s.safetyDays;
  const variants = new Map(book.variants.map((v) => [v.id, v] as const));

  const planned = plannedRuns(book.runs);
  const have = onHandByPart(book.stockMoves);
  /** Stock not yet taken by the runs before: a part in it covering a run's need can be had in time. */
  const left = new Map(have);
  const runs: RunPlan[] = [];
  /** Per part: the needs in run-date order with their runs, and a supplier every one of its lines is pinned to (if one). */
  const byPart = new Map<string, { gross: GrossNeed[]; of: RunPlan[]; pin: string | undefined | null }>();
  for (const run of planned) {
    const inHorizon = run.dateWanted <= horizonEnd;
    const rp: RunPlan = {
      run,
      inHorizon,
      needDate: runNeedDate(s, run),
      pastDue: run.dateWanted < today,
      late: false,
      needs: new Map(),
      problems: [],
    };
    runs.push(rp);
    if (!inHorizon) continue;
    if (!variants.has(run.variantId)) {
      rp.problems.push({ message: `the run's variant ${run.variantId} is not in the Book` });
      continue;
    }
    const { demands, problems } = runPlanDemands(ctx, s, lines.get(run.variantId) ?? [], run, left);
    rp.problems.push(...problems);
    for (const d of demands) {
      let p = byPart.get(d.partId);
      if (!p) byPart.set(d.partId, (p = { gross: [], of: [], pin: d.pinnedSupplierId }));
      else if (p.pin !== d.pinnedSupplierId) p.pin = null;
      const last = p.of.length - 1;
      // A part on lines pinned to different suppliers: one need per run.
      if (last >= 0 && p.of[last] === rp) {
        p.gross[last]!.qty += d.need;
        rp.needs.set(d.partId, p.gross[last]!.qty);
      } else {
        p.gross.push({ runId: run.id, date: rp.needDate, qty: d.need, fromStock: 0, fromOrders: 0, net: 0, inDate: today });
        p.of.push(rp);
        rp.needs.set(d.partId, d.need);
      }
    }
  }

  const receiptsOf = new Map<string, ScheduledReceipt[]>();
  for (const o of book.orders) {
    if (!isOpen(o)) continue;
    o.lines.forEach((l, line) => {
      const qty = outstanding(l);
      if (qty <= 0) return;
      const r: ScheduledReceipt = { orderId: o.id, number: o.number, line, due: o.dueDate, qty };
      const list = receiptsOf.get(l.partId);
      if (list) list.push(r);
      else receiptsOf.set(l.partId, [r]);
    });
  }

  const parts: PartPlan[] = [];
  const lineFor: SuggestedLine[] = [];
  /** Per run: the part whose parts are in last (the one that limits the run's date); one that cannot be bought first. */
  const limits = new Map<RunPlan, { partId: string; mpn: string; inDate?: string; problem?: string }>();
  for (const [partId, { gross, of, pin }] of byPart) {
    const part = ctx.parts.get(partId)!;
    const receipts = (receiptsOf.get(partId) ?? []).slice().sort((a, b) => (a.due < b.due ? -1 : a.due > b.due ? 1 : 0));
    const onHand = have.get(partId) ?? 0;
    let stock = Math.max(0, onHand);
    let arrived = 0;
    let next = 0;
    let lastDue = today;
    let fromOrders = 0;
    let net = 0;
    let grossTotal = 0;
    /** Receipts still to come when the first net need fell: they come after a need they could have covered. */
    let lateFrom = -1;
    let firstNet: GrossNeed | undefined;
    for (const g of gross) {
      while (next < receipts.length && receipts[next]!.due <= g.date) {
        arrived += receipts[next]!.qty;
        if (receipts[next]!.due > lastDue) lastDue = receipts[next]!.due;
        next++;
      }
      g.fromStock = Math.min(stock, g.qty);
      stock -= g.fromStock;
      g.fromOrders = Math.min(arrived, g.qty - g.fromStock);
      arrived -= g.fromOrders;
      g.net = g.qty - g.fromStock - g.fromOrders;
      g.inDate = g.fromOrders > 0 ? lastDue : today;
      fromOrders += g.fromOrders;
      net += g.net;
      grossTotal += g.qty;
      if (g.net > 0 && !firstNet) {
        firstNet = g;
        lateFrom = next;
      }
    }
    const pp: PartPlan = {
      partId,
      mpn: part.mpn,
      description: part.description,
      onHand,
      gross,
      grossTotal,
      receipts,
      fromOrders,
      net,
      lateReceipts: lateFrom < 0 ? [] : receipts.slice(lateFrom),
    };
    if (firstNet) {
      const choice = chooseQuote(candidateQuotes(ctx, partId, pin ?? undefined), net, part.mpn);
      if (!choice.ok) {
        pp.problem = choice.error;
        // The part is not in today (nor ever, until a quote can be used): each run still needing it cannot be built.
        for (let i = 0; i < gross.length; i++) {
          if (gross[i]!.net <= 0) continue;
          gross[i]!.inDate = undefined;
          of[i]!.problems.push({ partId, message: `cannot be bought: ${choice.error}` });
        }
      } else {
        const { prepared, buy, extendedBase } = choice.value;
        const q = prepared.quote;
        const needDate = firstNet.date;
        const orderBy = shiftDays(-1, needDate, q.leadDays)!;
        pp.buy = {
          partId,
          mpn: part.mpn,
          net,
          buy: buy.buy,
          supplierId: q.supplierId,
          supplier: prepared.supplier?.name ?? q.supplierId,
          supplierCode: q.supplierCode,
          quoteId: q.id,
          currency: q.currency,
          unitPrice: buy.unitPrice,
          extended: buy.extended,
          extendedBase,
          leadDays: q.leadDays,
          moq: q.moq,
          pack: q.pack,
          needDate,
          orderBy,
          late: orderBy < today,
          pastDue: needDate < today,
        };
        lineFor.push(pp.buy);
        const arrival = shiftDays(1, today, q.leadDays)!;
        for (const g of gross) if (g.net > 0) g.inDate = arrival;
      }
    }
    for (let i = 0; i < gross.length; i++) {
      const d = gross[i]!.inDate;
      const limit = limits.get(of[i]!);
      // A part that cannot be bought limits before any dated one; among equals, the lower mpn.
      const wins = !limit
        ? true
        : d === undefined
          ? limit.inDate !== undefined || part.mpn < limit.mpn
          : limit.inDate !== undefined && (d > limit.inDate || (d === limit.inDate && part.mpn < limit.mpn));
      if (wins) limits.set(of[i]!, d === undefined ? { partId, mpn: part.mpn, problem: pp.problem! } : { partId, mpn: part.mpn, inDate: d });
    }
    parts.push(pp);
  }
  parts.sort((a, b) => (a.mpn < b.mpn ? -1 : a.mpn > b.mpn ? 1 : a.partId < b.partId ? -1 : 1));

  for (const [rp, limit] of limits) {
    if (limit.inDate === undefined) {
      rp.limiting = { partId: limit.partId, mpn: limit.mpn, problem: limit.problem! };
      rp.late = true;
      continue;
    }
    const earliestWanted = shiftDays(1, limit.inDate, lag)!;
    rp.limiting = { partId: limit.partId, mpn: limit.mpn, inDate: limit.inDate, earliestWanted };
    rp.late = earliestWanted > rp.run.dateWanted;
  }

  return { ok: true, value: { today, horizonEnd, runs, parts, suggestions: suggestionsFrom(lineFor, today) } };
}

/** The date a run's parts must be in: its date wanted less the kitting and assembly days and the safety days. */
export function runNeedDate(settings: Pick<Settings, 'kittingDays' | 'safetyDays'>, run: Pick<Run, 'dateWanted'>): string {
  return shiftDays(-1, run.dateWanted, settings.kittingDays + settings.safetyDays)!;
}

/** The runs not built, in the order the plan takes them: by date wanted, then id. */
export function plannedRuns(runs: readonly Run[]): Run[] {
  return runs.filter((r) => r.status !== 'built').sort((a, b) => (a.dateWanted < b.dateWanted ? -1 : a.dateWanted > b.dateWanted ? 1 : a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
}

/**
 * A run's needs as the plan takes them, and as marking the run built issues them, so both choose the same part: a
 * line with approved alternates buys the part that can be had by the run's need date — a quote in time, or stock
 * covering the need (domain/costing.ts). `stock` is the stock on hand the runs before this one (in plan order) left,
 * per part id; the run's needs are taken from it.
 */
export function runPlanDemands(
  ctx: CostingContext,
  settings: Pick<Settings, 'kittingDays' | 'safetyDays'>,
  lines: readonly ResolvedLine[],
  run: Pick<Run, 'dateWanted' | 'quantity'>,
  stock: Map<string, number>,
): ReturnType<typeof runDemands> {
  const out = runDemands(ctx, lines, run.quantity, { dateWanted: runNeedDate(settings, run), onHand: stock });
  for (const d of out.demands) {
    const h = stock.get(d.partId);
    if (h !== undefined) stock.set(d.partId, Math.max(0, h - d.need));
  }
  return out;
}

/** Date arithmetic of a plan, remembered: a plan shifts the same few dates by the same few lead times many times. */
const SHIFTED = new Map<string, string | undefined>();
function shiftDays(sign: 1 | -1, date: string, days: number): string | undefined {
  const key = `${date}|${sign * days}`;
  let out = SHIFTED.get(key);
  if (out === undefined && !SHIFTED.has(key)) {
    if (SHIFTED.size > 50_000) SHIFTED.clear();
    out = sign > 0 ? daysAfter(date, days) : daysBefore(date, days);
    SHIFTED.set(key, out);
  }
  return out;
}

/** One collator for the plan's lists: far cheaper than a localeCompare per comparison. */
const BY_TEXT = new Intl.Collator('en');

/**
 * A run's need per part (and pinned supplier) by the costing's rule (variantDemands: a part's lines summed
 * unrounded, each with its attrition, then rounded up once), without the designators and line order a costed BOM
 * shows: planning many runs needs only the quantities.
 */
export function runDemands(
  ctx: CostingContext,
  lines: readonly ResolvedLine[],
  run: number,
  supply: SupplyOptions = {},
): { demands: { partId: string; pinnedSupplierId: string | undefined; need: number }[]; problems: CostProblem[] } {
  let simple = true;
  for (const r of lines) {
    if (r.error !== undefined || (r.applies && !(Number.isFinite(r.qtyPerUnit) && r.qtyPerUnit >= 0)) || (r.applies && r.qtyPerUnit > 0 && (r.partId === undefined || !ctx.parts.has(r.partId)))) {
      simple = false;
      break;
    }
    if (r.applies && (ctx.lines.get(r.lineId)?.alternates ?? []).length > 0) {
      simple = false;
      break;
    }
  }
  // Lines with problems go through the costing's own function, which names them; so do lines with approved
  // alternates, which it chooses among.
  if (!simple) return variantDemands(ctx, lines, run, supply);
  const raw = new Map<string, { partId: string; pinnedSupplierId: string | undefined; x: number }>();
  for (const r of lines) {
    if (!r.applies || r.qtyPerUnit === 0) continue;
    const part = ctx.parts.get(r.partId!)!;
    const line = ctx.lines.get(r.lineId);
    const pin = line?.pinnedSupplierId;
    const key = pin === undefined ? part.id : `${part.id}\u0000${pin}`;
    const x = r.qtyPerUnit * run * (1 + attritionFor(ctx, line, part));
    const d = raw.get(key);
    if (d) d.x += x;
    else raw.set(key, { partId: part.id, pinnedSupplierId: pin, x });
  }
  const demands = [...raw.values()].map((d) => ({ partId: d.partId, pinnedSupplierId: d.pinnedSupplierId, need: ceilNeed(d.x) }));
  return { demands, problems: [] };
}

/** Suggested lines grouped per supplier and currency; totals are sums of integer cents. */
function suggestionsFrom(lines: SuggestedLine[], today: string): SupplierSuggestion[] {
  const by = new Map<string, SupplierSuggestion>();
  for (const l of lines) {
    const key = `${l.supplierId}\u0000${l.currency}`;
    let s = by.get(key);
    if (!s) {
      s = { key, supplierId: l.supplierId, supplier: l.supplier, currency: l.currency, lines: [], total: 0, totalBase: 0, orderBy: l.orderBy, dueIfPlacedToday: today, late: false };
      by.set(key, s);
    }
    s.lines.push(l);
  }
  const out = [...by.values()].sort((a, b) => BY_TEXT.compare(a.supplier, b.supplier) || BY_TEXT.compare(a.currency, b.currency));
  for (const s of out) {
    s.lines.sort((a, b) => (a.mpn < b.mpn ? -1 : a.mpn > b.mpn ? 1 : 0));
    let cents = 0;
    let base = 0;
    let lead = 0;
    for (const l of s.lines) {
      cents += toCents(l.extended);
      base += toCents(l.extendedBase);
      lead = Math.max(lead, l.leadDays);
      if (l.orderBy < s.orderBy) s.orderBy = l.orderBy;
      if (l.late) s.late = true;
    }
    s.total = cents / 100;
    s.totalBase = base / 100;
    s.dueIfPlacedToday = shiftDays(1, today, lead)!;
  }
  return out;
}

/** The order a suggestion becomes when accepted on `today`: its lines at the quoted prices, due by its lead time. */
export function suggestionOrder(s: SupplierSuggestion, today: string): OrderInput {
  return {
    supplierId: s.supplierId,
    orderedDate: today,
    dueDate: s.dueIfPlacedToday,
    lines: s.lines.map((l) => ({ partId: l.partId, quantity: l.buy, price: l.unitPrice, currency: l.currency, quoteId: l.quoteId })),
  };
}

/** Accepts a suggestion: it becomes an open order with the next order number. */
export function acceptSuggestion(book: Book, s: SupplierSuggestion, today: string): Outcome<{ change: BookChange; order: Order }> {
  return placeOrder(book, suggestionOrder(s, today));
}

/** Accepts several suggestions at once: consecutive order numbers, one change. */
export function acceptSuggestions(book: Book, list: readonly SupplierSuggestion[], today: string): Outcome<{ change: BookChange; orders: Order[] }> {
  let b = book;
  const orders: Order[] = [];
  for (const s of list) {
    const r = acceptSuggestion(b, s, today);
    if (!r.ok) return r;
    orders.push(r.value.order);
    b = { ...b, orders: [...b.orders, r.value.order], settings: r.value.change.settings! };
  }
  if (orders.length === 0) return { ok: false, error: 'there is no suggested order to accept' };
  return { ok: true, value: { change: { put: { orders }, settings: { ...b.settings, rev: book.settings.rev } }, orders } };
}
