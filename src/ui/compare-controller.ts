// The work behind the Compare page: a private scratch costing workbook of the chosen variants, the what-if edits
// tried on it (with the text typed for each while it differs from the figure in use), the figures every view reads
// from it, and keeping the edits in the Book or discarding them. The scratch holds only the chosen variants and the
// quotes of the parts they buy, so it opens in a moment on the page's thread however large the family; what each
// variant is built from comes from the live figures (worked out in the figures worker).
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import type { Book, Quote, Variant } from '../domain/book.ts';
import type { CheckStatus } from '../domain/check-status.ts';
import type { CostedBom, Result } from '../domain/costing.ts';
import { CostingWorkbook } from '../engine/costing.ts';
import type { FamilyResolution } from '../engine/family.ts';
import type { BookController } from './book-context.ts';
import { applyWhatIf, emptyWhatIf, keepWhatIf, readRunSizes, whatIfCount } from './build-costing.ts';
import type { WhatIf } from './build-costing.ts';
import { CostingService } from './costing-service.ts';
import type { FieldProblems } from './record-forms.ts';

/** Why the scratch is not open yet: what each variant is built from is still being worked out. */
const WORKING = 'being worked out';

/** A figure, or NaN with why it cannot be had. */
export type Figure = { value: number; problem?: string };

export class CompareController implements ReactiveController {
  whatIf: WhatIf = emptyWhatIf();
  /** Text typed in what-if fields, by field key, while it differs from the figure in use. */
  wiText = new Map<string, string>();
  wiProblems: FieldProblems = {};
  keepError = '';
  /** Moves on every change of a figure, so views given this controller know to draw again. */
  revision = 0;

  private scratch: Result<CostingWorkbook> | undefined;
  private scratchBook: Book | undefined;
  /** The chosen variants and the live figures' version the scratch was opened with. */
  private scratchKey = '';
  /** Quotes the scratch holds (what-if prices of other quotes cannot move the chosen variants). */
  private scratchQuotes = new Set<string>();

  constructor(
    private readonly host: ReactiveControllerHost,
    private readonly books: BookController,
  ) {
    host.addController(this);
  }

  hostDisconnected(): void {
    this.closeScratch();
  }

  /** Opens the scratch workbook again when the Book, the chosen variants or the live figures have changed. */
  sync(book: Book, chosen: readonly string[]): void {
    const costing = CostingService.for(this.books.service!);
    costing.sync();
    const key = `${costing.version}\u0000${chosen.join('\u0001')}`;
    if (book !== this.scratchBook || key !== this.scratchKey) this.openScratch(book, chosen, key);
  }

  private closeScratch(): void {
    if (this.scratch?.ok) this.scratch.value.close();
    this.scratch = undefined;
    this.scratchBook = undefined;
    this.scratchKey = '';
  }

  /** A private workbook of the chosen variants as the Book has them now, with the what-if edits tried on it again. */
  private openScratch(book: Book, chosen: readonly string[], key: string): void {
    const costing = CostingService.for(this.books.service!);
    this.closeScratch();
    this.scratchBook = book;
    this.scratchKey = key;
    this.revision++;
    if (costing.pending) {
      this.scratch = { ok: false, error: WORKING };
      return;
    }
    const lines = new Map(costing.resolution().variants.map((v) => [v.variantId, v.lines] as const));
    const ids = new Set(chosen);
    const variants = book.variants.filter((v) => ids.has(v.id) && lines.has(v.id));
    const parts = new Set<string>();
    for (const v of variants) for (const l of lines.get(v.id)!) if (l.partId !== undefined) parts.add(l.partId);
    const quotes = book.quotes.filter((q) => parts.has(q.partId));
    this.scratchQuotes = new Set(quotes.map((q) => q.id));
    this.scratch = CostingWorkbook.open({ ...book, variants, quotes }, new Map(variants.map((v) => [v.id, lines.get(v.id)!] as const)));
    if (this.scratch.ok) {
      const errors = applyWhatIf(this.scratch.value, this.whatIf, (quoteId) => this.scratchQuotes.has(quoteId));
      if (errors.length > 0) this.keepError = `Some what-if edits no longer fit the Book and were not applied: ${errors.join('; ')}`;
    }
  }

  /** True while the live figures the scratch is opened from are still being worked out. */
  get working(): boolean {
    return this.scratch?.ok === false && this.scratch.error === WORKING;
  }

  runSizes(book: Book): number[] {
    return this.whatIf.runSizes ?? book.settings.runSizes;
  }

  /** The worst of a variant's checks, from the Book's own costing (what-if edits do not move checks). */
  worstStatus(variantId: string): CheckStatus {
    return CostingService.for(this.books.service!).worstStatus(variantId);
  }

  get family(): FamilyResolution {
    return CostingService.for(this.books.service!).resolution();
  }

