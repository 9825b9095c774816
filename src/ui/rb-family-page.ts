// Family page: the variants as a keyboard grid — code, name and parameters to edit in place, with each variant's worst
// check status and unit cost at every run size beside them — plus copy and paste of tab-separated blocks, add,
// duplicate, delete, a form for notes and parameters of the Book's own, and undo / redo of every step.
import { LitElement, css, html, nothing } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, query, state } from 'lit/decorators.js';
import type { Book, Variant } from '../domain/book.ts';
import type { BookChange } from '../domain/book-ops.ts';
import { mergeRecord } from '../domain/merge.ts';
import { newId } from '../domain/book.ts';
import { STATUS_SYMBOL } from '../domain/check-status.ts';
import { currencyMoney, grouped } from '../domain/format.ts';
import { VARIANT_PARAMS, ownValue } from '../domain/params.ts';
import { nextTask } from '../domain/slices.ts';
import { guardText } from '../domain/tsv.ts';
import { formatValue } from '../domain/units.ts';
import { sortVariants } from '../domain/variant-order.ts';
import { BookController } from './book-context.ts';
import { CostingService } from './costing-service.ts';
import { figuresShown } from './first-figures.ts';
import { field, focusFirstProblem, group, nothingSaved, saveRefusal } from './form-fields.ts';
import './rb-grid.ts';
import type { GridCell, GridClearDetail, GridColumn, GridCommitDetail, GridEditDetail, GridPasteDetail, GridRow, RbGrid } from './rb-grid.ts';
import { COLUMN_KINDS, duplicateVariants, editVariant, planClear, planPaste } from './grid-edits.ts';
import type { FamilyColumn, PastePlan, PasteTarget } from './grid-edits.ts';
import { ProgressiveRows } from './progressive.ts';
import { WINDOW_FROM } from './row-window.ts';
import type { FieldProblems, VariantDraft } from './record-forms.ts';
import { paramInfo, paramNames, paramText, validateVariant, variantDraft, variantUsers } from './record-forms.ts';
import { pageStyles } from './styles.ts';
import { DIRECTIONS, UndoStack, stepChange } from './undo.ts';
import type { Direction, UndoStep } from './undo.ts';

type Editing = { variant: Variant | undefined; draft: VariantDraft; problems: FieldProblems; saveError?: string; conflict?: boolean };
type Notice = { text: string; problem: boolean };
/** A saving step: the undo step and what it says when done; `change`, when given, is saved as it is (see enqueue). */
type Made = { step: UndoStep<Variant>; done: string; change?: BookChange };

/**
 * A cell edit saved from the variant as the person saw it (`before`), as the undo stack keeps it: after as stored,
 * before as stored with only the person's own change taken back, so an undo keeps what another tab merged in.
 */
function asSaved(step: UndoStep<Variant>, book: Book): UndoStep<Variant> {
  const changes = step.changes.map((c) => {
    const stored = book.variants.find((v) => v.id === c.id);
    if (!c.before || !c.after || !stored) return { ...c, after: stored ?? c.after };
    const back = mergeRecord(c.after, c.before, stored);
    return { id: c.id, before: back.ok ? back.merged : c.before, after: stored };
  });
  return { ...step, changes };
}

/** Books with at most this many variants draw the grid with the page (see gridShown). */
const GRID_WITH_PAGE_MAX = 50;
const STATUS_KEY = 'checks';
const costKey = (run: number): string => `cost_${run}`;
const newVariantId = (): string => newId('var');

function shown(name: string, v: Variant['params'][string] | undefined): string {
  if (v === undefined) return '';
  if (typeof v === 'string') return v;
  const { unit } = paramInfo(name, v);
  return unit === '' ? String(Number(v.toPrecision(4))) : formatValue(v, unit);
}

