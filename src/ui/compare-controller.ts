// The work behind the Compare page: the chosen variants' figures with what-if edits tried on them (worked out by the
// figures worker on a private workbook of those variants, so neither switching to the page nor an edit holds up the
// page's thread), the text typed for each edit while it differs from the figure in use, and keeping the edits in
// the Book or discarding them. Views ask for figures as they draw; figures not held yet are asked of the worker
// together after the draw, and the previous figures show meanwhile. The host gets `data-figures="ready"` once every
// figure its views asked for is held.
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import type { Book, Quote, Variant } from '../domain/book.ts';
import type { CheckStatus } from '../domain/check-status.ts';
import type { CostedBom, Result } from '../domain/costing.ts';
import type { FamilyResolution } from '../engine/family.ts';
import type { WhatIfFigure, WhatIfWant } from '../engine/what-if.ts';
import type { BookController } from './book-context.ts';
import { emptyWhatIf, keepWhatIf, readRunSizes, whatIfCount } from './build-costing.ts';
import type { WhatIf } from './build-costing.ts';
import { CostingService } from './costing-service.ts';
import type { FieldProblems } from './record-forms.ts';

/** Why a figure is not shown yet. */
const WORKING = 'being worked out';

/** A figure, or NaN with why it cannot be had. */
export type Figure = { value: number; problem?: string };

/** A what-if set as a key: the same edits give the same key. */
function whatIfKey(w: WhatIf): string {
  const sorted = (m: Map<string, number>) => [...m].sort((a, b) => (a[0] < b[0] ? -1 : 1));
  return JSON.stringify([sorted(w.prices), sorted(w.rates), sorted(w.settings)]);
}

const figureKey = (variantId: string, run: number): string => `${variantId}\u0000${run}`;

export class CompareController implements ReactiveController {
  whatIf: WhatIf = emptyWhatIf();
  /** Text typed in what-if fields, by field key, while it differs from the figure in use. */
  wiText = new Map<string, string>();
  wiProblems: FieldProblems = {};
  keepError = '';
  /** Moves on every change of a figure, so views given this controller know to draw again. */
  revision = 0;

  /** Figures held for the Book, chosen variants and what-if edits of `key`; the previous set shows meanwhile. */
  private figures = new Map<string, WhatIfFigure>();
  private stale = new Map<string, WhatIfFigure>();
  private key = '';
  private chosen: string[] = [];
  /** Figures asked for in this draw and not held; asked of the worker together after the draw. */
  private wants = new Map<string, WhatIfWant>();
  private asking = false;
  private frame = 0;

  constructor(
    private readonly host: ReactiveControllerHost,
    private readonly books: BookController,
    /** False while the host has views still to draw (it draws them a task apart): their figures are not asked yet. */
    private readonly drawnAll: () => boolean = () => true,
  ) {
    host.addController(this);
  }

  hostDisconnected(): void {
    if (this.frame !== 0) cancelAnimationFrame(this.frame);
    this.frame = 0;
  }

  hostUpdated(): void {
    // Once this draw (and the views' draws it started) is done: ask for what was missing, or say all is shown.
    if (this.frame === 0) this.frame = requestAnimationFrame(() => this.afterDraw());
  }

  /** Starts a new set of figures when the Book's figures, the chosen variants or the what-if edits have changed. */
  sync(chosen: readonly string[]): void {
    const costing = CostingService.for(this.books.service!);
    costing.sync();
    const key = `${costing.version}\u0000${chosen.join('\u0001')}\u0000${whatIfKey(this.whatIf)}`;
    if (key === this.key) return;
    if (this.figures.size > 0) this.stale = this.figures;
    this.figures = new Map();
    this.wants = new Map();
    this.key = key;
    this.chosen = [...chosen];
  }

  /** True while no figure at all can be shown yet. */
  get working(): boolean {
    return this.figures.size === 0 && this.stale.size === 0 && (this.asking || this.wants.size > 0);
  }

