// The costing workbook: every variant's unit cost at every run size, computed by the formula engine so that any cost
// cell can be overridden with a formula, and laid out so that opening, a price edit and a rate change stay fast.
//
// Layout (chosen by measurement, see `npm run bench`; one ordinary formula per cost figure took ~1.8 s to open here,
// and the engine spends ~10–20 µs on every cell it recomputes, so the design counts cells):
//   Rates     one row per currency: code, base units per unit.
//   Settings  one row: labour rate/h, minutes per unit, minutes per placement, test cost, overhead %, margin %.
//   Quotes    one row per usable quote, grouped by part then supplier: =Rates!B<k>, MOQ, pack, qty1, price1, …
//   Demand    one cell per distinct (part, pinned supplier, need): =COST_BEST(need, Quotes!A<s>:<e>) → cents.
//             Variants that need the same quantity of a part share the cell: a few hundred cells, not 48,000.
//   Blocks    build lines that split the family alike (common to all; by steps; by stage…) are summed once per
//             distinct choice: =SUM(Demand!A…) → cents. Lines that may buy one part (their own or an approved
//             alternate) always share a block, so a variant's lines of one part merge into one purchase. A variant
//             then reads a handful of block cells, not 80 lines; variants buying the same list share its cell.
//   Landed    each quote row carries the landed percentages that fall to us on its term, so COST_BEST chooses by
//             landed cost. Only when some supplier charges an amount per order: Demand gets a second column (the
//             chosen row's supplier token), Blocks a second column (their tokens), Suppliers one row per supplier
//             (freight and charges per order in base cents) and OrderCosts one cell per variant and run size
//             (=COST_ORDERS: the amounts per order of the suppliers it buys from), added to its cents.
//   Variants  ONE cell per variant and run size: =COST_RUN(run, placements, Settings!A1:F1, Blocks!A…, …) → unit cost.
//             The first override on a variant expands its row: labour, test, overhead and material get cells of their
//             own (same kernels) and the unit cost becomes =COST_UNIT(material, labour, test, overhead).
// A quote price edit dirties one Quotes cell, the few Demand cells of that part, their blocks, and only the variants
// that buy that part. A rate edit dirties the Demand cells in that currency once each, however many variants share
// them. A quote's other terms and its validity (superseded, expired, deleted) are taken by writing its row again, or
// blank (updateQuote); a quote that was not usable at open, or is new, needs the workbook opened again. Prices, rates,
// cost settings and overrides are live. A variant whose lines change (a parameter, a quantity, a rule) is costed again
// in place block by block with the blocks of the open: Demand and Blocks cells are added for needs and lists of them
// not costed yet, and only the rows whose formulas come out different are set. The price is derived on reading:
// unit cost / (1 − margin).
import type { CellValue, ExportedChange, HyperFormula, SimpleCellAddress } from 'hyperformula';
import type { Book, BuildLine, CurrencyCode, Quote, Supplier } from '../domain/book.ts';
import {
  costVariantRun,
  candidateQuotes,
  labourUnit,
  overheadPerUnit,
  placementsPerUnit,
  prepareCosting,
  priceFor,
  quoteProblem,
  roundUnit,
  toTenThousandths,
  unitCostOf,
  variantDemands,
} from '../domain/costing.ts';
import type { CostedBom, CostingContext, ResolvedLine, Result, SupplyOptions } from '../domain/costing.ts';
import { approvedParts } from '../domain/alternates.ts';
import { hasPerOrder, landedRates } from '../domain/landed.ts';
import { QUOTE_ROW_HEAD } from './costing-functions.ts';
import { changeInOne, createEngine } from './create.ts';
import type { FamilyResolution } from './family.ts';
import { columnLetters } from './cells.ts';
import { normalizeFormula } from './formula-syntax.ts';

/** Each variant's resolved lines by variant id. */
export type Resolution = Map<string, readonly ResolvedLine[]>;

/** Cost figures a user may override with a formula. labour, test and overhead are per variant; the rest per run. */
export const COST_FIELDS = ['labour', 'test', 'overhead', 'material', 'unitCost'] as const;
export type CostField = (typeof COST_FIELDS)[number];
/** Figures that can be read: the overridable ones and the price (derived from unit cost and margin). */
export type CostFigure = CostField | 'price';
const PER_VARIANT: ReadonlySet<CostField> = new Set(['labour', 'test', 'overhead']);

export interface UnitCostRow {
  variantId: string;
  variant: string;
  run: number;
  /** NaN when the cost cannot be computed; `error` says why. */
  unitCost: number;
  price: number;
  error?: string;
}

export interface ChangedCost {
  variantId: string;
  run: number;
}

/** The family resolver's lines by variant id. */
export function resolutionFromFamily(family: FamilyResolution): Resolution {
  return new Map(family.variants.map((v) => [v.variantId, v.lines] as const));
}

const SETTINGS_RANGE = 'Settings!$A$1:$F$1';
const SHEETS = {
  rates: 'Rates',
  settings: 'Settings',
  quotes: 'Quotes',
  demand: 'Demand',
  blocks: 'Blocks',
  suppliers: 'Suppliers',
  orders: 'OrderCosts',
  variants: 'Variants',
} as const;
/** Variants sheet: unit cost per run size in columns 0…R−1; an expanded row adds labour, test, overhead, materials. */
const EXP_LABOUR = 0;
const EXP_TEST = 1;
const EXP_OVERHEAD = 2;
const EXP_MATERIAL = 3;

/** The supplier-token cell beside a cents cell of the Demand or Blocks sheet (column B beside column A). */
function tokenRef(centsRef: string): string {
  return centsRef.replace('!$A$', '!$B$');
}