  /** A variant's unit cost at a run size from the scratch workbook (a cell for the Book's run sizes). */
  unitCost(variantId: string, run: number): Figure {
    const wb = this.scratch;
    if (!wb) return { value: NaN, problem: 'costs are not available' };
    if (!wb.ok) return { value: NaN, problem: wb.error };
    if (wb.value.runSizes.includes(run)) {
      const value = wb.value.unitCost(variantId, run);
      const f: Figure = { value };
      if (!Number.isFinite(value)) f.problem = wb.value.problem(variantId, 'unitCost', run) ?? 'cannot be computed';
      return f;
    }
    const bom = this.bom(variantId, run);
    if (!bom.ok) return { value: NaN, problem: bom.error };
    return { value: bom.value.unitCost };
  }

  /** The costed BOM, or why it is incomplete (a cost that leaves lines out is not a cost). */
  bom(variantId: string, run: number): Result<CostedBom> {
    const wb = this.scratch;
    if (!wb) return { ok: false, error: 'costs are not available' };
    if (!wb.ok) return wb;
    const r = wb.value.costedBom(variantId, run);
    if (r.ok && !r.value.complete) {
      const p = r.value.problems[0]!;
      return { ok: false, error: `${p.designators || p.lineId || ''}: ${p.message}` };
    }
    return r;
  }

  /** Quotes of the parts the chosen variants buy at a run size, by part. */
  quotesInUse(book: Book, chosen: Variant[], run: number): Quote[] {
    const parts = new Set<string>();
    for (const v of chosen) {
      const r = this.scratch?.ok ? this.scratch.value.costedBom(v.id, run) : undefined;
      if (r?.ok) for (const l of r.value.lines) parts.add(l.partId);
    }
    const mpn = new Map(book.parts.map((p) => [p.id, p.mpn] as const));
    return book.quotes
      .filter((q) => parts.has(q.partId) && q.supersededBy === undefined)
      .sort((a, b) => (mpn.get(a.partId) ?? '').localeCompare(mpn.get(b.partId) ?? '') || a.supplierCode.localeCompare(b.supplierCode));
  }

  /** Reads a typed number; a bad one is shown beside its field and changes nothing. */
  tryNumber(key: string, text: string, current: number, apply: (n: number) => string | undefined): void {
    const wiText = new Map(this.wiText);
    wiText.set(key, text);
    this.wiText = wiText;
    const t = text.trim().replace(/\s*%$/, '');
    const n = t === '' ? NaN : Number(t);
    const problems = { ...this.wiProblems };
    delete problems[key];
    const error = Number.isFinite(n) ? apply(n) : `a number, for example ${current}`;
    if (error) problems[key] = error;
    this.wiProblems = problems;
    this.changed();
  }

  /**
   * Tries an edit on the scratch workbook (the engine's own setter checks it; a refused edit changes nothing) and
   * records it as what-if, or drops it from the list when the value is the Book's own again.
   */
  applyEdit(edit: (wb: CostingWorkbook) => Result<unknown>, set: (w: WhatIf) => void, drop: (w: WhatIf) => void, same: boolean): string | undefined {
    const wb = this.scratch;
    if (!wb?.ok) return wb ? wb.error : 'costs are not available';
    const r = edit(wb.value);
    if (!r.ok) return r.error;
    const w: WhatIf = {
      prices: new Map(this.whatIf.prices),
      rates: new Map(this.whatIf.rates),
      settings: new Map(this.whatIf.settings),
      runSizes: this.whatIf.runSizes,
    };
    if (same) drop(w);
    else set(w);
    this.whatIf = w;
    this.keepError = '';
    this.changed();
    return undefined;
  }

  tryRuns(book: Book, text: string): void {
    const wiText = new Map(this.wiText);
    wiText.set('runs', text);
    this.wiText = wiText;
    const problems = { ...this.wiProblems };
    delete problems.runs;
    const r = readRunSizes(text);
    if (!r.ok) problems.runs = r.error;
    else {
      const same = r.value.join(',') === book.settings.runSizes.join(',');
      this.whatIf = { ...this.whatIf, runSizes: same ? undefined : r.value };
    }
    this.wiProblems = problems;
    this.changed();
  }

  /** Saves the what-if edits in the Book; gives how many were kept, or undefined when the save was refused. */
  async keep(): Promise<number | undefined> {
    const service = this.books.service;
    const book = this.books.book;
    if (!service || !book) return undefined;
    const change = keepWhatIf(book, this.whatIf);
    const result = await service.save(change);
    if (!result.ok) {
      this.keepError = `Nothing was kept: ${result.message}`;
      this.changed();
      return undefined;
    }
    const n = whatIfCount(this.whatIf);
    this.clear();
    return n;
  }

  discard(): void {
    this.clear();
    // The next draw opens the scratch again without the edits.
    this.closeScratch();
  }

  private clear(): void {
    this.whatIf = emptyWhatIf();
    this.wiText = new Map();
    this.wiProblems = {};
    this.keepError = '';
    this.changed();
  }

  private changed(): void {
    this.revision++;
    this.host.requestUpdate();
  }
}