@customElement('rb-family-page')
export class RbFamilyPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      table.glance {
        border-collapse: collapse;
        font-variant-numeric: tabular-nums;
      }
      table.glance th,
      table.glance td {
        padding: 0.2rem 0.9rem 0.2rem 0;
        border-bottom: 1px solid var(--rb-rule);
        text-align: left;
        font-weight: normal;
      }
      table.glance thead th {
        font-family: var(--rb-mono);
        font-size: 0.82rem;
        border-bottom: 2px solid var(--rb-ink);
      }
      table.glance tbody th {
        font-family: var(--rb-mono);
      }
      table.glance .num {
        text-align: right;
      }
      table.glance .pass {
        color: var(--rb-pass);
      }
      table.glance .margin {
        color: var(--rb-margin);
      }
      table.glance .fail,
      table.glance .error,
      table.glance .problem {
        color: var(--rb-fail);
      }
      table.glance .na {
        color: var(--rb-na);
      }
      .keys {
        font-size: 0.84rem;
        color: var(--rb-na);
        margin: -0.4rem 0 0.7rem;
      }
      .keys kbd {
        font-family: var(--rb-mono);
        font-size: 0.78rem;
        border: 1px solid var(--rb-rule);
        border-bottom-width: 2px;
        border-radius: 3px;
        padding: 0 0.25rem;
        background: var(--rb-paper);
      }
      .toolbar .sep {
        flex: 1;
      }
      .note {
        margin: 0 0 0.6rem;
        font-size: 0.9rem;
      }
      .note.problem {
        color: var(--rb-fail);
      }
      .note.problem::before {
        content: '✗ ';
        font-weight: 700;
      }
      .note.done::before {
        content: '✓ ';
        color: var(--rb-pass);
        font-weight: 700;
      }
      .confirm {
        display: flex;
        gap: 0.6rem;
        align-items: baseline;
        margin: 0 0 0.6rem;
        padding: 0.35rem 0.7rem;
        border-left: 3px solid var(--rb-fail);
        background: var(--rb-fail-bg);
      }
    `,
  ];

  private readonly books = new BookController(this, { figures: true });
  /** The at-a-glance table draws a slice of rows per frame; a large family's is folded until opened. */
  private readonly glanceRows = new ProgressiveRows(this);
  @state() private glanceOpen = false;
  private readonly history = new UndoStack<Variant>();
  /** Saves from this page run one after another, each from the Book as the one before left it. */
  private writes: Promise<unknown> = Promise.resolve();
  /** Rows drawn last time, by variant id, reused while their text is unchanged so the grid skips them. */
  private rowCache = new Map<string, { params: GridCell[]; figures: GridCell[]; figSig: string; row: GridRow }>();
  private paramCache = new Map<string, { variant: Variant; colSig: string; cells: GridCell[] }>();
  /**
   * The variants in the grid's order and the parameters any of them sets, worked out once per list of variants: the
   * page is drawn again at every change of the figures, and going over every variant for every parameter name took
   * about 2.5 ms of a parameter edit with the reference family.
   */
  private shape: { of: Book['variants']; variants: Variant[]; used: string[] } | undefined;
  private syncQueued = false;
  private columnCache: { sig: string; grid: GridColumn[]; family: FamilyColumn[] } | undefined;
  private order: Variant[] = [];
  /** The variant as it was when editing of a grid cell began; the cell's save is made from it. */
  private editFrom: Variant | undefined;

  @state() private editing: Editing | undefined;
  @state() private confirmDelete: Variant[] | undefined;
  @state() private notice: Notice | undefined;
  @state() private busy = 0;
  @query('rb-grid') private grid: RbGrid | undefined;

  override connectedCallback(): void {
    super.connectedCallback();
    this.addEventListener('keydown', this._onKey);
    if (!this.gridShown) this.showGridSoon();
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    this.removeEventListener('keydown', this._onKey);
  }

  /** The Book replacement this page's undo steps and form belong to (see BookService.replacements). */
  private replacementSeen = 0;

  override willUpdate(): void {
    // A small Book's grid is drawn with the page: the task after costs a frame of the first view for no gain.
    const variants = this.books.book?.variants.length;
    if (!this.gridShown && variants !== undefined && variants <= GRID_WITH_PAGE_MAX) this.gridShown = true;
    const replaced = this.books.service?.replacements ?? 0;
    if (replaced === this.replacementSeen) return;
    // The whole Book was replaced: its variants, their undo steps and an open form belong to a Book that is gone.
    this.replacementSeen = replaced;
    // The app makes a new page for the new Book and drops this one: its grid waits for the next task, by which time
    // it is gone (or, kept, draws the new Book then), rather than drawing a Book's worth of rows to be thrown away.
    if (this.gridShown) {
      this.gridShown = false;
      this.showGridSoon();
    }
    this.history.clear();
    this.editing = undefined;
    this.editFrom = undefined;
    this.confirmDelete = undefined;
  }

  /**
   * A page made afresh (the app starting on it, a Book just opened) draws its heading first and its grid in the task
   * after: the Book's opening, the page replaced and the first rows of the grid in one task held the page too long.
   * A Book of at most GRID_WITH_PAGE_MAX variants draws its grid at once.
   */
  @state() private gridShown = false;
  /** Variants edited in the grid and not yet stored, by id: shown at once, marked as saving (see `_onCommit`). */
  @state() private saving = new Map<string, Variant>();
  private gridAsked = false;

  private showGridSoon(): void {
    if (this.gridAsked) return;
    this.gridAsked = true;
    void nextTask().then(() => {
      this.gridAsked = false;
      if (this.isConnected) this.gridShown = true;
    });
  }

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    return html`${this.editing ? this.renderForm(book, this.editing) : ''} ${this.gridShown ? this.renderGrid(book) : this.renderHeading(book)}`;
  }

  /** The grid's section before its grid is drawn (see gridShown); the figures are asked for meanwhile. */
  private renderHeading(book: Book) {
    const service = this.books.service;
    if (service) {
      const costing = CostingService.for(service);
      if (costing.pending) this.queueSync(costing);
    }
    return html`<section class="sheet" aria-labelledby="family-h">
      <h2 id="family-h">Variants</h2>
      <p class="why">${book.variants.length} variants.</p>
    </section>`;
  }

  // ---- the grid

  private columns(book: Book, runs: readonly number[], currency: string, used: string[]): { sig: string; grid: GridColumn[]; family: FamilyColumn[] } {
    const sig = `${used.join(',')}|${runs.join(',')}|${currency}`;
    if (this.columnCache?.sig === sig) return this.columnCache;
    const grid: GridColumn[] = [
      { key: 'code', label: 'code', editable: true, rowHeader: true, title: 'short code, unique in the Book' },
      { key: 'name', label: 'name', editable: true, title: 'what the variant is called on drawings and run sheets' },
    ];
    const family: FamilyColumn[] = [
      { key: 'code', kind: COLUMN_KINDS.code },
      { key: 'name', kind: COLUMN_KINDS.name },
    ];
    for (const n of used) {
      const info = paramInfo(n, ownValue(book.variants.find((v) => ownValue(v.params, n) !== undefined)?.params, n));
      const std = VARIANT_PARAMS.find((p) => p.name === n);
      const col: GridColumn = { key: n, label: n, num: info.kind === 'number', editable: true };
      if (info.unit) col.unit = info.unit;
      col.title = std ? std.doc : 'a parameter of this Book’s own (formulas read it by this name; no built-in check does)';
      grid.push(col);
      family.push({ key: n, kind: COLUMN_KINDS.param });
    }
    grid.push({ key: STATUS_KEY, label: 'checks', editable: false, title: 'the worst status of the variant’s checks (see the Checks page)' });
    family.push({ key: STATUS_KEY, kind: COLUMN_KINDS.computed });
    for (const run of runs) {
      grid.push({ key: costKey(run), label: `unit cost @ ${grouped(run)}`, unit: currency, num: true, editable: false, title: `cost per unit in a run of ${run}` });
      family.push({ key: costKey(run), kind: COLUMN_KINDS.computed });
    }
    this.columnCache = { sig, grid, family };
    return this.columnCache;
  }

  /**
   * A variant's code, name and parameter cells; kept while the variant record and the columns are the same (`keep`
   * false for a record that is not the stored variant, such as an edit being saved).
   */
  private paramCells(v: Variant, used: string[], colSig: string, keep = true): GridCell[] {
    const cached = this.paramCache.get(v.id);
    if (cached && cached.variant === v && cached.colSig === colSig) return cached.cells;
    const cells: GridCell[] = [
      { text: v.code },
      { text: v.name, copy: guardText(v.name) },
    ];
    for (const n of used) {
      const p = ownValue(v.params, n);
      const edit = paramText(n, p);
      cells.push({ text: shown(n, p), edit, copy: typeof p === 'string' ? guardText(p) : edit });
    }
    if (keep) this.paramCache.set(v.id, { variant: v, colSig, cells });
    return cells;
  }

  /** A variant's own cells; one being saved shows the edit, marked as saving, until the Book has it. */
  private shownCells(v: Variant, used: string[], colSig: string): GridCell[] {
    const edited = this.saving.get(v.id);
    if (!edited) return this.paramCells(v, used, colSig);
    const stored = this.paramCells(v, used, colSig);
    const cells = this.paramCells(edited, used, colSig, false);
    return cells.map((c, i) => (c.text === stored[i]?.text ? c : { ...c, tone: 'saving', title: 'saving…' }));
  }

  /** The worked-out cells: worst check status and unit cost at each run size. */
  private figureCells(v: Variant, costing: CostingService, runs: readonly number[], money: (n: number) => string): GridCell[] {
    const status = costing.worstStatus(v.id);
    const notPassing = costing
      .checkResults(v.id)
      .filter((r) => r.status !== 'pass' && r.status !== 'n/a')
      .map((r) => `${r.status}: ${r.checkName}`);
    const cells: GridCell[] = [
      {
        text: `${STATUS_SYMBOL[status]} ${status}`,
        tone: status === 'n/a' ? 'na' : status,
        title: costing.checksProblem ?? (notPassing.length ? notPassing.join('\n') : status === 'pass' ? 'every check that applies passes' : 'no check applies'),
      },
    ];
    for (const run of runs) {
      const u = costing.unitCost(v.id, run);
      if (Number.isFinite(u)) cells.push({ text: money(u), copy: String(u) });
      else cells.push({ text: '—', copy: '', tone: 'problem', title: costing.costProblem(v.id, run) ?? 'cannot be computed' });
    }
    return cells;
  }

  /**
   * One grid row. While the costing service is catching up (`pending`) the figures drawn last time stay, marked as
   * being worked out; a row whose cells are all unchanged is the same object, so the grid does not draw it again.
   */
  private rowFor(v: Variant, params: GridCell[], figures: GridCell[] | undefined, runs: readonly number[]): GridRow {
    const cached = this.rowCache.get(v.id);
    const figs =
      figures ??
      cached?.figures ??
      [{ text: '…', tone: 'na', title: 'being worked out' }, ...runs.map((): GridCell => ({ text: '…', copy: '', tone: 'na', title: 'being worked out' }))];
    const figSig = figs.map((c) => `${c.text}\u0001${c.title ?? ''}`).join('\u0002');
    if (cached && cached.params === params && cached.figSig === figSig) return cached.row;
    const row: GridRow = { id: v.id, cells: [...params, ...figs], rev: v.rev };
    this.rowCache.set(v.id, { params, figures: figs, figSig, row });
    return row;
  }

  private renderGrid(book: Book) {
    const service = this.books.service;
    if (!service) return html``;
    const costing = CostingService.for(service);
    // Draw first, work out afterwards: a large family's workbooks take a moment to build after a structural change.
    const pending = costing.pending;
    if (pending) this.queueSync(costing);
    if (this.shape?.of !== book.variants) {
      const sorted = sortVariants(book.variants);
      const used = paramNames(book).filter((n) => sorted.some((v) => ownValue(v.params, n) !== undefined));
      this.shape = { of: book.variants, variants: sorted, used };
    }
    const { variants, used } = this.shape;
    this.order = variants;
    const runs = book.settings.runSizes;
    const currency = book.settings.baseCurrency;
    const { grid, sig: colSig } = this.columns(book, runs, currency, used);
    const money = (n: number): string => currencyMoney(n, currency, 'unitCost');
    const rows = variants.map((v) => this.rowFor(v, this.shownCells(v, used, colSig), pending ? undefined : this.figureCells(v, costing, runs, money), runs));
    if (this.rowCache.size > variants.length * 2) {
      const ids = new Set(variants.map((v) => v.id));
      this.rowCache = new Map([...this.rowCache].filter(([id]) => ids.has(id)));
      this.paramCache = new Map([...this.paramCache].filter(([id]) => ids.has(id)));
    }
    // The figures are shown: work held back for the first view may start (see first-figures.ts).
    if (!pending) figuresShown();
    const costProblem = pending ? undefined : costing.problem;
    const checksProblem = pending ? undefined : costing.checksProblem;
    const undoStep = this.history.peek(DIRECTIONS.undo);
    const redoStep = this.history.peek(DIRECTIONS.redo);
    return html`<section class="sheet" aria-labelledby="family-h">
      <h2 id="family-h">Variants</h2>
      <p class="why">
        ${variants.length} variants. Each parameter column is read by the checks and build rules by its name; a blank cell
        means the variant does not set it. The checks column is the worst of the variant's checks; unit costs are for
        runs of ${runs.map((r) => grouped(r)).join(', ')} from the current quotes, in ${currency}.
      </p>
      <p class="keys">
        <kbd>↑</kbd><kbd>↓</kbd><kbd>←</kbd><kbd>→</kbd> move (with <kbd>Shift</kbd> to mark a block) · <kbd>Enter</kbd> or typing edits ·
        <kbd>Esc</kbd> cancels · <kbd>Enter</kbd>/<kbd>Tab</kbd> keeps and moves on · <kbd>Ctrl</kbd>+<kbd>C</kbd> / <kbd>V</kbd> copy and
        paste tab-separated cells (a first row of column names is recognised) · <kbd>Ctrl</kbd>+<kbd>Z</kbd> undo,
        <kbd>Ctrl</kbd>+<kbd>Shift</kbd>+<kbd>Z</kbd> or <kbd>Ctrl</kbd>+<kbd>Y</kbd> redo. To add variants, type a code on the
        last line (+ new) or paste rows there; a pasted variant without a name is named by its code.
      </p>
      <div class="toolbar" role="toolbar" aria-label="Variants">
        <button type="button" class="primary" @click=${() => this.startEdit(book, undefined)}>Add a variant</button>
        <button type="button" @click=${this._onDuplicate} ?disabled=${variants.length === 0}>Duplicate</button>
        <button type="button" @click=${this._onAskDelete} ?disabled=${variants.length === 0}>Delete…</button>
        <button type="button" @click=${this._onDetails} ?disabled=${variants.length === 0}>Details…</button>
        <span class="sep"></span>
        <button
          type="button"
          data-testid="undo"
          title=${undoStep ? `Undo: ${undoStep.label}` : 'Nothing to undo'}
          ?disabled=${!undoStep}
          @click=${() => this.step(DIRECTIONS.undo)}
        >
          ↶ Undo${undoStep ? html` <span class="muted">${undoStep.label}</span>` : ''}
        </button>
        <button
          type="button"
          data-testid="redo"
          title=${redoStep ? `Redo: ${redoStep.label}` : 'Nothing to redo'}
          ?disabled=${!redoStep}
          @click=${() => this.step(DIRECTIONS.redo)}
        >
          ↷ Redo${redoStep ? html` <span class="muted">${redoStep.label}</span>` : ''}
        </button>
      </div>
      ${this.confirmDelete ? this.renderConfirm(this.confirmDelete) : ''}
      ${this.notice
        ? html`<p class="note ${this.notice.problem ? 'problem' : 'done'}" role=${this.notice.problem ? 'alert' : 'status'} data-testid="family-notice">
            ${this.notice.text}
          </p>`
        : ''}
      ${variants.length === 0
        ? html`<p class="empty">No variants yet. Add the first one with the button above, type a code on the + new line, or paste rows there.</p>`
        : ''}
      ${checksProblem ? html`<p class="note problem" role="alert">Checks: ${checksProblem}.</p>` : ''}
      ${costProblem ? html`<p class="note problem" role="alert">Unit costs cannot be worked out: ${costProblem}.</p>` : ''}
      <rb-grid
        testid="family-table"
        label="Variants of the family"
        newRow="+ new"
        .columns=${grid}
        .rows=${rows}
        @rb-grid-edit=${this._onEditStart}
        @rb-grid-commit=${this._onCommit}
        @rb-grid-paste=${this._onPaste}
        @rb-grid-clear=${this._onClear}
      ></rb-grid>
    </section>
    ${this.renderGlance(variants, runs, currency)}`;
  }

  /**
   * The worked-out figures again, next to the code only: with many parameters the grid's last columns sit far to the
   * right, and the checks and costs are what a person looks for first.
   */
  private renderGlance(variants: Variant[], runs: readonly number[], currency: string) {
    if (variants.length === 0) return html``;
    // A large family's table is long: it folds away (drawn only when opened) and the grid above holds the same figures.
    const folded = variants.length >= WINDOW_FROM;
    // Made only when shown: its rows are drawn a slice per frame, and each slice draws the page again, so a folded
    // table made anyway drew the whole page again for frames after every change and every return to the page.
    const table = (): TemplateResult => html`<table class="glance" data-testid="family-glance">
      <thead>
        <tr>
          <th scope="col">code</th>
          <th scope="col">checks</th>
          ${runs.map((r) => html`<th scope="col" class="num">unit cost @ ${grouped(r)}</th>`)}
        </tr>
      </thead>
      <tbody>
        ${this.glanceRows.take(variants).map((v) => {
          const figs = this.rowCache.get(v.id)?.figures ?? [];
          return html`<tr>
            <th scope="row">${v.code}</th>
            ${figs.map((c, i) => html`<td class="${i > 0 ? 'num' : ''} ${c.tone ?? ''}" title=${c.title ?? ''}>${c.text}</td>`)}
          </tr>`;
        })}
      </tbody>
    </table>`;
    return html`<section class="sheet" aria-labelledby="glance-h">
      <h2 id="glance-h">Checks and unit cost at a glance</h2>
      <p class="why">The same figures as the grid's last columns: the worst check of each variant and its unit cost, in ${currency}, at each run size.</p>
      ${folded
        ? html`<details data-testid="family-glance-fold" @toggle=${(e: Event) => (this.glanceOpen = (e.target as HTMLDetailsElement).open)}>
            <summary>Show all ${grouped(variants.length)} variants</summary>
            ${this.glanceOpen ? table() : nothing}
          </details>`
        : table()}
    </section>`;
  }

  /** Asks for the figures after this paint; they arrive as a change of the costing service, which draws again. */
  private queueSync(costing: CostingService): void {
    if (this.syncQueued) return;
    this.syncQueued = true;
    setTimeout(() => {
      this.syncQueued = false;
      if (costing.sync().kind !== 'pending') this.requestUpdate();
    }, 0);
  }


  private renderConfirm(list: Variant[]) {
    const names = list.length <= 3 ? list.map((v) => v.code).join(', ') : `${list.slice(0, 3).map((v) => v.code).join(', ')} and ${list.length - 3} more`;
    return html`<div class="confirm" role="alertdialog" aria-label="Confirm delete">
      Delete ${names}? (Undo brings ${list.length === 1 ? 'it' : 'them'} back.)
      <button type="button" class="danger" @click=${() => this.delete(list)}>Delete</button>
      <button type="button" class="quiet" @click=${() => (this.confirmDelete = undefined)}>Keep</button>
    </div>`;
  }

  // ---- saving steps

  /** Runs a save after the ones before it; `make` builds the step from the Book as it is then. */
  private enqueue(make: (book: Book) => Made | { problem: string }): Promise<void> {
    const service = this.books.service;
    if (!service) return Promise.resolve();
    this.busy += 1;
    const run = this.writes.then(async () => {
      try {
        const made = make(service.book);
        if ('problem' in made) {
          this.notice = { text: made.problem, problem: true };
          return;
        }
        // A change made from the record as the person saw it goes to the Book service as it is, which merges it
        // with what was saved since or refuses it naming the field.
        const plan = made.change ? { ok: true as const, change: made.change } : stepChange(service.book, 'variants', made.step, DIRECTIONS.redo, (v) => v.code);
        if (!plan.ok) {
          this.notice = { text: plan.message, problem: true };
          return;
        }
        const result = await service.save(plan.change);
        if (!result.ok) {
          this.notice = { text: result.message, problem: true };
          return;
        }
        this.history.record(made.change ? asSaved(made.step, service.book) : made.step);
        const done = result.merged ?? made.done;
        this.notice = done ? { text: done, problem: false } : undefined;
      } finally {
        this.busy -= 1;
      }
    });
    this.writes = run;
    return run;
  }

  private fromPlan(plan: PastePlan, label: string, done: string): { step: UndoStep<Variant>; done: string } | { problem: string } {
    if (!plan.ok) return { problem: plan.message };
    return { step: { label, changes: plan.changes.map((c) => ({ id: c.after.id, before: c.before, after: c.after })) }, done };
  }

  private target(order: readonly Variant[], r0: number, c0: number, r1: number, c1: number): PasteTarget {
    return { order, columns: this.columnCache?.family ?? [], row: r0, col: c0, lastRow: r1, lastCol: c1 };
  }

  /** The grid's order with each variant as it is in `book` now (by id). */
  private current(book: Book): Variant[] {
    const byId = new Map(book.variants.map((v) => [v.id, v] as const));
    return this.order.map((v) => byId.get(v.id) ?? v);
  }

  private readonly _onEditStart = (ev: CustomEvent<GridEditDetail>): void => {
    const id = ev.detail.rowId;
    this.editFrom = id === undefined ? undefined : this.books.book?.variants.find((v) => v.id === id);
  };

  private readonly _onCommit = (ev: CustomEvent<GridCommitDetail>): void => {
    const book = this.books.book;
    const d = ev.detail;
    if (!book) return;
    const variant = d.rowId === undefined ? undefined : book.variants.find((v) => v.id === d.rowId);
    if (d.rowId !== undefined && !variant) {
      d.refuse('This variant was deleted elsewhere; nothing was saved.');
      return;
    }
    const texts = { [d.key]: d.text };
    const check = editVariant(book, variant, texts, newVariantId);
    if (!check.ok) {
      d.refuse(`${check.key}: ${check.message}`);
      return;
    }
    const id = check.record.id;
    // A new row, or a new code, may sort elsewhere: the cursor goes with the record, not the row number.
    if (!variant || d.key === 'code') this.grid?.follow(id);
    const seen = variant && this.editFrom?.id === variant.id ? this.editFrom : variant;
    // The edit shows in its row at once, marked as saving, while the Book stores it (a new row waits for the Book).
    const shown = variant ? check.record : undefined;
    if (variant && shown) this.saving = new Map(this.saving).set(variant.id, shown);
    const saved = this.enqueue((now) => {
      const v = variant ? now.variants.find((x) => x.id === variant.id) : undefined;
      if (variant && !v) return { problem: `${variant.code} was deleted elsewhere; the edit was not saved.` };
      const r = editVariant(now, v && seen, texts, () => id);
      if (!r.ok) return { problem: `${v?.code ?? 'New variant'}, ${r.key}: ${r.message}. Nothing was saved.` };
      const label = v ? `edit ${d.key} of ${v.code}` : `add ${r.record.code}`;
      return { step: { label, changes: [{ id: r.record.id, before: v && seen, after: r.record }] }, done: '', change: { put: { variants: [r.record] } } };
    });
    // Stored or refused, the row shows the Book again (a later edit of the same row keeps its own mark).
    if (variant && shown) {
      void saved.finally(() => {
        if (this.saving.get(variant.id) !== shown) return;
        const next = new Map(this.saving);
        next.delete(variant.id);
        this.saving = next;
      });
    }
  };

  private readonly _onPaste = (ev: CustomEvent<GridPasteDetail>): void => {
    const book = this.books.book;
    const d = ev.detail;
    if (!book) return;
    const { r0, c0, r1, c1 } = d.range;
    const first = planPaste(book, this.target(this.order, r0, c0, r1, c1), d.rows, newVariantId);
    if (!first.ok) {
      d.refuse(first.message);
      return;
    }
    void this.enqueue((now) => {
      const plan = planPaste(now, this.target(this.current(now), r0, c0, r1, c1), d.rows, newVariantId);
      if (!plan.ok) return { problem: plan.message };
      const n = plan.changes.length;
      const parts = [plan.created ? `${plan.created} new ${plan.created === 1 ? 'variant' : 'variants'}` : '', plan.edited ? `${plan.edited} edited` : ''].filter(Boolean);
      const skipped = plan.skipped.length ? ` The worked-out columns (${plan.skipped.join(', ')}) were left as they are.` : '';
      return this.fromPlan(plan, `paste ${n} ${n === 1 ? 'row' : 'rows'}`, `Pasted: ${parts.join(', ')}.${skipped}`);
    });
  };

  private readonly _onClear = (ev: CustomEvent<GridClearDetail>): void => {
    const book = this.books.book;
    const d = ev.detail;
    if (!book) return;
    const { r0, c0, r1, c1 } = d.range;
    const first = planClear(book, this.target(this.order, r0, c0, r1, c1), newVariantId);
    if (!first.ok) {
      d.refuse(first.message);
      return;
    }
    void this.enqueue((now) => {
      const plan = planClear(now, this.target(this.current(now), r0, c0, r1, c1), newVariantId);
      return this.fromPlan(plan, `clear ${plan.ok ? plan.changes.length : 0} rows`, '');
    });
  };

  private selectedVariants(): Variant[] {
    const g = this.grid;
    if (!g) return [];
    const s = g.selection;
    return this.order.slice(s.r0, Math.min(s.r1, this.order.length - 1) + 1);
  }

  private readonly _onDuplicate = (): void => {
    const list = this.selectedVariants();
    if (list.length === 0) {
      this.notice = { text: 'Select the rows to duplicate first (the new-row line has nothing to copy).', problem: true };
      return;
    }
    void this.enqueue((now) => {
      const sources = list.map((v) => now.variants.find((x) => x.id === v.id)).filter((v): v is Variant => v !== undefined);
      const copies = duplicateVariants(now, sources, newVariantId);
      // The cursor goes to the (first) copy, so the next edit lands on it and not on the original.
      if (copies[0]) this.grid?.follow(copies[0].id, true);
      const label = `duplicate ${sources.map((v) => v.code).join(', ')}`;
      return { step: { label, changes: copies.map((c) => ({ id: c.id, before: undefined, after: c })) }, done: `Added ${copies.map((c) => c.code).join(', ')}.` };
    });
  };

  private readonly _onAskDelete = (): void => {
    const list = this.selectedVariants();
    const book = this.books.book;
    if (!book || list.length === 0) {
      this.notice = { text: 'Select the rows to delete first.', problem: true };
      return;
    }
    for (const v of list) {
      const users = variantUsers(book, v.id);
      if (users) {
        this.notice = { text: `${v.code}: ${users}`, problem: true };
        return;
      }
    }
    this.notice = undefined;
    this.confirmDelete = list;
  };

  private delete(list: Variant[]): void {
    this.confirmDelete = undefined;
    void this.enqueue((now) => {
      const changes = [];
      for (const v of list) {
        const cur = now.variants.find((x) => x.id === v.id);
        if (!cur) continue;
        const users = variantUsers(now, v.id);
        if (users) return { problem: `${v.code}: ${users}` };
        changes.push({ id: cur.id, before: cur, after: undefined });
      }
      const label = `delete ${list.map((v) => v.code).join(', ')}`;
      return { step: { label, changes }, done: `Deleted ${list.map((v) => v.code).join(', ')}.` };
    });
    if (this.editing?.variant && list.some((v) => v.id === this.editing!.variant!.id)) this.editing = undefined;
  }

  private readonly _onDetails = (): void => {
    const book = this.books.book;
    const v = this.selectedVariants()[0];
    if (!book || !v) {
      this.notice = { text: 'Select a variant first.', problem: true };
      return;
    }
    this.startEdit(book, v);
  };

  /** Undo or redo the last step, as one save; a step whose variants changed elsewhere is refused and forgotten. */
  private step(direction: Direction): void {
    const service = this.books.service;
    if (!service) return;
    this.busy += 1;
    this.writes = this.writes.then(async () => {
      try {
        const step = this.history.peek(direction);
        if (!step) return;
        const plan = stepChange(service.book, 'variants', step, direction, (v) => v.code);
        if (!plan.ok) {
          this.history.drop(direction);
          this.notice = { text: plan.message, problem: true };
          return;
        }
        for (const id of plan.change.delete?.variants ?? []) {
          const users = variantUsers(service.book, id);
          if (users) {
            const code = service.book.variants.find((v) => v.id === id)?.code ?? id;
            this.notice = { text: `“${step.label}” cannot be ${direction === 'undo' ? 'undone' : 'redone'}: ${code} ${users.charAt(0).toLowerCase()}${users.slice(1)}`, problem: true };
            return;
          }
        }
        const result = await service.save(plan.change);
        if (!result.ok) {
          this.notice = { text: result.message, problem: true };
          return;
        }
        this.history.settle(direction);
        this.notice = { text: `${direction === 'undo' ? 'Undone' : 'Redone'}: ${step.label}.`, problem: false };
      } finally {
        this.busy -= 1;
        this.requestUpdate();
      }
    });
  }

  private readonly _onKey = (ev: KeyboardEvent): void => {
    const mod = ev.ctrlKey || ev.metaKey;
    if (!mod || ev.altKey) return;
    const key = ev.key.toLowerCase();
    if (key !== 'z' && key !== 'y') return;
    // Inside a text field the browser's own undo of the typing applies.
    const inField = ev.composedPath().some((t) => t instanceof HTMLInputElement || t instanceof HTMLTextAreaElement || t instanceof HTMLSelectElement);
    if (inField) return;
    ev.preventDefault();
    this.step(key === 'y' || ev.shiftKey ? DIRECTIONS.redo : DIRECTIONS.undo);
  };

  // ---- the form (new variants with every parameter, notes, parameters of the Book's own)

  private renderForm(book: Book, e: Editing) {
    const d = e.draft;
    const set = (patch: Partial<VariantDraft>) => {
      if (this.editing) this.editing = { ...this.editing, draft: { ...this.editing.draft, ...patch } };
    };
    const setParam = (name: string, v: string) => set({ params: { ...d.params, [name]: v } });
    return html`<section class="sheet" aria-labelledby="variant-form-h">
      <h2 id="variant-form-h">${e.variant ? `Edit variant ${e.variant.code}` : 'New variant'}</h2>
      <p class="why">
        Values take engineering notation with or without the unit (230, 230 V, 470n, 0.47 uF, 4k7); fractions may be
        written as percentages (10 %). Leave a parameter blank to remove it.
      </p>
      ${saveRefusal(e.saveError, e.conflict, this.restartFromStored)}
      <form class="record" novalidate @submit=${(ev: Event) => this.submit(ev, book)} aria-label="Variant">
        ${field({ name: 'code', label: 'code', value: d.code, problem: e.problems.code, hint: 'short code, unique in the Book', onInput: (v) => set({ code: v }) })}
        ${field({ name: 'name', label: 'name', value: d.name, problem: e.problems.name, onInput: (v) => set({ name: v }) })}
        ${field({ name: 'notes', label: 'notes', value: d.notes, multiline: true, onInput: (v) => set({ notes: v }) })}
        ${group('parameters')}
        ${Object.keys(d.params).map((n) => {
          const std = VARIANT_PARAMS.find((p) => p.name === n);
          const info = paramInfo(n, ownValue(e.variant?.params, n));
          const hint = std ? `${std.doc}${std.unit ? ` (${std.unit})` : ''}` : info.unit ? `(${info.unit})` : 'a parameter of this Book';
          return field({ name: `param:${n}`, label: n, value: ownValue(d.params, n) ?? '', problem: e.problems[`param:${n}`], hint, onInput: (v) => setParam(n, v) });
        })}
        ${group('a parameter of your own')}
        ${field({
          name: 'newParamName',
          label: 'name',
          value: d.newParamName,
          problem: e.problems.newParamName,
          hint: 'for example r_gate; formulas read it by this name',
          onInput: (v) => set({ newParamName: v }),
        })}
        ${field({ name: 'newParamValue', label: 'value', value: d.newParamValue, problem: e.problems.newParamValue, onInput: (v) => set({ newParamValue: v }) })}
        <div class="actions">
          <button type="submit" class="primary">${e.variant ? 'Save the variant' : 'Add the variant'}</button>
          <button type="button" @click=${() => (this.editing = undefined)}>Cancel</button>
          ${nothingSaved(e.problems)}
        </div>
      </form>
    </section>`;
  }

  private startEdit(book: Book, variant: Variant | undefined): void {
    this.confirmDelete = undefined;
    this.editing = { variant, draft: variantDraft(book, variant), problems: {} };
    void this.updateComplete.then(() => this.renderRoot.querySelector<HTMLInputElement>('#f-code')?.focus());
  }

  private async submit(ev: Event, book: Book): Promise<void> {
    ev.preventDefault();
    const e = this.editing;
    const service = this.books.service;
    if (!e || !service) return;
    if (e.variant && !book.variants.some((v) => v.id === e.variant!.id)) {
      this.editing = { ...e, saveError: 'This variant was deleted elsewhere; nothing was saved.' };
      return;
    }
    const r = validateVariant(e.draft, book, e.variant, newVariantId);
    if (!r.ok) {
      this.editing = { ...e, problems: r.problems };
      await focusFirstProblem(this);
      return;
    }
    this.editing = { ...e, problems: {} };
    const before = e.variant ? book.variants.find((v) => v.id === e.variant!.id) : undefined;
    // The form saves from the revision it was opened at, so an edit made elsewhere meanwhile is reported, not lost.
    await this.writes;
    const result = await service.save({ put: { variants: [r.record] } });
    if (result.ok) {
      const after = service.book.variants.find((v) => v.id === r.record.id);
      this.history.record({ label: before ? `edit ${before.code}` : `add ${r.record.code}`, changes: [{ id: r.record.id, before, after }] });
      this.editing = undefined;
      this.requestUpdate();
    } else this.editing = { ...e, problems: {}, saveError: result.message, conflict: result.conflict };
  }

  /** After a refused save: re-read the Book and reopen the form on the stored version of the record. */
  private readonly restartFromStored = async (): Promise<void> => {
    const service = this.books.service;
    const id = this.editing?.variant?.id;
    if (!service || !id) return;
    await service.reload();
    const cur = service.book.variants.find((r) => r.id === id);
    if (cur) this.startEdit(service.book, cur);
    else this.editing = undefined;
  };
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-family-page': RbFamilyPage;
  }
}
