// The open Book's live figures, shared by every page: each variant's check results (worst status) and unit cost at
// every run size, from one family workbook and one costing workbook kept in step with the Book as it changes.
//
// Pages get it with `CostingService.for(bookService)` and read through it; every read first catches up with the Book
// (lazily, so a page that shows no costs never pays for them). Catching up edits the workbooks in place where the
// engine allows it — a quote price, an exchange rate, a cost setting, a variant parameter whose build lines resolve as
// before — and rebuilds them on structural changes (variants added or deleted, parts, build lines, suppliers, run
// sizes, quote terms other than prices). After each catch-up that changed figures it emits `change` with a
// `CostingChangeDetail`; `version` rises with every such change, so a page can tell whether its rows are stale.
import type { Book, CollectionName, Quote, Settings, Variant } from '../domain/book.ts';
import { CHECK_STATUS, worstOf } from '../domain/check-status.ts';
import type { CheckStatus } from '../domain/check-status.ts';
import type { CostedBom, Result } from '../domain/costing.ts';
import { CostingWorkbook, resolutionFromFamily } from '../engine/costing.ts';
import type { ChangedCost } from '../engine/costing.ts';
import { FamilyWorkbook } from '../engine/family.ts';
import type { CheckResult, FamilyResolution } from '../engine/family.ts';

/** How the last catch-up brought the figures up to date. */
export const SYNC_KINDS = {
  /** Nothing that figures depend on changed. */
  same: 'same',
  /** Workbooks edited in place; `changed` lists the unit costs that moved. */
  edited: 'edited',
  /** Workbooks built again from the Book. */
  rebuilt: 'rebuilt',
} as const;
export type SyncKind = (typeof SYNC_KINDS)[keyof typeof SYNC_KINDS];

export interface CostingChangeDetail {
  kind: SyncKind;
  /** Unit costs that changed (edited), or every one (rebuilt). */
  changed: readonly ChangedCost[];
  /** Check results were evaluated again. */
  checks: boolean;
}

/** Cost settings the costing workbook takes live. */
const LIVE_SETTINGS = ['labourRatePerHour', 'labourMinutesPerUnit', 'labourMinutesPerPlacement', 'testCostPerUnit', 'overheadPct', 'marginPct'] as const;
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
      if (o.rev !== r.rev || o !== r) {
        if (o.rev !== r.rev || JSON.stringify(o) !== JSON.stringify(r)) out.changed.push([o, r]);
      }
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

/** Where the service reads the open Book: the app's BookService, or any holder of a Book (tests, the CLI's twin). */
export interface BookSource {
  readonly book: Book;
}

const services = new WeakMap<BookSource, CostingService>();

export class CostingService extends EventTarget {
  /** Rises with every change of figures; pages compare it with the version they last drew. */
  version = 0;
  private book: Book | undefined;
  private family: FamilyWorkbook | undefined;
  private costing: CostingWorkbook | undefined;
  private costingError: string | undefined;
  private familyError: string | undefined;
  private results = new Map<string, CheckResult[]>();
  private worst = new Map<string, CheckStatus>();
  /** Each variant's resolved lines as JSON, to tell whether a parameter edit changed what it is built from. */
  private lineKeys = new Map<string, string>();

  private constructor(private readonly books: BookSource) {
    super();
  }

  /** The one costing service of an open Book (made on first use); pass the app's BookService. */
  static for(books: BookSource): CostingService {
    let s = services.get(books);
    if (!s) {
      s = new CostingService(books);
      services.set(books, s);
    }
    return s;
  }

  /**
   * True while the Book has changed since the figures were last brought up to date. Reading any figure catches up
   * first (which may take a while for a large family after a structural change); a page may call `sync()` after its
   * first paint instead and show its previous figures meanwhile.
   */
  get pending(): boolean {
    return this.book !== this.books.book;
  }

  /** The Book's run sizes as costed (the columns of every cost table). */
  get runSizes(): readonly number[] {
    this.sync();
    return this.costing?.runSizes ?? this.books.book.settings.runSizes;
  }

  get currency(): string {
    return this.books.book.settings.baseCurrency;
  }

  /** Why no unit cost can be computed at all (bad settings, no run sizes), or undefined. */
  get problem(): string | undefined {
    this.sync();
    return this.costingError;
  }

  /** Unit cost of a variant at one of the run sizes, in the base currency; NaN when it cannot be computed. */
  unitCost(variantId: string, run: number): number {
    this.sync();
    return this.costing ? this.costing.unitCost(variantId, run) : NaN;
  }

  /** Why a unit cost cannot be computed, or undefined when it can. */
  costProblem(variantId: string, run: number): string | undefined {
    this.sync();
    if (!this.costing) return this.costingError ?? 'costs are not available';
    return this.costing.problem(variantId, 'unitCost', run);
  }

  /** The costed BOM of a variant for any run size, with the Book's live prices and rates. */
  costedBom(variantId: string, run: number): Result<CostedBom> {
    this.sync();
    if (!this.costing) return { ok: false, error: this.costingError ?? 'costs are not available' };
    return this.costing.costedBom(variantId, run);
  }

  /** Worst status of a variant's checks (`n/a` when none apply; `error` when the checks could not be evaluated). */
  worstStatus(variantId: string): CheckStatus {
    this.sync();
    if (this.familyError !== undefined) return CHECK_STATUS.error;
    return this.worst.get(variantId) ?? CHECK_STATUS.na;
  }

  /** A variant's check results, in the order of the Book's checks. */
  checkResults(variantId: string): readonly CheckResult[] {
    this.sync();
    return this.results.get(variantId) ?? [];
  }

