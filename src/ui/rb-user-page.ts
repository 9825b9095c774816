// One of the user's own notebook pages: headed sections of plain text and small formula grids that may read the Book
// by name (VAR, CHECK, CHECK_STATUS, PART_PRICE, PART_COST). The page can be renamed, deleted and rearranged; every
// change is saved in the Book, and the grids recalculate whenever the Book changes.
import { LitElement, css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book, NotebookPage, NotebookSection } from '../domain/book.ts';
import { formatValue } from '../domain/units.ts';
import { CELL_KIND, NOTEBOOK_LIMITS, cellAddress, evaluateNotebookPage, notebookCellProblem, sectionSheetName } from '../engine/notebook.ts';
import type { NotebookCell, NotebookResult } from '../engine/notebook.ts';
import { BookController } from './book-context.ts';
import { PAGES } from './pages.ts';
import { notebookPageProblem } from './record-forms.ts';
import type { NameHint } from './rb-formula-input.ts';
import { pageStyles, ruledControlStyles } from './styles.ts';
import './rb-formula-input.ts';
import './rb-mains-caution.ts';

type Selected = { section: number; row: number; col: number };
/** `from`: the page as the person saw it when the form opened; the save is made from it, so the Book service merges. */
type SectionEdit = { section: number; heading: string; text: string; problem?: string; from?: NotebookPage };

/** How a computed cell reads: numbers to 6 figures, truth values as words, errors as their code. */
export function cellText(c: NotebookCell): string {
  if (c.error) return c.error;
  const v = c.value;
  if (v === null) return '';
  if (typeof v === 'number') {
    // Very small and very large figures read better with an SI prefix (470 n) than in exponent form.
    const a = Math.abs(v);
    return a !== 0 && (a < 1e-3 || a >= 1e6) ? formatValue(v, '', 4) : String(Number(v.toPrecision(6)));
  }
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  return v;
}

/**
 * What the page shows when its grids cannot be calculated at all: each cell as typed, each formula with the reason,
 * so the page and its controls stay usable.
 */
function uncalculatedPage(page: NotebookPage, why: string): NotebookResult {
  return {
    sections: page.sections.map((s, i) => ({
      sheet: sectionSheetName(i),
      grid: s.grid.map((row) =>
        row.map((input): NotebookCell => {
          const t = input.trim();
          if (t === '') return { input, kind: CELL_KIND.empty, value: null };
          if (t.startsWith('=')) return { input, kind: CELL_KIND.formula, value: null, error: '#ERROR!', message: why };
          return { input, kind: CELL_KIND.value, value: input };
        }),
      ),
    })),
  };
}

function gridCount(page: NotebookPage): number {
  return page.sections.filter((s) => s.grid.length > 0).length;
}

/** A grid widened to `cols` columns, every row the same length. */
function squared(grid: string[][], cols: number): string[][] {
  return grid.map((r) => Array.from({ length: cols }, (_, i) => r[i] ?? ''));
}

function width(grid: string[][]): number {
  return grid.reduce((m, r) => Math.max(m, r.length), 0);
}

const GRIDS_FULL = `A page holds at most ${NOTEBOOK_LIMITS.gridSections} grids; start another page for more. Nothing was saved.`;

const BOOK_NAMES: readonly NameHint[] = [
  { name: 'Section1', doc: 'another section’s grid: Section2!B3 reads cell B3 of the second section', kind: 'name' },
];

