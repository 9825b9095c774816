// The open Book's live figures, shared by every page: each variant's check results (worst status), resolved build
// lines and unit cost at every run size. The engines (one family workbook, one costing workbook, src/engine/figures.ts)
// run in a Web Worker, so building them for a large family or recomputing after an edit never holds up the page;
// where no Worker exists (Node: tests, tools) the same code runs in-process and every read is up to date at once.
//
// Pages get it with `CostingService.for(bookService)` and read through it synchronously. Every read first makes sure
// the worker is catching up with the Book (a Book nobody has asked figures of costs nothing; once asked, the worker
// follows every change) and answers from the figures held: while `pending`, those are the previous Book's. The worker is sent the Book once, then only
// what changed; when its answer arrives the service emits `change` with a `CostingChangeDetail`, and `version` rises,
// so a page can tell whether its rows are stale and draw again.
//
// A small save is sent ahead: while the Book service writes it to IndexedDB, the worker already works out the Book it
// will give (BookService.proposed). That answer is held back until the Book is that Book, then shown in the same task
// with no second request; a save refused or merged with another tab's change sends the worker the Book as it is. A
// Book that replaced the one open (a file opened, the demo Book) is drawn first: its figures wait for the page's idle
// time (waitsForIdle).
import type { Book, BuildLine } from '../domain/book.ts';
import { COLLECTIONS } from '../domain/book.ts';
import { bookDelta } from '../domain/book-ops.ts';
import { CHECK_STATUS, worstOf } from '../domain/check-status.ts';
import type { CheckStatus } from '../domain/check-status.ts';
import { SYNC_KINDS } from '../engine/figures-kinds.ts';
import type { CostingChangeDetail, FiguresUpdate, UnitCostFigure } from '../engine/figures-kinds.ts';
import type { LiveFigures } from '../engine/figures.ts';
import { HOLD_MAX_MS, stageQuotes, takesLong } from '../engine/figures-protocol.ts';
import type { FiguresMessage, FiguresRequest, WhatIfRequest } from '../engine/figures-protocol.ts';
import type { LineOutcome } from '../engine/line-trial.ts';
import type { WhatIfAnswer, WhatIfCosts } from '../engine/what-if.ts';
import type { CheckTrialAnswer, CheckTrialRequest, CheckTrials } from '../engine/check-trial.ts';
import type { CheckResult, FamilyResolution, VariantResolution } from '../engine/family.ts';
import { hasIdleTime, onIdle } from '../domain/slices.ts';

export { SYNC_KINDS } from '../engine/figures-kinds.ts';
export type { CostingChangeDetail, SyncKind } from '../engine/figures-kinds.ts';

/** The longest a replaced Book's figures wait for the page to be idle before the worker starts on them (ms). */
export const REPLACED_WAIT_MS = 500;

/**
 * The longest a question to the worker (a what-if, a line or check tried) waits for its answer, in ms: the Build and
 * Checks pages' saves wait on their trials, and a worker that never answers must not keep them saving for ever. Far
 * above the longest wait seen: a trial queued behind the figures of a 30 MB Book just opened (7–12 s in all).
 */
export const ASK_LIMIT_MS = 60_000;

/**
 * The engines, for running in this thread where there are no Web Workers (Node: tests, the command line's twin of
 * the app). The page has workers and never loads them here: its first view parses no formula engine.
 */
const inProcess = typeof Worker === 'function' ? undefined : await import('./costing-in-process.ts');

function engines(): NonNullable<typeof inProcess> {
  if (!inProcess) throw new Error('the figures are worked out in a worker here; no in-process engine was loaded');
  return inProcess;
}

/** Where the service reads the open Book: the app's BookService, or any holder of a Book (tests, the CLI's twin). */
export interface BookSource {
  readonly book: Book;
  /**
   * The Book a save under way will give once stored (BookService.proposed): the worker starts on it ahead, and its
   * figures are held back until `book` is that very Book.
   */
  readonly proposed?: Book | undefined;
  /** Counts the times the whole Book was replaced (BookService.replacements): work on a replaced Book is dropped. */
  readonly replacements?: number;
}

