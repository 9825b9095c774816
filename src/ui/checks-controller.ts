// The work behind the Checks page: a live FamilyWorkbook of the Book (every check on every variant), its results,
// formulas typed and not yet kept, our own saves run one after another so the Book each brings back is adopted
// instead of recompiled, and the undo steps of the parameters and part ratings changed from a check's detail.
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import type { Book, Check, ParamValue, Part, Variant } from '../domain/book.ts';
import { CHECK_STATUS } from '../domain/check-status.ts';
import type { CheckStatus } from '../domain/check-status.ts';
import { formatValue } from '../domain/units.ts';
import { FamilyWorkbook } from '../engine/family.ts';
import type { CheckResult, VariantResolution } from '../engine/family.ts';
import type { BookController } from './book-context.ts';
import { checkFormulaNames } from './rb-formula-input.ts';
import type { NameHint } from './rb-formula-input.ts';
import { UndoStack, stepChange } from './undo.ts';
import type { Direction, UndoStep } from './undo.ts';

export type SaveOutcome = { ok: true } | { ok: false; message: string };

/** The figure of a result with its unit, or the word for what it is. */
export function shownValue(r: CheckResult): string {
  const v = r.value;
  if (v === null) return '';
  if (typeof v === 'number') return r.unit ? formatValue(v, r.unit) : String(Number(v.toPrecision(4)));
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  return v;
}

/** The class a status is drawn with. */
export function statusClass(s: CheckStatus): string {
  return s === CHECK_STATUS.na ? 'na' : s;
}

export class ChecksController implements ReactiveController {
  /** Check id → formula typed and not yet kept. */
  formulaDrafts = new Map<string, string>();
  names: readonly NameHint[] = [];
  /** Moves whenever a result may have changed, so views given this controller know to draw again. */
  revision = 0;
  /** Edits of variant parameters and part ratings made from a check's detail, undone one at a time. */
  readonly history = new UndoStack<Variant | Part>();

  private session: FamilyWorkbook | undefined;
  /** The Book the session was built from (or adopted after our own save). */
  private sessionBook: Book | undefined;
  /** Saves of ours in flight: the Book they bring back is adopted without rebuilding the session. */
  private ownSaves = 0;
  private writes: Promise<unknown> = Promise.resolve();
  private results = new Map<string, CheckResult>();

  constructor(
    private readonly host: ReactiveControllerHost,
    private readonly books: BookController,
  ) {
    host.addController(this);
  }

  hostDisconnected(): void {
    this.session?.close();
    this.session = undefined;
    this.sessionBook = undefined;
  }

  /** Follows the Book: a Book of our own save is adopted, any other rebuilds the session. */
  sync(book: Book): void {
    if (book === this.sessionBook) return;
    if (this.ownSaves > 0 && this.session) {
      this.sessionBook = book;
      return;
    }
    this.rebuild(book);
  }

  /** A fresh session for the Book (opened elsewhere, or changed by another page or tab), with kept formula drafts. */
  private rebuild(book: Book): void {
    this.session?.close();
    this.session = FamilyWorkbook.open(book);
    this.sessionBook = book;
    this.names = checkFormulaNames(book);
    for (const [checkId, text] of this.formulaDrafts) {
      if (book.checks.some((c) => c.id === checkId)) this.session.setCheckFormula(checkId, text);
    }
    this.refresh();
  }

  private refresh(): void {
    this.results = new Map();
    for (const r of this.session?.results() ?? []) this.results.set(`${r.variantId}\u0000${r.checkId}`, r);
    this.revision++;
  }

  result(variantId: string, checkId: string): CheckResult | undefined {
    return this.results.get(`${variantId}\u0000${checkId}`);
  }

  allResults(): IterableIterator<CheckResult> {
    return this.results.values();
  }

  /** The variant's build lines as the session resolves them now (which part each role's line gives). */
  resolved(variantId: string): VariantResolution | undefined {
    return this.session?.resolve().variants.find((r) => r.variantId === variantId);
  }

  /** Remembers a saved edit of one variant or part, found in the Book as saved, for undo. */
  recordEdit(collection: 'variants' | 'parts', before: Variant | Part, label: string): void {
    const list: readonly (Variant | Part)[] = this.books.service?.book[collection] ?? [];
    const after = list.find((r) => r.id === before.id);
    if (after) this.history.record({ label, collection, changes: [{ id: before.id, before, after }] });
  }

  /**
   * Undoes or redoes the last edit as one save (the session then follows the Book); gives why it could not be,
   * when it could not — a record changed elsewhere since, whose step is then forgotten.
   */
  async step(direction: Direction): Promise<SaveOutcome> {
    // After our saves in flight, so the step is planned on the Book they leave.
    await this.writes;
    const service = this.books.service;
    const step = this.history.peek(direction);
    if (!service || !step) return { ok: true };
    const plan =
      step.collection === 'parts'
        ? stepChange(service.book, 'parts', step as UndoStep<Part>, direction, (p) => p.mpn)
        : stepChange(service.book, 'variants', step as UndoStep<Variant>, direction, (v) => v.code);
    if (!plan.ok) {
      this.history.drop(direction);
      this.host.requestUpdate();
      return { ok: false, message: plan.message };
    }
    const result = await service.save(plan.change);
    if (result.ok) this.history.settle(direction);
    this.host.requestUpdate();
    return result.ok ? { ok: true } : { ok: false, message: result.message };
  }

  /** Tries a parameter value in the session (every check re-evaluates at once); gives why it was refused, if it was. */
  tryParam(variantId: string, name: string, value: ParamValue): string | undefined {
    const session = this.session;
    if (!session) return 'the checks are not open';
    const set = session.setParam(variantId, name, value);
    if (!set.ok) return set.error;
    this.refresh();
    this.host.requestUpdate();
    return undefined;
  }

  /** Tries a formula typed for a check on every variant; gives why it cannot be read, if it cannot. */
  tryFormula(c: Check, text: string): string | undefined {
    const session = this.session;
    if (!session) return undefined;
    this.formulaDrafts = new Map(this.formulaDrafts).set(c.id, text);
    const r = session.setCheckFormula(c.id, text);
    this.refresh();
    this.host.requestUpdate();
    return r.ok ? undefined : r.error;
  }

  /** Puts the check's own formula back in the session and forgets the draft. */
  putBack(c: Check): void {
    this.dropDraft(c.id);
    this.session?.setCheckFormula(c.id, c.formula);
    this.refresh();
  }

  dropDraft(checkId: string): void {
    const drafts = new Map(this.formulaDrafts);
    drafts.delete(checkId);
    this.formulaDrafts = drafts;
    this.revision++;
    this.host.requestUpdate();
  }

  /**
   * Runs our saves one after another so the Book each brings back is adopted, not recompiled; a failed save
   * recompiles from the Book as stored.
   */
  saveOwn(write: () => Promise<SaveOutcome>): Promise<SaveOutcome> {
    this.ownSaves += 1;
    const run = this.writes.then(async () => {
      let result: SaveOutcome;
      try {
        result = await write();
      } catch (e) {
        result = { ok: false, message: String(e) };
      } finally {
        this.ownSaves -= 1;
      }
      const service = this.books.service;
      if (!result.ok) {
        if (service) this.rebuild(service.book);
        this.host.requestUpdate();
        return result;
      }
      if (service) this.sessionBook = service.book;
      return result;
    });
    this.writes = run;
    return run;
  }
}