  /** Why the checks could not be evaluated, or undefined. */
  get checksProblem(): string | undefined {
    this.sync();
    return this.familyError;
  }

  /** Every variant's resolved build lines (what each one is built from). */
  resolution(): FamilyResolution {
    this.sync();
    return this.family?.resolve() ?? { variants: [], problems: [] };
  }

  /**
   * A private costing workbook of the Book as it is now, for what-if edits that must not reach other pages (the
   * caller edits it freely and must `close()` it). Shares nothing with the live workbook.
   */
  scratch(options: { date?: string } = {}): Result<CostingWorkbook> {
    this.sync();
    if (!this.family) return { ok: false, error: this.costingError ?? 'the build lines could not be resolved' };
    return CostingWorkbook.open(this.books.book, resolutionFromFamily(this.family.resolve()), options);
  }

  /** Frees both workbooks; the next read builds them again. */
  dispose(): void {
    this.family?.close();
    this.costing?.close();
    this.family = undefined;
    this.costing = undefined;
    this.book = undefined;
  }

  /** Catches up with the Book now; returns how. Reads call this themselves. */
  sync(): CostingChangeDetail {
    const next = this.books.book;
    const prev = this.book;
    if (prev === next) return { kind: SYNC_KINDS.same, changed: [], checks: false };
    this.book = next;
    const detail = prev && this.family && this.costing ? this.catchUp(prev, next) : this.rebuildAll(next);
    if (detail.kind !== SYNC_KINDS.same) {
      this.version += 1;
      this.dispatchEvent(new CustomEvent<CostingChangeDetail>('change', { detail }));
    }
    return detail;
  }

  private rebuildAll(book: Book): CostingChangeDetail {
    this.openFamily(book);
    this.openCosting(book);
    return this.rebuilt(true);
  }

  private rebuilt(checks: boolean): CostingChangeDetail {
    const changed: ChangedCost[] = [];
    for (const v of this.book?.variants ?? []) for (const run of this.costing?.runSizes ?? []) changed.push({ variantId: v.id, run });
    return { kind: SYNC_KINDS.rebuilt, changed, checks };
  }

  private openFamily(book: Book): void {
    this.family?.close();
    this.family = undefined;
    this.familyError = undefined;
    try {
      this.family = FamilyWorkbook.open(book);
    } catch (e) {
      this.familyError = `the checks could not be evaluated: ${e instanceof Error ? e.message : String(e)}`;
    }
    this.readChecks();
  }

  private readChecks(): void {
    this.results = new Map();
    this.worst = new Map();
    this.lineKeys = new Map();
    if (!this.family) return;
    for (const r of this.family.results()) {
      const list = this.results.get(r.variantId);
      if (list) list.push(r);
      else this.results.set(r.variantId, [r]);
    }
    for (const [id, list] of this.results) this.worst.set(id, worstOf(list.map((r) => r.status)));
    for (const v of this.family.resolve().variants) this.lineKeys.set(v.variantId, JSON.stringify(v.lines));
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
  private catchUp(prev: Book, next: Book): CostingChangeDetail {
    const diff = <C extends CollectionName>(c: C) => diffRecords<Book[C][number]>(prev[c], next[c]);
    const variants = diff('variants');
    const checks = diff('checks');
    const structural = !empty(diff('parts')) || !empty(diff('buildLines')) || !empty(diff('suppliers'));
    const familyRebuild = structural || !empty(checks) || variants.added.length > 0 || variants.removed.length > 0;

    let familyTouched = familyRebuild;
    let costingRebuild = structural || variants.added.length > 0 || variants.removed.length > 0;
    const oldKeys = this.lineKeys;
    if (familyRebuild) {
      this.openFamily(next);
    } else if (variants.changed.length > 0) {
      familyTouched = true;
      if (!this.editParams(variants.changed)) {
        this.openFamily(next);
        costingRebuild = true;
      } else {
        this.readChecks();
        for (const [, v] of variants.changed) if (oldKeys.get(v.id) !== this.lineKeys.get(v.id)) costingRebuild = true;
      }
      // The costed BOM names the variant by its code, which the costing workbook copied at open.
      if (variants.changed.some(([a, b]) => a.code !== b.code)) costingRebuild = true;
    }
    if (familyRebuild && !costingRebuild) {
      // New checks alone do not change what a variant is built from, but parameters saved with them may.
      for (const v of next.variants) if (oldKeys.get(v.id) !== this.lineKeys.get(v.id)) costingRebuild = true;
      if (variants.changed.some(([a, b]) => a.code !== b.code)) costingRebuild = true;
    }

    const edits: (() => Result<ChangedCost[]>)[] = [];
    if (!costingRebuild) {
      const quotes = diff('quotes');
      if (quotes.added.length || quotes.removed.length) costingRebuild = true;
      for (const [a, b] of quotes.changed) {
        const p = priceEdits(a, b);
        if (!p) costingRebuild = true;
        else for (const e of p) edits.push(() => this.costing!.setQuotePrice(b.id, e.breakIndex, e.price));
      }
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
    if (!costingRebuild) {
      for (const edit of edits) {
        const r = edit();
        if (!r.ok) {
          // An edit the live workbook cannot take (a currency it does not hold): build it again instead.
          costingRebuild = true;
          break;
        }
        changed.push(...r.value);
      }
    }
    if (costingRebuild) {
      this.openCosting(next);
      return this.rebuilt(familyTouched);
    }
    if (changed.length === 0 && !familyTouched && edits.length === 0) return { kind: SYNC_KINDS.same, changed, checks: false };
    return { kind: SYNC_KINDS.edited, changed, checks: familyTouched };
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
