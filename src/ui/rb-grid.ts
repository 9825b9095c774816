// A keyboard grid of records: a table whose cells are selected with the arrows, edited in place, copied and pasted
// as tab-separated text. It owns selection and editing only; the page validates and saves through the events below.
//
// Keys: arrows move (Shift widens the block), Home/End to the row's ends, Page Up/Down by twenty rows, Enter or F2 or
// typing starts editing, Escape cancels, Enter commits and moves down (Shift+Enter up), Tab commits and moves right
// (Shift+Tab left; at the row's ends Tab leaves the grid), Delete clears the block, Ctrl/Cmd+A selects all.
// Copy and paste go through the browser's own copy and paste events, so Ctrl/Cmd+C and V and the menus all work.
import { LitElement, css, html, nothing } from 'lit';
import type { PropertyValues } from 'lit';
import { customElement, property, query, state } from 'lit/decorators.js';
import { classMap } from 'lit/directives/class-map.js';
import { guard } from 'lit/directives/guard.js';
import { live } from 'lit/directives/live.js';
import { repeat } from 'lit/directives/repeat.js';
import { formatTsv, parseTsv } from '../domain/tsv.ts';
import { RowWindow } from './row-window.ts';

export interface GridColumn {
  key: string;
  label: string;
  /** Small second line of the heading (a unit, a currency). */
  unit?: string;
  /** Right-aligned figures. */
  num?: boolean;
  editable: boolean;
  /** The column names the row (shown as a row heading, kept in view when scrolling sideways). */
  rowHeader?: boolean;
  /** What the column holds, in words: shown on the help line when the column is hovered or holds the active cell. */
  title?: string;
}

export interface GridCell {
  /** What the cell shows. */
  text: string;
  /** What editing starts from; defaults to `text`. */
  edit?: string;
  /** What a copy puts on the clipboard; defaults to `edit`, then `text`. */
  copy?: string;
  /** A status look: pass, margin, fail, error, na, problem. */
  tone?: string;
  title?: string;
}

export interface GridRow {
  id: string;
  cells: readonly GridCell[];
  /**
   * The record's revision, when the row shows a saved record: a row the cursor follows (see `follow`) counts as saved
   * again only when this moves, not when figures worked out elsewhere redraw its other cells.
   */
  rev?: number;
}

/** A block of cells, corners included, top-left first. Row indexes may reach the new-row line (rows.length). */
export interface GridRange {
  r0: number;
  c0: number;
  r1: number;
  c1: number;
}

export interface GridCommitDetail {
  row: number;
  col: number;
  /** Undefined on the new-row line. */
  rowId: string | undefined;
  key: string;
  text: string;
  /** Call synchronously to refuse the value: the cell stays in editing with the message shown. */
  refuse(message: string): void;
}

/** Editing of a cell began: the page keeps the record as the person saw it, to save the edit from it. */
export interface GridEditDetail {
  rowId: string | undefined;
  key: string;
}

export interface GridPasteDetail {
  /** Top-left cell of the paste. */
  row: number;
  col: number;
  /** The selection when pasting, so one value can fill a block. */
  range: GridRange;
  rows: string[][];
  refuse(message: string): void;
}

export interface GridClearDetail {
  range: GridRange;
  refuse(message: string): void;
}

interface Editing {
  /** Row id, or '' for the new-row line; kept by id so an edit survives rows moving while a save completes. */
  rowId: string;
  col: number;
  text: string;
  original: string;
}

const PAGE_ROWS = 20;
/** Column widths in characters of text: at least, at most (longer text is cut with an ellipsis; the title has it). */
const MIN_COLUMN_CHARS = 3;
const MAX_COLUMN_CHARS = 40;
/** A cell's padding on both sides plus its border, as in the cell styles below. */
const CELL_PADDING = '1.2rem';

