// The open Book's live figures as one engine job: each variant's check results and resolved build lines from one
// family workbook, and its unit cost at every run size from one costing workbook, kept in step with the Book as it
// changes. The app runs this in a Web Worker (figures-worker.ts) so the page never waits for the engine; tests and
// other callers may run it in-process. Either way each step's answer is a `FiguresUpdate`: the figures that moved,
// small enough to copy to the page.
//
// Catching up edits the workbooks in place where the engine allows it — a quote added, or its price or other
// terms (an expiry, a supersede, MOQ, pack, breaks; a delete), an exchange rate, a cost setting, a variant
// parameter, a build line's quantity, rules, attrition, designators, category or pin (the variants whose lines moved
// costed again) — and rebuilds them on structural changes (variants added or deleted, parts, suppliers, run sizes,
// many quotes at once).
import type { Book, Quote, Settings, Variant } from '../domain/book.ts';
import type { ResolvedLine, Result } from '../domain/costing.ts';
import { sameValue } from '../domain/merge.ts';
import { runAtOnce } from '../domain/slices.ts';
import type { Sliced } from '../domain/slices.ts';
import { CostingWorkbook, resolutionFromFamily } from './costing.ts';
import type { ChangedCost } from './costing.ts';
import { FamilyWorkbook } from './family.ts';
import type { CheckResult } from './family.ts';

import { FIGURES_READ, SYNC_KINDS } from './figures-kinds.ts';
import type { CostingChangeDetail, FiguresCollection, FiguresUpdate, UnitCostFigure } from './figures-kinds.ts';

export { SYNC_KINDS } from './figures-kinds.ts';
export type { CostingChangeDetail, FiguresUpdate, SyncKind, UnitCostFigure } from './figures-kinds.ts';

/** Cost settings the costing workbook takes live. */
const LIVE_SETTINGS = ['labourRatePerHour', 'labourMinutesPerUnit', 'labourMinutesPerPlacement', 'testCostPerUnit', 'overheadPct', 'marginPct'] as const;
/** Collections of FIGURES_READ that catchUp weighs record by record; a change to any other builds both workbooks again. */
const IN_PLACE: ReadonlySet<FiguresCollection> = new Set(['variants', 'quotes', 'buildLines', 'checks']);
/** Settings that change no figure. */
const QUIET_SETTINGS: ReadonlySet<keyof Settings> = new Set(['id', 'rev', 'bookName', 'company', 'lastExportAt', 'editsSinceExport']);

interface RecordDiff<R> {
  added: R[];
  removed: R[];
  changed: [R, R][];
}

/** Records added, removed and saved again, by id and revision (every save raises the revision). */
function diffRecords<R extends { id: string; rev: number }>(before: readonly R[], after: readonly R[]): RecordDiff<R> {
  const out: RecordDiff<R> = { added: [], removed: [], changed: [] };
  if (before === after) return out;
  const old = new Map(before.map((r) => [r.id, r] as const));
  for (const r of after) {
    const o = old.get(r.id);
    if (!o) out.added.push(r);
    else {
      if (o.rev !== r.rev || (o !== r && JSON.stringify(o) !== JSON.stringify(r))) out.changed.push([o, r]);
      old.delete(r.id);
    }
  }
  out.removed = [...old.values()];
  return out;
}

const empty = (d: RecordDiff<unknown>): boolean => d.added.length === 0 && d.removed.length === 0 && d.changed.length === 0;

/** Price edits between two versions of a quote, or undefined when anything but break prices changed. */
function priceEdits(a: Quote, b: Quote): { breakIndex: number; price: number }[] | undefined {
  if (a.breaks.length !== b.breaks.length) return undefined;
  const strip = (q: Quote) => JSON.stringify({ ...q, rev: 0, breaks: q.breaks.map((x) => x.qty) });
  if (strip(a) !== strip(b)) return undefined;
  const out: { breakIndex: number; price: number }[] = [];
  a.breaks.forEach((x, i) => {
    const p = b.breaks[i]!.price;
    if (x.price !== p) out.push({ breakIndex: i, price: p });
  });
  return out;
}

