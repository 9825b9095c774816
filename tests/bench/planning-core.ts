// The planning measurement of the benchmark: 20 planned runs over the reference family (200 variants × 80 lines),
// with stock on hand and an open order for every part, planned by the domain's planRuns, against a plain
// TypeScript loop doing the same netting (needs per run, date order, stock then orders in time, buy quantity);
// and the whole path the app and `rungbook plan` take (planBook: prepareCosting, resolveFamily, then planRuns).
// A plan whose net need disagrees with the plain loop's stops the bench: its times would measure a wrong plan.
import { REFERENCE_FAMILY, referenceFamily } from '../fixtures/reference-family.ts';
import type { Book, Order, Run, StockMove } from '../../src/domain/book.ts';
import { buyQtyUnchecked, needQtyUnchecked, prepareCosting } from '../../src/domain/costing.ts';
import type { CostingContext, ResolvedLine } from '../../src/domain/costing.ts';
import { planRuns } from '../../src/domain/planning.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { planBook } from '../../src/io/plan-export.ts';
import { median, round, timeMs } from './stats.ts';
import type { Figures } from './stats.ts';

const RUNS = 20;
/** Untimed runs of each before timing, so both are measured as warm code. */
const WARM_UP = 150;
/** The whole path resolves the family every time (hundreds of ms), so it is warmed and timed fewer times. */
const FULL_WARM_UP = 3;
const TODAY = '2025-06-02';

