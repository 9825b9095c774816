// The work behind the Checks page: every check on every variant, from the Book's live figures (worked out in the
// figures worker, so a large family never holds up the page); formulas typed and not yet kept, tried there too in a
// workbook of their own; our own saves run one after another; and the undo steps of the parameters and part ratings
// changed from a check's detail.
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import type { Book, Check, Part, Variant } from '../domain/book.ts';
import { CHECK_STATUS } from '../domain/check-status.ts';
import type { CheckStatus } from '../domain/check-status.ts';
import { formatValue } from '../domain/units.ts';
import type { CheckTrialAnswer } from '../engine/check-trial.ts';
import type { CheckResult, VariantResolution } from '../engine/family.ts';
import type { BookController } from './book-context.ts';
import { CostingService } from './costing-service.ts';
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
  /** Check id → why its formula typed cannot be read (from the last trial). */
  formulaProblems = new Map<string, string>();
  names: readonly NameHint[] = [];
  /** Moves whenever a result may have changed, so views given this controller know to draw again. */
  revision = 0;
  /** Edits of variant parameters and part ratings made from a check's detail, undone one at a time. */
  readonly history = new UndoStack<Variant | Part>();

  /** The figures the results come from: the live ones of the Book as saved (worked out off the page's thread). */
  private costing: CostingService | undefined;
  /** The last trial of the formulas typed, while there are any. */
  private trial: CheckTrialAnswer | undefined;
  /** Why the last trial failed, if it did. */
  trialProblem: string | undefined;
  private asked = 0;
  /** Settles when the last trial asked has been answered. */
  private lastTrial: Promise<unknown> = Promise.resolve();
  private namesOf: Book | undefined;
  private writes: Promise<unknown> = Promise.resolve();
  /** The results shown, by variant and check, and each variant's lines; made again when `revision` moves. */
  private index: { revision: number; results: Map<string, Map<string, CheckResult>>; lines: Map<string, VariantResolution> } | undefined;
  private readonly onFigures = (): void => {
    // The Book's figures moved (a save here, another page or tab): a trial is asked again of the new Book.
    if (this.formulaDrafts.size > 0) this.askTrial();
    this.changed();
  };

  constructor(
    private readonly host: ReactiveControllerHost,
    private readonly books: BookController,
  ) {
    host.addController(this);
  }

  hostConnected(): void {
    this.costing?.addEventListener('change', this.onFigures);
  }

  hostDisconnected(): void {
    this.costing?.removeEventListener('change', this.onFigures);
  }

  /** Follows the Book: its names for the formula input, and the figures of the Book's service. */
  sync(book: Book): void {
    if (book !== this.namesOf) {
      this.namesOf = book;
      this.names = checkFormulaNames(book);
    }
    const service = this.books.service;
    const costing = service ? CostingService.for(service) : undefined;
    if (costing !== this.costing) {
      this.costing?.removeEventListener('change', this.onFigures);
      this.costing = costing;
      costing?.addEventListener('change', this.onFigures);
      this.trial = undefined;
      if (this.formulaDrafts.size > 0) this.askTrial();
      this.changed();
    }
  }

  /** Whether the results shown are not yet those of the Book as it is, or of the formulas as typed. */
  get pending(): boolean {
    return (this.costing?.pending ?? true) || (this.formulaDrafts.size > 0 && this.trial === undefined);
  }

  /** Why the checks could not be evaluated at all, or undefined. */
  get problem(): string | undefined {
    return this.trialProblem ?? this.costing?.checksProblem;
  }

  private changed(): void {
    this.revision++;
    this.host.requestUpdate();
  }

  private shown(): NonNullable<ChecksController['index']> {
    if (this.index?.revision === this.revision) return this.index;
    const results = new Map<string, Map<string, CheckResult>>();
    const lines = new Map<string, VariantResolution>();
    const add = (r: CheckResult): void => {
      let m = results.get(r.variantId);
      if (!m) results.set(r.variantId, (m = new Map()));
      m.set(r.checkId, r);
    };
    if (this.formulaDrafts.size > 0 && this.trial) {
      for (const r of this.trial.results) add(r);
      for (const l of this.trial.lines) lines.set(l.variantId, l);
    } else if (this.costing) {
      for (const v of this.books.book?.variants ?? []) for (const r of this.costing.checkResults(v.id)) add(r);
      for (const l of this.costing.resolution().variants) lines.set(l.variantId, l);
    }
    this.index = { revision: this.revision, results, lines };
    return this.index;
  }

  /** Whether any result is held to show (none before the first figures of the Book arrive). */
  get hasResults(): boolean {
    return this.shown().results.size > 0;
  }

  result(variantId: string, checkId: string): CheckResult | undefined {
    return this.shown().results.get(variantId)?.get(checkId);
  }

  *allResults(): IterableIterator<CheckResult> {
    for (const m of this.shown().results.values()) yield* m.values();
  }

  /** The variant's build lines as resolved now (which part each role's line gives). */
  resolved(variantId: string): VariantResolution | undefined {
    return this.shown().lines.get(variantId);
  }

  /** Remembers a saved edit of one variant or part, found in the Book as saved, for undo. */
  recordEdit(collection: 'variants' | 'parts', before: Variant | Part, label: string): void {
    const list: readonly (Variant | Part)[] = this.books.service?.book[collection] ?? [];
    const after = list.find((r) => r.id === before.id);
    if (after) this.history.record({ label, collection, changes: [{ id: before.id, before, after }] });
  }

  /**
   * Undoes or redoes the last edit as one save (the figures then follow the Book); gives why it could not be,
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

  /** Tries a formula typed for a check on every variant (off the page's thread); the results follow when worked out. */
  tryFormula(c: Check, text: string): void {
    this.formulaDrafts = new Map(this.formulaDrafts).set(c.id, text);
    this.askTrial();
    this.changed();
  }

  /** Puts the check's own formula back and forgets the draft. */
  putBack(c: Check): void {
    this.dropDraft(c.id);
  }

  dropDraft(checkId: string): void {
    if (!this.formulaDrafts.has(checkId)) return;
    const drafts = new Map(this.formulaDrafts);
    drafts.delete(checkId);
    this.formulaDrafts = drafts;
    const problems = new Map(this.formulaProblems);
    problems.delete(checkId);
    this.formulaProblems = problems;
    if (drafts.size > 0) this.askTrial();
    else {
      this.asked++;
      this.trial = undefined;
      this.trialProblem = undefined;
    }
    this.changed();
  }

  /** Asks for the results with the formulas typed; an answer to an earlier question is not shown. */
  private askTrial(): void {
    const costing = this.costing;
    if (!costing) return;
    const asked = ++this.asked;
    const formulas = [...this.formulaDrafts].map(([checkId, text]) => ({ checkId, text }));
    this.lastTrial = costing.checkTrial({ formulas }).then(
      (answer) => {
        if (asked !== this.asked) return;
        this.trial = answer;
        this.trialProblem = undefined;
        this.formulaProblems = new Map(answer.refused.map((r) => [r.checkId, r.message] as const));
        this.changed();
      },
      (e: unknown) => {
        if (asked !== this.asked) return;
        this.trialProblem = `The formulas typed could not be tried: ${e instanceof Error ? e.message : String(e)}`;
        this.changed();
      },
    );
  }

  /** Resolves once the formulas as typed now have been tried (their problems are then in `formulaProblems`). */
  async tried(): Promise<void> {
    let seen: Promise<unknown> | undefined;
    while (seen !== this.lastTrial) {
      seen = this.lastTrial;
      await seen;
    }
  }

  /** Runs our saves one after another, so each is planned on the Book the one before left. */
  saveOwn(write: () => Promise<SaveOutcome>): Promise<SaveOutcome> {
    const run = this.writes.then(async (): Promise<SaveOutcome> => {
      try {
        return await write();
      } catch (e) {
        return { ok: false, message: String(e) };
      } finally {
        this.host.requestUpdate();
      }
    });
    this.writes = run;
    return run;
  }
}