/**
 * Quotes added, edited or deleted in one change, at most, that the costing workbook takes in place (each a row
 * written and the Demand cells that read it): more, as when an import supersedes thousands, and building it again is
 * quicker.
 */
export const QUOTES_IN_PLACE = 50;
/** Edits in place (a price, a rate, a quote's row) made between two pauses of the figures worker. */
const EDITS_PER_STEP = 10;

/**
 * Variants costed again in one part of a build line edit: 6–17 ms per 10 of the reference family's 200 in Node (40 at
 * a time made parts of 25–60 ms, which the worker cannot pause inside while the page draws).
 */
export const VARIANTS_PER_RELINE = 8;

export class LiveFigures {
  private book: Book | undefined;
  private family: FamilyWorkbook | undefined;
  private costing: CostingWorkbook | undefined;
  private costingError: string | undefined;
  private familyError: string | undefined;
  /**
   * Each variant's resolved lines, to tell whether an edit changed what it is built from (the family workbook gives
   * new lists, never changes them).
   */
  private lineSets = new Map<string, readonly ResolvedLine[]>();

  /** The workbooks' Book: the last one caught up with. */
  get current(): Book | undefined {
    return this.book;
  }

  /** Brings the figures up to `next`; gives what moved. */
  update(next: Book): FiguresUpdate {
    return runAtOnce(this.updateInSteps(next));
  }

  /**
   * As `update`, yielding between parts of the work (the variants a build line edit costs again, a few dozen at a
   * time): the figures worker pauses there while the page asks for the processor (see figures-worker.ts). Nothing else
   * may use these figures until the steps have ended.
   */
  *updateInSteps(next: Book): Sliced<FiguresUpdate> {
    const prev = this.book;
    if (prev === next) return this.answer({ kind: SYNC_KINDS.same, changed: [], checks: false }, [], false);
    this.book = next;
    if (prev && this.family && this.costing) return yield* this.catchUp(prev, next);
    yield* this.openFamily(next);
    yield;
    this.openCosting(next);
    return this.rebuilt(true, undefined);
  }

  /**
   * A private costing workbook of the Book as it is now, for what-if edits that must not reach the live figures
   * (the caller edits it freely and must `close()` it).
   */
  scratch(options: { date?: string } = {}): Result<CostingWorkbook> {
    if (!this.book || !this.family) return { ok: false, error: this.costingError ?? 'the build lines could not be resolved' };
    return CostingWorkbook.open(this.book, resolutionFromFamily(this.family.resolve()), options);
  }

  /** The resolved build lines of some variants, as the family workbook has them now. */
  linesOf(ids: readonly string[]): Map<string, ResolvedLine[]> {
    const wanted = new Set(ids);
    const out = new Map<string, ResolvedLine[]>();
    for (const v of this.family?.resolve().variants ?? []) if (wanted.has(v.variantId)) out.set(v.variantId, v.lines);
    return out;
  }

  /** Frees both workbooks; the next update builds them again. */
  close(): void {
    this.family?.close();
    this.costing?.close();
    this.family = undefined;
    this.costing = undefined;
    this.book = undefined;
  }

  private answer(detail: CostingChangeDetail, costs: UnitCostFigure[], costsFull: boolean, checkVariants?: readonly string[]): FiguresUpdate {
    const variants: FiguresUpdate['variants'] = [];
    const checksFull = detail.checks && checkVariants === undefined;
    if (detail.checks) {
      const results = new Map<string, CheckResult[]>();
      const wanted = checkVariants ? new Set(checkVariants) : undefined;
      for (const r of this.family?.results() ?? []) {
        if (wanted && !wanted.has(r.variantId)) continue;
        const list = results.get(r.variantId);
        if (list) list.push(r);
        else results.set(r.variantId, [r]);
      }
      const lines = new Map((this.family?.resolve().variants ?? []).map((v) => [v.variantId, v] as const));
      for (const v of this.book?.variants ?? []) {
        if (wanted && !wanted.has(v.id)) continue;
        variants.push({ variantId: v.id, results: results.get(v.id) ?? [], lines: lines.get(v.id) });
      }
    }
    const out: FiguresUpdate = {
      ...detail,
      runSizes: [...(this.costing?.runSizes ?? this.book?.settings.runSizes ?? [])],
      costs,
      costsFull,
      variants,
      checksFull,
    };
    if (this.costingError !== undefined) out.costingError = this.costingError;
    if (this.familyError !== undefined) out.familyError = this.familyError;
    return out;
  }