@customElement('rb-grid')
export class RbGrid extends LitElement {
  static override styles = css`
    :host {
      display: block;
    }
    tr.spacer td {
      padding: 0;
      border: none;
    }
    .frame {
      overflow: auto;
      max-height: 72vh; /* FRAME_SHARE in row-window.ts */
      border: 1px solid var(--rb-rule);
      background: var(--rb-sheet);
    }
    table {
      table-layout: fixed;
      border-collapse: separate;
      border-spacing: 0;
      font-size: 0.88rem;
      font-variant-numeric: tabular-nums;
      min-width: 100%;
      outline: none;
    }
    thead th {
      position: sticky;
      top: 0;
      z-index: 2;
      background: var(--rb-sheet);
      font-family: var(--rb-mono);
      font-size: 0.76rem;
      font-weight: 600;
      text-align: left;
      color: var(--rb-accent-ink);
      border-bottom: 2px solid var(--rb-ink);
      padding: 0.35rem 0.55rem 0.25rem;
      white-space: nowrap;
      vertical-align: bottom;
    }
    thead th.num {
      text-align: right;
    }
    thead th small {
      display: block;
      font-weight: 400;
      color: var(--rb-na);
    }
    thead th.ro {
      border-bottom-style: double;
      border-bottom-width: 3px;
    }
    thead th:first-child {
      left: 0;
      z-index: 3;
    }
    td,
    tbody th,
    tfoot th,
    tfoot td {
      padding: 0.22rem 0.55rem;
      border-bottom: 1px solid var(--rb-rule);
      white-space: nowrap;
      overflow: hidden;
      text-overflow: ellipsis;
      text-align: left;
      font-weight: 400;
      user-select: none;
    }
    tbody th,
    tfoot th {
      position: sticky;
      left: 0;
      z-index: 1;
      background: var(--rb-sheet);
      font-family: var(--rb-mono);
      font-size: 0.82rem;
      border-right: 1px solid var(--rb-rule);
    }
    .num {
      text-align: right;
    }
    .ro {
      background: var(--rb-paper);
    }
    .tone-pass {
      color: var(--rb-pass);
    }
    .tone-margin {
      color: var(--rb-margin);
      background: var(--rb-margin-bg);
    }
    .tone-fail,
    .tone-error,
    .tone-problem {
      color: var(--rb-fail);
      background: var(--rb-fail-bg);
    }
    .tone-na {
      color: var(--rb-na);
    }
    .tone-saving {
      color: var(--rb-na);
      font-style: italic;
    }
    /* Our selection look: a highlighter wash over the block and a pen stroke under the active cell. */
    .sel,
    tbody th.sel,
    tfoot th.sel {
      background: var(--rb-highlight);
    }
    .active {
      box-shadow: inset 0 -3px 0 var(--rb-accent);
    }
    table:not(:focus-within) .active {
      box-shadow: inset 0 -3px 0 var(--rb-rule);
    }
    td.editing,
    th.editing {
      padding: 0.1rem 0.3rem;
      background: var(--rb-paper);
      box-shadow: inset 0 -3px 0 var(--rb-ink);
    }
    input.editor {
      font: inherit;
      width: 100%;
      min-width: 7rem;
      border: none;
      background: transparent;
      color: var(--rb-ink);
      padding: 0.12rem 0.25rem;
      outline: none;
    }
    tfoot .newrow {
      font-style: italic;
      color: var(--rb-na);
    }
    .message {
      margin: 0.35rem 0 0;
      font-size: 0.88rem;
      min-height: 1.2em;
    }
    .message.problem {
      color: var(--rb-fail);
    }
    .message.problem::before {
      content: '✗ ';
      font-weight: 700;
    }
    .colhelp {
      margin: 0 0 0.3rem;
      font-size: 0.86rem;
      min-height: 1.3em;
      color: var(--rb-ink);
    }
    .colhelp b {
      font-family: var(--rb-mono);
      font-size: 0.82rem;
      color: var(--rb-accent-ink);
    }
    .colhelp .unit {
      color: var(--rb-na);
    }
  `;

