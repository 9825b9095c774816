// The costing workbook: every variant's unit cost at every run size, computed by the formula engine so that any cost
// cell can be overridden with a formula, and laid out so that opening, a price edit and a rate change stay fast.
//
// Layout (chosen by measurement, see `npm run bench`; one ordinary formula per cost figure took ~1.8 s to open):
//   Rates     one row per currency: code, base units per unit.
//   Settings  one row: labour rate/h, minutes per unit, minutes per placement, test cost, overhead %, margin %.
//   Quotes    one row per usable quote, grouped by part then supplier: =Rates!B<k>, MOQ, pack, qty1, price1, …
//   Demand    one cell per distinct (part, pinned supplier, need): =COST_BEST(need, Quotes!A<s>:<e>) → cents.
//             Variants that need the same quantity of a part share the cell, so there are a few hundred, not 48,000.
//   Variants  per variant: labour, test, overhead; per run size: material =COST_MATERIAL(run, Demand!A…, …),
//             unit cost =COST_UNIT(…) and price =COST_PRICE(…).
// A quote price edit dirties one Quotes cell, the few Demand cells of that part, and only the variants that buy that
// part: the fan-out stays proportional to how widely the part is used. A rate edit dirties every Demand cell in that
// currency, once each, however many variants share them. Validity (superseded, expired, bad breaks) is decided when
// the workbook opens: edit those fields and reopen. The Demand key uses the need computed at open time, so editing
// quantities, attrition or rules also means reopening; prices, rates, cost settings and overrides are live.
import { HyperFormula } from 'hyperformula';
import type { CellValue, ExportedChange, SimpleCellAddress } from 'hyperformula';
import type { Book, CurrencyCode, Quote } from '../domain/book.ts';
import {
  costVariantRun,
  candidateQuotes,
  placementsPerUnit,
  prepareCosting,
  priceFor,
  quoteProblem,
  unitCostOf,
  resolveFixedLines,
  variantDemands,
} from '../domain/costing.ts';
import type { CostedBom, CostingContext, ResolvedLine, Result } from '../domain/costing.ts';
import { registerCostingFunctions } from './costing-functions.ts';
import { ENGINE_DEFAULTS, registerRungbookFunctions } from './create.ts';

/** Each variant's resolved lines by variant id. */
export type Resolution = Map<string, readonly ResolvedLine[]>;

/** Cost figures a user may override with a formula. labour, test and overhead are per variant; the rest per run. */
export const COST_FIELDS = ['labour', 'test', 'overhead', 'material', 'unitCost', 'price'] as const;
export type CostField = (typeof COST_FIELDS)[number];
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

/** The shape of the family resolver's answer (src/engine/family.ts), read structurally. */
export interface FamilyResolutionLike {
  variants: {
    variantId: string;
    lines: { lineId: string; partId: string | null; qtyPerUnit: number; applies: boolean }[];
    problems: { lineId: string; message: string }[];
  }[];
}

/** Turns the family resolver's answer into costing's resolved lines (a line with a problem carries its message). */
export function resolutionFromFamily(family: FamilyResolutionLike): Resolution {
  const out: Resolution = new Map();
  for (const v of family.variants) {
    const errors = new Map<string, string>();
    for (const p of v.problems) errors.set(p.lineId, errors.has(p.lineId) ? `${errors.get(p.lineId)}; ${p.message}` : p.message);
    out.set(
      v.variantId,
      v.lines.map((l): ResolvedLine => {
        const base: ResolvedLine = { lineId: l.lineId, qtyPerUnit: l.qtyPerUnit, applies: l.applies };
        if (l.partId !== null) base.partId = l.partId;
        const e = errors.get(l.lineId);
        if (e !== undefined) base.error = e;
        return base;
      }),
    );
  }
  return out;
}

/** Resolution for Books whose build rules are all constants (no formula engine needed). */
export function fixedResolution(book: Book): Resolution {
  return new Map(book.variants.map((v) => [v.id, resolveFixedLines(book, v)] as const));
}