  /** Every unit cost of the costing workbook, read in one pass. */
  private allCosts(): UnitCostFigure[] {
    if (!this.costing) return [];
    return this.costing.allUnitCosts().map((r) => {
      const f: UnitCostFigure = { variantId: r.variantId, run: r.run, value: r.unitCost };
      if (r.error !== undefined) f.problem = r.error;
      return f;
    });
  }

  private someCosts(changed: readonly ChangedCost[]): UnitCostFigure[] {
    const c = this.costing;
    if (!c) return [];
    return changed.map(({ variantId, run }) => {
      const f: UnitCostFigure = { variantId, run, value: c.unitCost(variantId, run) };
      if (!Number.isFinite(f.value)) f.problem = c.problem(variantId, 'unitCost', run) ?? 'cannot be computed';
      return f;
    });
  }

  private rebuilt(checks: boolean, checkVariants: readonly string[] | undefined): FiguresUpdate {
    const changed: ChangedCost[] = [];
    for (const v of this.book?.variants ?? []) for (const run of this.costing?.runSizes ?? []) changed.push({ variantId: v.id, run });
    return this.answer({ kind: SYNC_KINDS.rebuilt, changed, checks }, this.allCosts(), true, checkVariants);
  }

  private *openFamily(book: Book): Sliced<void> {
    this.family?.close();
    this.family = undefined;
    this.familyError = undefined;
    try {
      this.family = yield* FamilyWorkbook.openInSteps(book);
    } catch (e) {
      this.familyError = `the checks could not be evaluated: ${e instanceof Error ? e.message : String(e)}`;
    }
    this.readLineSets();
  }

  /** Reads each variant's resolved lines (of the variants named, after a parameter edit; else of all). */
  private readLineSets(only?: ReadonlySet<string>): void {
    if (!only) this.lineSets = new Map();
    for (const v of this.family?.resolve().variants ?? []) if (!only || only.has(v.variantId)) this.lineSets.set(v.variantId, v.lines);
  }

  private openCosting(book: Book): void {
    this.costing?.close();
    this.costing = undefined;
    this.costingError = undefined;
    if (!this.family) {
      // Without resolved build lines any figure would leave lines out; show why instead of a wrong cost.
      this.costingError = `the build lines could not be resolved (${this.familyError ?? 'no family workbook'})`;
      return;
    }
    try {
      const opened = CostingWorkbook.open(book, resolutionFromFamily(this.family.resolve()));
      if (opened.ok) this.costing = opened.value;
      else this.costingError = opened.error;
    } catch (e) {
      this.costingError = `costs could not be computed: ${e instanceof Error ? e.message : String(e)}`;
    }
  }