function quoteFormulaText(text: string): string {
  return text.replace(/"/g, '""');
}

function errorText(v: CellValue): string | undefined {
  if (typeof v === 'object' && v !== null && 'value' in v) {
    const e = v as { value: string; message?: string };
    return e.message ? e.message : e.value;
  }
  return undefined;
}

/** A variant row's placements per unit and, per run size, its cells' formulas. */
/** A usable quote's place on the Quotes sheet: its row, its number of breaks and its rank in id order (ties). */
interface QuoteRow {
  row: number;
  breaks: number;
  rank: number;
}

interface RowPlan {
  placements: number;
  /** COST_MATERIAL formulas, kept to expand the row for overrides. */
  material: string[];
  /** The Variants cells' formulas. */
  cost: string[];
  /** The OrderCosts cells' formulas (empty when no supplier charges per order). */
  order: string[];
}

/** How the Demand sheet is laid out: the Quotes rows of each part (and part + pinned supplier), and its cells by need. */
interface DemandLayout {
  span: ReadonlyMap<string, [number, number]>;
  /** Ranges of the rows of quotes added since open (see addQuote), read after the span of the same key. */
  added: ReadonlyMap<string, readonly string[]>;
  lastQuoteCol: string;
  perOrder: boolean;
  /** Demand row of each (part, pinned supplier, need). */
  index: Map<string, number>;
  /** Adds a Demand row; gives its index. */
  add(row: string[]): number;
  /** The Blocks cell adding up each list of Demand cells (joined by commas), shared by every variant that buys it. */
  sums: Map<string, string>;
  /** Adds a Blocks row; gives its index. */
  addSum(row: string[]): number;
}

/** The Quotes sheet's rows `rows` (first and last, from 0) as a range a Demand cell reads. */
function quoteRange(rows: readonly [number, number], lastQuoteCol: string): string {
  return `${SHEETS.quotes}!$A$${rows[0] + 1}:$${lastQuoteCol}$${rows[1] + 1}`;
}

/**
 * One cell giving the cost of some Demand cells: the cell itself when there is one, else the Blocks cell that adds
 * them up (made when no variant bought that list yet); undefined when there are none.
 */
function sumRef(cells: readonly string[], layout: DemandLayout): string | undefined {
  if (cells.length <= 1) return cells[0];
  const key = cells.join(',');
  let ref = layout.sums.get(key);
  if (ref === undefined) {
    const r = layout.addSum(layout.perOrder ? [`=SUM(${key})`, `=COST_SUPPLIERS(${cells.map(tokenRef).join(',')})`] : [`=SUM(${key})`]);
    ref = `${SHEETS.blocks}!$A$${r + 1}`;
    layout.sums.set(key, ref);
  }
  return ref;
}

/**
 * The parts a resolved line may buy: its own and, for the line's fixed part, the approved alternates costing may
 * choose instead. Lines that may buy one part are costed in one block, so they merge into one purchase.
 */
function partsOf(ctx: CostingContext, l: ResolvedLine): string[] {
  if (l.partId === undefined) return [];
  const line = ctx.lines.get(l.lineId);
  return line && line.partId === l.partId ? approvedParts(line) : [l.partId];
}

/**
 * A variant's lines cut into the blocks the workbook was opened with (`blockOf`, by line id), lines of no block
 * together: blocks that share a part here are joined, so each part is still bought once. Adding up the blocks'
 * Demand cells gives what buying all the lines at once gives.
 */
function blockGroups(ctx: CostingContext, lines: readonly ResolvedLine[], blockOf: ReadonlyMap<string, number>): ResolvedLine[][] {
  const NO_BLOCK = -1;
  const parent = new Map<number, number>();
  const find = (g: number): number => {
    let r = g;
    while (parent.has(r)) r = parent.get(r)!;
    return r;
  };
  const partGroup = new Map<string, number>();
  for (const l of lines) {
    for (const p of partsOf(ctx, l)) {
      const g = find(blockOf.get(l.lineId) ?? NO_BLOCK);
      const other = partGroup.get(p);
      if (other === undefined) partGroup.set(p, g);
      else if (find(other) !== g) parent.set(g, find(other));
    }
  }
  const groups = new Map<number, ResolvedLine[]>();
  for (const l of lines) {
    const g = find(blockOf.get(l.lineId) ?? NO_BLOCK);
    const list = groups.get(g);
    if (list) list.push(l);
    else groups.set(g, [l]);
  }
  return [...groups.values()];
}

/**
 * A variant's cells at one run size (variant row `row`, run column `k`) from the cents cells it buys from: its unit
 * cost, its material (kept to expand the row for overrides) and, when suppliers charge per order (`suppliers` rows),
 * its OrderCosts cell, which the unit cost then adds.
 */
function runCells(
  run: number,
  k: number,
  row: number,
  placements: number,
  cents: readonly string[],
  problem: string | undefined,
  suppliers: number | undefined,
): { cost: string; material: string; order?: string } {
  const refs = [...cents];
  let order: string | undefined;
  if (suppliers !== undefined) {
    order = `=COST_ORDERS(${SHEETS.suppliers}!$A$1:$B$${suppliers},${refs.length ? refs.map(tokenRef).join(',') : '""'})`;
    refs.push(`${SHEETS.orders}!$${columnLetters(k)}$${row + 1}`);
  }
  const args = refs.map((x) => ',' + x).join('');
  const material = problem !== undefined ? `=COST_PROBLEM("${quoteFormulaText(problem)}")` : `=COST_MATERIAL(${run}${args})`;
  const cost = problem !== undefined ? material : `=COST_RUN(${run},${placements},${SETTINGS_RANGE}${args})`;
  return order === undefined ? { cost, material } : { cost, material, order };
}

/** What a quote row is written from, besides the quote: kept from open so a quote's row can be written again in place. */
interface QuoteRowTerms {
  rateRow: ReadonlyMap<string, number>;
  suppliers: ReadonlyMap<string, Supplier>;
  /** Each supplier's place in the Book (its token is twice that, plus 1 where the carriage is ours). */
  supplierAt: ReadonlyMap<string, number>;
}

/**
 * A usable quote's row on the Quotes sheet: its rate, MOQ, pack, the landed percentages that fall to us on its term,
 * its supplier's token (−1 when the supplier charges nothing per order), lead days, rank, then its breaks.
 */
function quoteRowCells(q: Quote, rank: number, t: QuoteRowTerms): (string | number | null)[] {
  const supplier = t.suppliers.get(q.supplierId);
  const landed = landedRates(supplier, q.incoterm);
  const token = supplier && hasPerOrder(supplier) ? 2 * t.supplierAt.get(supplier.id)! + (landed.carriage ? 1 : 0) : -1;
  const row: (string | number | null)[] = [
    `=${SHEETS.rates}!$B$${t.rateRow.get(q.currency)! + 1}`,
    q.moq,
    q.pack,
    landed.freightPct,
    landed.dutyPct,
    landed.chargesPct,
    token,
    q.leadDays,
    rank,
  ];
  for (const b of q.breaks) row.push(b.qty, b.price);
  return row;
}

/**
 * The Demand cells that a set of lines buys from at one run size — one per part (and pinned supplier) at its need,
 * added when not there yet — and the first problem (a line that cannot be costed, a part with no usable quote).
 */
function demandCells(ctx: CostingContext, lines: readonly ResolvedLine[], run: number, layout: DemandLayout): { cells: string[]; problem?: string } {
  const { demands, problems } = variantDemands(ctx, lines, run);
  const cells: string[] = [];
  let problem = problems[0] ? `${problems[0].designators || problems[0].lineId}: ${problems[0].message}` : undefined;
  for (const d of demands) {
    const key = d.pinnedSupplierId === undefined ? d.partId : `${d.partId}\u0000${d.pinnedSupplierId}`;
    const sp = layout.span.get(key);
    if (!sp) {
      const part = ctx.parts.get(d.partId)!;
      const why = candidateQuotes(ctx, d.partId, d.pinnedSupplierId).map((p) => `quote ${p.quote.id} ${p.unusable ?? ''}`.trim());
      problem ??= `${d.designators.join(', ')}: no usable quote for ${part.mpn}${why.length ? ` (${why.join('; ')})` : ''}`;
      continue;
    }
    const dkey = `${key}\u0000${d.need}`;
    let dr = layout.index.get(dkey);
    if (dr === undefined) {
      const range = [quoteRange(sp, layout.lastQuoteCol), ...(layout.added.get(key) ?? [])].join(',');
      dr = layout.add(layout.perOrder ? [`=COST_BEST(${d.need},${range})`, `=COST_BEST_SUPPLIER(${d.need},${range})`] : [`=COST_BEST(${d.need},${range})`]);
      layout.index.set(dkey, dr);
    }
    cells.push(`${SHEETS.demand}!$A$${dr + 1}`);
  }
  return problem === undefined ? { cells } : { cells, problem };
}

export class CostingWorkbook {
  /** The engine; exposed for the app's formula bar and for tests. */
  readonly hf: HyperFormula;
  readonly runSizes: readonly number[];
  private book: Book;
  private readonly resolution: Resolution;
  private readonly date: string;
  private readonly sheet: Record<keyof typeof SHEETS, number>;
  private readonly variantRow = new Map<string, number>();
  private readonly variantAt: string[] = [];
  /** Per variant row: placements per unit, and per run size its cells' formulas (material kept to expand the row). */
  private readonly plan: RowPlan[] = [];
  /** Each build line's block at open (see `blockGroups`). */
  private blockOf: ReadonlyMap<string, number> = new Map();
  private blockRowCount = 0;
  private readonly expanded = new Set<number>();
  private readonly quoteRow = new Map<string, QuoteRow>();
  private readonly rateRow = new Map<CurrencyCode, number>();
  /** What quote rows are written from (see quoteRowCells), and the widest row's number of breaks. */
  private quoteTerms: QuoteRowTerms | undefined;
  private maxBreaks = 1;
  /** Rows of quotes no longer usable (superseded, expired, deleted since open): blank, so no Demand cell reads them. */
  private readonly withdrawn = new Set<string>();
  /** The quotes laid out at open, by part, in row order. */
  private readonly quotesOfPart = new Map<string, string[]>();
  /**
   * The rows of each part, and of each part and supplier, laid out at open or by addQuote (a supplier new to a part);
   * and those a Demand cell may read now (a part and supplier with no usable row left has none).
   */
  private laidSpans: Map<string, [number, number]> | undefined;
  private spans: Map<string, [number, number]> | undefined;
  /** Rows of quotes added since open, as ranges, by part and by part and supplier (see addQuote). */
  private readonly addedRanges = new Map<string, string[]>();
  private quoteRowCount = 0;
  /** Original formulas of overridden cells, to restore on clear. */
  private readonly originals = new Map<string, string>();
  /** Working copies of quotes and rates that follow live edits, for costed BOM detail. */
  private readonly quotes: Map<string, Quote>;
  private rates: Record<CurrencyCode, number>;
  private ctxCache: CostingContext | undefined;
  /** Where Demand cells are found and added (kept from open, so lines can change in place). */
  private layout: DemandLayout | undefined;
  private demandRowCount = 0;
  /** Suppliers rows (amounts per order), 0 when no supplier charges per order. */
  private supplierCount = 0;

  private constructor(
    hf: HyperFormula,
    book: Book,
    resolution: Resolution,
    date: string,
    runSizes: number[],
    quotes: Map<string, Quote>,
  ) {
    this.hf = hf;
    // Own copy of the settings: live setting edits must not reach into the caller's Book.
    this.book = { ...book, settings: { ...book.settings } };
    this.resolution = resolution;
    this.date = date;
    this.runSizes = runSizes;
    this.quotes = quotes;
    this.rates = { ...book.settings.rates };
    const id = (name: string): number => hf.getSheetId(name)!;
    this.sheet = {
      rates: id(SHEETS.rates),
      settings: id(SHEETS.settings),
      quotes: id(SHEETS.quotes),
      demand: id(SHEETS.demand),
      blocks: id(SHEETS.blocks),
      suppliers: id(SHEETS.suppliers),
      orders: id(SHEETS.orders),
      variants: id(SHEETS.variants),
    };
  }

  /**
   * Builds the workbook for a Book. `resolution` gives each variant's resolved lines (from the family resolver).
   * Bad settings or run sizes give an error, nothing is built.
   */
  static open(book: Book, resolution: Resolution, options: { date?: string } = {}): Result<CostingWorkbook> {
    const prepared = prepareCosting(book, options);
    if (!prepared.ok) return prepared;
    const ctx = prepared.value;
    const runSizes = book.settings.runSizes;
    if (runSizes.length === 0) return { ok: false, error: 'the Book lists no run sizes to cost' };
    for (const r of runSizes) {
      if (!Number.isInteger(r) || r < 1) return { ok: false, error: `run sizes must be whole numbers ≥ 1, got ${r}` };
    }
    if (new Set(runSizes).size !== runSizes.length) return { ok: false, error: 'run sizes are listed twice' };

    // Rates: every currency the settings or a quote name.
    const perOrderCurrencies = book.suppliers.flatMap((s) => [s.freightPerOrder?.currency, s.chargesPerOrder?.currency]).filter((c) => c !== undefined);
    const currencies = new Set<string>([
      book.settings.baseCurrency,
      ...Object.keys(book.settings.rates),
      ...book.quotes.map((q) => q.currency),
      ...perOrderCurrencies,
    ]);
    const rateRows: (string | number | null)[][] = [];
    const rateRow = new Map<string, number>();
    for (const c of currencies) {
      rateRow.set(c, rateRows.length);
      const rate = c === book.settings.baseCurrency ? 1 : book.settings.rates[c];
      rateRows.push([c, rate ?? null]);
    }

    const s = book.settings;
    const settingsRows = [[s.labourRatePerHour, s.labourMinutesPerUnit, s.labourMinutesPerPlacement, s.testCostPerUnit, s.overheadPct, s.marginPct]];

    // Quotes usable apart from their rate (a missing rate can be added live), grouped by part then supplier.
    const usable: Quote[] = [];
    for (const q of book.quotes) if (quoteProblem(q, ctx.date, 1) === undefined) usable.push(q);
    usable.sort((a, b) => (a.partId < b.partId ? -1 : a.partId > b.partId ? 1 : a.supplierId < b.supplierId ? -1 : a.supplierId > b.supplierId ? 1 : 0));
    const maxBreaks = usable.reduce((m, q) => Math.max(m, q.breaks.length), 1);
    const lastQuoteCol = columnLetters(QUOTE_ROW_HEAD - 1 + 2 * maxBreaks);
    // Amounts per order: a supplier's token is its place in the Book × 2 (+ 1 where the carriage is ours).
    const perOrder = book.suppliers.some(hasPerOrder);
    const supplierAt = new Map(book.suppliers.map((x, i) => [x.id, i] as const));
    const rank = new Map([...usable].sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0)).map((q, i) => [q.id, i] as const));
    const quoteRows: (string | number | null)[][] = [];
    const quoteRow = new Map<string, QuoteRow>();
    /** Rows [start, end] of each part's quotes, and of each part+supplier. */
    const span = new Map<string, [number, number]>();
    const widen = (key: string, r: number): void => {
      const sp = span.get(key);
      if (sp) sp[1] = r;
      else span.set(key, [r, r]);
    };
    const quotes = new Map<string, Quote>();
    const terms: QuoteRowTerms = { rateRow, suppliers: ctx.suppliers, supplierAt };
    for (const q of usable) {
      const r = quoteRows.length;
      quoteRows.push(quoteRowCells(q, rank.get(q.id)!, terms));
      quoteRow.set(q.id, { row: r, breaks: q.breaks.length, rank: rank.get(q.id)! });
      widen(q.partId, r);
      widen(`${q.partId}\u0000${q.supplierId}`, r);
      quotes.set(q.id, { ...q, breaks: q.breaks.map((b) => ({ ...b })) });
    }
    for (const q of book.quotes) if (!quotes.has(q.id)) quotes.set(q.id, q);

    // Blocks: build lines that split the family the same way (common to all, by steps, by stage…) are costed together,
    // and lines that may buy one part always land in one block so that a variant's lines of one part merge into one
    // purchase (an alternate costing may choose counts: see `partsOf`).
    const variants = book.variants;
    const lineIds = [...new Set(variants.flatMap((v) => (resolution.get(v.id) ?? []).map((l) => l.lineId)))];
    const byVariant = variants.map((v) => new Map((resolution.get(v.id) ?? []).map((l) => [l.lineId, l] as const)));
    const optionKey = (l: ResolvedLine | undefined): string =>
      !l || l.error !== undefined || !l.applies || !(l.qtyPerUnit > 0) || l.partId === undefined ? '-' : `${l.partId}|${l.qtyPerUnit}`;
    const groupOf = new Map<string, number>();
    const groupLines: string[][] = [];
    const groupParts: Set<string>[] = [];
    for (const lineId of lineIds) {
      const classes = new Map<string, number>();
      const sig: number[] = [];
      const parts = new Set<string>();
      for (let i = 0; i < variants.length; i++) {
        const l = byVariant[i]!.get(lineId);
        const k = optionKey(l);
        if (k !== '-') for (const p of partsOf(ctx, l!)) parts.add(p);
        let c = classes.get(k);
        if (c === undefined) classes.set(k, (c = classes.size));
        sig.push(c);
      }
      const key = sig.join(',');
      let g = groupOf.get(key);
      if (g === undefined) {
        g = groupLines.length;
        groupOf.set(key, g);
        groupLines.push([]);
        groupParts.push(new Set());
      }
      groupLines[g]!.push(lineId);
      for (const p of parts) groupParts[g]!.add(p);
    }
    // Union groups that share a part.
    const parent = groupLines.map((_, i) => i);
    const find = (i: number): number => (parent[i] === i ? i : (parent[i] = find(parent[i]!)));
    const partGroup = new Map<string, number>();
    groupParts.forEach((parts, g) => {
      for (const p of parts) {
        const other = partGroup.get(p);
        if (other === undefined) partGroup.set(p, g);
        else parent[find(g)] = find(other);
      }
    });
    const blocks = new Map<number, string[]>();
    groupLines.forEach((ls, g) => {
      const root = find(g);
      const list = blocks.get(root);
      if (list) list.push(...ls);
      else blocks.set(root, [...ls]);
    });
    /** Each line's block, by its place in `blocks`: edits in place cost a variant block by block too. */
    const blockOf = new Map<string, number>();
    [...blocks.values()].forEach((ls, b) => ls.forEach((id) => blockOf.set(id, b)));

    const demandRows: string[][] = [];
    const blockRows: string[][] = [];
    const layout: DemandLayout = {
      span,
      added: new Map(),
      lastQuoteCol,
      perOrder,
      index: new Map(),
      add: (row) => demandRows.push(row) - 1,
      sums: new Map(),
      addSum: (row) => blockRows.push(row) - 1,
    };
    /** Per variant, per run size: block cells to add up, and the first problem. */
    const refs: string[][][] = variants.map(() => runSizes.map(() => []));
    const missing: (string | undefined)[][] = variants.map(() => runSizes.map(() => undefined));
    for (const blockLines of blocks.values()) {
      const combos = new Map<string, number[]>();
      for (let i = 0; i < variants.length; i++) {
        const key = blockLines.map((id) => optionKey(byVariant[i]!.get(id))).join('\u0001');
        const list = combos.get(key);
        if (list) list.push(i);
        else combos.set(key, [i]);
      }
      for (const members of combos.values()) {
        const rep = byVariant[members[0]!]!;
        const lines = blockLines.map((id) => rep.get(id)).filter((l): l is ResolvedLine => l !== undefined && l.error === undefined);
        for (let k = 0; k < runSizes.length; k++) {
          const run = runSizes[k]!;
          const { cells, problem } = demandCells(ctx, lines, run, layout);
          const ref = sumRef(cells, layout);
          for (const i of members) {
            if (ref !== undefined) refs[i]![k]!.push(ref);
            if (problem !== undefined) missing[i]![k] ??= problem;
          }
        }
      }
    }

    // Suppliers: freight and charges per order in base cents, following the rates live.
    const perOrderCell = (amount: { amount: number; currency: string } | undefined): string | number =>
      amount && amount.amount > 0 ? `=COST_ORDER_CENTS(${amount.amount},${SHEETS.rates}!$B$${rateRow.get(amount.currency)! + 1})` : 0;
    const supplierRows = perOrder ? book.suppliers.map((x) => [perOrderCell(x.freightPerOrder), perOrderCell(x.chargesPerOrder)]) : [];
    const orderRows: string[][] = [];
    const variantRows: (string | number)[][] = [];
    const variantRow = new Map<string, number>();
    const variantAt: string[] = [];
    const plan: RowPlan[] = [];
    variants.forEach((v, i) => {
      variantRow.set(v.id, variantRows.length);
      variantAt.push(v.id);
      const placements = placementsPerUnit(ctx, resolution.get(v.id) ?? []);
      const row: string[] = [];
      const material: string[] = [];
      const orderRow: string[] = [];
      for (let k = 0; k < runSizes.length; k++) {
        const cells = runCells(runSizes[k]!, k, i, placements, refs[i]![k]!, missing[i]![k], perOrder ? supplierRows.length : undefined);
        if (cells.order !== undefined) orderRow.push(cells.order);
        material.push(cells.material);
        row.push(cells.cost);
      }
      plan.push({ placements, material, cost: row, order: orderRow });
      variantRows.push(row);
      if (perOrder) orderRows.push(orderRow);
    });

    const hf = createEngine(
      // Exact results (our functions round money themselves), no undo history (the app keeps its own), and room for
      // a large family's Demand sheet.
      { smartRounding: false, undoLimit: 0, useArrayArithmetic: false, maxRows: 1_000_000 },
      {
        [SHEETS.rates]: rateRows,
        [SHEETS.settings]: settingsRows,
        [SHEETS.quotes]: quoteRows.length ? quoteRows : [[]],
        [SHEETS.demand]: demandRows.length ? demandRows : [[]],
        [SHEETS.blocks]: blockRows.length ? blockRows : [[]],
        [SHEETS.suppliers]: supplierRows.length ? supplierRows : [[]],
        [SHEETS.orders]: orderRows.length ? orderRows : [[]],
        [SHEETS.variants]: variantRows.length ? variantRows : [[]],
      },
    );
    const wb = new CostingWorkbook(hf, book, resolution, ctx.date, [...runSizes], quotes);
    for (const [k, v] of variantRow) wb.variantRow.set(k, v);
    wb.plan.push(...plan);
    wb.variantAt.push(...variantAt);
    for (const [k, v] of quoteRow) wb.quoteRow.set(k, v);
    for (const [k, v] of rateRow) wb.rateRow.set(k, v);
    wb.quoteTerms = { rateRow: wb.rateRow, suppliers: terms.suppliers, supplierAt };
    wb.maxBreaks = maxBreaks;
    for (const q of usable) {
      const ids = wb.quotesOfPart.get(q.partId);
      if (ids) ids.push(q.id);
      else wb.quotesOfPart.set(q.partId, [q.id]);
    }
    wb.laidSpans = new Map(span);
    wb.spans = new Map(span);
    wb.layout = { ...layout, span: wb.spans, added: wb.addedRanges, add: (row) => wb.addDemandRow(row), addSum: (row) => wb.addBlockRow(row) };
    wb.quoteRowCount = quoteRows.length;
    wb.supplierCount = supplierRows.length;
    wb.demandRowCount = demandRows.length;
    wb.blockRowCount = blockRows.length;
    wb.blockOf = blockOf;
    return { ok: true, value: wb };
  }

  private addDemandRow(row: string[]): number {
    const r = this.demandRowCount++;
    row.forEach((formula, col) => this.hf.setCellContents({ sheet: this.sheet.demand, row: r, col }, formula));
    return r;
  }

  private addBlockRow(row: string[]): number {
    const r = this.blockRowCount++;
    row.forEach((formula, col) => this.hf.setCellContents({ sheet: this.sheet.blocks, row: r, col }, formula));
    return r;
  }

  /**
   * Gives variants new resolved lines (a parameter or build-line edit changed what they are built from) without
   * building the workbook again: each variant's lines are costed block by block as at open (blocks sharing a part
   * joined), through Blocks cells that variants buying the same share, with Demand and Blocks cells added for needs
   * not costed yet; a row whose formulas come out as they were is left alone. Gives the unit costs that changed, or an
   * error when the layout cannot take it in place (overridden figures, an unknown variant) and the workbook must be
   * opened again.
   */
  relineVariants(lines: ReadonlyMap<string, readonly ResolvedLine[]>, buildLines: BuildLine[] = this.book.buildLines): Result<ChangedCost[]> {
    const layout = this.layout;
    if (!layout) return { ok: false, error: 'the workbook was not opened from a Book: open it again' };
    for (const id of lines.keys()) {
      const row = this.variantRow.get(id);
      if (row === undefined) return { ok: false, error: `no variant with id ${id}` };
      if (this.expanded.has(row)) return { ok: false, error: 'a variant with overridden figures: open the workbook again' };
    }
    if (buildLines !== this.book.buildLines) {
      // The Book's own list, kept as given (Books are never changed in place): a line edit relined in parts passes
      // the same list to every part, and the costing context is worked out once.
      this.book = { ...this.book, buildLines };
      this.ctxCache = undefined;
    }
    const ctx = this.context();
    const sheet = this.sheet.variants;
    // Variants of a family mostly buy a block alike: each block's lines are costed once per run size.
    const costed = new Map<string, { cells: string[]; problem?: string }>();
    const blockCells = (group: readonly ResolvedLine[], run: number): { cells: string[]; problem?: string } => {
      let key = String(run);
      for (const l of group) key += `\u0000${l.lineId}\u0001${l.partId ?? ''}\u0001${l.qtyPerUnit}\u0001${l.applies ? 1 : 0}`;
      let r = costed.get(key);
      if (!r) costed.set(key, (r = demandCells(ctx, group, run, layout)));
      return r;
    };
    const changes = changeInOne(this.hf, () => {
      for (const [id, resolved] of lines) {
        const row = this.variantRow.get(id)!;
        this.resolution.set(id, resolved);
        const usable = resolved.filter((l) => l.error === undefined);
        const groups = blockGroups(ctx, usable, this.blockOf);
        const placements = placementsPerUnit(ctx, resolved);
        const was = this.plan[row]!;
        const next: RowPlan = { placements, material: [], cost: [], order: [] };
        this.runSizes.forEach((run, k) => {
          const refs: string[] = [];
          let problem: string | undefined;
          for (const group of groups) {
            const r = blockCells(group, run);
            problem ??= r.problem;
            const ref = sumRef(r.cells, layout);
            if (ref !== undefined) refs.push(ref);
          }
          // The variant's first problem in the order of its lines, as the plain costing of its costed BOM names it (the
          // workbook's open names the first in block order: the cost cell is a problem either way).
          if (problem !== undefined) problem = demandCells(ctx, usable, run, layout).problem ?? problem;
          const made = runCells(run, k, row, placements, refs, problem, layout.perOrder ? this.supplierCount : undefined);
          if (made.order !== undefined) {
            next.order.push(made.order);
            if (was.order[k] !== made.order) this.hf.setCellContents({ sheet: this.sheet.orders, row, col: k }, made.order);
          }
          next.material.push(made.material);
          next.cost.push(made.cost);
          if (was.cost[k] !== made.cost) this.hf.setCellContents({ sheet, row, col: k }, made.cost);
        });
        this.plan[row] = next;
      }
    });
    return { ok: true, value: this.changedCosts(changes) };
  }

  private runIndex(run: number): number {
    return this.runSizes.indexOf(run);
  }

  private get runCount(): number {
    return this.runSizes.length;
  }

  /** Where a figure lives: unit costs always have a cell; the others only once the variant's row is expanded. */
  private address(variantId: string, field: CostField, run?: number): Result<{ at: SimpleCellAddress; row: number; cell: boolean }> {
    const row = this.variantRow.get(variantId);
    if (row === undefined) return { ok: false, error: `no variant with id ${variantId}` };
    const sheet = this.sheet.variants;
    const R = this.runCount;
    const perVariant = PER_VARIANT.has(field);
    const k = perVariant ? 0 : run === undefined ? -1 : this.runIndex(run);
    if (k < 0) return { ok: false, error: `run size ${run} is not one of the Book's run sizes (${this.runSizes.join(', ')})` };
    if (field === 'unitCost') return { ok: true, value: { at: { sheet, row, col: k }, row, cell: true } };
    const off = field === 'labour' ? EXP_LABOUR : field === 'test' ? EXP_TEST : field === 'overhead' ? EXP_OVERHEAD : EXP_MATERIAL + k;
    return { ok: true, value: { at: { sheet, row, col: R + off }, row, cell: this.expanded.has(row) } };
  }

  /** Gives a variant's row its own labour, test, overhead and material cells (same kernels, same numbers). */
  private expand(row: number): void {
    if (this.expanded.has(row)) return;
    const R = this.runCount;
    const n = row + 1;
    const p = this.plan[row]!;
    const ref = (c: number): string => `${columnLetters(R + c)}${n}`;
    const s = (c: number): string => `${SHEETS.settings}!$${columnLetters(c)}$1`;
    const sheet = this.sheet.variants;
    changeInOne(this.hf, () => {
      this.hf.setCellContents({ sheet, row, col: R + EXP_LABOUR }, `=COST_LABOUR(${p.placements},${s(0)},${s(1)},${s(2)})`);
      this.hf.setCellContents({ sheet, row, col: R + EXP_TEST }, `=COST_ROUND_UNIT(${s(3)})`);
      this.hf.setCellContents({ sheet, row, col: R + EXP_OVERHEAD }, `=COST_OVERHEAD(${ref(EXP_LABOUR)},${s(4)})`);
      for (let k = 0; k < R; k++) {
        this.hf.setCellContents({ sheet, row, col: R + EXP_MATERIAL + k }, p.material[k]!);
        this.hf.setCellContents(
          { sheet, row, col: k },
          `=COST_UNIT(${ref(EXP_MATERIAL + k)},${ref(EXP_LABOUR)},${ref(EXP_TEST)},${ref(EXP_OVERHEAD)})`,
        );
      }
    });
    this.expanded.add(row);
  }

  /**
   * A cost figure's value (per unit, base currency); NaN when it is an error or unknown. The price is the unit cost
   * at the Book's margin. Figures of a row that has no cells of its own come from the same kernels in TypeScript.
   */
  value(variantId: string, field: CostFigure, run?: number): number {
    if (field === 'price') {
      const u = this.value(variantId, 'unitCost', run);
      return Number.isFinite(u) ? priceFor(u, this.book.settings.marginPct) : NaN;
    }
    const where = this.address(variantId, field, run);
    if (!where.ok) return NaN;
    if (!where.value.cell) {
      const s = this.book.settings;
      const labour = labourUnit(s.labourRatePerHour, s.labourMinutesPerUnit, s.labourMinutesPerPlacement, this.plan[where.value.row]!.placements);
      if (field === 'labour') return labour;
      if (field === 'test') return roundUnit(s.testCostPerUnit);
      if (field === 'overhead') return overheadPerUnit(labour, s.overheadPct);
      // material: read back from the unit cost, which is material + the three per-variant figures.
      const u = this.value(variantId, 'unitCost', run);
      if (!Number.isFinite(u)) return NaN;
      const rest = toTenThousandths(labour) + toTenThousandths(roundUnit(s.testCostPerUnit)) + toTenThousandths(overheadPerUnit(labour, s.overheadPct));
      return (toTenThousandths(u) - rest) / 10_000;
    }
    const v = this.hf.getCellValue(where.value.at);
    return typeof v === 'number' ? v : NaN;
  }

  /** Why a cost figure cannot be computed, or undefined when it can. */
  problem(variantId: string, field: CostFigure, run?: number): string | undefined {
    const where = this.address(variantId, field === 'price' ? 'unitCost' : field, run);
    if (!where.ok) return where.error;
    if (!where.value.cell) return errorText(this.hf.getCellValue({ ...where.value.at, col: this.runIndex(run ?? this.runSizes[0]!) }));
    return errorText(this.hf.getCellValue(where.value.at));
  }

  /** Unit cost of a variant at one of the Book's run sizes (NaN when it cannot be computed; see `problem`). */
  unitCost(variantId: string, run: number): number {
    return this.value(variantId, 'unitCost', run);
  }

  /** Every variant's unit cost and price at every run size, read in one pass over the Variants sheet. */
  allUnitCosts(): UnitCostRow[] {
    const values = this.hf.getSheetValues(this.sheet.variants);
    const out: UnitCostRow[] = [];
    const codes = new Map(this.book.variants.map((v) => [v.id, v.code] as const));
    const margin = this.book.settings.marginPct;
    for (let r = 0; r < this.variantAt.length; r++) {
      const id = this.variantAt[r]!;
      const row = values[r] ?? [];
      for (let k = 0; k < this.runSizes.length; k++) {
        const u = row[k];
        const unitCost = typeof u === 'number' ? u : NaN;
        const item: UnitCostRow = {
          variantId: id,
          variant: codes.get(id) ?? id,
          run: this.runSizes[k]!,
          unitCost,
          price: Number.isFinite(unitCost) ? priceFor(unitCost, margin) : NaN,
        };
        const e = errorText(u ?? null);
        if (e !== undefined) item.error = e;
        out.push(item);
      }
    }
    return out;
  }

  private context(): CostingContext {
    if (!this.ctxCache) {
      const book: Book = { ...this.book, settings: { ...this.book.settings, rates: { ...this.rates } }, quotes: [...this.quotes.values()] };
      const r = prepareCosting(book, { date: this.date });
      if (!r.ok) throw new Error(r.error); // settings were validated at open; edits are validated before they land
      this.ctxCache = r.value;
    }
    return this.ctxCache;
  }

  /**
   * The costed BOM of a variant for a run, with the live prices and rates. Overridden cost figures win over the
   * computed ones (the lines stay as computed). Any run size works; overrides only exist for the Book's run sizes.
   * `supply` (a run's date wanted, stock on hand) decides which approved alternates can be had in time.
   */
  costedBom(variantId: string, run: number, supply: SupplyOptions = {}): Result<CostedBom> {
    const variant = this.book.variants.find((v) => v.id === variantId);
    if (!variant) return { ok: false, error: `no variant with id ${variantId}` };
    const r = costVariantRun(this.context(), variant, this.resolution.get(variantId) ?? [], run, supply);
    const row = this.variantRow.get(variantId)!;
    if (!r.ok || !this.expanded.has(row)) return r;
    const bom = { ...r.value };
    const known = this.runIndex(run) >= 0;
    for (const field of COST_FIELDS) {
      if (field === 'unitCost' || (!known && !PER_VARIANT.has(field))) continue;
      const v = this.value(variantId, field, run);
      if (!Number.isNaN(v)) bom[field] = v;
    }
    bom.unitCost = known ? this.value(variantId, 'unitCost', run) : unitCostOf(bom.material, bom.labour, bom.test, bom.overhead);
    bom.price = priceFor(bom.unitCost, this.book.settings.marginPct);
    return { ok: true, value: bom };
  }

  private changedCosts(changes: ExportedChange[]): ChangedCost[] {
    const out: ChangedCost[] = [];
    const R = this.runCount;
    for (const c of changes) {
      if (!('address' in c) || c.address.sheet !== this.sheet.variants || c.address.col >= R) continue;
      out.push({ variantId: this.variantAt[c.address.row]!, run: this.runSizes[c.address.col]! });
    }
    return out;
  }

  /** Sets one break's unit price of a quote; returns the unit costs that changed. Bad input changes nothing. */
  setQuotePrice(quoteId: string, breakIndex: number, price: number): Result<ChangedCost[]> {
    const at = this.quoteRow.get(quoteId);
    if (!at) {
      const q = this.quotes.get(quoteId);
      if (!q) return { ok: false, error: `no quote with id ${quoteId}` };
      return { ok: false, error: `quote ${quoteId} ${quoteProblem(q, this.date, 1) ?? 'is not used'}; it takes no part in costing` };
    }
    if (!Number.isInteger(breakIndex) || breakIndex < 0 || breakIndex >= at.breaks) {
      return { ok: false, error: `quote ${quoteId} has breaks 0 to ${at.breaks - 1}, not ${breakIndex}` };
    }
    if (typeof price !== 'number' || !Number.isFinite(price) || price < 0) return { ok: false, error: `a price must be a number ≥ 0, got ${price}` };
    const changes = this.hf.setCellContents({ sheet: this.sheet.quotes, row: at.row, col: QUOTE_ROW_HEAD + 1 + 2 * breakIndex }, price);
    this.quotes.get(quoteId)!.breaks[breakIndex]!.price = price;
    this.ctxCache = undefined;
    return { ok: true, value: [...this.changedCosts(changes), ...this.chooseAgain()] };
  }

  /**
   * Takes a quote's new terms in place — its MOQ, pack, lead time, term, currency, breaks, or whether it is still
   * usable (superseded, expired, deleted: `next` undefined) — by writing its row of the Quotes sheet again, or blank
   * when it is no longer usable, so every Demand cell that reads it works its best buy out again. Refused (the caller
   * opens the workbook again) where the layout of the open cannot hold it: a quote not laid out at open becoming
   * usable, one moved to another part or supplier, more breaks than the widest row, a currency with no rate row, or a
   * part (or a part and supplier) left without a usable row, whose lines then say why in their own words at open.
   */
  updateQuote(quoteId: string, next: Quote | undefined): Result<ChangedCost[]> {
    const prev = this.quotes.get(quoteId);
    if (!prev) return { ok: false, error: `no quote with id ${quoteId}` };
    if (next && (next.id !== quoteId || next.partId !== prev.partId || next.supplierId !== prev.supplierId)) {
      return { ok: false, error: `quote ${quoteId} moved to another part or supplier; the workbook must be opened again` };
    }
    const usable = next !== undefined && quoteProblem(next, this.date, 1) === undefined;
    const at = this.quoteRow.get(quoteId);
    const keep = (): void => {
      if (next) this.quotes.set(quoteId, { ...next, breaks: next.breaks.map((b) => ({ ...b })) });
      else this.quotes.delete(quoteId);
      this.ctxCache = undefined;
    };
    if (!at) {
      if (usable) return { ok: false, error: `quote ${quoteId} became usable but has no row; the workbook must be opened again` };
      keep();
      return { ok: true, value: [] };
    }
    const terms = this.quoteTerms!;
    const bySupplier = `${prev.partId}\u0000${prev.supplierId}`;
    let cells: (string | number | null)[] = [];
    if (usable) {
      if (next.breaks.length > this.maxBreaks) return { ok: false, error: `quote ${quoteId} has more breaks than the Quotes sheet holds` };
      if (!terms.rateRow.has(next.currency)) return { ok: false, error: `no rate row for ${next.currency}` };
      cells = quoteRowCells(next, at.rank, terms);
    } else if (!this.withdrawn.has(quoteId)) {
      const left = this.usableRows(prev);
      if (left.part === 0 || (left.supplier === 0 && this.pinnedTo(bySupplier))) {
        return { ok: false, error: `quote ${quoteId} was the last usable quote its lines buy from; the workbook must be opened again` };
      }
    }
    const width = QUOTE_ROW_HEAD + 2 * this.maxBreaks;
    while (cells.length < width) cells.push(null);
    const changes = changeInOne(this.hf, () => this.hf.setCellContents({ sheet: this.sheet.quotes, row: at.row, col: 0 }, [cells]));
    const spans = this.spans!;
    if (usable) {
      this.withdrawn.delete(quoteId);
      this.quoteRow.set(quoteId, { ...at, breaks: next.breaks.length });
      // Its part and supplier have a usable row again (see below).
      const laid = this.laidSpans!.get(bySupplier);
      if (laid) spans.set(bySupplier, laid);
    } else {
      this.withdrawn.add(quoteId);
      // A part and supplier with no usable row left is costed as at open: a line pinned to it later says why.
      if (this.usableRows(prev).supplier === 0) spans.delete(bySupplier);
    }
    keep();
    return { ok: true, value: [...this.changedCosts(changes), ...this.chooseAgain()] };
  }

  /**
   * Takes a new quote in place (typed in, or an import's few): its row goes below the Quotes sheet's last, and every
   * Demand cell buying its part — from any supplier, or pinned to its supplier — reads that row too, so the best buy
   * is chosen again among all of them; new Demand cells read it as well. Its rank among the part's quotes (the last
   * tie rule) is between its neighbours in id order, as at open. Refused (the caller opens the workbook again) where
   * the layout of the open cannot hold it: a part that had no usable quote at open (its lines then say why in their
   * own words), a supplier some line is pinned to with no quote of that part at open, more breaks than the widest
   * row, a currency with no rate row. An unusable quote (superseded or expired already) needs no row.
   */
  addQuote(q: Quote): Result<ChangedCost[]> {
    if (this.quotes.has(q.id)) return { ok: false, error: `quote ${q.id} is there already` };
    const keep = (): void => {
      this.quotes.set(q.id, { ...q, breaks: q.breaks.map((b) => ({ ...b })) });
      this.ctxCache = undefined;
    };
    if (quoteProblem(q, this.date, 1) !== undefined) {
      keep();
      return { ok: true, value: [] };
    }
    const spans = this.spans!;
    const bySupplier = `${q.partId}\u0000${q.supplierId}`;
    const laid = this.laidSpans!;
    if (!spans.has(q.partId)) return { ok: false, error: `part ${q.partId} had no usable quote when the workbook was opened` };
    if (!laid.has(bySupplier) && this.book.buildLines.some((l) => l.pinnedSupplierId === q.supplierId)) {
      return { ok: false, error: `a line is pinned to supplier ${q.supplierId}, which quoted no such part at open` };
    }
    if (q.breaks.length > this.maxBreaks) return { ok: false, error: `quote ${q.id} has more breaks than the Quotes sheet holds` };
    const terms = this.quoteTerms!;
    if (!terms.rateRow.has(q.currency)) return { ok: false, error: `no rate row for ${q.currency}` };

    const ids = this.quotesOfPart.get(q.partId) ?? [];
    let below = -Infinity;
    let above = Infinity;
    for (const id of ids) {
      const rank = this.quoteRow.get(id)!.rank;
      if (id < q.id) below = Math.max(below, rank);
      else above = Math.min(above, rank);
    }
    const rank = below === -Infinity ? above - 1 : above === Infinity ? below + 1 : (below + above) / 2;
    const row = this.quoteRowCount++;
    const cells = quoteRowCells(q, rank, terms);
    const range = quoteRange([row, row], this.layout!.lastQuoteCol);
    const widen = (key: string): void => {
      const list = this.addedRanges.get(key);
      if (list) list.push(range);
      else this.addedRanges.set(key, [range]);
    };
    widen(q.partId);
    const sub = laid.get(bySupplier);
    if (sub) {
      widen(bySupplier);
      spans.set(bySupplier, sub);
    } else {
      laid.set(bySupplier, [row, row]);
      spans.set(bySupplier, [row, row]);
    }
    // The Demand cells of its part, and those pinned to its supplier, read its row too.
    const demands: number[] = [];
    for (const [key, r] of this.layout!.index) {
      const at = key.split('\u0000');
      if (at[0] !== q.partId || (at.length === 3 && at[1] !== q.supplierId)) continue;
      demands.push(r);
    }
    const columns = this.layout!.perOrder ? 2 : 1;
    const changes = changeInOne(this.hf, () => {
      this.hf.setCellContents({ sheet: this.sheet.quotes, row, col: 0 }, [cells]);
      for (const r of demands) {
        for (let col = 0; col < columns; col++) {
          const at = { sheet: this.sheet.demand, row: r, col };
          const formula = this.hf.getCellFormula(at)!;
          this.hf.setCellContents(at, `${formula.slice(0, -1)},${range})`);
        }
      }
    });
    this.quoteRow.set(q.id, { row, breaks: q.breaks.length, rank });
    this.quotesOfPart.set(q.partId, [...ids, q.id]);
    keep();
    return { ok: true, value: [...this.changedCosts(changes), ...this.chooseAgain()] };
  }

  /** The rows still usable of a quote's part, and of its part and supplier, besides its own. */
  private usableRows(q: Quote): { part: number; supplier: number } {
    let part = 0;
    let supplier = 0;
    for (const id of this.quotesOfPart.get(q.partId) ?? []) {
      if (id === q.id || this.withdrawn.has(id)) continue;
      part++;
      if (this.quotes.get(id)?.supplierId === q.supplierId) supplier++;
    }
    return { part, supplier };
  }

  /** Whether some Demand cell buys a part from one supplier alone (`key`: part and supplier; a line pinned to it). */
  private pinnedTo(key: string): boolean {
    const prefix = `${key}\u0000`;
    for (const k of this.layout?.index.keys() ?? []) if (k.startsWith(prefix)) return true;
    return false;
  }

  /** Sets the base-currency value of one unit of a currency; returns the unit costs that changed. */
  setRate(currency: CurrencyCode, rate: number): Result<ChangedCost[]> {
    const row = this.rateRow.get(currency);
    if (row === undefined) return { ok: false, error: `no quote or setting uses the currency ${currency}` };
    if (currency === this.book.settings.baseCurrency) return { ok: false, error: `${currency} is the base currency; its rate is 1` };
    if (typeof rate !== 'number' || !Number.isFinite(rate) || rate <= 0) return { ok: false, error: `an exchange rate must be a number > 0, got ${rate}` };
    const changes = this.hf.setCellContents({ sheet: this.sheet.rates, row, col: 1 }, rate);
    this.rates = { ...this.rates, [currency]: rate };
    this.ctxCache = undefined;
    return { ok: true, value: [...this.changedCosts(changes), ...this.chooseAgain()] };
  }

  /**
   * After a price or rate edit: the variants that fit a line with approved alternates choose among them again (the
   * cheapest may be another part now), as a workbook opened afresh would. Rows with overridden figures keep theirs.
   */
  private chooseAgain(): ChangedCost[] {
    const choosing = new Set(this.book.buildLines.filter((l) => l.partId !== undefined && (l.alternates ?? []).length > 0).map((l) => l.id));
    if (choosing.size === 0) return [];
    const lines = new Map<string, readonly ResolvedLine[]>();
    for (const [id, resolved] of this.resolution) {
      const row = this.variantRow.get(id);
      if (row === undefined || this.expanded.has(row)) continue;
      if (resolved.some((l) => choosing.has(l.lineId) && l.applies)) lines.set(id, resolved);
    }
    if (lines.size === 0) return [];
    const r = this.relineVariants(lines);
    return r.ok ? r.value : [];
  }

  private key(a: SimpleCellAddress): string {
    return `${a.row}:${a.col}`;
  }

  /**
   * Overrides a cost figure with a formula ("=1.85", "=Variants!D4*1.1") or a number. A formula that does not parse or
   * gives an error is refused and the cell keeps what it had. `run` is needed for material and unitCost.
   */
  setOverride(variantId: string, field: CostField, formula: string | number, run?: number): Result<ChangedCost[]> {
    if (!COST_FIELDS.includes(field)) return { ok: false, error: `no cost field ${String(field)}; use one of ${COST_FIELDS.join(', ')}` };
    const where = this.address(variantId, field, run);
    if (!where.ok) return where;
    let content: string | number;
    if (typeof formula === 'number') {
      if (!Number.isFinite(formula)) return { ok: false, error: `an override must be a finite number, got ${formula}` };
      content = formula;
    } else {
      const text = formula.trim();
      if (text === '') return { ok: false, error: 'an empty override; use clearOverride to go back to the computed figure' };
      if (text.startsWith('=')) {
        const engineText = normalizeFormula(text);
        if (!this.hf.validateFormula(engineText)) return { ok: false, error: `the formula ${text} does not parse` };
        content = engineText;
      } else {
        const n = Number(text);
        if (!Number.isFinite(n)) return { ok: false, error: `an override must be a number or a formula starting with =, got ${text}` };
        content = n;
      }
    }
    // Try the content in a scratch cell first, so a formula that gives an error changes nothing at all.
    const probe = this.hf.calculateFormula(typeof content === 'number' ? `=${content}` : content, this.sheet.variants);
    if (typeof probe !== 'number') {
      return { ok: false, error: `the override ${String(content)} gives ${errorText(probe as CellValue) ?? 'no number'}; nothing changed` };
    }
    this.expand(where.value.row);
    const at = where.value.at;
    const k = this.key(at);
    const before = this.hf.getCellFormula(at) ?? String(this.hf.getCellValue(at));
    const changes = this.hf.setCellContents(at, content);
    if (!this.originals.has(k)) this.originals.set(k, before);
    return { ok: true, value: this.changedCosts(changes) };
  }

  /** Puts back the computed formula of an overridden cost figure. */
  clearOverride(variantId: string, field: CostField, run?: number): Result<ChangedCost[]> {
    const where = this.address(variantId, field, run);
    if (!where.ok) return where;
    const k = this.key(where.value.at);
    const original = this.originals.get(k);
    if (original === undefined) return { ok: false, error: `${field} of that variant is not overridden` };
    const changes = this.hf.setCellContents(where.value.at, original);
    this.originals.delete(k);
    return { ok: true, value: this.changedCosts(changes) };
  }

  /** Changes a cost setting (labour rate, minutes, test cost, overhead %, margin %) for every variant. */
  setCostSetting(
    name: 'labourRatePerHour' | 'labourMinutesPerUnit' | 'labourMinutesPerPlacement' | 'testCostPerUnit' | 'overheadPct' | 'marginPct',
    value: number,
  ): Result<ChangedCost[]> {
    const order = ['labourRatePerHour', 'labourMinutesPerUnit', 'labourMinutesPerPlacement', 'testCostPerUnit', 'overheadPct', 'marginPct'] as const;
    const c = order.indexOf(name);
    if (c < 0) return { ok: false, error: `no cost setting ${String(name)}` };
    if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) return { ok: false, error: `${name} must be a number ≥ 0, got ${value}` };
    if (name === 'marginPct' && value >= 100) return { ok: false, error: `margin % must be below 100, got ${value}` };
    const changes = this.hf.setCellContents({ sheet: this.sheet.settings, row: 0, col: c }, value);
    (this.book.settings as unknown as Record<string, number>)[name] = value;
    this.ctxCache = undefined;
    return { ok: true, value: this.changedCosts(changes) };
  }

  /** Formula cells in the workbook (for the benchmark and for the app's diagnostics). */
  formulaCount(): number {
    return this.hf.getSheetNames().reduce((n, name) => {
      const id = this.hf.getSheetId(name)!;
      const f = this.hf.getSheetFormulas(id);
      return n + f.reduce((m, row) => m + row.filter((x) => x !== undefined).length, 0);
    }, 0);
  }

  close(): void {
    this.hf.destroy();
  }
}