const SHEETS = { rates: 'Rates', settings: 'Settings', quotes: 'Quotes', demand: 'Demand', blocks: 'Blocks', variants: 'Variants' } as const;
/** Variants sheet columns: labour, test, overhead, then (material, unitCost, price) per run size. */
const COL_LABOUR = 0;
const COL_TEST = 1;
const COL_OVERHEAD = 2;
const RUN_COLS = 3;

function col(n: number): string {
  let s = '';
  let c = n + 1;
  while (c > 0) {
    const r = (c - 1) % 26;
    s = String.fromCharCode(65 + r) + s;
    c = Math.floor((c - 1) / 26);
  }
  return s;
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

export class CostingWorkbook {
  /** The engine; exposed for the app's formula bar and for tests. */
  readonly hf: HyperFormula;
  readonly runSizes: readonly number[];
  private readonly book: Book;
  private readonly resolution: Resolution;
  private readonly date: string;
  private readonly sheet: Record<keyof typeof SHEETS, number>;
  private readonly variantRow = new Map<string, number>();
  private readonly variantAt: string[] = [];
  private readonly quoteRow = new Map<string, { row: number; breaks: number }>();
  private readonly rateRow = new Map<CurrencyCode, number>();
  /** Original formulas of overridden cells, to restore on clear. */
  private readonly originals = new Map<string, string>();
  /** Working copies of quotes and rates that follow live edits, for costed BOM detail. */
  private readonly quotes: Map<string, Quote>;
  private rates: Record<CurrencyCode, number>;
  private ctxCache: CostingContext | undefined;

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
      variants: id(SHEETS.variants),
    };
  }

  /**
   * Builds the workbook for a Book. `resolution` gives each variant's resolved lines (from the family resolver);
   * without it only constant build rules are understood. Bad settings or run sizes give an error, nothing is built.
   */
  static open(book: Book, resolution?: Resolution, options: { date?: string } = {}): Result<CostingWorkbook> {
    const prepared = prepareCosting(book, options);
    if (!prepared.ok) return prepared;
    const ctx = prepared.value;
    const runSizes = book.settings.runSizes;
    if (runSizes.length === 0) return { ok: false, error: 'the Book lists no run sizes to cost' };
    for (const r of runSizes) {
      if (!Number.isInteger(r) || r < 1) return { ok: false, error: `run sizes must be whole numbers ≥ 1, got ${r}` };
    }
    if (new Set(runSizes).size !== runSizes.length) return { ok: false, error: 'run sizes are listed twice' };
    const res = resolution ?? fixedResolution(book);
    // Rungbook's own functions too, so a user's override formula may use any of them.
    registerRungbookFunctions();
    registerCostingFunctions();

    // Rates: every currency the settings or a quote name.
    const currencies = new Set<string>([book.settings.baseCurrency, ...Object.keys(book.settings.rates), ...book.quotes.map((q) => q.currency)]);
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
    const lastQuoteCol = col(2 + 2 * maxBreaks);
    const quoteRows: (string | number | null)[][] = [];
    const quoteRow = new Map<string, { row: number; breaks: number }>();
    /** Rows [start, end] of each part's quotes, and of each part+supplier. */
    const span = new Map<string, [number, number]>();
    const widen = (key: string, r: number): void => {
      const sp = span.get(key);
      if (sp) sp[1] = r;
      else span.set(key, [r, r]);
    };
    const quotes = new Map<string, Quote>();
    for (const q of usable) {
      const r = quoteRows.length;
      const row: (string | number | null)[] = [`=${SHEETS.rates}!$B$${rateRow.get(q.currency)! + 1}`, q.moq, q.pack];
      for (const b of q.breaks) row.push(b.qty, b.price);
      quoteRows.push(row);
      quoteRow.set(q.id, { row: r, breaks: q.breaks.length });
      widen(q.partId, r);
      widen(`${q.partId}\u0000${q.supplierId}`, r);
      quotes.set(q.id, { ...q, breaks: q.breaks.map((b) => ({ ...b })) });
    }
    for (const q of book.quotes) if (!quotes.has(q.id)) quotes.set(q.id, q);

    // Blocks: build lines that split the family the same way (common to all, by steps, by stage…) are costed together,
    // and lines sharing a part always land in one block so that a variant's lines of one part merge into one purchase.
    const variants = book.variants;
    const lineIds = [...new Set(variants.flatMap((v) => (res.get(v.id) ?? []).map((l) => l.lineId)))];
    const byVariant = variants.map((v) => new Map((res.get(v.id) ?? []).map((l) => [l.lineId, l] as const)));
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
        if (k !== '-') parts.add(l!.partId!);
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

    const demandRows: string[][] = [];
    const demandIndex = new Map<string, number>();
    const blockRows: string[][] = [];
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
          const { demands, problems } = variantDemands(ctx, lines, run);
          const cells: string[] = [];
          let problem = problems[0] ? `${problems[0].designators || problems[0].lineId}: ${problems[0].message}` : undefined;
          for (const d of demands) {
            const key = d.pinnedSupplierId === undefined ? d.partId : `${d.partId}\u0000${d.pinnedSupplierId}`;
            const sp = span.get(key);
            if (!sp) {
              const part = ctx.parts.get(d.partId)!;
              const why = candidateQuotes(ctx, d.partId, d.pinnedSupplierId).map((p) => `quote ${p.quote.id} ${p.unusable ?? ''}`.trim());
              problem ??= `${d.designators.join(', ')}: no usable quote for ${part.mpn}${why.length ? ` (${why.join('; ')})` : ''}`;
              continue;
            }
            const dkey = `${key}\u0000${d.need}`;
            let dr = demandIndex.get(dkey);
            if (dr === undefined) {
              dr = demandRows.length;
              demandIndex.set(dkey, dr);
              demandRows.push([`=COST_BEST(${d.need},${SHEETS.quotes}!$A$${sp[0] + 1}:$${lastQuoteCol}$${sp[1] + 1})`]);
            }
            cells.push(`${SHEETS.demand}!$A$${dr + 1}`);
          }
          let ref: string | undefined;
          if (cells.length === 1) ref = cells[0]!;
          else if (cells.length > 1) {
            blockRows.push([`=SUM(${cells.join(',')})`]);
            ref = `${SHEETS.blocks}!$A$${blockRows.length}`;
          }
          for (const i of members) {
            if (ref !== undefined) refs[i]![k]!.push(ref);
            if (problem !== undefined) missing[i]![k] ??= problem;
          }
        }
      }
    }

    const variantRows: (string | number)[][] = [];
    const variantRow = new Map<string, number>();
    const variantAt: string[] = [];
    const settingsRef = (c: number): string => `${SHEETS.settings}!$${col(c)}$1`;
    variants.forEach((v, i) => {
      const r = variantRows.length;
      const n = r + 1;
      variantRow.set(v.id, r);
      variantAt.push(v.id);
      const placements = placementsPerUnit(ctx, res.get(v.id) ?? []);
      const row: (string | number)[] = [
        `=COST_LABOUR(${placements},${settingsRef(0)},${settingsRef(1)},${settingsRef(2)})`,
        `=COST_ROUND_UNIT(${settingsRef(3)})`,
        `=COST_OVERHEAD(A${n},${settingsRef(4)})`,
      ];
      for (let k = 0; k < runSizes.length; k++) {
        const m = col(RUN_COLS + 3 * k);
        const problem = missing[i]![k];
        row.push(
          problem !== undefined
            ? `=COST_PROBLEM("${quoteFormulaText(problem)}")`
            : `=COST_MATERIAL(${runSizes[k]}${refs[i]![k]!.map((x) => ',' + x).join('')})`,
          `=COST_UNIT(${m}${n},A${n},B${n},C${n})`,
          `=COST_PRICE(${col(RUN_COLS + 3 * k + 1)}${n},${settingsRef(5)})`,
        );
      }
      variantRows.push(row);
    });

    const hf = HyperFormula.buildFromSheets(
      {
        [SHEETS.rates]: rateRows,
        [SHEETS.settings]: settingsRows,
        [SHEETS.quotes]: quoteRows.length ? quoteRows : [[]],
        [SHEETS.demand]: demandRows.length ? demandRows : [[]],
        [SHEETS.blocks]: blockRows.length ? blockRows : [[]],
        [SHEETS.variants]: variantRows.length ? variantRows : [[]],
      },
      // Exact results (our functions round money themselves), no undo history (the app keeps its own), and room for
      // a large family's Demand sheet.
      { ...ENGINE_DEFAULTS, smartRounding: false, undoLimit: 0, useArrayArithmetic: false, maxRows: 1_000_000 },
    );
    const wb = new CostingWorkbook(hf, book, res, ctx.date, [...runSizes], quotes);
    for (const [k, v] of variantRow) wb.variantRow.set(k, v);
    wb.variantAt.push(...variantAt);
    for (const [k, v] of quoteRow) wb.quoteRow.set(k, v);
    for (const [k, v] of rateRow) wb.rateRow.set(k, v);
    return { ok: true, value: wb };
  }

  private runIndex(run: number): number {
    return this.runSizes.indexOf(run);
  }

  private address(variantId: string, field: CostField, run?: number): Result<SimpleCellAddress> {
    const row = this.variantRow.get(variantId);
    if (row === undefined) return { ok: false, error: `no variant with id ${variantId}` };
    if (field === 'labour') return { ok: true, value: { sheet: this.sheet.variants, row, col: COL_LABOUR } };
    if (field === 'test') return { ok: true, value: { sheet: this.sheet.variants, row, col: COL_TEST } };
    if (field === 'overhead') return { ok: true, value: { sheet: this.sheet.variants, row, col: COL_OVERHEAD } };
    const k = run === undefined ? -1 : this.runIndex(run);
    if (k < 0) return { ok: false, error: `run size ${run} is not one of the Book's run sizes (${this.runSizes.join(', ')})` };
    const off = field === 'material' ? 0 : field === 'unitCost' ? 1 : 2;
    return { ok: true, value: { sheet: this.sheet.variants, row, col: RUN_COLS + 3 * k + off } };
  }

  /** A cost figure's value; NaN when it is an error or unknown. */
  value(variantId: string, field: CostField, run?: number): number {
    const at = this.address(variantId, field, run);
    if (!at.ok) return NaN;
    const v = this.hf.getCellValue(at.value);
    return typeof v === 'number' ? v : NaN;
  }

  /** Why a cost figure cannot be computed, or undefined when it can. */
  problem(variantId: string, field: CostField, run?: number): string | undefined {
    const at = this.address(variantId, field, run);
    if (!at.ok) return at.error;
    return errorText(this.hf.getCellValue(at.value));
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
    for (let r = 0; r < this.variantAt.length; r++) {
      const id = this.variantAt[r]!;
      const row = values[r] ?? [];
      for (let k = 0; k < this.runSizes.length; k++) {
        const u = row[RUN_COLS + 3 * k + 1];
        const p = row[RUN_COLS + 3 * k + 2];
        const item: UnitCostRow = {
          variantId: id,
          variant: codes.get(id) ?? id,
          run: this.runSizes[k]!,
          unitCost: typeof u === 'number' ? u : NaN,
          price: typeof p === 'number' ? p : NaN,
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
   * The costed BOM of a variant for a run, with the live prices and rates. Overridden cost cells win over the computed
   * figures (the lines stay as computed). Any run size works; overrides only exist for the Book's run sizes.
   */
  costedBom(variantId: string, run: number): Result<CostedBom> {
    const variant = this.book.variants.find((v) => v.id === variantId);
    if (!variant) return { ok: false, error: `no variant with id ${variantId}` };
    const r = costVariantRun(this.context(), variant, this.resolution.get(variantId) ?? [], run);
    if (!r.ok || this.originals.size === 0) return r;
    const bom = { ...r.value };
    for (const field of COST_FIELDS) {
      const at = this.address(variantId, field, run);
      if (!at.ok || !this.originals.has(this.key(at.value))) continue;
      const v = this.value(variantId, field, run);
      if (!Number.isNaN(v)) bom[field] = v;
    }
    if (this.runIndex(run) >= 0) {
      bom.unitCost = this.value(variantId, 'unitCost', run);
      bom.price = this.value(variantId, 'price', run);
    } else {
      bom.unitCost = unitCostOf(bom.material, bom.labour, bom.test, bom.overhead);
      bom.price = priceFor(bom.unitCost, this.book.settings.marginPct);
    }
    return { ok: true, value: bom };
  }

  private changedCosts(changes: ExportedChange[]): ChangedCost[] {
    const out: ChangedCost[] = [];
    for (const c of changes) {
      if (!('address' in c) || c.address.sheet !== this.sheet.variants) continue;
      const k = c.address.col - RUN_COLS;
      if (k < 0 || k % 3 !== 1) continue;
      out.push({ variantId: this.variantAt[c.address.row]!, run: this.runSizes[(k - 1) / 3]! });
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
    const changes = this.hf.setCellContents({ sheet: this.sheet.quotes, row: at.row, col: 4 + 2 * breakIndex }, price);
    this.quotes.get(quoteId)!.breaks[breakIndex]!.price = price;
    this.ctxCache = undefined;
    return { ok: true, value: this.changedCosts(changes) };
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
    return { ok: true, value: this.changedCosts(changes) };
  }

  private key(a: SimpleCellAddress): string {
    return `${a.row}:${a.col}`;
  }

  /**
   * Overrides a cost figure with a formula ("=1.85", "=A1*1.1") or a number. A formula that does not parse or gives an
   * error is refused and the cell keeps what it had. `run` is needed for material, unitCost and price.
   */
  setOverride(variantId: string, field: CostField, formula: string | number, run?: number): Result<ChangedCost[]> {
    if (!COST_FIELDS.includes(field)) return { ok: false, error: `no cost field ${String(field)}; use one of ${COST_FIELDS.join(', ')}` };
    const at = this.address(variantId, field, PER_VARIANT.has(field) ? this.runSizes[0] : run);
    if (!at.ok) return at;
    let content: string | number;
    if (typeof formula === 'number') {
      if (!Number.isFinite(formula)) return { ok: false, error: `an override must be a finite number, got ${formula}` };
      content = formula;
    } else {
      const text = formula.trim();
      if (text === '') return { ok: false, error: 'an empty override; use clearOverride to go back to the computed figure' };
      if (text.startsWith('=')) {
        if (!this.hf.validateFormula(text)) return { ok: false, error: `the formula ${text} does not parse` };
        content = text;
      } else {
        const n = Number(text);
        if (!Number.isFinite(n)) return { ok: false, error: `an override must be a number or a formula starting with =, got ${text}` };
        content = n;
      }
    }
    const k = this.key(at.value);
    const before = this.hf.getCellFormula(at.value) ?? String(this.hf.getCellValue(at.value));
    const changes = this.hf.setCellContents(at.value, content);
    const after = this.hf.getCellValue(at.value);
    if (typeof after !== 'number') {
      this.hf.setCellContents(at.value, before);
      return { ok: false, error: `the override ${String(content)} gives ${errorText(after) ?? 'no number'}; nothing changed` };
    }
    if (!this.originals.has(k)) this.originals.set(k, before);
    return { ok: true, value: this.changedCosts(changes) };
  }

  /** Puts back the computed formula of an overridden cost figure. */
  clearOverride(variantId: string, field: CostField, run?: number): Result<ChangedCost[]> {
    const at = this.address(variantId, field, PER_VARIANT.has(field) ? this.runSizes[0] : run);
    if (!at.ok) return at;
    const k = this.key(at.value);
    const original = this.originals.get(k);
    if (original === undefined) return { ok: false, error: `${field} of that variant is not overridden` };
    const changes = this.hf.setCellContents(at.value, original);
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