  /** Edits the workbooks in place where the change allows it, else rebuilds what depends on it. */
  private *catchUp(prev: Book, next: Book): Sliced<FiguresUpdate> {
    const diff = <C extends FiguresCollection>(c: C) => diffRecords<Book[C][number]>(prev[c], next[c]);
    const variants = diff('variants');
    const checks = diff('checks');
    const lineDiff = diff('buildLines');
    // Any other collection the figures read (parts, suppliers) is taken in by building both workbooks again.
    const othersChanged = FIGURES_READ.some((c) => !IN_PLACE.has(c) && !empty(diff(c)));
    const shapeSame = !othersChanged && empty(checks) && variants.added.length === 0 && variants.removed.length === 0;
    const onlyLines = shapeSame && variants.changed.length === 0 && lineDiff.added.length === 0 && lineDiff.removed.length === 0 && lineDiff.changed.length > 0;
    yield;
    // A line's quantity, rules, attrition, designators, category or pin are taken by the family table in place (a
    // rule as a new memo; FamilyWorkbook.setLineTerms): the variants are resolved again, and only the variants whose
    // lines moved or that fit the line are costed again.
    const linesInPlace = onlyLines && this.family !== undefined && (yield* this.family.setLineTermsInSteps(lineDiff.changed.map(([, b]) => b)));
    const familyRebuild = !linesInPlace && (!shapeSame || !empty(lineDiff));

    let familyTouched = familyRebuild;
    let costingRebuild = othersChanged || variants.added.length > 0 || variants.removed.length > 0;
    const oldSets = new Map(this.lineSets);
    /** Variants whose build lines (or a line they fit) changed: their costs are worked out again in place. */
    const moved = new Set<string>();
    if (familyRebuild || linesInPlace) {
      if (familyRebuild) yield* this.openFamily(next);
      else this.readLineSets();
      for (const v of next.variants) if (!sameValue(oldSets.get(v.id), this.lineSets.get(v.id))) moved.add(v.id);
      if (!empty(lineDiff)) {
        // A line's designators, category, attrition or pinned supplier change its cost without changing how it
        // resolves: the variants that fit it (before or after) are costed again too.
        const touched = new Set([...lineDiff.added, ...lineDiff.removed, ...lineDiff.changed.map(([, b]) => b)].map((l) => l.id));
        for (const v of next.variants) {
          const fits = (lines: readonly ResolvedLine[] | undefined): boolean => (lines ?? []).some((l) => touched.has(l.lineId) && l.applies);
          if (fits(oldSets.get(v.id)) || fits(this.lineSets.get(v.id))) moved.add(v.id);
        }
      }
    } else if (variants.changed.length > 0) {
      familyTouched = true;
      if (!this.editParams(variants.changed)) {
        yield* this.openFamily(next);
        costingRebuild = true;
      } else {
        this.readLineSets(new Set(variants.changed.map(([, v]) => v.id)));
        for (const [, v] of variants.changed) if (!sameValue(oldSets.get(v.id), this.lineSets.get(v.id))) moved.add(v.id);
      }
    }
    // The costed BOM names the variant by its code, which the costing workbook copied at open.
    if (variants.changed.some(([a, b]) => a.code !== b.code)) costingRebuild = true;
    // A parameter edit moves only the edited variants' checks (lines edited in place, the lines of the variants that
    // fit them); a rebuilt family moves every variant's.
    const checkVariants = familyRebuild ? undefined : linesInPlace ? [...moved] : variants.changed.map(([, v]) => v.id);
    if (linesInPlace && moved.size > 0) familyTouched = true;

    const edits: (() => Result<ChangedCost[]>)[] = [];
    if (!costingRebuild) {
      const quotes = diff('quotes');
      // Quotes are taken in place: a new one as a row of its own that its part's Demand cells read too, a price in
      // its cell, other terms (an expiry, a supersede, MOQ, pack, breaks) or a delete by writing its row again, or
      // blank (CostingWorkbook.addQuote and updateQuote, which refuse what the layout of the open cannot hold: the
      // workbook is then built again). New quotes go first, so a quote they supersede never leaves its part bare.
      if (quotes.added.length + quotes.removed.length + quotes.changed.length > QUOTES_IN_PLACE) costingRebuild = true;
      for (const q of quotes.added) edits.push(() => this.costing!.addQuote(q));
      for (const [a, b] of quotes.changed) {
        const p = priceEdits(a, b);
        if (!p) edits.push(() => this.costing!.updateQuote(b.id, b));
        else for (const e of p) edits.push(() => this.costing!.setQuotePrice(b.id, e.breakIndex, e.price));
      }
      for (const q of quotes.removed) edits.push(() => this.costing!.updateQuote(q.id, undefined));
      const s0 = prev.settings;
      const s1 = next.settings;
      if (s0 !== s1) {
        for (const k of Object.keys({ ...s0, ...s1 }) as (keyof Settings)[]) {
          if (QUIET_SETTINGS.has(k) || k === 'rates' || (LIVE_SETTINGS as readonly string[]).includes(k)) continue;
          if (JSON.stringify(s0[k]) !== JSON.stringify(s1[k])) costingRebuild = true;
        }
        for (const k of LIVE_SETTINGS) if (s0[k] !== s1[k]) edits.push(() => this.costing!.setCostSetting(k, s1[k]));
        const currencies = new Set([...Object.keys(s0.rates), ...Object.keys(s1.rates)]);
        for (const c of currencies) {
          const r = s1.rates[c];
          if (s0.rates[c] === r) continue;
          if (r === undefined) costingRebuild = true;
          else edits.push(() => this.costing!.setRate(c, r));
        }
      }
    }

    const changed: ChangedCost[] = [];
    if (!costingRebuild && moved.size > 0 && this.family) {
      // A few dozen variants at a time, each part evaluated on its own: the same cells in the end, as variants read
      // cells that others add and never change them.
      const lines = [...this.linesOf([...moved])];
      for (let i = 0; i < lines.length && !costingRebuild; i += VARIANTS_PER_RELINE) {
        yield;
        const r = this.costing!.relineVariants(new Map(lines.slice(i, i + VARIANTS_PER_RELINE)), next.buildLines);
        if (r.ok) changed.push(...r.value);
        else costingRebuild = true;
      }
    }
    if (!costingRebuild) {
      for (let i = 0; i < edits.length; i++) {
        // A part at a time when there are many (quotes written again, each worked out on its own).
        if (i > 0 && i % EDITS_PER_STEP === 0) yield;
        const r = edits[i]!();
        if (!r.ok) {
          // An edit the live workbook cannot take (a currency it does not hold): build it again instead.
          costingRebuild = true;
          break;
        }
        changed.push(...r.value);
      }
    }
    if (costingRebuild) {
      yield;
      this.openCosting(next);
      return this.rebuilt(familyTouched, checkVariants);
    }
    if (changed.length === 0 && !familyTouched && edits.length === 0 && moved.size === 0) return this.answer({ kind: SYNC_KINDS.same, changed, checks: false }, [], false);
    return this.answer({ kind: SYNC_KINDS.edited, changed, checks: familyTouched }, this.someCosts(changed), false, checkVariants);
  }