  @property({ attribute: false }) columns: readonly GridColumn[] = [];
  @property({ attribute: false }) rows: readonly GridRow[] = [];
  /** A long grid draws only the rows in view in its frame. */
  private readonly window = new RowWindow(this, () => this.renderRoot?.querySelector<HTMLElement>('.frame') ?? null);
  /** When set, a last line (in the table foot) where typing or pasting adds rows; the text labels it. */
  @property() newRow: string | undefined;
  @property() label = 'Records';
  @property() testid = '';

  @state() private active = { r: 0, c: 0 };
  @state() private anchor = { r: 0, c: 0 };
  @state() private editing: Editing | undefined;
  @state() private message: { text: string; problem: boolean } | undefined;
  /** The row the active cell is on, so it stays on that record when rows are re-sorted. */
  private activeId: string | undefined;
  /** The column the pointer is over in the heading, whose meaning the help line shows meanwhile. */
  @state() private hoverCol: number | undefined;
  /** A row the active cell goes to once it shows at a new place (an edited row re-sorted, a new or copied row). */
  private followRow: { id: string; at: number; row: GridRow | undefined; rev: number | undefined; focus: boolean } | undefined;
  private dragging = false;
  private focusEditor = false;

  @query('table') private table!: HTMLTableElement;

  /** The selected block. */
  get selection(): GridRange {
    return {
      r0: Math.min(this.active.r, this.anchor.r),
      r1: Math.max(this.active.r, this.anchor.r),
      c0: Math.min(this.active.c, this.anchor.c),
      c1: Math.max(this.active.c, this.anchor.c),
    };
  }

  get activeCell(): { row: number; col: number } {
    return { row: this.active.r, col: this.active.c };
  }

  get isEditing(): boolean {
    return this.editing !== undefined;
  }

  /** Moves the active cell (and collapses the block) and gives the grid the keyboard. */
  focusCell(row: number, col: number): void {
    this.setActive(row, col, false);
    void this.updateComplete.then(() => this.takeFocus());
  }

  /**
   * Puts the active cell on row `id` (same column) once that row shows at another place than it does now: a row whose
   * edit re-sorts it, or a row just being added. The cursor follows the record, never an index. With `focus` the
   * grid also takes the keyboard there (after a toolbar button made the row).
   */
  follow(id: string, focus = false): void {
    const at = this.rows.findIndex((r) => r.id === id);
    this.followRow = { id, at, row: this.rows[at], rev: this.rows[at]?.rev, focus };
  }

  /** Shows a line under the grid; a problem is announced. */
  say(text: string | undefined, problem = false): void {
    this.message = text === undefined ? undefined : { text, problem };
  }