/** The slice of the Worker interface the service uses, so tests can stand in for the worker. */
export interface FiguresWorkerLike {
  onmessage: ((e: MessageEvent<FiguresMessage>) => void) | null;
  onerror: ((e: ErrorEvent) => void) | null;
  postMessage(message: FiguresRequest): void;
  terminate(): void;
}

/**
 * The build of the engines that work figures out, for figures kept between starts (figures-keep.ts): in a production
 * build the file name of this module's chunk, which the build names after its content, the figures worker's file name
 * included. Undefined elsewhere: a development server serves changed code under the same name.
 */
export const ENGINE_BUILD: string | undefined = import.meta.env?.PROD ? import.meta.url.slice(import.meta.url.lastIndexOf('/') + 1) : undefined;

function startWorker(): FiguresWorkerLike {
  return new Worker(new URL('../engine/figures-worker.ts', import.meta.url), { type: 'module' }) as unknown as FiguresWorkerLike;
}

/** How new services run the engines: in a Web Worker where the platform has them, else in-process. */
let workerFactory: (() => FiguresWorkerLike) | undefined = typeof Worker === 'function' ? startWorker : undefined;

/** Sets how services made from now on run the engines (undefined: in-process). For tests. */
export function setFiguresWorker(factory: (() => FiguresWorkerLike) | undefined): void {
  workerFactory = factory;
  spare = undefined;
}

/** A worker started ahead of need, which the first service to want one takes. */
let spare: FiguresWorkerLike | undefined;

/**
 * Starts the figures worker now, so that its code loads and its formula engine warms up while the page is still
 * opening the Book: the first figures then come without that wait. Does nothing where workers are not used.
 */
export function warmFiguresWorker(): void {
  if (spare || !workerFactory) return;
  try {
    spare = workerFactory();
  } catch {
    // The service will try again when it needs the worker, and say why if it still cannot start.
  }
}

const services = new WeakMap<BookSource, CostingService>();

const SAME: CostingChangeDetail = { kind: SYNC_KINDS.same, changed: [], checks: false };
const PENDING: CostingChangeDetail = { kind: SYNC_KINDS.pending, changed: [], checks: false };

export class CostingService extends EventTarget {
  /** Rises with every change of figures; pages compare it with the version they last drew. */
  version = 0;
  /** The Book the held figures are of. */
  private shown: Book | undefined;
  /** In worker mode: the Book last sent, whether an answer is awaited, and the sequence number of the last request. */
  private sent: Book | undefined;
  private inFlight = false;
  private seq = 0;
  /** True while the figures held were seeded and the worker has not been sent the Book yet (see `seed`). */
  private seededOnly = false;
  /** The Book's replacement count when it was last sent (see BookSource.replacements). */
  private sentReplacements: number | undefined;
  /** The Book replacement whose figures wait for the page's idle time, and the last one that waited (waitsForIdle). */
  private idleAwaited: number | undefined;
  private idleCame: number | undefined;
  /** True while the Book last sent is a save's proposed Book that has not become the Book yet. */
  private sentAhead = false;
  /** The answer for a proposed Book, held back (not merged) until the Book is that Book. */
  private heldBack: FiguresUpdate[] = [];
  private worker: FiguresWorkerLike | undefined;
  /** Holds asked of the worker so far: each hold's id, which its go names (holdWhileDrawing). */
  private holdsAsked = 0;
  private local: LiveFigures | undefined;
  private localWhatIfs: WhatIfCosts | undefined;
  private localCheckTrials: CheckTrials | undefined;
  /** Questions sent to the worker and not yet answered, by id. */
  private readonly asked = new Map<number, { resolve: (a: never) => void; reject: (e: Error) => void }>();
  private nextAsk = 0;
  private readonly makeWorker: (() => FiguresWorkerLike) | undefined;