  /** Sets changed parameters in the family workbook; false when a parameter was removed (needs a rebuild). */
  private editParams(pairs: [Variant, Variant][]): boolean {
    const family = this.family!;
    for (const [a, b] of pairs) {
      for (const k of Object.keys(a.params)) if (!Object.hasOwn(b.params, k)) return false;
      for (const [k, v] of Object.entries(b.params)) {
        if (a.params[k] === v) continue;
        if (!family.setParam(b.id, k, v).ok) return false;
      }
    }
    return true;
  }
}

/** Variants (their check results and lines) and unit costs per message: small enough to copy in a few ms. */
export const VARIANTS_PER_PART = 20;
export const COSTS_PER_PART = 400;

/**
 * An update cut into parts that are each quick to copy, so the page never spends long on one message: the first part
 * says what to reset (`costsFull`, `checksFull`), the last carries the list of what changed; merged in order they
 * give the whole update.
 */
export function splitUpdate(u: FiguresUpdate, variantsPer = VARIANTS_PER_PART, costsPer = COSTS_PER_PART): FiguresUpdate[] {
  const parts = Math.max(1, Math.ceil(u.variants.length / variantsPer), Math.ceil(u.costs.length / costsPer));
  if (parts === 1) return [u];
  const out: FiguresUpdate[] = [];
  for (let i = 0; i < parts; i++) {
    const last = i === parts - 1;
    out.push({
      ...u,
      changed: last ? u.changed : [],
      costs: u.costs.slice(i * costsPer, (i + 1) * costsPer),
      costsFull: i === 0 && u.costsFull,
      variants: u.variants.slice(i * variantsPer, (i + 1) * variantsPer),
      checksFull: i === 0 && u.checksFull,
    });
  }
  return out;
}