  /** A figure held for now, the previous one meanwhile, or being worked out (and asked for). */
  private figure(variantId: string, run: number, bom: boolean): WhatIfFigure {
    const k = figureKey(variantId, run);
    const held = this.figures.get(k);
    if (held && (!bom || held.bom)) return held;
    const want = this.wants.get(k);
    this.wants.set(k, { variantId, run, bom: bom || (want?.bom ?? false) });
    // A view may draw on its own (its run size changed): ask after that draw too.
    if (this.frame === 0) this.frame = requestAnimationFrame(() => this.afterDraw());
    const old = this.stale.get(k);
    if (old && (!bom || old.bom)) return old;
    return { variantId, run, value: NaN, problem: WORKING };
  }

  private afterDraw(): void {
    this.frame = 0;
    const host = this.host as unknown as HTMLElement;
    const ready = this.drawnAll() && this.wants.size === 0 && !this.asking && !CostingService.for(this.books.service!).pending;
    if (ready) host.setAttribute?.('data-figures', 'ready');
    else host.removeAttribute?.('data-figures');
    if (this.wants.size > 0 && !this.asking) void this.ask();
  }

  /** Asks the worker for the figures wanted; draws again when they arrive. */
  private async ask(): Promise<void> {
    const key = this.key;
    const wants = [...this.wants.values()];
    this.wants = new Map();
    this.asking = true;
    try {
      const answer = await CostingService.for(this.books.service!).whatIf({ chosen: this.chosen, whatIf: this.whatIf, wants });
      if (key !== this.key) return;
      for (const f of answer.figures) this.figures.set(figureKey(f.variantId, f.run), f);
      if (answer.refused.length > 0) this.refuse(answer.refused);
      // Held in full: the previous figures are not needed any more.
      this.stale = new Map();
    } catch (e) {
      if (key !== this.key) return;
      const problem = e instanceof Error ? e.message : String(e);
      for (const w of wants) this.figures.set(figureKey(w.variantId, w.run), { variantId: w.variantId, run: w.run, value: NaN, problem, bom: { ok: false, error: problem } });
    } finally {
      this.asking = false;
      this.changed();
    }
  }

  /** Edits the workbook refused: shown beside their fields and taken out of the what-if edits. */
  private refuse(refused: readonly { field: string; error: string }[]): void {
    const problems = { ...this.wiProblems };
    const w: WhatIf = { prices: new Map(this.whatIf.prices), rates: new Map(this.whatIf.rates), settings: new Map(this.whatIf.settings), runSizes: this.whatIf.runSizes };
    for (const { field, error } of refused) {
      problems[field] = error;
      if (field.startsWith('price:')) w.prices.delete(field.slice('price:'.length));
      else if (field.startsWith('rate:')) w.rates.delete(field.slice('rate:'.length));
      else w.settings.delete(field as never);
    }
    this.wiProblems = problems;
    this.whatIf = w;
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

  /** A variant's unit cost at a run size, with the what-if edits. */
  unitCost(variantId: string, run: number): Figure {
    const f = this.figure(variantId, run, false);
    return f.problem === undefined ? { value: f.value } : { value: f.value, problem: f.problem };
  }

  /** The costed BOM, or why it is incomplete (a cost that leaves lines out is not a cost). */
  bom(variantId: string, run: number): Result<CostedBom> {
    return this.figure(variantId, run, true).bom ?? { ok: false, error: WORKING };
  }

  /** Quotes of the parts the chosen variants buy, by part. */
  quotesInUse(book: Book, chosen: Variant[]): Quote[] {
    const lines = new Map(this.family.variants.map((v) => [v.variantId, v.lines] as const));
    const parts = new Set<string>();
    for (const v of chosen) for (const l of lines.get(v.id) ?? []) if (l.applies && l.qtyPerUnit > 0 && l.partId !== undefined) parts.add(l.partId);
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
   * Records an edit as what-if, or drops it from the list when the value is the Book's own again. The worker tries it
   * on its workbook with the engine's own setter; one it refuses is shown beside its field and taken out again.
   */
  applyEdit(set: (w: WhatIf) => void, drop: (w: WhatIf) => void, same: boolean): string | undefined {
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
  }

  private clear(): void {
    this.whatIf = emptyWhatIf();
    this.wiText = new Map();
    this.wiProblems = {};
    this.keepError = '';
    this.changed();
  }

  private changed(): void {
    // Not ready until the next draw has asked for (and been given) every figure it shows.
    (this.host as unknown as HTMLElement).removeAttribute?.('data-figures');
    this.revision++;
    this.host.requestUpdate();
  }
}