  private runSizesHeld: number[] = [];
  private costingError: string | undefined;
  private familyError: string | undefined;
  /** Unit costs by variant, in the order of `runSizesHeld`; problems by variant and run. */
  private costs = new Map<string, number[]>();
  private problems = new Map<string, string>();
  private results = new Map<string, CheckResult[]>();
  private worst = new Map<string, CheckStatus>();
  private lines = new Map<string, VariantResolution>();

  private constructor(private readonly books: BookSource) {
    super();
    this.makeWorker = workerFactory;
    // Once figures have been asked for, the worker follows every change of the Book at once, off the page's thread,
    // so a page that shows figures later (the Family page after a price edit on the Quotes page) finds them ready.
    if (books instanceof EventTarget) {
      books.addEventListener('change', () => this.worker && this.send());
      // A save under way: the worker starts on the Book it will give while the store writes it.
      books.addEventListener('proposed', () => this.worker && this.send());
    }
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
   * True while the figures held are not yet those of the Book as it is now (the worker is working them out). Reads
   * answer from the previous Book's figures meanwhile; a `change` event follows when the new ones arrive.
   */
  get pending(): boolean {
    return this.shown !== this.books.book;
  }

  /** True until the first figures of any Book have arrived. */
  get empty(): boolean {
    return this.shown === undefined;
  }

  /** The run sizes as costed (the columns of every cost table). */
  get runSizes(): readonly number[] {
    this.sync();
    return this.shown ? this.runSizesHeld : this.books.book.settings.runSizes;
  }

  get currency(): string {
    return this.books.book.settings.baseCurrency;
  }

  /** Why no unit cost can be computed at all (bad settings, no run sizes), or undefined. */
  get problem(): string | undefined {
    this.sync();
    return this.costingError;
  }

  /** Unit cost of a variant at one of the run sizes, in the base currency; NaN when it cannot be computed (yet). */
  unitCost(variantId: string, run: number): number {
    this.sync();
    const k = this.runSizesHeld.indexOf(run);
    return k < 0 ? NaN : (this.costs.get(variantId)?.[k] ?? NaN);
  }

  /** Why a unit cost cannot be computed, or undefined when it can. */
  costProblem(variantId: string, run: number): string | undefined {
    this.sync();
    if (this.costingError !== undefined) return this.costingError;
    if (!this.shown) return 'being worked out';
    const k = this.runSizesHeld.indexOf(run);
    if (k < 0) return `run size ${run} is not one of the Book's run sizes (${this.runSizesHeld.join(', ')})`;
    const value = this.costs.get(variantId)?.[k];
    if (value === undefined) return this.pending ? 'being worked out' : `no variant with id ${variantId}`;
    return Number.isFinite(value) ? undefined : (this.problems.get(`${variantId}\u0000${run}`) ?? 'cannot be computed');
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

  /** Every variant's resolved build lines (what each one is built from), in the Book's variant order. */
  resolution(): FamilyResolution {
    this.sync();
    const variants: VariantResolution[] = [];
    for (const v of this.books.book.variants) {
      const r = this.lines.get(v.id);
      if (r) variants.push(r);
    }
    return { variants, problems: variants.flatMap((v) => v.problems) };
  }

  /**
   * The page is about to draw a page of its own (a switch of pages) or what a change the worker takes long over just
   * made looks like (see takesLong): the worker pauses between slices of its work until the page is idle, at most
   * HOLD_MAX_MS. Its figures come that much later; the page's frames get the processor meanwhile. Nothing to do
   * without a worker.
   */
  holdWhileDrawing(): void {
    const worker = this.worker;
    if (!worker) return;
    const id = ++this.holdsAsked;
    worker.postMessage({ type: 'hold', ms: HOLD_MAX_MS, id });
    const go = (): void => {
      if (this.worker === worker) worker.postMessage({ type: 'go', id });
    };
    onIdle(go, HOLD_MAX_MS);
  }

  /**
   * The Compare page's figures: the chosen variants with what-if edits tried on them, from the Book as the figures
   * hold it (a question asked while they catch up is answered from the Book they catch up to or an earlier one;
   * the page asks again when `version` moves).
   */
  whatIf(request: WhatIfRequest): Promise<WhatIfAnswer> {
    this.sync();
    if (!this.makeWorker) {
      const live = this.local!;
      this.localWhatIfs ??= new (engines().WhatIfCosts)();
      try {
        return Promise.resolve(this.localWhatIfs.answer(live.current!, live.linesOf(request.chosen), request.chosen, request.whatIf, request.wants));
      } catch (e) {
        return Promise.reject(e instanceof Error ? e : new Error(String(e)));
      }
    }
    return this.ask<WhatIfAnswer>((id) => ({ type: 'whatif', id, ...request }));
  }

  /** How every variant of the Book resolves `line` (new, or edited and not saved): the Build page's trial. */
  trialLine(line: BuildLine): Promise<LineOutcome[]> {
    this.sync();
    if (!this.makeWorker) {
      try {
        return Promise.resolve(engines().trialOutcomes(this.local!.current!, line));
      } catch (e) {
        return Promise.reject(e instanceof Error ? e : new Error(String(e)));
      }
    }
    return this.ask<LineOutcome[]>((id) => ({ type: 'trial', id, line }));
  }

  /**
   * The Checks page's trial: every check on every variant with the formulas typed and not yet kept, from the Book as
   * the figures hold it (asked again by the page when `version` moves).
   */
  checkTrial(request: CheckTrialRequest): Promise<CheckTrialAnswer> {
    this.sync();
    if (!this.makeWorker) {
      this.localCheckTrials ??= new (engines().CheckTrials)();
      try {
        return Promise.resolve(this.localCheckTrials.answer(this.local!.current!, request));
      } catch (e) {
        this.localCheckTrials.close();
        return Promise.reject(e instanceof Error ? e : new Error(String(e)));
      }
    }
    return this.ask<CheckTrialAnswer>((id) => ({ type: 'checktrial', id, ...request }));
  }

  /**
   * Shows figures kept from an earlier start for the Book as it is now (figures-keep.ts checked they are of this very
   * Book), before the worker has worked them out. The worker is not started: `catchUp` sends it the Book (the app
   * does so once the first view is painted), as does the first edit or question; its answer replaces these figures.
   * Only where figures come from a worker and none are held yet.
   */
  seed(update: FiguresUpdate): boolean {
    if (this.shown !== undefined || this.sent !== undefined || !this.makeWorker) return false;
    this.shown = this.books.book;
    this.take(update);
    this.seededOnly = true;
    return true;
  }

  /** Sends the worker the Book whose figures were seeded, if nothing has sent it yet. */
  catchUp(): void {
    if (this.seededOnly) this.send();
  }

  /**
   * The figures held, whole, with the Book they are of, when they are settled (the worker's, of the Book as it is now,
   * with no answer awaited) and complete (no figure refused as a whole): for keeping until the next start.
   */
  settled(): { book: Book; update: FiguresUpdate } | undefined {
    const book = this.shown;
    if (!book || !this.makeWorker || book !== this.books.book || book !== this.sent || this.inFlight) return undefined;
    if (this.costingError !== undefined || this.familyError !== undefined) return undefined;
    const costs: UnitCostFigure[] = [];
    const changed: { variantId: string; run: number }[] = [];
    for (const [variantId, row] of this.costs) {
      row.forEach((value, k) => {
        const run = this.runSizesHeld[k]!;
        const problem = this.problems.get(`${variantId}\u0000${run}`);
        costs.push(problem === undefined ? { variantId, run, value } : { variantId, run, value, problem });
        changed.push({ variantId, run });
      });
    }
    const variants = [...this.results].map(([variantId, results]) => ({ variantId, results, lines: this.lines.get(variantId) }));
    return { book, update: { kind: SYNC_KINDS.rebuilt, changed, checks: true, runSizes: [...this.runSizesHeld], costs, costsFull: true, variants, checksFull: true } };
  }

  /** Sends the worker a question; its answer (in order after every change sent before it) settles the promise. */
  private ask<T>(request: (id: number) => FiguresRequest): Promise<T> {
    this.catchUp();
    const worker = this.worker;
    if (!worker) return Promise.reject(new Error(this.costingError ?? 'the figures worker is not running'));
    const id = ++this.nextAsk;
    return new Promise<T>((resolve, reject) => {
      // A question that waits on a save (a line or check tried before it is kept) must end even if no answer comes.
      const limit = setTimeout(() => {
        if (!this.asked.delete(id)) return;
        reject(new Error(`the figures worker gave no answer in ${ASK_LIMIT_MS / 1000} s`));
      }, ASK_LIMIT_MS);
      const done = <A>(end: (a: A) => void) => (a: A) => {
        clearTimeout(limit);
        end(a);
      };
      this.asked.set(id, { resolve: done(resolve as (a: never) => void), reject: done(reject) });
      worker.postMessage(request(id));
    });
  }

  /** Frees the engines; the next read builds them again. */
  dispose(): void {
    this.dropAsked('the figures were closed');
    this.localWhatIfs?.close();
    this.localWhatIfs = undefined;
    this.localCheckTrials?.close();
    this.localCheckTrials = undefined;
    this.worker?.terminate();
    this.worker = undefined;
    this.local?.close();
    this.local = undefined;
    this.sent = undefined;
    this.shown = undefined;
    this.inFlight = false;
    this.sentAhead = false;
    this.heldBack = [];
  }

  /**
   * Catches up with the Book: in-process at once (returns how), or by sending the change to the worker (returns
   * `pending`; the answer comes as a change event). Reads call this themselves.
   */
  sync(): CostingChangeDetail {
    const next = this.books.book;
    if (next === this.shown) return SAME;
    if (!this.makeWorker) {
      this.local ??= new (engines().LiveFigures)();
      const update = this.local.update(next);
      this.shown = next;
      this.take(update);
      return update;
    }
    this.send();
    return PENDING;
  }

  /**
   * Sends the worker what changed since the Book it holds, unless it is still answering the last request: from the
   * Book as it is, or from the Book a save under way will give (`proposed`), so the figures are worked out while the
   * store writes it.
   */
  private send(): void {
    const proposed = this.books.proposed;
    const next = proposed ?? this.books.book;
    if (next === this.sent || this.becameBook(next)) return;
    if (this.inFlight) {
      // The Book was replaced (a file opened, the demo Book) while the worker was still working out the one before:
      // its answer is worth nothing, and for a large Book it could be many seconds away. That worker is stopped and
      // a new one starts on the new Book.
      if (this.books.replacements === this.sentReplacements) return;
      this.dropWorker('the Book was replaced');
    }
    if (this.waitsForIdle()) return;
    this.sentReplacements = this.books.replacements;
    this.seededOnly = false;
    let worker = this.worker;
    if (!worker) {
      try {
        worker = this.startWorker();
      } catch (e) {
        this.fail(next, `the figures could not be worked out: the worker did not start (${e instanceof Error ? e.message : String(e)})`);
        return;
      }
    }
    if (this.heldBack.length > 0) {
      // Moving on from a proposed Book that did not become the Book as it was (the save failed, or was merged with
      // another tab's change): its figures are the base the next answer is a change from, and stay pending until then.
      for (const u of this.heldBack) this.merge(u);
      this.heldBack = [];
      this.shown = this.sent;
    }
    this.sentAhead = proposed !== undefined && next !== this.books.book;
    this.seq += 1;
    const request = this.sent ? ({ type: 'delta', seq: this.seq, delta: bookDelta(this.sent, next) } as const) : ({ type: 'book', seq: this.seq, book: next } as const);
    // On two cores the worker's first steps on a long change took the processor from the frames that show it (the
    // Build page's row and form, then the page the person goes to next): it starts once the page is idle.
    const hold = request.type === 'delta' && takesLong(this.sent!, next, request.delta);
    this.sent = next;
    this.inFlight = true;
    if (hold) this.holdWhileDrawing();
    // A large Book or change goes in parts, one per task, so the page draws between them.
    const parts = stageQuotes(request);
    const post = (i: number): void => {
      if (this.worker !== worker) return;
      worker.postMessage(parts[i]!);
      if (i + 1 < parts.length) setTimeout(() => post(i + 1), 0);
    };
    post(0);
  }

  /**
   * When the proposed Book last sent has become the Book (`next`, the same records stored and read back as other
   * objects): takes `next` as the Book sent, and its figures, held back until now, as the figures shown. True when so.
   */
  private becameBook(next: Book): boolean {
    const sent = this.sent;
    if (!this.sentAhead || !sent || next !== this.books.book || !sameRecords(sent, next)) return false;
    this.sent = next;
    this.sentAhead = false;
    const parts = this.heldBack;
    this.heldBack = [];
    for (const u of parts) this.merge(u);
    // Still answering (parts before the last are merged quietly, as always): the last part completes the figures of
    // `next`, now the Book sent.
    if (this.inFlight) return true;
    if (this.shown === sent || parts.length > 0) this.shown = next;
    if (parts.length > 0) this.announce(parts[parts.length - 1]!, true);
    return true;
  }

  /**
   * Whether the figures of a Book that replaced the one before (a file opened, the demo Book) wait for the page's next
   * idle time, or REPLACED_WAIT_MS at most: the page draws the new Book first. Started at once, the worker (a new
   * Book's two workbooks built, the compiler threads it keeps busy) took the CPU the page's first frames of the new
   * Book needed on a 2-core machine, and those frames held the page 50–80 ms. The first Book's figures never wait, nor
   * does anything where no idle callback exists (Node).
   */
  private waitsForIdle(): boolean {
    const replaced = this.books.replacements;
    if (this.sentReplacements === undefined || replaced === this.sentReplacements || replaced === this.idleCame) return false;
    if (!hasIdleTime()) return false;
    if (this.idleAwaited !== replaced) {
      this.idleAwaited = replaced;
      onIdle(() => {
        this.idleCame = replaced;
        this.send();
      }, REPLACED_WAIT_MS);
    }
    return true;
  }

  private startWorker(): FiguresWorkerLike {
    const worker = spare ?? this.makeWorker!();
    spare = undefined;
    worker.onmessage = (e) => this.answered(e.data);
    worker.onerror = (e) => {
      e.preventDefault?.();
      worker.terminate();
      // A worker already let go of (the Book was replaced) says nothing about the one working now.
      if (this.worker !== worker) return;
      const why = `the worker stopped (${e.message || 'no reason given'})`;
      const book = this.sent ?? this.books.book;
      this.dropWorker(why);
      this.fail(book, `the figures could not be worked out: ${why}`);
    };
    this.worker = worker;
    return worker;
  }

  /** Stops the worker and forgets what it was sent; the next send starts a new one with the whole Book. */
  private dropWorker(why: string): void {
    this.worker?.terminate();
    this.worker = undefined;
    this.sent = undefined;
    this.inFlight = false;
    this.sentAhead = false;
    this.heldBack = [];
    this.dropAsked(why);
  }

  /** Fails every question still waiting (a what-if, a line or check tried). */
  private dropAsked(why: string): void {
    for (const { reject } of this.asked.values()) reject(new Error(`the figures worker gave no answer: ${why}`));
    this.asked.clear();
  }

  private answered(m: FiguresMessage): void {
    if (m.type === 'whatif' || m.type === 'trial' || m.type === 'checktrial' || m.type === 'refused') {
      const ask = this.asked.get(m.id);
      this.asked.delete(m.id);
      if (m.type === 'refused') ask?.reject(new Error(m.message));
      else ask?.resolve((m.type === 'trial' ? m.outcomes : m.answer) as never);
      return;
    }
    if (m.seq !== this.seq) return;
    const book = this.sent!;
    if (m.type === 'figures') {
      if (this.sentAhead) {
        // The figures of a proposed Book wait until the Book is that Book (becameBook): until then reads answer from
        // the figures of a Book that has been the Book.
        this.heldBack.push(m.update);
        if (!m.last) return;
        this.inFlight = false;
      } else {
        // Parts before the last are merged quietly; the last one completes the figures of the Book sent.
        this.merge(m.update);
        if (!m.last) return;
        this.inFlight = false;
        this.shown = book;
        // Even when nothing moved ('same'): a page that read while the figures were pending waits for this event.
        this.announce(m.update, true);
      }
    } else {
      this.inFlight = false;
      // The worker dropped its workbooks: the next request sends the whole Book again.
      this.sent = undefined;
      this.sentAhead = false;
      this.heldBack = [];
      this.fail(book, m.message);
    }
    if ((this.books.proposed ?? this.books.book) !== this.sent || this.sentAhead) this.send();
  }

  /** Holds no figures, only why. */
  private fail(book: Book, message: string): void {
    this.shown = book;
    this.take({ kind: SYNC_KINDS.rebuilt, changed: [], checks: true, runSizes: [], costingError: message, familyError: message, costs: [], costsFull: true, variants: [], checksFull: true });
  }

  /** Merges one update into the figures held and tells the pages. */
  private take(u: FiguresUpdate): void {
    if (u.kind === SYNC_KINDS.same) return;
    this.merge(u);
    this.announce(u);
  }

  /** Merges one update (or one part of it) into the figures held. */
  private merge(u: FiguresUpdate): void {
    if (u.kind === SYNC_KINDS.same) return;
    this.runSizesHeld = u.runSizes;
    this.costingError = u.costingError;
    this.familyError = u.familyError;
    if (u.costsFull) {
      this.costs = new Map();
      this.problems = new Map();
    }
    const R = u.runSizes.length;
    for (const f of u.costs) {
      const k = u.runSizes.indexOf(f.run);
      if (k < 0) continue;
      let row = this.costs.get(f.variantId);
      if (!row) this.costs.set(f.variantId, (row = new Array<number>(R).fill(NaN)));
      row[k] = f.value;
      const key = `${f.variantId}\u0000${f.run}`;
      if (f.problem !== undefined) this.problems.set(key, f.problem);
      else this.problems.delete(key);
    }
    if (u.checksFull) {
      this.results = new Map();
      this.worst = new Map();
      this.lines = new Map();
    }
    for (const v of u.variants) {
      this.results.set(v.variantId, v.results);
      this.worst.set(v.variantId, worstOf(v.results.map((r) => r.status)));
      if (v.lines) this.lines.set(v.variantId, v.lines);
      else this.lines.delete(v.variantId);
    }
  }

  /** Tells the pages the figures moved, or (`settled`) that the figures awaited are in, moved or not. */
  private announce(u: FiguresUpdate, settled = false): void {
    if (u.kind === SYNC_KINDS.same && !settled) return;
    this.version += 1;
    const detail: CostingChangeDetail = { kind: u.kind, changed: u.changed, checks: u.checks };
    this.dispatchEvent(new CustomEvent<CostingChangeDetail>('change', { detail }));
  }
}

/**
 * Whether two Books hold the very same records, in the same order (a save's proposed Book and the Book the store
 * gave back for it). Records kept from one to the other are the same objects, so only those the save wrote are read.
 */
function sameRecords(a: Book, b: Book): boolean {
  for (const c of COLLECTIONS) {
    const x: readonly { id: string; rev: number }[] = a[c];
    const y: readonly { id: string; rev: number }[] = b[c];
    if (x === y) continue;
    if (x.length !== y.length) return false;
    for (let i = 0; i < x.length; i++) {
      const p = x[i]!;
      const q = y[i]!;
      if (p !== q && (p.id !== q.id || p.rev !== q.rev || JSON.stringify(p) !== JSON.stringify(q))) return false;
    }
  }
  return a.settings === b.settings || JSON.stringify(a.settings) === JSON.stringify(b.settings);
}