  override connectedCallback(): void {
    super.connectedCallback();
    window.addEventListener('mouseup', this._onMouseUp);
  }

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    window.removeEventListener('mouseup', this._onMouseUp);
  }

  override willUpdate(changed: PropertyValues<this>): void {
    if (changed.has('rows')) {
      // Keep the active cell on its record when rows were re-sorted or others were added or removed.
      if (this.activeId !== undefined && this.rows[this.active.r]?.id !== this.activeId) {
        const at = this.rows.findIndex((r) => r.id === this.activeId);
        if (at >= 0) {
          const dr = at - this.active.r;
          this.active = { ...this.active, r: at };
          this.anchor = { ...this.anchor, r: Math.max(0, Math.min(this.lastRow, this.anchor.r + dr)) };
        }
      }
      const f = this.followRow;
      const at = f ? this.rows.findIndex((r) => r.id === f.id) : -1;
      // Settled once the row is drawn anew (saved) or at another place; until then other redraws leave it pending.
      const redrawn = f && at >= 0 && (f.rev !== undefined ? this.rows[at]!.rev !== f.rev : this.rows[at] !== f.row);
      if (f && at >= 0 && (at !== f.at || redrawn)) {
        this.followRow = undefined;
        if (at !== f.at) {
          this.active = { r: at, c: this.active.c };
          this.anchor = { ...this.active };
          this.window.reach(at);
          void this.updateComplete.then(() => {
            this.cellAt(this.active.r, this.active.c)?.scrollIntoView({ block: 'nearest', inline: 'nearest' });
            if (f.focus) this.takeFocus();
          });
        }
      }
      this.clamp();
      if (this.editing && this.editing.rowId !== '' && !this.rows.some((r) => r.id === this.editing!.rowId)) this.editing = undefined;
    }
    if (changed.has('columns')) this.clamp();
  }

  override updated(): void {
    if (this.focusEditor) {
      this.focusEditor = false;
      const input = this.renderRoot.querySelector<HTMLInputElement>('input.editor');
      if (input) {
        input.focus({ preventScroll: true });
        input.setSelectionRange(input.value.length, input.value.length);
        input.scrollIntoView({ block: 'nearest', inline: 'nearest' });
      }
    }
  }

  private get lastRow(): number {
    return this.rows.length - (this.newRow === undefined ? 1 : 0);
  }

  private clamp(): void {
    const maxR = Math.max(0, this.lastRow);
    const maxC = Math.max(0, this.columns.length - 1);
    const fix = (p: { r: number; c: number }) => ({ r: Math.max(0, Math.min(maxR, p.r)), c: Math.max(0, Math.min(maxC, p.c)) });
    const a = fix(this.active);
    const b = fix(this.anchor);
    if (a.r !== this.active.r || a.c !== this.active.c) this.active = a;
    if (b.r !== this.anchor.r || b.c !== this.anchor.c) this.anchor = b;
    this.activeId = this.rows[this.active.r]?.id;
  }

  private setActive(r: number, c: number, extend: boolean): void {
    const maxR = Math.max(0, this.lastRow);
    const maxC = Math.max(0, this.columns.length - 1);
    this.active = { r: Math.max(0, Math.min(maxR, r)), c: Math.max(0, Math.min(maxC, c)) };
    if (!extend) this.anchor = { ...this.active };
    this.activeId = this.rows[this.active.r]?.id;
    this.window.reach(this.active.r);
    if (this.message && !this.message.problem) this.message = undefined;
    void this.updateComplete.then(() => this.cellAt(this.active.r, this.active.c)?.scrollIntoView({ block: 'nearest', inline: 'nearest' }));
  }

  private takeFocus(): void {
    this.table?.focus({ preventScroll: true });
  }

  private cellAt(r: number, c: number): HTMLElement | null {
    return this.renderRoot.querySelector<HTMLElement>(`[data-r="${r}"][data-c="${c}"]`);
  }

  private cell(r: number, c: number): GridCell | undefined {
    return this.rows[r]?.cells[c];
  }

  private rowIdAt(r: number): string {
    return this.rows[r]?.id ?? '';
  }

  // ---- editing

  private startEdit(replaceWith?: string): void {
    const { r, c } = this.active;
    const col = this.columns[c];
    if (!col) return;
    if (!col.editable) {
      this.say(`${col.label} is worked out by Rungbook and cannot be edited here.`, true);
      return;
    }
    const cell = this.cell(r, c);
    const original = cell?.edit ?? cell?.text ?? '';
    this.anchor = { ...this.active };
    this.editing = { rowId: this.rowIdAt(r), col: c, text: replaceWith ?? original, original };
    const edit: GridEditDetail = { rowId: this.rows[r]?.id, key: col.key };
    this.dispatchEvent(new CustomEvent<GridEditDetail>('rb-grid-edit', { detail: edit, bubbles: true, composed: true }));
    this.message = undefined;
    this.focusEditor = true;
  }

  private editingIndex(): number {
    const e = this.editing;
    if (!e) return -1;
    return e.rowId === '' ? this.rows.length : this.rows.findIndex((r) => r.id === e.rowId);
  }

  /** Offers the edited value to the page; true when it was taken (or unchanged) and editing ended. */
  private commit(): boolean {
    const e = this.editing;
    if (!e) return true;
    const row = this.editingIndex();
    if (e.text === e.original || row < 0) {
      this.editing = undefined;
      return true;
    }
    let refused: string | undefined;
    const detail: GridCommitDetail = {
      row,
      col: e.col,
      rowId: e.rowId === '' ? undefined : e.rowId,
      key: this.columns[e.col]!.key,
      text: e.text,
      refuse: (m) => (refused = m),
    };
    this.dispatchEvent(new CustomEvent<GridCommitDetail>('rb-grid-commit', { detail, bubbles: true, composed: true }));
    if (refused !== undefined) {
      this.say(refused, true);
      return false;
    }
    this.editing = undefined;
    this.message = undefined;
    return true;
  }

  private cancelEdit(): void {
    this.editing = undefined;
    this.message = undefined;
    void this.updateComplete.then(() => this.takeFocus());
  }

  private readonly _onEditorKey = (ev: KeyboardEvent): void => {
    ev.stopPropagation();
    if (ev.isComposing) return;
    const move = (dr: number, dc: number): void => {
      ev.preventDefault();
      const { r, c } = this.active;
      if (!this.commit()) return;
      this.setActive(r + dr, c + dc, false);
      void this.updateComplete.then(() => this.takeFocus());
    };
    if (ev.key === 'Enter') move(ev.shiftKey ? -1 : 1, 0);
    else if (ev.key === 'Tab') move(0, ev.shiftKey ? -1 : 1);
    else if (ev.key === 'Escape') {
      ev.preventDefault();
      this.cancelEdit();
    }
  };

  private readonly _onEditorInput = (ev: Event): void => {
    if (this.editing) this.editing = { ...this.editing, text: (ev.target as HTMLInputElement).value };
  };

  private readonly _onEditorBlur = (): void => {
    // Focus left the cell (a click elsewhere): keep the value if the page takes it, else drop it and say why.
    if (!this.editing) return;
    if (!this.commit()) {
      this.editing = undefined;
      this.say(`${this.message?.text ?? 'Not kept.'} The cell was left as it was.`, true);
    }
  };

  // ---- keyboard, clipboard and mouse on the table

  private readonly _onKey = (ev: KeyboardEvent): void => {
    if (this.editing || ev.isComposing) return;
    const { r, c } = this.active;
    const mod = ev.ctrlKey || ev.metaKey;
    const go = (nr: number, nc: number): void => {
      ev.preventDefault();
      this.setActive(nr, nc, ev.shiftKey);
    };
    switch (ev.key) {
      case 'ArrowUp':
        return go(mod ? 0 : r - 1, c);
      case 'ArrowDown':
        return go(mod ? this.lastRow : r + 1, c);
      case 'ArrowLeft':
        return go(r, mod ? 0 : c - 1);
      case 'ArrowRight':
        return go(r, mod ? this.columns.length - 1 : c + 1);
      case 'Home':
        return go(mod ? 0 : r, 0);
      case 'End':
        return go(mod ? this.lastRow : r, this.columns.length - 1);
      case 'PageUp':
        return go(r - PAGE_ROWS, c);
      case 'PageDown':
        return go(r + PAGE_ROWS, c);
      case 'Tab': {
        const nc = c + (ev.shiftKey ? -1 : 1);
        if (nc < 0 || nc >= this.columns.length) return; // leave the grid
        ev.preventDefault();
        this.setActive(r, nc, false);
        return;
      }
      case 'Enter':
      case 'F2':
        ev.preventDefault();
        this.startEdit();
        return;
      case 'Escape':
        this.anchor = { ...this.active };
        this.message = undefined;
        return;
      case 'Delete':
      case 'Backspace':
        ev.preventDefault();
        this.clear();
        return;
    }
    if (mod && (ev.key === 'a' || ev.key === 'A')) {
      ev.preventDefault();
      this.anchor = { r: 0, c: 0 };
      this.active = { r: Math.max(0, this.rows.length - 1), c: this.columns.length - 1 };
      return;
    }
    if (ev.key.length === 1 && !mod && !ev.altKey) {
      ev.preventDefault();
      this.startEdit(ev.key);
    }
  };

  private clear(): void {
    let refused: string | undefined;
    const detail: GridClearDetail = { range: this.selection, refuse: (m) => (refused = m) };
    this.dispatchEvent(new CustomEvent<GridClearDetail>('rb-grid-clear', { detail, bubbles: true, composed: true }));
    if (refused !== undefined) this.say(refused, true);
  }

  /** The selected block as tab-separated text (the new-row line copies as nothing). */
  selectedText(): string {
    const s = this.selection;
    const out: string[][] = [];
    for (let r = s.r0; r <= Math.min(s.r1, this.rows.length - 1); r++) {
      const line: string[] = [];
      for (let c = s.c0; c <= s.c1; c++) {
        const cell = this.cell(r, c);
        line.push(cell?.copy ?? cell?.edit ?? cell?.text ?? '');
      }
      out.push(line);
    }
    return formatTsv(out);
  }

  private readonly _onCopy = (ev: ClipboardEvent): void => {
    if (this.editing || !ev.clipboardData) return;
    ev.preventDefault();
    ev.clipboardData.setData('text/plain', this.selectedText());
    const s = this.selection;
    const rows = Math.min(s.r1, this.rows.length - 1) - s.r0 + 1;
    this.say(`Copied ${rows} × ${s.c1 - s.c0 + 1} cells as tab-separated text.`);
  };

  private readonly _onCut = (ev: ClipboardEvent): void => {
    if (this.editing) return;
    this._onCopy(ev);
    this.clear();
  };

  private readonly _onPaste = (ev: ClipboardEvent): void => {
    if (this.editing) return;
    ev.preventDefault();
    const text = ev.clipboardData?.getData('text/plain') ?? '';
    this.pasteText(text);
  };

  /** Pastes tab-separated text at the selection (the page decides what it means). Also used by tests and menus. */
  pasteText(text: string): void {
    const parsed = parseTsv(text);
    if (!parsed.ok) {
      this.say(`Nothing pasted: ${parsed.error}.`, true);
      return;
    }
    if (parsed.rows.length === 0) {
      this.say('Nothing pasted: the clipboard holds no text.', true);
      return;
    }
    const range = this.selection;
    let refused: string | undefined;
    const detail: GridPasteDetail = { row: range.r0, col: range.c0, range, rows: parsed.rows, refuse: (m) => (refused = m) };
    this.dispatchEvent(new CustomEvent<GridPasteDetail>('rb-grid-paste', { detail, bubbles: true, composed: true }));
    if (refused !== undefined) this.say(refused, true);
    else this.message = undefined;
  }

  private target(ev: Event): { r: number; c: number } | undefined {
    for (const el of ev.composedPath()) {
      if (el instanceof HTMLElement && el.dataset.r !== undefined && el.dataset.c !== undefined) {
        return { r: Number(el.dataset.r), c: Number(el.dataset.c) };
      }
      if (el === this.table) break;
    }
    return undefined;
  }

  private readonly _onMouseDown = (ev: MouseEvent): void => {
    if (ev.button !== 0) return;
    const t = this.target(ev);
    if (!t) return;
    if (this.editing) {
      const e = this.editing;
      if (this.editingIndex() === t.r && e.col === t.c) return; // a click inside the editor
      if (!this.commit()) {
        ev.preventDefault();
        return;
      }
    }
    ev.preventDefault();
    this.takeFocus();
    this.setActive(t.r, t.c, ev.shiftKey);
    this.dragging = true;
  };

  private readonly _onMouseOver = (ev: MouseEvent): void => {
    if (!this.dragging) return;
    const t = this.target(ev);
    if (t && (t.r !== this.active.r || t.c !== this.active.c)) this.setActive(t.r, t.c, true);
  };

  private readonly _onMouseUp = (): void => {
    this.dragging = false;
  };

  private readonly _onDoubleClick = (ev: MouseEvent): void => {
    const t = this.target(ev);
    if (!t || this.editing) return;
    this.setActive(t.r, t.c, false);
    this.startEdit();
  };

  // ---- rendering

  override render() {
    const rowsShown = this.rows.length + (this.newRow === undefined ? 0 : 1);
    const widths = this.columnWidths();
    const win = this.window.slice(this.rows.length);
    return html`${this.renderColumnHelp()}<div class="frame">
        <table
          style="width: ${widths.table}"
          role="grid"
          tabindex="0"
          aria-label=${this.label}
          aria-rowcount=${rowsShown + 1}
          aria-colcount=${this.columns.length}
          aria-multiselectable="true"
          aria-describedby="colhelp"
          aria-activedescendant=${this.editing ? nothing : `cell-${this.active.r}-${this.active.c}`}
          data-testid=${this.testid || nothing}
          @keydown=${this._onKey}
          @copy=${this._onCopy}
          @cut=${this._onCut}
          @paste=${this._onPaste}
          @mousedown=${this._onMouseDown}
          @mouseover=${this._onMouseOver}
          @dblclick=${this._onDoubleClick}
        >
          <colgroup>
            ${widths.cols.map((w) => html`<col style="width: ${w}" />`)}
          </colgroup>
          <thead>
            <tr>
              ${this.columns.map(
                (col) =>
                  html`<th
                    scope="col"
                    data-key=${col.key}
                    class=${classMap({ num: !!col.num, ro: !col.editable })}
                    title=${col.title ?? nothing}
                    @mouseenter=${() => (this.hoverCol = this.columns.indexOf(col))}
                    @mouseleave=${() => (this.hoverCol = undefined)}
                  >
                    ${col.label}${col.unit ? html`<small>${col.unit}</small>` : nothing}
                  </th>`,
              )}
            </tr>
          </thead>
          <tbody>
            ${win.before > 0 ? this.renderSpacer(win.before) : nothing}
            ${repeat(
              this.rows.slice(win.from, win.to),
              (row) => row.id,
              (row, i) => guard([row, this.columns, this.rowState(win.from + i), win.from + i], () => this.renderRow(row.cells, win.from + i)),
            )}
            ${win.after > 0 ? this.renderSpacer(win.after) : nothing}
          </tbody>
          ${this.newRow === undefined
            ? nothing
            : html`<tfoot>
                ${this.renderRow([{ text: this.newRow }], this.rows.length, true)}
              </tfoot>`}
        </table>
      </div>
      <p class=${classMap({ message: true, problem: !!this.message?.problem })} role=${this.message?.problem ? 'alert' : 'status'}>
        ${this.message?.text ?? ''}
      </p>`;
  }

  private widthCache: { columns: readonly GridColumn[]; rows: readonly GridRow[]; cols: string[]; table: string } | undefined;

  /**
   * Each column's width from its longest text (heading and cells, at most MAX_COLUMN_CHARS): the table is laid out
   * with these fixed widths, so an edit or a new slice of rows never makes the browser measure every cell again.
   */
  private columnWidths(): { cols: string[]; table: string } {
    const c = this.widthCache;
    if (c && c.columns === this.columns && c.rows === this.rows) return c;
    const chars = this.columns.map((col) => Math.max(col.label.length, col.unit?.length ?? 0, MIN_COLUMN_CHARS));
    for (const row of this.rows) {
      row.cells.forEach((cell, i) => {
        if (i < chars.length && cell.text.length > chars[i]!) chars[i] = Math.min(cell.text.length, MAX_COLUMN_CHARS);
      });
    }
    if (this.newRow !== undefined && chars.length > 0) chars[0] = Math.max(chars[0]!, Math.min(this.newRow.length, MAX_COLUMN_CHARS));
    const width = (n: number): string => `calc(${n}ch + ${CELL_PADDING})`;
    const total = chars.reduce((a, b) => a + b, 0);
    const out = { columns: this.columns, rows: this.rows, cols: chars.map(width), table: `calc(${total}ch + ${chars.length} * ${CELL_PADDING})` };
    this.widthCache = out;
    return out;
  }

  /**
   * The help line: the name, unit and meaning of the column under the pointer in the heading, else of the column
   * holding the active cell, so a column's meaning is where the person is, by mouse or by keyboard.
   */
  private renderColumnHelp() {
    const col = this.columns[this.hoverCol ?? this.active.c];
    return html`<p class="colhelp" id="colhelp" data-testid=${this.testid ? `${this.testid}-column-help` : nothing}>
      ${col
        ? html`<b>${col.label}</b>${col.unit ? html` <span class="unit">(${col.unit})</span>` : nothing}${col.title ? html` — ${col.title}` : nothing}${col.editable
            ? nothing
            : html` <span class="unit">· worked out, not edited</span>`}`
        : nothing}
    </p>`;
  }

  /** What of the selection touches row r, as a key: rows whose key and data are unchanged are not drawn again. */
  private rowState(r: number): string {
    const s = this.selection;
    const inBlock = r >= s.r0 && r <= s.r1;
    const act = this.active.r === r ? this.active.c : -1;
    const ed = this.editingIndex() === r ? `${this.editing!.col}:${this.editing!.text}` : '';
    return inBlock || act >= 0 || ed ? `${inBlock ? `${s.c0}-${s.c1}` : ''}|${act}|${ed}` : '';
  }

  /** Stands for rows not drawn (above or below the view) so the frame scrolls as if they were. */
  private renderSpacer(height: number) {
    return html`<tr class="spacer" aria-hidden="true"><td colspan=${this.columns.length} style="height: ${height}px"></td></tr>`;
  }

  private renderRow(cells: readonly GridCell[], r: number, isNew = false) {
    const s = this.selection;
    const inBlock = r >= s.r0 && r <= s.r1;
    const editCol = this.editingIndex() === r ? this.editing!.col : -1;
    return html`<tr aria-rowindex=${r + 2}>
      ${this.columns.map((col, c) => {
        const cell = isNew ? (c === 0 ? cells[0] : undefined) : cells[c];
        const sel = inBlock && c >= s.c0 && c <= s.c1;
        const active = this.active.r === r && this.active.c === c;
        const tone = cell?.tone;
        // A plain class string: a class-map directive per cell cost more than drawing the cell's text.
        let cls = col.num ? 'num' : '';
        if (!col.editable) cls += ' ro';
        if (sel) cls += ' sel';
        if (active) cls += ' active';
        if (editCol === c) cls += ' editing';
        else if (isNew) cls += ' newrow';
        if (tone) cls += ` tone-${tone}`;
        const content =
          editCol === c
            ? html`<input
                class="editor"
                aria-label=${`${col.label}${isNew ? ' of a new row' : ''}`}
                .value=${live(this.editing!.text)}
                @input=${this._onEditorInput}
                @keydown=${this._onEditorKey}
                @blur=${this._onEditorBlur}
              />`
            : (cell?.text ?? '');
        return col.rowHeader
          ? html`<th scope="row" id="cell-${r}-${c}" class=${cls} data-r=${r} data-c=${c} aria-selected=${sel ? 'true' : 'false'} title=${cell?.title ?? nothing}>${content}</th>`
          : html`<td id="cell-${r}-${c}" class=${cls} data-r=${r} data-c=${c} aria-selected=${sel ? 'true' : 'false'} title=${cell?.title ?? nothing}>${content}</td>`;
      })}
    </tr>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-grid': RbGrid;
  }
  interface HTMLElementEventMap {
    'rb-grid-edit': CustomEvent<GridEditDetail>;
    'rb-grid-commit': CustomEvent<GridCommitDetail>;
    'rb-grid-paste': CustomEvent<GridPasteDetail>;
    'rb-grid-clear': CustomEvent<GridClearDetail>;
  }
}