function day(n: number): string {
  return new Date(Date.parse(`${TODAY}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);
}

/** The reference family with 20 planned runs, stock of every part and an open order for every part. */
export function planningBook(): { book: Book; lines: Map<string, readonly ResolvedLine[]> } {
  const { book, resolution } = referenceFamily(REFERENCE_FAMILY);
  const runs: Run[] = Array.from({ length: RUNS }, (_, i) => ({
    id: `run_${i}`,
    rev: 1,
    name: `run ${i}`,
    variantId: book.variants[(i * 37) % book.variants.length]!.id,
    quantity: [500, 2000, 1000, 5000][i % 4]!,
    dateWanted: day(14 + i * 4),
    notes: '',
  }));
  const stockMoves: StockMove[] = book.parts.map((p, i) => ({ id: `m_${i}`, rev: 1, partId: p.id, date: TODAY, quantity: 200 + ((i * 131) % 3000), kind: 'counted', reason: '' }));
  const supplierOf = new Map(book.quotes.map((q) => [q.partId, q.supplierId] as const));
  const orders: Order[] = book.parts.map((p, i) => ({
    id: `o_${i}`,
    rev: 1,
    number: `B-${i}`,
    supplierId: supplierOf.get(p.id) ?? book.suppliers[0]!.id,
    status: 'open',
    orderedDate: TODAY,
    dueDate: day(10 + (i % 60)),
    lines: [{ partId: p.id, quantity: 500 + ((i * 71) % 4000), price: 0.1, currency: book.settings.baseCurrency, received: 0 }],
    notes: '',
  }));
  return { book: { ...book, runs, stockMoves, orders, settings: { ...book.settings, horizonDays: 120 } }, lines: resolution };
}

/**
 * The same netting as a plain loop over part indexes: each run's needs (lines of a part merged, rounded up once),
 * runs in date order, stock first, then open orders due by the need date, the net bought with the first quote's
 * MOQ and pack. Returns the total net need (to check it against the plan).
 */
export function plainNetting(book: Book, ctx: CostingContext, lines: Map<string, readonly ResolvedLine[]>): number {
  const index = new Map(book.parts.map((p, i) => [p.id, i] as const));
  const n = book.parts.length;
  const stock = new Float64Array(n);
  for (const m of book.stockMoves) stock[index.get(m.partId)!]! += m.quantity;
  const receipts = book.orders.map((o) => ({ part: index.get(o.lines[0]!.partId)!, due: o.dueDate, qty: o.lines[0]!.quantity - o.lines[0]!.received }));
  receipts.sort((a, b) => (a.due < b.due ? -1 : 1));
  const arrived = new Float64Array(n);
  const raw = new Float64Array(n);
  const touched: number[] = [];
  const net = new Float64Array(n);
  const lag = book.settings.kittingDays + book.settings.safetyDays;
  const runs = [...book.runs].sort((a, b) => (a.dateWanted < b.dateWanted ? -1 : 1));
  let r = 0;
  for (const run of runs) {
    const needDate = new Date(Date.parse(`${run.dateWanted}T00:00:00Z`) - lag * 86_400_000).toISOString().slice(0, 10);
    while (r < receipts.length && receipts[r]!.due <= needDate) arrived[receipts[r]!.part]! += receipts[r++]!.qty;
    for (const l of lines.get(run.variantId) ?? []) {
      if (!l.applies || l.partId === undefined || !(l.qtyPerUnit > 0)) continue;
      const i = index.get(l.partId)!;
      const line = ctx.lines.get(l.lineId);
      const a = line?.attrition ?? ctx.settings.attrition[ctx.parts.get(l.partId)!.kind] ?? ctx.settings.attrition['default'] ?? 0;
      if (raw[i] === 0) touched.push(i);
      raw[i]! += l.qtyPerUnit * run.quantity * (1 + a);
    }
    for (const i of touched) {
      const need = needQtyUnchecked(raw[i]!, 1, 0);
      raw[i] = 0;
      const s = Math.min(Math.max(0, stock[i]!), need);
      stock[i]! -= s;
      const o = Math.min(arrived[i]!, need - s);
      arrived[i]! -= o;
      net[i]! += need - s - o;
    }
    touched.length = 0;
  }
  let total = 0;
  book.parts.forEach((p, i) => {
    if (net[i]! <= 0) return;
    const q = ctx.quotesByPart.get(p.id)?.[0]?.quote;
    total += q ? Math.min(net[i]!, buyQtyUnchecked(net[i]!, q.moq, q.pack)) : net[i]!;
  });
  return total;
}

/** Stops the bench when two ways of planning disagree on the net need: the times would be of a wrong plan. */
export function netAgrees(what: string, net: number, other: string, otherNet: number): void {
  if (net !== otherNet) throw new Error(`planning: ${what} net need ${net} is not ${other} ${otherNet}; no planning figure is reported`);
}

export function measurePlanning({ quick, log }: { quick: boolean; log(text: string): void }): Figures {
  const f: Figures = {};
  const { book, lines } = planningBook();
  const ctx = prepareCosting(book, { date: TODAY });
  if (!ctx.ok) throw new Error(ctx.error);
  f['planning_family'] = `${REFERENCE_FAMILY.variants} variants × ${REFERENCE_FAMILY.lines} lines, ${RUNS} runs, ${book.parts.length} parts with stock and an open order`;
  log('planning: plan and the plain loop');
  const plan = (): number => {
    // The netting, the buys and the suggestions from the indexed Book, as the plain loop gets it too.
    const p = planRuns(book, ctx.value, lines, { today: TODAY });
    if (!p.ok) throw new Error(p.error);
    return p.value.parts.reduce((n, x) => n + x.net, 0);
  };
  let netPlan = 0;
  let netPlain = 0;
  f['plan_cold_ms'] = round(timeMs(() => (netPlan = plan())));
  // Both warm up alike (a user's second plan runs warm code), then are timed turn about, so a busy machine
  // slows both the same.
  for (let i = 0; i < WARM_UP; i++) {
    plan();
    plainNetting(book, ctx.value, lines);
  }
  const times: number[] = [];
  const plain: number[] = [];
  for (let i = 0; i < (quick ? 20 : 40); i++) {
    times.push(timeMs(() => (netPlan = plan())));
    plain.push(timeMs(() => (netPlain = plainNetting(book, ctx.value, lines))));
  }
  const prepares: number[] = [];
  for (let i = 0; i < 20; i++) prepares.push(timeMs(() => prepareCosting(book, { date: TODAY })));
  f['plan_prepare_ms'] = round(median(prepares.slice(5)), 2);
  f['plan_ms'] = round(median(times), 2);
  f['plan_plain_ms'] = round(median(plain), 2);
  f['plan_vs_plain'] = round(f['plan_ms'] / Math.max(0.01, f['plan_plain_ms']), 1);
  f['plan_net_parts'] = netPlan;
  f['plan_net_agrees'] = netPlain === netPlan;
  netAgrees("the plan's", netPlan, "the plain loop's", netPlain);

  // The app's real path: the Plan page takes each variant's lines from the live figures (resolved in the figures
  // worker) and prepares the costing and plans on each plan (planBook with the family given). The command line
  // resolves the family too (planBook alone): timed beside it as information.
  log('planning: the whole path (planBook)');
  const resolved = resolveFamily(book);
  const total = (p: ReturnType<typeof planBook>): number => {
    if (!p.ok) throw new Error(p.error);
    return p.value.parts.reduce((n, x) => n + x.net, 0);
  };
  const full = (): number => total(planBook(book, { today: TODAY }, resolved));
  const cli = (): number => total(planBook(book, { today: TODAY }));
  let netFull = 0;
  let netCli = 0;
  f['plan_full_cold_ms'] = round(timeMs(() => (netFull = full())));
  for (let i = 0; i < FULL_WARM_UP; i++) full();
  const fullTimes: number[] = [];
  const cliTimes: number[] = [];
  const resolves: number[] = [];
  for (let i = 0; i < (quick ? 3 : 7); i++) {
    fullTimes.push(timeMs(() => (netFull = full())));
    cliTimes.push(timeMs(() => (netCli = cli())));
    resolves.push(timeMs(() => resolveFamily(book)));
  }
  f['plan_full_ms'] = round(median(fullTimes), 2);
  f['plan_cli_ms'] = round(median(cliTimes), 2);
  f['plan_full_resolve_ms'] = round(median(resolves), 2);
  f['plan_full_net_agrees'] = netFull === netPlan && netCli === netPlan;
  netAgrees("the whole path's", netFull, "the plan's from the same lines", netPlan);
  netAgrees("the command line's path", netCli, "the plan's from the same lines", netPlan);
  return f;
}
