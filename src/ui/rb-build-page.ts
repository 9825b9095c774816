// Build page: the family bill of materials. Build lines with their part or part rule, quantity and applies-when
// rules (add, edit, delete, reorder; rules tried on every variant with the failures shown beside the field), and
// each variant's resolved BOM: which lines apply, which part, how many per unit.
import { LitElement, css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import { guard } from 'lit/directives/guard.js';
import type { Book, BuildLine } from '../domain/book.ts';
import { COST_CATEGORIES, newId } from '../domain/book.ts';
import { ROLES, VARIANT_PARAMS } from '../domain/params.ts';
import type { FamilyResolution } from '../engine/family.ts';
import { BookController } from './book-context.ts';
import { CostingService } from './costing-service.ts';
import { field, fieldId, focusFirstProblem, formulaField, nothingSaved } from './form-fields.ts';
import type { FieldProblems } from './record-forms.ts';
import { alternateProblem, buildLineDraft, findPart, lineSummaries, moveLine, orderedLines, trialProblems, validateBuildLine } from './build-rules.ts';
import { approvedParts } from '../domain/alternates.ts';
import type { BuildLineDraft, LineOutcome, LineSummary } from './build-rules.ts';
import type { NoticeDetail } from './rb-book-menu.ts';
import type { NameHint } from './rb-formula-input.ts';
import { pageStyles, previewStyles, toolbarSearchStyles } from './styles.ts';
import './rb-formula-input.ts';
import { ProgressiveRows, ROWS_PER_FRAME } from './progressive.ts';
import { afterNextFrame } from '../domain/slices.ts';
import { DIRECTIONS, UndoStack, stepChange } from './undo.ts';
import type { Direction, RecordChange } from './undo.ts';

type Editing = {
  line: BuildLine | undefined;
  draft: BuildLineDraft;
  problems: FieldProblems;
  preview: LineOutcome[];
  saveError?: string;
  /** The maker part number typed to approve next, and why it could not be. */
  altInput: string;
  altProblem?: string;
};

/** Names a build rule may use: the variant parameters (rules are read before parts and checks exist). */
function ruleNames(book: Book): NameHint[] {
  const out = new Map<string, NameHint>();
  for (const p of VARIANT_PARAMS) out.set(p.name, { name: p.name, doc: `parameter: ${p.doc}${p.unit ? ` (${p.unit})` : ''}`, kind: 'name' });
  for (const v of book.variants) {
    for (const name of Object.keys(v.params)) if (!out.has(name)) out.set(name, { name, doc: 'parameter of this Book', kind: 'name' });
  }
  return [...out.values()];
}

function pct(fraction: number): string {
  return `${Number((fraction * 100).toPrecision(4))} %`;
}

/** Whether two lists of build lines hold the same lines (by id) in the same order. */
function sameLineIds(a: readonly BuildLine[], b: readonly BuildLine[] | undefined): boolean {
  return b !== undefined && a.length === b.length && a.every((l, i) => l.id === b[i]!.id);
}

/**
 * The new summaries, each line's kept as the earlier object when it reads the same: a row whose standing did not move
 * is not drawn again.
 */
function steadySummaries(before: ReadonlyMap<string, LineSummary>, after: Map<string, LineSummary>): Map<string, LineSummary> {
  for (const [id, s] of after) {
    const b = before.get(id);
    if (
      b &&
      b.variants === s.variants &&
      b.applying === s.applying &&
      b.problem === s.problem &&
      b.failing.length === s.failing.length &&
      b.failing.every((code, i) => code === s.failing[i])
    )
      after.set(id, b);
  }
  return after;
}

function qtyText(n: number): string {
  return String(Number(n.toPrecision(6)));
}

@customElement('rb-build-page')
export class RbBuildPage extends LitElement {
  static override styles = [
    pageStyles,
    previewStyles,
    toolbarSearchStyles,
    css`
      td.nowrap {
        white-space: nowrap;
      }
      small.role {
        display: block;
        font-family: var(--rb-mono);
        font-size: 0.74rem;
        color: var(--rb-na);
      }
      td.rule code,
      td.rule span.code {
        font-family: var(--rb-mono);
        font-size: 0.8rem;
        display: inline-block;
        max-width: 11.5rem;
        overflow: hidden;
        text-overflow: ellipsis;
        white-space: nowrap;
        vertical-align: bottom;
      }
      td.rule small {
        display: block;
        color: var(--rb-na);
        font-size: 0.74rem;
      }
      td.rule small {
        white-space: nowrap;
      }
      td.rule small code {
        font-size: 0.74rem;
        max-width: 9.5rem;
        color: var(--rb-ink);
      }
      td.status {
        font-size: 0.82rem;
        min-width: 5rem;
        max-width: 16rem;
      }
      td.rule > small:not(:has(code)) {
        max-width: 12rem;
        white-space: normal;
      }
      .ok {
        color: var(--rb-pass);
      }
      .bad {
        color: var(--rb-fail);
      }
      .bad::before {
        content: '✗ ';
        font-weight: 700;
      }
      .ok::before {
        content: '✓ ';
        font-weight: 700;
      }
      tr.off td {
        color: var(--rb-na);
      }
      tr.off td.code {
        text-decoration: line-through;
      }
      tr.saving td {
        color: var(--rb-na);
      }
      tr.problem td {
        background: var(--rb-fail-bg);
      }
      .preview span.fail {
        color: var(--rb-fail);
        background: var(--rb-fail-bg);
      }
      .preview span.na {
        color: var(--rb-na);
        border-style: dashed;
      }
      /*
       * The line tried on every variant (a large family has hundreds): a scrolled box of its own height, so drawing a
       * new trial as the rules are typed lays out and paints the box alone, not the page and its table below.
       */
      form.record .preview {
        height: 7.5rem;
        overflow-y: auto;
        align-content: flex-start;
        contain: strict;
      }
      form.record rb-formula-input {
        min-width: 0;
      }
      button.move {
        padding: 0.05rem 0.4rem;
        font-family: var(--rb-mono);
      }
      .totals {
        font-size: 0.88rem;
        margin: 0.6rem 0 0;
      }
      small.single {
        color: var(--rb-margin, var(--rb-na));
      }
      small.single::before {
        content: '◆ ';
      }
      .alternates ol {
        margin: 0 0 0.3rem;
        padding-left: 1.4rem;
      }
      .alternates li {
        margin: 0.1rem 0;
      }
      .alternates .add {
        display: flex;
        gap: 0.4rem;
      }
      /*
       * Each line's row painted on its own: an edit's row marked as saving, or the form closing above the list, had
       * the browser paint all 80 rows of the reference family again (about 9 ms a frame in Chromium here); a
       * positioned row gets a paint layer of its own, so the browser paints the changed row and reuses the rest's
       * painting (under 1 ms).
       */
      table[data-testid='build-lines'] tbody tr {
        position: relative;
      }
      /* Below the line list: the browser lays it out and paints it only when it comes near the view. */
      section.bom {
        content-visibility: auto;
        contain-intrinsic-size: auto 40rem;
      }
    `,
  ];

  private readonly books = new BookController(this, { figures: true });
  /**
   * Long tables draw a slice of rows per frame. A build line's row is heavy (rules, attrition, its standing across the
   * variants, four buttons): the 80 lines of a large family took about 0.1 s to draw and lay out at once, so more than
   * one slice of them is drawn a slice per frame.
   */
  private readonly drawnLines = new ProgressiveRows(this, ROWS_PER_FRAME, ROWS_PER_FRAME);
  private readonly drawnBom = new ProgressiveRows(this);
  private family: FamilyResolution | undefined;
  /** Each line's standing across the variants, worked out once per Book and resolution. */
  private summaries = new Map<string, LineSummary>();
  /** The Book's parts by id, kept while the parts are the same. */
  private partsById: { of: Book['parts']; map: Map<string, Book['parts'][number]> } | undefined;
  private familyBook: Book | undefined;
  /** The figures' version the resolved lines were read at (they arrive from the worker after the Book changes). */
  private familyVersion = -1;
  private names: readonly NameHint[] = [];
  /** The variants the rule names were read from. */
  private namesOf: Book['variants'] | undefined;
  private timer: ReturnType<typeof setTimeout> | undefined;
  /** Saved line edits (add, edit, move, delete), undone and redone as one Book change each. */
  private readonly history = new UndoStack<BuildLine>();
  /** The Book replacement the undo steps belong to (see BookService.replacements). */
  private replacementSeen = 0;
  @state() private historyMessage: string | undefined;

  @state() private editing: Editing | undefined;
  /**
   * Line edits shown in the table while they are tried on the variants and stored: the form closes at once and the
   * row shows the edit marked as saving. A save that fails puts the row back as stored and opens the form again with
   * the reason (or, when another line is being edited by then, says it on the row).
   */
  @state() private saving: ReadonlyMap<string, BuildLine> = new Map();
  @state() private confirmDelete: string | undefined;
  @state() private rowProblem: { id: string; message: string } | undefined;
  @state() private filter = '';
  @state() private bomVariant = '';
  @state() private onlyApplying = true;

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    clearTimeout(this.timer);
  }

  override willUpdate(): void {
    const book = this.books.book;
    const service = this.books.service;
    if (!book || !service) return;
    if (service.replacements !== this.replacementSeen) {
      // The whole Book was replaced: undo steps of its lines belong to a Book that is gone.
      this.replacementSeen = service.replacements;
      this.history.clear();
      this.historyMessage = undefined;
    }
    const costing = CostingService.for(service);
    costing.sync();
    if (book === this.familyBook && costing.version === this.familyVersion) return;
    // The shared service keeps the family resolved as the Book changes; the Family and Compare pages read the same.
    // A line edit changes the Book at once and the resolution when the figures come: until then (same version, same
    // lines and variants) the lines' standing is as it was, and is not counted again.
    const earlier = this.familyBook;
    if (costing.version !== this.familyVersion || !earlier || earlier.variants !== book.variants || !sameLineIds(book.buildLines, earlier.buildLines)) {
      const family = costing.resolution();
      this.family = family;
      if (this.summaries.size > 0 || book.buildLines.length === 0) this.summaries = steadySummaries(this.summaries, lineSummaries(book, family));
      else {
        // The page's first drawing: its lines show at once, and their standing across the variants (a pass over
        // every variant's lines, 10 ms or more the first time on a large family) is counted after that frame.
        const version = costing.version;
        void afterNextFrame().then(() => {
          if (this.familyBook !== book || this.familyVersion !== version || this.summaries.size > 0) return;
          this.summaries = lineSummaries(book, family);
          this.requestUpdate();
        });
      }
    }
    this.familyVersion = costing.version;
    this.familyBook = book;
    if (this.namesOf !== book.variants) {
      this.names = ruleNames(book);
      this.namesOf = book.variants;
    }
    if (!book.variants.some((v) => v.id === this.bomVariant)) this.bomVariant = book.variants[0]?.id ?? '';
  }

  override render() {
    const book = this.books.book;
    const family = this.family;
    if (!book || !family) return html``;
    return html`${this.editing ? this.renderForm(book, this.editing) : ''}${this.renderLines(book, family)}${this.renderBom(book, family)}`;
  }

  // -------------------------------------------------------------------------------------------------------------
  // The lines

  private parts(book: Book): Map<string, Book['parts'][number]> {
    if (this.partsById?.of !== book.parts) this.partsById = { of: book.parts, map: new Map(book.parts.map((p) => [p.id, p] as const)) };
    return this.partsById.map;
  }

  private renderLines(book: Book, family: FamilyResolution): TemplateResult {
    const f = this.filter.trim().toLowerCase();
    const parts = this.parts(book);
    const saving = this.saving;
    const stored = orderedLines(book);
    const all = saving.size === 0 ? stored : stored.map((l) => saving.get(l.id) ?? l);
    const lines = f
      ? all.filter((l) =>
          `${l.designators} ${l.partRule ?? ''} ${parts.get(l.partId ?? '')?.mpn ?? ''} ${l.category} ${l.role ?? ''} ${l.appliesWhen} ${l.notes ?? ''}`
            .toLowerCase()
            .includes(f),
        )
      : all;
    const failing = new Set(family.problems.map((p) => p.lineId));
    const index = new Map(all.map((l, i) => [l.id, i] as const));
    return html`<section class="sheet" aria-labelledby="lines-h">
      <h2 id="lines-h">Build lines of the family</h2>
      <p class="why">
        ${all.length} lines. Each line names a part, or a part rule that picks a maker part number per variant; a quantity
        rule (parts per finished unit) and an applies-when rule are formulas over the variant's parameters. Every rule is
        tried on all ${book.variants.length} variants; ${failing.size === 0 ? 'all of them resolve.' : `${failing.size} ${failing.size === 1 ? 'line fails' : 'lines fail'} for some variant (marked ✗).`}
      </p>
      <div class="toolbar">
        <button type="button" class="primary" @click=${() => this.startEdit(book, undefined)}>Add a build line</button>
        <input
          type="search"
          placeholder="Filter by designator, part, rule, category…"
          aria-label="Filter build lines"
          .value=${this.filter}
          @input=${(e: Event) => (this.filter = (e.target as HTMLInputElement).value)}
        />
        ${f ? html`<span class="muted">${lines.length} shown; moving lines works on the whole list</span>` : ''}
        ${this.renderHistory()}
      </div>
      ${this.historyMessage ? html`<p class="notice" role="alert" data-testid="build-undo-message">${this.historyMessage}</p>` : ''}
      ${all.length === 0
        ? html`<p class="empty">No build lines yet. Add the first one above.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="build-lines">
              <thead>
                <tr>
                  <th class="num">#</th>
                  <th>designators</th>
                  <th>part / part rule</th>
                  <th>qty per unit · applies when</th>
                  <th>category · role · buying</th>
                  <th>variants</th>
                  <th><span class="muted">actions</span></th>
                </tr>
              </thead>
              <tbody>
                ${this.drawnLines.take(lines).map((l) => this.renderRow(book, parts, l, index.get(l.id)!, all.length))}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  /**
   * A line's row, drawn again only when something it shows changed: an edit saved or tried changes one row, and the
   * other rows of a long list are left as they are.
   */
  private renderRow(book: Book, parts: ReadonlyMap<string, Book['parts'][number]>, l: BuildLine, index: number, count: number) {
    const problem = this.rowProblem?.id === l.id ? this.rowProblem.message : undefined;
    const deps = [
      l,
      book.parts,
      book.suppliers,
      book.settings.attrition,
      this.summaries.get(l.id),
      this.confirmDelete === l.id,
      problem,
      this.saving.has(l.id),
      this.editing?.line?.id === l.id,
      index,
      count,
    ];
    return guard(deps, () => this.renderLine(book, parts, l, index, count));
  }

  private renderLine(book: Book, parts: ReadonlyMap<string, Book['parts'][number]>, l: BuildLine, index: number, count: number): TemplateResult {
    const part = l.partId ? parts.get(l.partId) : undefined;
    const pin = l.pinnedSupplierId ? book.suppliers.find((s) => s.id === l.pinnedSupplierId) : undefined;
    const summary = this.summaries.get(l.id);
    const bad = summary?.failing ?? [];
    const applying = summary?.applying ?? 0;
    const tried = summary?.variants ?? 0;
    const confirming = this.confirmDelete === l.id;
    const rowProblem = this.rowProblem?.id === l.id ? this.rowProblem.message : undefined;
    const saving = this.saving.has(l.id);
    const defaultAttrition = part ? (book.settings.attrition[part.kind] ?? book.settings.attrition['default']) : book.settings.attrition['default'];
    return html`<tr class="${this.editing?.line?.id === l.id ? 'editing' : ''} ${bad.length ? 'problem' : ''} ${saving ? 'saving' : ''}" data-id=${l.id}>
      <td class="num">${index + 1}</td>
      <td class="code">${l.designators}</td>
      <td class="rule">
        ${l.partRule
          ? html`<code title=${l.partRule}>${l.partRule}</code><small>part rule</small>`
          : html`<span class="code">${part?.mpn ?? l.partId ?? ''}</span><small>${part?.description ?? (l.partId ? 'part not in the Book' : '')}</small>`}
        ${this.renderApproved(book, l)}
      </td>
      <td class="rule">
        <code title=${l.qtyRule}>${l.qtyRule}</code>
        <small>${l.appliesWhen ? html`when <code title=${l.appliesWhen}>${l.appliesWhen}</code>` : 'always'}</small>
      </td>
      <td class="nowrap">
        ${l.category}${l.role ? html`<small class="role">role ${l.role}</small>` : ''}
        <small class="role" title=${l.attrition === undefined ? "the Book's default for the part kind" : 'set on this line'}
          >attrition ${l.attrition !== undefined ? pct(l.attrition) : defaultAttrition === undefined ? '—' : `${pct(defaultAttrition)} (default)`}</small
        >
        ${pin ? html`<small class="role">pinned: ${pin.name}</small>` : l.pinnedSupplierId ? html`<small class="bad">pinned to a supplier not in the Book</small>` : ''}
      </td>
      <td class="status" data-testid="line-status">
        ${saving
          ? html`<span class="muted" role="status">saving…</span>`
          : bad.length
          ? html`<span class="bad">fails for ${bad.join(', ')}: ${summary!.problem}</span>`
          : summary === undefined
          ? html`<span class="muted">being counted…</span>`
          : html`<span class="ok" title="fitted on ${applying} of ${tried} variants">${applying} of ${tried}</span>`}
      </td>
      <td class="acts">
        ${saving
          ? ''
          : confirming
          ? html`Delete ${l.designators}?
              <button type="button" class="danger" @click=${() => this.delete(l)}>Delete</button>
              <button type="button" class="quiet" @click=${() => (this.confirmDelete = undefined)}>Keep</button>`
          : html`<button type="button" class="move" aria-label="Move ${l.designators} up" ?disabled=${index === 0} @click=${() => this.move(l, -1)}>↑</button>
              <button type="button" class="move" aria-label="Move ${l.designators} down" ?disabled=${index === count - 1} @click=${() => this.move(l, 1)}>↓</button>
              <button type="button" class="quiet" @click=${() => this.startEdit(this.books.book ?? book, l)}>edit</button>
              <button type="button" class="quiet" @click=${() => this.askDelete(l)}>delete</button>`}
        ${rowProblem ? html`<div class="bad" role="alert">${rowProblem}</div>` : ''}
      </td>
    </tr>`;
  }

  private renderHistory(): TemplateResult | '' {
    const undo = this.history.peek(DIRECTIONS.undo);
    const redo = this.history.peek(DIRECTIONS.redo);
    if (!undo && !redo) return '';
    return html`<button type="button" data-testid="build-undo" ?disabled=${!undo} @click=${() => void this.step(DIRECTIONS.undo)}>
        ↶ Undo${undo ? html` <span class="muted">${undo.label}</span>` : ''}
      </button>
      <button type="button" data-testid="build-redo" ?disabled=${!redo} @click=${() => void this.step(DIRECTIONS.redo)}>
        ↷ Redo${redo ? html` <span class="muted">${redo.label}</span>` : ''}
      </button>`;
  }

  /** Undoes or redoes the last line edit, unless a line it touched changed since (then says so, changes nothing). */
  private async step(direction: Direction): Promise<void> {
    const service = this.books.service;
    const step = this.history.peek(direction);
    if (!service || !step) return;
    const plan = stepChange(service.book, 'buildLines', step, direction, (l) => `line ${l.designators}`);
    if (!plan.ok) {
      this.history.drop(direction);
      this.historyMessage = plan.message;
      return;
    }
    const result = await service.save(plan.change);
    if (result.ok) {
      this.history.settle(direction);
      this.historyMessage = undefined;
    } else this.historyMessage = result.message;
  }

  /** Remembers a saved edit of these lines (as they were before it) for undo. */
  private remember(label: string, before: readonly (BuildLine | undefined)[], ids: readonly string[]): void {
    const now = new Map((this.books.service?.book.buildLines ?? []).map((l) => [l.id, l] as const));
    const changes: RecordChange<BuildLine>[] = ids.map((id, i) => ({ id, before: before[i], after: now.get(id) }));
    this.history.record({ label, changes });
    this.historyMessage = undefined;
  }

  /** A line's approved alternates and pinned part, or the single-source mark when it has nothing to fall back on. */
  private renderApproved(book: Book, l: BuildLine): TemplateResult {
    const mpn = (id: string): string => book.parts.find((p) => p.id === id)?.mpn ?? id;
    const alts = l.alternates ?? [];
    if (approvedParts(l).length <= 1 && l.partRule === undefined) {
      return html`<small class="single" data-testid="single-source" title="one approved part: nothing to fall back on when it cannot be had">single source</small>`;
    }
    if (alts.length === 0) {
      return html`<small class="single" data-testid="single-source" title="the rule picks one part per variant: nothing approved to fall back on">single source per variant</small>`;
    }
    return html`<small data-testid="approved-alternates">approved alternates: ${alts.map(mpn).join(', ')}</small>${l.pinnedPartId
        ? html`<small>pinned part: ${mpn(l.pinnedPartId)}</small>`
        : ''}`;
  }

  // -------------------------------------------------------------------------------------------------------------
  // The form

  private renderForm(book: Book, e: Editing): TemplateResult {
    const d = e.draft;
    const p = e.problems;
    const set = (patch: Partial<BuildLineDraft>) => {
      if (!this.editing) return;
      this.editing = { ...this.editing, draft: { ...this.editing.draft, ...patch } };
      this.schedulePreview();
    };
    const formula = (name: 'partRule' | 'qtyRule' | 'appliesWhen', label: string, hint: string, placeholder: string) =>
      formulaField({ name, label, value: d[name], names: this.names, problem: p[name], hint, placeholder, onInput: (v) => set({ [name]: v }) });
    const mpns = [...book.parts].sort((a, b) => a.mpn.localeCompare(b.mpn));
    return html`<section class="sheet" aria-labelledby="line-form-h">
      <h2 id="line-form-h">${e.line ? `Edit build line ${e.line.designators}` : 'New build line'}</h2>
      <p class="why">
        Rules are formulas over the variant's parameters, for example <code>steps - 1</code> or
        <code>IF(load_w>100, "part A", "part B")</code>. The line is tried on every variant as you type.
      </p>
      ${e.saveError ? html`<p class="notice" role="alert">${e.saveError}</p>` : ''}
      <form class="record" novalidate aria-label="Build line" @submit=${(ev: Event) => this.submit(ev)}>
        ${field({ name: 'designators', label: 'designators', value: d.designators, problem: p.designators, hint: 'reference designators, e.g. R5 or C6, C7', onInput: (v) => set({ designators: v }) })}
        <label for=${fieldId('part')}>part</label>
        <input
          id=${fieldId('part')}
          name="part"
          list="build-part-list"
          autocomplete="off"
          spellcheck="false"
          .value=${d.part}
          aria-invalid=${p.part ? 'true' : 'false'}
          @input=${(ev: Event) => set({ part: (ev.target as HTMLInputElement).value })}
        />
        ${p.part
          ? html`<span class="problem" data-problem-for="part" role="alert">${p.part}</span>`
          : html`<span class="hint">maker part number of a fixed part; leave blank when a part rule chooses it</span>`}
        <datalist id="build-part-list">${mpns.map((x) => html`<option value=${x.mpn}>${x.description}</option>`)}</datalist>
        ${formula('partRule', 'part rule', 'a formula giving a maker part number per variant; wins over the fixed part', 'IF(stage="triac", "…", "…")')}
        ${this.renderAlternatesField(book, e)}
        ${formula('qtyRule', 'qty rule', 'parts per finished unit, e.g. 1, 2 or steps - 1', '1')}
        ${formula('appliesWhen', 'applies when', 'blank for every variant; e.g. supply="dropper"', '')}
        ${field({ name: 'category', label: 'category', value: d.category, problem: p.category, choices: COST_CATEGORIES, hint: 'where the cost is counted in the split', onInput: (v) => set({ category: v }) })}
        <label for=${fieldId('role')}>role</label>
        <input
          id=${fieldId('role')}
          name="role"
          list="build-role-list"
          autocomplete="off"
          spellcheck="false"
          .value=${d.role}
          aria-invalid=${p.role ? 'true' : 'false'}
          @input=${(ev: Event) => set({ role: (ev.target as HTMLInputElement).value })}
        />
        ${p.role
          ? html`<span class="problem" data-problem-for="role" role="alert">${p.role}</span>`
          : html`<span class="hint">optional; checks read the part's ratings as &lt;role&gt;_&lt;rating&gt;</span>`}
        <datalist id="build-role-list">${ROLES.map((r) => html`<option value=${r}></option>`)}</datalist>
        ${field({ name: 'attrition', label: 'attrition %', value: d.attrition, problem: p.attrition, hint: 'extra parts bought for losses; blank = the Book’s default for the part kind', onInput: (v) => set({ attrition: v }) })}
        ${field({
          name: 'pinnedSupplier',
          label: 'pinned supplier',
          value: d.pinnedSupplier,
          problem: p.pinnedSupplier,
          choices: book.suppliers.map((s) => s.name).sort(),
          hint: 'buy this line only from this supplier; — = the cheapest usable quote',
          onInput: (v) => set({ pinnedSupplier: v }),
        })}
        ${field({ name: 'notes', label: 'notes', value: d.notes, multiline: true, onInput: (v) => set({ notes: v }) })}
        <span></span>
        <div class="preview" aria-label="The line on every variant" data-testid="line-preview">
          ${e.preview.map((o) =>
            o.problem !== undefined
              ? html`<span class="fail" title=${o.problem}>${o.variantCode} ✗ ${o.problem}</span>`
              : o.applies && o.qtyPerUnit > 0
                ? html`<span>${o.variantCode} ✓ ${o.mpn} × ${qtyText(o.qtyPerUnit)}</span>`
                : html`<span class="na">${o.variantCode} – not fitted</span>`,
          )}
        </div>
        <span></span>
        <div class="actions">
          <button type="submit" class="primary">${e.line ? 'Save the line' : 'Add the line'}</button>
          <button type="button" @click=${() => (this.editing = undefined)}>Cancel</button>
          ${nothingSaved(p)}
        </div>
      </form>
    </section>`;
  }

  /**
   * The approved alternates of the line, best first, each moved up or down or taken off, a part of the Book to
   * approve next (refused beside the field with the reason, nothing changed), and the approved part to pin.
   */
  private renderAlternatesField(book: Book, e: Editing): TemplateResult {
    const d = e.draft;
    const change = (patch: Partial<BuildLineDraft>, rest: Partial<Editing> = {}) => {
      if (!this.editing) return;
      this.editing = { ...this.editing, ...rest, draft: { ...this.editing.draft, ...patch } };
    };
    const move = (i: number, step: -1 | 1) => {
      const list = [...d.alternates];
      [list[i], list[i + step]] = [list[i + step]!, list[i]!];
      change({ alternates: list });
    };
    const remove = (i: number) => {
      const gone = d.alternates[i]!;
      change({ alternates: d.alternates.filter((_, k) => k !== i), pinnedPart: d.pinnedPart === gone ? '' : d.pinnedPart });
    };
    const add = () => {
      const cur = this.editing;
      if (!cur) return;
      const bad = alternateProblem(cur.altInput, cur.draft, book);
      if (bad) {
        this.editing = { ...cur, altProblem: bad };
        return;
      }
      const { altProblem: _refused, ...rest } = cur;
      const part = findPart(book, cur.altInput.trim())!;
      this.editing = { ...rest, altInput: '', draft: { ...cur.draft, alternates: [...cur.draft.alternates, part.mpn] } };
    };
    const problem = e.altProblem ?? e.problems['alternates'];
    const desc = (mpn: string): string => book.parts.find((p) => p.mpn === mpn)?.description ?? '';
    return html`<label for=${fieldId('alternate')}>approved alternates</label>
      <div class="alternates" data-testid="alternates">
        ${d.alternates.length > 0
          ? html`<ol aria-label="Approved alternates, best first">
              ${d.alternates.map(
                (mpn, i) => html`<li>
                  <span class="code">${mpn}</span> <small class="muted">${desc(mpn)}</small>
                  <button type="button" class="move" aria-label="Rank ${mpn} higher" ?disabled=${i === 0} @click=${() => move(i, -1)}>↑</button>
                  <button type="button" class="move" aria-label="Rank ${mpn} lower" ?disabled=${i === d.alternates.length - 1} @click=${() => move(i, 1)}>↓</button>
                  <button type="button" class="quiet" aria-label="Remove ${mpn}" @click=${() => remove(i)}>remove</button>
                </li>`,
              )}
            </ol>`
          : ''}
        <div class="add">
          <input
            id=${fieldId('alternate')}
            name="alternate"
            list="build-part-list"
            autocomplete="off"
            spellcheck="false"
            placeholder="maker part number"
            .value=${e.altInput}
            aria-invalid=${problem ? 'true' : 'false'}
            @input=${(ev: Event) => {
              if (this.editing) this.editing = { ...this.editing, altInput: (ev.target as HTMLInputElement).value };
            }}
            @keydown=${(ev: KeyboardEvent) => {
              if (ev.key !== 'Enter') return;
              ev.preventDefault();
              add();
            }}
          />
          <button type="button" @click=${add}>Approve</button>
        </div>
      </div>
      ${problem
        ? html`<span class="problem" data-problem-for="alternates" role="alert">${problem}</span>`
        : html`<span class="hint">second sources of the line's part, best first; checks judge every approved part and report the worst</span>`}
      ${field({
        name: 'pinnedPart',
        label: 'pinned part',
        value: d.pinnedPart,
        problem: e.problems['pinnedPart'],
        choices: d.part.trim() === '' ? d.alternates : [d.part.trim(), ...d.alternates],
        hint: 'costing buys only this approved part; — = the cheapest that can be had in time',
        onInput: (v) => change({ pinnedPart: v }),
      })}`;
  }

  private startEdit(book: Book, line: BuildLine | undefined): void {
    this.confirmDelete = undefined;
    this.rowProblem = undefined;
    this.editing = { line, draft: buildLineDraft(book, line), problems: {}, preview: [], altInput: '' };
    this.schedulePreview();
    void this.updateComplete.then(() => {
      this.renderRoot.querySelector<HTMLElement>('#line-form-h')?.scrollIntoView({ block: 'nearest' });
      this.renderRoot.querySelector<HTMLInputElement>(`#${fieldId('designators')}`)?.focus();
    });
  }

  private schedulePreview(): void {
    clearTimeout(this.timer);
    this.timer = setTimeout(() => this.runPreview(), 250);
  }

  /** Tries the draft on every variant (off the page's thread) and shows how each resolves it beside the form. */
  private runPreview(): void {
    const book = this.books.book;
    const service = this.books.service;
    const e = this.editing;
    if (!book || !service || !e) return;
    const v = validateBuildLine(e.draft, book, e.line, () => 'line_draft');
    if (!v.ok) {
      this.editing = { ...e, preview: [] };
      return;
    }
    const draft = e.draft;
    CostingService.for(service)
      .trialLine(v.record)
      .then(
        (outcomes) => {
          // Only while the same draft is still being edited.
          if (this.editing?.draft === draft) this.editing = { ...this.editing, preview: outcomes };
        },
        () => undefined,
      );
  }

  private async submit(ev: Event): Promise<void> {
    ev.preventDefault();
    clearTimeout(this.timer);
    const service = this.books.service;
    const book = this.books.book;
    const e = this.editing;
    if (!service || !book || !e) return;
    const held = e.line ? book.buildLines.find((l) => l.id === e.line!.id) : undefined;
    if (e.line && !held) {
      this.editing = { ...e, saveError: 'This line was deleted elsewhere; nothing was saved.' };
      return;
    }
    const v = validateBuildLine(e.draft, book, held, () => newId('line'));
    if (!v.ok) {
      this.editing = { ...e, problems: v.problems, preview: [] };
      await focusFirstProblem(this);
      return;
    }
    // An edited line is shown in the table at once, marked as saving, while it is tried and stored.
    if (held) this.showSaving(held.id, v.record);
    let outcomes: LineOutcome[];
    try {
      outcomes = await CostingService.for(service).trialLine(v.record);
    } catch (err) {
      this.failed(e, { saveError: `The line could not be tried on the variants; nothing was saved: ${err instanceof Error ? err.message : String(err)}` });
      return;
    }
    const problems = trialProblems(outcomes);
    if (Object.keys(problems).length > 0) {
      if (this.failed(e, { problems, preview: outcomes })) await focusFirstProblem(this);
      return;
    }
    const result = await service.save({ put: { buildLines: [v.record] } });
    if (!result.ok) {
      this.failed(e, { problems: {}, saveError: result.message });
      return;
    }
    if (held) this.showSaving(held.id, undefined);
    this.remember(`${held ? 'edit' : 'add'} line ${v.record.designators}`, [held], [v.record.id]);
    // An edited line's form closed when its row showed the edit, and the row says it is saved: a notice above the
    // page would move every row down and back as it came and went. A new line's form stays open while it saves,
    // then closes with a notice: its row may be out of view.
    if (held) return;
    this.editing = undefined;
    this.dispatchEvent(
      new CustomEvent<NoticeDetail>('rb-notice', {
        detail: { tone: 'done', title: `Build line ${v.record.designators} saved`, lines: [] },
        bubbles: true,
        composed: true,
      }),
    );
  }

  /** Shows `line` in the table in place of the stored line `id` while it saves (closing its form), or stops. */
  private showSaving(id: string, line: BuildLine | undefined): void {
    const next = new Map(this.saving);
    if (line) next.set(id, line);
    else next.delete(id);
    this.saving = next;
    if (line && this.editing?.line?.id === id) this.editing = undefined;
  }

  /**
   * A line edit that was not saved: its row goes back to the line as stored, and the form opens again with the edit
   * and why; when another edit has the form by then, the reason is said on the row. True when the form was opened.
   */
  private failed(e: Editing, why: Partial<Editing>): boolean {
    const id = e.line?.id;
    if (id) this.showSaving(id, undefined);
    if (!id || this.editing === undefined || this.editing === e) {
      this.editing = { ...e, ...why };
      return true;
    }
    if (id) this.rowProblem = { id, message: why.saveError ?? `Not saved: ${Object.values(why.problems ?? {}).join('; ')}` };
    return false;
  }

  private async move(l: BuildLine, step: -1 | 1): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    const changed = moveLine(service.book, l.id, step);
    if (changed.length === 0) return;
    const before = changed.map((c) => service.book.buildLines.find((x) => x.id === c.id));
    const result = await service.save({ put: { buildLines: changed } });
    this.rowProblem = result.ok ? undefined : { id: l.id, message: result.message };
    if (result.ok) this.remember(`move line ${l.designators}`, before, changed.map((c) => c.id));
  }

  private askDelete(l: BuildLine): void {
    this.rowProblem = undefined;
    this.confirmDelete = l.id;
  }

  private async delete(l: BuildLine): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    this.confirmDelete = undefined;
    const before = service.book.buildLines.find((x) => x.id === l.id);
    const result = await service.save({ delete: { buildLines: [l.id] } });
    if (!result.ok) this.rowProblem = { id: l.id, message: result.message };
    else this.remember(`delete line ${l.designators}`, [before], [l.id]);
    if (this.editing?.line?.id === l.id) this.editing = undefined;
  }

  // -------------------------------------------------------------------------------------------------------------
  // Per-variant resolved BOM

  private renderBom(book: Book, family: FamilyResolution): TemplateResult {
    const variant = book.variants.find((v) => v.id === this.bomVariant);
    const resolved = family.variants.find((v) => v.variantId === this.bomVariant);
    const parts = this.parts(book);
    const lines = new Map(book.buildLines.map((l) => [l.id, l] as const));
    const rows = (resolved?.lines ?? []).map((r) => ({
      r,
      line: lines.get(r.lineId),
      problem: resolved?.problems.filter((p) => p.lineId === r.lineId).map((p) => p.message).join('; ') ?? '',
    }));
    const fitted = rows.filter((x) => x.r.applies && x.r.qtyPerUnit > 0 && x.problem === '');
    const shown = this.onlyApplying ? rows.filter((x) => (x.r.applies && x.r.qtyPerUnit > 0) || x.problem !== '') : rows;
    const pieces = fitted.reduce((n, x) => n + x.r.qtyPerUnit, 0);
    const placements = fitted.reduce((n, x) => n + x.r.qtyPerUnit * (parts.get(x.r.partId ?? '')?.placements ?? 1), 0);
    return html`<section class="sheet bom" aria-labelledby="bom-h">
      <h2 id="bom-h">Resolved BOM of one variant</h2>
      <p class="why">The build lines as they stand for the chosen variant: whether each applies, the part its rules pick, and how many per finished unit.</p>
      ${book.variants.length === 0
        ? html`<p class="empty">No variants yet; add them on the Family page.</p>`
        : html`<div class="toolbar">
              <label
                >variant
                <select
                  aria-label="Variant"
                  data-testid="bom-variant"
                  @change=${(e: Event) => (this.bomVariant = (e.target as HTMLSelectElement).value)}
                >
                  ${book.variants.map((v) => html`<option value=${v.id} ?selected=${v.id === this.bomVariant}>${v.code} · ${v.name}</option>`)}
                </select></label
              >
              <label
                ><input
                  type="checkbox"
                  .checked=${this.onlyApplying}
                  @change=${(e: Event) => (this.onlyApplying = (e.target as HTMLInputElement).checked)}
                />
                only lines that are fitted</label
              >
            </div>
            <div class="scroll">
              <table class="records" data-testid="resolved-bom">
                <thead>
                  <tr>
                    <th>designators</th>
                    <th>fitted</th>
                    <th>mpn</th>
                    <th>description</th>
                    <th class="num">qty per unit</th>
                    <th>category</th>
                    <th>problem</th>
                  </tr>
                </thead>
                <tbody>
                  ${this.drawnBom.take(shown).map(({ r, line, problem }) => {
                    const part = r.partId ? parts.get(r.partId) : undefined;
                    const on = r.applies && r.qtyPerUnit > 0;
                    return html`<tr class=${problem ? 'problem' : on ? '' : 'off'} data-line=${r.lineId}>
                      <td class="code">${line?.designators ?? r.lineId}</td>
                      <td>${problem ? html`<span class="bad">error</span>` : on ? html`<span class="ok">yes</span>` : '– no'}</td>
                      <td class="code">${on ? (part?.mpn ?? '') : ''}</td>
                      <td>${on ? (part?.description ?? '') : ''}</td>
                      <td class="num">${on ? qtyText(r.qtyPerUnit) : ''}</td>
                      <td>${line?.category ?? ''}</td>
                      <td>${problem ? html`<span class="bad">${problem}</span>` : ''}</td>
                    </tr>`;
                  })}
                </tbody>
              </table>
            </div>
            <p class="totals" data-testid="bom-totals">
              ${variant?.code ?? ''}: ${fitted.length} lines fitted, ${qtyText(pieces)} parts and ${qtyText(placements)} placements per unit.
            </p>`}
    </section>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-build-page': RbBuildPage;
  }
}