@customElement('rb-user-page')
export class RbUserPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      header {
        display: flex;
        gap: 0.8rem;
        align-items: baseline;
        flex-wrap: wrap;
      }
      header input {
        font: inherit;
        font-size: 1.4rem;
        padding: 0.1rem 0.3rem;
        border: 1px solid var(--rb-rule);
        border-bottom: 2px solid var(--rb-ink);
        background: var(--rb-paper);
      }
      .text {
        white-space: pre-wrap;
        margin: 0.2rem 0 0.6rem;
        max-width: 60rem;
      }
      table.grid {
        border-collapse: collapse;
        font-size: 0.9rem;
        font-variant-numeric: tabular-nums;
      }
      table.grid td {
        border: 1px solid var(--rb-rule);
        padding: 0;
        min-width: 6.5rem;
        max-width: 16rem;
      }
      table.grid td button {
        all: unset;
        box-sizing: border-box;
        display: block;
        width: 100%;
        min-height: 1.7rem;
        padding: 0.2rem 0.45rem;
        cursor: cell;
        overflow: hidden;
        text-overflow: ellipsis;
        white-space: nowrap;
      }
      table.grid td.num button {
        text-align: right;
        font-family: var(--rb-mono);
        font-size: 0.84rem;
      }
      table.grid td.formula button {
        background: var(--rb-paper);
      }
      table.grid td.err button {
        color: var(--rb-fail);
        background: var(--rb-fail-bg);
        font-family: var(--rb-mono);
        font-size: 0.82rem;
      }
      table.grid td button[aria-pressed='true'] {
        outline: 2px solid var(--rb-accent);
        outline-offset: -2px;
      }
      table.grid td button:focus-visible {
        outline: 2px dashed var(--rb-accent);
        outline-offset: -2px;
      }
      .bar {
        display: grid;
        grid-template-columns: 3.2rem minmax(14rem, 40rem) auto;
        gap: 0.5rem;
        align-items: start;
        margin: 0 0 0.4rem;
      }
      .bar .addr {
        font-family: var(--rb-mono);
        font-size: 0.84rem;
        color: var(--rb-accent-ink);
        padding-top: 0.2rem;
        text-align: right;
      }
      .cellmsg {
        font-size: 0.84rem;
        margin: 0 0 0.4rem 3.7rem;
      }
      .cellmsg.problem {
        color: var(--rb-fail);
      }
      .tools {
        display: flex;
        flex-wrap: wrap;
        gap: 0.4rem;
        margin-top: 0.5rem;
      }
      .sheetname {
        font-family: var(--rb-mono);
        font-size: 0.75rem;
        color: var(--rb-na);
        margin-left: 0.5rem;
        font-variant: normal;
        letter-spacing: 0;
      }
      form.section-edit {
        display: grid;
        grid-template-columns: max-content minmax(14rem, 40rem);
        gap: 0.35rem 0.8rem;
        margin: 0.4rem 0;
      }
      form.section-edit label {
        font-family: var(--rb-mono);
        font-size: 0.8rem;
        color: var(--rb-accent-ink);
        text-align: right;
      }
      ${ruledControlStyles('form.section-edit input, form.section-edit textarea', { form: true, ink: false })}
      .problem::before {
        content: '✗ ';
        font-weight: 700;
      }
      .problem {
        color: var(--rb-fail);
      }
    `,
  ];

  @property({ attribute: false }) pageId = '';
  @state() private selected: Selected | undefined;
  @state() private cellDraft: string | undefined;
  @state() private sectionEdit: SectionEdit | undefined;
  @state() private renaming: string | undefined;
  @state() private confirm: { kind: 'page' } | { kind: 'section'; section: number } | undefined;
  @state() private message: string | undefined;
  private readonly books = new BookController(this);
  private writes: Promise<unknown> = Promise.resolve();
  /** The page as shown when typing in the selected cell began: the cell's save is made from it. */
  private cellFrom: NotebookPage | undefined;
  private evaluated: { book: Book; page: NotebookPage; result: NotebookResult } | undefined;

  private page(book: Book): NotebookPage | undefined {
    return book.pages.find((p) => p.id === this.pageId);
  }

  /** Evaluated once per Book (a Book change replaces the object), so grids recalculate with it. */
  private result(book: Book, page: NotebookPage): NotebookResult {
    const e = this.evaluated;
    if (e && e.book === book && e.page === page) return e.result;
    let result: NotebookResult;
    try {
      result = evaluateNotebookPage(book, page);
    } catch (e) {
      // Evaluation answers bad cells in the cells; should it fail as a whole, the page still shows with its controls.
      result = uncalculatedPage(page, `the page could not be calculated: ${e instanceof Error ? e.message : String(e)}`);
    }
    this.evaluated = { book, page, result };
    return result;
  }

  override updated(changed: Map<PropertyKey, unknown>): void {
    if (changed.has('pageId')) {
      this.selected = undefined;
      this.cellDraft = undefined;
      this.sectionEdit = undefined;
      this.renaming = undefined;
      this.confirm = undefined;
      this.message = undefined;
    }
  }

  /**
   * Saves a change to this page, one after another, each made from the page as stored when it runs (so quick edits
   * never reuse a revision). `change` returns the new page, or a message and nothing is saved. An edit that sets
   * what the person typed is made `from` the page as they saw it: the Book service merges it with changes saved
   * since (here or in another tab) field by field, or refuses it naming the field both changed.
   */
  private edit(change: (p: NotebookPage) => NotebookPage | string, from?: NotebookPage): Promise<boolean> {
    const run = this.writes.then(async () => {
      const service = this.books.service;
      const page = from ?? (service ? this.page(service.book) : undefined);
      if (!service || !page) {
        this.message = 'This page is no longer in the Book; nothing was saved.';
        return false;
      }
      const next = change(page);
      // A page the Book file reader would refuse (a text or cell beyond LIMITS) is never saved.
      const refused = typeof next === 'string' ? next : notebookPageProblem(next);
      if (refused !== undefined || typeof next === 'string') {
        this.message = refused;
        return false;
      }
      const r = await service.save({ put: { pages: [next] } });
      this.message = r.ok ? r.merged : r.message;
      return r.ok;
    });
    this.writes = run;
    return run;
  }

  private withSection(index: number, f: (s: NotebookSection) => NotebookSection | string): (p: NotebookPage) => NotebookPage | string {
    return (p) => {
      const s = p.sections[index];
      if (!s) return 'That section is no longer on the page; nothing was saved.';
      const next = f(s);
      if (typeof next === 'string') return next;
      return { ...p, sections: p.sections.map((x, i) => (i === index ? next : x)) };
    };
  }

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const page = this.page(book);
    if (!page) return html`<p class="empty">This notebook page is not in the Book.</p>`;
    const result = this.result(book, page);
    return html`<header>
        ${this.renaming !== undefined
          ? html`<form @submit=${(e: Event) => this.rename(e)} aria-label="Rename the page">
              <input aria-label="page title" .value=${live(this.renaming)} @input=${(e: Event) => (this.renaming = (e.target as HTMLInputElement).value)} />
              <button type="submit" class="primary">Rename</button>
              <button type="button" @click=${() => (this.renaming = undefined)}>Cancel</button>
            </form>`
          : html`<h1>${page.title || '(untitled page)'}</h1>
              <button type="button" class="quiet" @click=${() => (this.renaming = page.title)}>rename</button>`}
        ${this.confirm?.kind === 'page'
          ? html`<span
              >Delete the page “${page.title}” and everything on it?
              <button type="button" class="danger" @click=${() => void this.deletePage()}>Delete the page</button>
              <button type="button" class="quiet" @click=${() => (this.confirm = undefined)}>Keep</button></span
            >`
          : html`<button type="button" class="quiet" @click=${() => (this.confirm = { kind: 'page' })}>delete page</button>`}
      </header>
      <p class="blurb">
        A page of your own. Grid cells take values (230 V, 4k7, 0.47 uF) or formulas starting with “=”; formulas can read
        the Book: VAR("code", "load_w"), CHECK("code", "check"), CHECK_STATUS(…), PART_PRICE("part number", qty),
        PART_COST(…). Another section's grid is read as Section2!B3.
      </p>
      <rb-mains-caution></rb-mains-caution>
      ${this.message ? html`<p class="notice" role="alert">${this.message}</p>` : ''}
      ${page.sections.length === 0 ? html`<p class="empty">This page has no sections yet.</p>` : ''}
      ${page.sections.map((s, i) => this.renderSection(s, i, result, i === page.sections.length - 1))}
      <div class="toolbar">
        <button type="button" class="primary" @click=${() => void this.addSection(false)}>Add a text section</button>
        <button type="button" class="primary" @click=${() => void this.addSection(true)}>Add a section with a grid</button>
      </div>`;
  }

  private renderSection(s: NotebookSection, i: number, result: NotebookResult, last: boolean): TemplateResult {
    const editing = this.sectionEdit?.section === i ? this.sectionEdit : undefined;
    const grid = result.sections[i]?.grid ?? [];
    return html`<section class="sheet" data-section=${i}>
      ${editing
        ? html`<form class="section-edit" @submit=${(e: Event) => this.saveSection(e)} aria-label="Section heading and text">
            <label for="sec-heading">heading</label>
            <input id="sec-heading" .value=${live(editing.heading)} @input=${(e: Event) => (this.sectionEdit = { ...editing, heading: (e.target as HTMLInputElement).value })} />
            <label for="sec-text">text</label>
            <textarea id="sec-text" rows="4" .value=${live(editing.text)} @input=${(e: Event) => (this.sectionEdit = { ...editing, text: (e.target as HTMLTextAreaElement).value })}></textarea>
            <span></span>
            <span>
              <button type="submit" class="primary">Save the section</button>
              <button type="button" @click=${() => (this.sectionEdit = undefined)}>Cancel</button>
              ${editing.problem ? html`<span class="problem" role="alert">${editing.problem}</span>` : ''}
            </span>
          </form>`
        : html`<h2>${s.heading || '(no heading)'}${s.grid.length > 0 ? html`<span class="sheetname">${sectionSheetName(i)}</span>` : ''}</h2>
            ${s.text ? html`<p class="text">${s.text}</p>` : ''}`}
      ${s.grid.length > 0 ? this.renderGrid(s, i, grid) : ''}
      <div class="tools">
        ${editing ? '' : html`<button type="button" class="quiet" @click=${() => (this.sectionEdit = { section: i, heading: s.heading, text: s.text, from: this.page(this.books.book!) })}>edit heading and text</button>`}
        ${s.grid.length === 0
          ? html`<button
              type="button"
              class="quiet"
              @click=${() => void this.edit((p) => (gridCount(p) >= NOTEBOOK_LIMITS.gridSections ? GRIDS_FULL : this.withSection(i, (x) => ({ ...x, grid: [['', ''], ['', '']] }))(p)))}
            >
              add a grid
            </button>`
          : html`<button type="button" class="quiet" @click=${() => void this.resize(i, 1, 0)}>+ row</button>
              <button type="button" class="quiet" @click=${() => void this.resize(i, 0, 1)}>+ column</button>
              <button type="button" class="quiet" @click=${() => void this.resize(i, -1, 0)}>− last row</button>
              <button type="button" class="quiet" @click=${() => void this.resize(i, 0, -1)}>− last column</button>`}
        ${i > 0 ? html`<button type="button" class="quiet" @click=${() => void this.move(i, -1)}>move up</button>` : ''}
        ${last ? '' : html`<button type="button" class="quiet" @click=${() => void this.move(i, 1)}>move down</button>`}
        ${this.confirm?.kind === 'section' && this.confirm.section === i
          ? html`<span
              >Delete “${s.heading || 'this section'}”?
              <button type="button" class="danger" @click=${() => void this.deleteSection(i)}>Delete</button>
              <button type="button" class="quiet" @click=${() => (this.confirm = undefined)}>Keep</button></span
            >`
          : html`<button type="button" class="quiet" @click=${() => (this.confirm = { kind: 'section', section: i })}>delete section</button>`}
      </div>
    </section>`;
  }

  private renderGrid(s: NotebookSection, i: number, cells: NotebookCell[][]): TemplateResult {
    const sel = this.selected?.section === i ? this.selected : undefined;
    const cols = width(s.grid);
    const selCell = sel ? cells[sel.row]?.[sel.col] : undefined;
    const raw = sel ? (s.grid[sel.row]?.[sel.col] ?? '') : '';
    return html`${sel
        ? html`<div class="bar">
              <span class="addr" data-testid="cell-address">${cellAddress(sel.row, sel.col)}</span>
              <rb-formula-input
                data-field="cell"
                .label=${`cell ${cellAddress(sel.row, sel.col)}`}
                .value=${this.cellDraft ?? raw}
                .names=${BOOK_NAMES}
                placeholder="a value, text, or =formula"
                @formula-input=${(e: CustomEvent<{ value: string }>) => {
                  if (this.cellDraft === undefined) this.cellFrom = this.books.book && this.page(this.books.book);
                  this.cellDraft = e.detail.value;
                }}
                @formula-commit=${(e: CustomEvent<{ value: string }>) => void this.commitCell(e.detail.value)}
              ></rb-formula-input>
              <span class="muted">Enter keeps it</span>
            </div>
            ${selCell?.error
              ? html`<p class="cellmsg problem" role="alert" data-testid="cell-message">${selCell.message}</p>`
              : ''}`
        : html`<p class="muted" style="font-size:0.84rem;margin:0 0 0.4rem">Choose a cell to write in it.</p>`}
      <div class="scroll">
        <table class="grid" aria-label=${`grid ${sectionSheetName(i)}`} data-testid="user-grid">
          <tbody>
            ${s.grid.map(
              (row, r) => html`<tr>
                ${Array.from({ length: cols }, (_, c) => {
                  const cell = cells[r]?.[c];
                  const text = cell ? cellText(cell) : '';
                  const cls = cell?.error ? 'err' : typeof cell?.value === 'number' ? 'num' : '';
                  const pressed = sel?.row === r && sel.col === c;
                  return html`<td class="${cls} ${cell?.kind === 'formula' ? 'formula' : ''}">
                    <button
                      type="button"
                      data-cell=${cellAddress(r, c)}
                      aria-pressed=${pressed ? 'true' : 'false'}
                      aria-label="${cellAddress(r, c)}: ${text || 'empty'}"
                      title=${cell?.error ? `${cellAddress(r, c)}: ${cell.message ?? ''}` : `${cellAddress(r, c)}${row[c] ? `: ${row[c]}` : ''}`}
                      @click=${() => this.selectCell(i, r, c)}
                    >
                      ${text}
                    </button>
                  </td>`;
                })}
              </tr>`,
            )}
          </tbody>
        </table>
      </div>`;
  }

  private selectCell(section: number, row: number, col: number): void {
    this.selected = { section, row, col };
    this.cellDraft = undefined;
    void this.updateComplete.then(() => this.renderRoot.querySelector('rb-formula-input')?.focus());
  }

  private async commitCell(value: string): Promise<void> {
    const sel = this.selected;
    if (!sel || this.cellDraft === undefined) return;
    this.cellDraft = undefined;
    await this.edit((p) =>
      notebookCellProblem(p, sel.section, sel.row, sel.col, value) ??
      this.withSection(sel.section, (s) => {
        const cols = Math.max(width(s.grid), sel.col + 1);
        const grid = squared(s.grid, cols);
        if (!grid[sel.row]) return 'That cell is no longer in the grid; nothing was saved.';
        if ((grid[sel.row]![sel.col] ?? '') === value) return s;
        grid[sel.row]![sel.col] = value;
        return { ...s, grid };
      })(p),
      this.cellFrom,
    );
  }

  private resize(section: number, dRows: number, dCols: number): Promise<boolean> {
    if (this.selected?.section === section) this.selected = undefined;
    return this.edit(
      this.withSection(section, (s) => {
        const rows = s.grid.length + dRows;
        const cols = width(s.grid) + dCols;
        if (rows < 1 || cols < 1) return 'A grid keeps at least one row and one column; delete the section to remove it.';
        if (rows > NOTEBOOK_LIMITS.rows || cols > NOTEBOOK_LIMITS.cols) {
          return `A grid holds at most ${NOTEBOOK_LIMITS.rows} rows and ${NOTEBOOK_LIMITS.cols} columns.`;
        }
        const lost = (dRows < 0 && s.grid[rows]!.some((c) => c.trim() !== '')) || (dCols < 0 && s.grid.some((r) => (r[cols] ?? '').trim() !== ''));
        if (lost) return 'That row or column is not empty; clear its cells first.';
        const grid = squared(s.grid.slice(0, rows), cols);
        while (grid.length < rows) grid.push(Array.from({ length: cols }, () => ''));
        return { ...s, grid };
      }),
    );
  }

  private move(section: number, by: number): Promise<boolean> {
    this.selected = undefined;
    return this.edit((p) => {
      const to = section + by;
      if (to < 0 || to >= p.sections.length) return p;
      const sections = [...p.sections];
      [sections[section], sections[to]] = [sections[to]!, sections[section]!];
      return { ...p, sections };
    });
  }

  private async addSection(withGrid: boolean): Promise<void> {
    await this.edit((p) => {
      if (withGrid && gridCount(p) >= NOTEBOOK_LIMITS.gridSections) return GRIDS_FULL;
      return {
        ...p,
        sections: [...p.sections, { heading: withGrid ? 'Calculation' : 'Notes', text: '', grid: withGrid ? [['', ''], ['', '']] : [] }],
      };
    });
  }

  private async saveSection(e: Event): Promise<void> {
    e.preventDefault();
    const ed = this.sectionEdit;
    if (!ed) return;
    if (ed.heading.trim() === '') {
      this.sectionEdit = { ...ed, problem: 'A section needs a heading.' };
      return;
    }
    const ok = await this.edit(this.withSection(ed.section, (s) => ({ ...s, heading: ed.heading.trim(), text: ed.text })), ed.from);
    if (ok) this.sectionEdit = undefined;
  }

  private async deleteSection(section: number): Promise<void> {
    this.confirm = undefined;
    this.selected = undefined;
    await this.edit((p) => ({ ...p, sections: p.sections.filter((_, i) => i !== section) }));
  }

  private async rename(e: Event): Promise<void> {
    e.preventDefault();
    const title = (this.renaming ?? '').trim();
    if (title === '') {
      this.message = 'A page needs a title; nothing was saved.';
      return;
    }
    if (title.length > 80) {
      this.message = 'Keep the title to 80 characters; nothing was saved.';
      return;
    }
    const ok = await this.edit((p) => ({ ...p, title }));
    if (ok) this.renaming = undefined;
  }

  private async deletePage(): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    this.confirm = undefined;
    await this.writes;
    const r = await service.save({ delete: { pages: [this.pageId] } });
    if (!r.ok) {
      this.message = r.message;
      return;
    }
    location.hash = `#/${PAGES[0]!.slug}`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-user-page': RbUserPage;
  }
}
