// Checks page: every check against every variant as a matrix of statuses (word, symbol and colour), the selected
// cell's figure, formula, rule, limit and note opened under its row, with the variant's parameters and the check's
// formula editable in place (a live check session re-evaluates at once); adding and editing checks; the step ladder.
import { LitElement, css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book, Check, ParamValue, Variant } from '../domain/book.ts';
import { CHECK_STATUS, STATUS_SYMBOL, worstOf } from '../domain/check-status.ts';
import type { CheckStatus } from '../domain/check-status.ts';
import { ownValue } from '../domain/params.ts';
import { formatValue } from '../domain/units.ts';
import { FamilyWorkbook } from '../engine/family.ts';
import type { CheckResult } from '../engine/family.ts';
import { formulaNames, nameKey } from '../engine/formula-names.ts';
import { formatRule } from '../engine/sheets.ts';
import { BookController } from './book-context.ts';
import { paramInfo, paramText, readNumber } from './record-forms.ts';
import { checkFormulaNames } from './rb-formula-input.ts';
import type { NameHint } from './rb-formula-input.ts';
import { pageStyles } from './styles.ts';
import './rb-check-form.ts';
import './rb-formula-input.ts';
import './rb-ladder-designer.ts';

/** Most variant columns drawn at once; a larger family is narrowed with the filter (the rest are counted). */
const MAX_COLUMNS = 40;

type Selection = { variantId: string; checkId: string };
type Editing = { check: Check | undefined };

/** The figure of a result with its unit, or the word for what it is. */
export function shownValue(r: CheckResult): string {
  const v = r.value;
  if (v === null) return '';
  if (typeof v === 'number') return r.unit ? formatValue(v, r.unit) : String(Number(v.toPrecision(4)));
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  return v;
}

function statusClass(s: CheckStatus): string {
  return s === CHECK_STATUS.na ? 'na' : s;
}

@customElement('rb-checks-page')
export class RbChecksPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      table.matrix {
        border-collapse: separate;
        border-spacing: 0;
        font-size: 0.86rem;
        font-variant-numeric: tabular-nums;
      }
      table.matrix th,
      table.matrix td {
        border-bottom: 1px solid var(--rb-rule);
        padding: 0.2rem 0.3rem;
        vertical-align: top;
      }
      table.matrix thead th {
        font-family: var(--rb-mono);
        font-size: 0.76rem;
        color: var(--rb-accent-ink);
        border-bottom: 2px solid var(--rb-ink);
        text-align: left;
        white-space: nowrap;
        position: sticky;
        top: 0;
        background: var(--rb-sheet);
        z-index: 1;
      }
      table.matrix th.check {
        position: sticky;
        left: 0;
        background: var(--rb-sheet);
        text-align: left;
        min-width: 11rem;
        max-width: 14rem;
        font-weight: 400;
        z-index: 2;
      }
      th.check code {
        font-family: var(--rb-mono);
        font-size: 0.8rem;
        font-weight: 600;
      }
      th.check small {
        display: block;
        color: var(--rb-na);
        font-size: 0.76rem;
        line-height: 1.2;
      }
      tr.group th {
        font-variant: small-caps;
        letter-spacing: 0.06em;
        color: var(--rb-accent-ink);
        text-align: left;
        padding-top: 0.7rem;
        border-bottom: 1px dashed var(--rb-rule);
      }
      button.cell {
        all: unset;
        box-sizing: border-box;
        display: block;
        width: 100%;
        min-width: 5rem;
        cursor: pointer;
        padding: 0.1rem 0.35rem;
        border-radius: 3px;
        border: 1px solid transparent;
        white-space: nowrap;
      }
      button.cell:focus-visible {
        outline: 2px solid var(--rb-accent);
      }
      button.cell[aria-pressed='true'] {
        border-color: var(--rb-ink);
        box-shadow: inset 0 0 0 1px var(--rb-ink);
      }
      button.cell .sym {
        font-weight: 700;
        display: inline-block;
        width: 1em;
      }
      button.cell small {
        display: block;
        font-family: var(--rb-mono);
        font-size: 0.72rem;
        color: var(--rb-ink);
      }
      .pass {
        color: var(--rb-pass);
      }
      .margin {
        color: var(--rb-margin);
        background: var(--rb-margin-bg);
      }
      .fail {
        color: var(--rb-fail);
        background: var(--rb-fail-bg);
        font-weight: 600;
      }
      .error {
        color: var(--rb-fail);
        border: 1px dashed var(--rb-fail) !important;
      }
      .na {
        color: var(--rb-na);
      }
      tr.summary td {
        border-bottom: 2px solid var(--rb-ink);
      }
      tr.summary span {
        display: block;
        padding: 0 0.35rem;
        border-radius: 3px;
        font-size: 0.8rem;
      }
      tr.detail > td {
        background: var(--rb-highlight);
        border-bottom: 2px solid var(--rb-accent);
        padding: 0;
      }
      .panel {
        position: sticky;
        left: 0;
        max-width: min(62rem, calc(100vw - 22rem));
        padding: 0.6rem 0.9rem 0.9rem;
      }
      .panel h3 {
        margin: 0 0 0.3rem;
        font-size: 1rem;
      }
      .panel h3 .st {
        font-size: 0.85rem;
        padding: 0.05rem 0.45rem;
        border-radius: 3px;
        margin-left: 0.4rem;
      }
      dl.facts {
        display: grid;
        grid-template-columns: max-content 1fr;
        gap: 0.2rem 0.8rem;
        margin: 0 0 0.6rem;
        font-size: 0.88rem;
      }
      dl.facts dt {
        font-family: var(--rb-mono);
        font-size: 0.78rem;
        color: var(--rb-accent-ink);
        text-align: right;
      }
      dl.facts dd {
        margin: 0;
      }
      dl.facts dd code {
        font-family: var(--rb-mono);
        font-size: 0.84rem;
      }
      .edit-grid {
        display: grid;
        grid-template-columns: max-content minmax(10rem, 16rem) 1fr;
        gap: 0.25rem 0.7rem;
        align-items: baseline;
        font-size: 0.88rem;
      }
      .edit-grid label {
        font-family: var(--rb-mono);
        font-size: 0.78rem;
        color: var(--rb-accent-ink);
        text-align: right;
      }
      .edit-grid input {
        font: inherit;
        font-size: 0.88rem;
        padding: 0.15rem 0.3rem;
        border: 1px solid var(--rb-rule);
        border-bottom: 2px solid var(--rb-ink);
        background: var(--rb-paper);
      }
      .edit-grid input[aria-invalid='true'] {
        border-bottom-color: var(--rb-fail);
        background: var(--rb-fail-bg);
      }
      .edit-grid .problem,
      .panel .problem {
        color: var(--rb-fail);
        font-size: 0.84rem;
      }
      .edit-grid .problem::before,
      .panel .problem::before {
        content: '✗ ';
        font-weight: 700;
      }
      .edit-grid .hint {
        color: var(--rb-na);
        font-size: 0.8rem;
      }
      h4 {
        margin: 0.7rem 0 0.3rem;
        font-size: 0.9rem;
        font-variant: small-caps;
        letter-spacing: 0.05em;
        color: var(--rb-accent-ink);
      }
      .formula-row {
        display: grid;
        grid-template-columns: minmax(14rem, 40rem) auto;
        gap: 0.5rem;
        align-items: start;
      }
      .row-actions {
        display: flex;
        gap: 0.5rem;
        flex-wrap: wrap;
        align-items: baseline;
        margin-top: 0.7rem;
      }
      .toolbar input[type='search'] {
        font: inherit;
        font-size: 0.88rem;
        padding: 0.15rem 0.4rem;
        border: 1px solid var(--rb-rule);
        border-bottom: 2px solid var(--rb-ink);
        background: var(--rb-paper);
      }
      .toolbar label {
        font-size: 0.88rem;
      }
      .legend {
        font-size: 0.82rem;
        color: var(--rb-na);
        margin: 0 0 0.6rem;
      }
      .legend span {
        padding: 0 0.35rem;
        margin-right: 0.4rem;
        border-radius: 3px;
      }
    `,
  ];

  private readonly books = new BookController(this);
  private session: FamilyWorkbook | undefined;
  /** The Book the session was built from (or adopted after our own save). */
  private sessionBook: Book | undefined;
  /** Saves of ours in flight: the Book they bring back is adopted without rebuilding the session. */
  private ownSaves = 0;
  private writes: Promise<unknown> = Promise.resolve();
  private results = new Map<string, CheckResult>();
  private names: readonly NameHint[] = [];

  @state() private selected: Selection | undefined;
  @state() private filter = '';
  @state() private onlyProblems = false;
  @state() private editing: Editing | undefined;
  /** Check id → formula typed in the panel and not yet kept. */
  @state() private formulaDrafts = new Map<string, string>();
  @state() private formulaProblem: string | undefined;
  @state() private paramDrafts = new Map<string, string>();
  @state() private paramProblems = new Map<string, string>();
  @state() private panelMessage: string | undefined;
  @state() private confirmDelete = false;

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    this.session?.close();
    this.session = undefined;
    this.sessionBook = undefined;
  }

  override willUpdate(): void {
    const book = this.books.book;
    if (!book || book === this.sessionBook) return;
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
  }

  private result(variantId: string, checkId: string): CheckResult | undefined {
    return this.results.get(`${variantId}\u0000${checkId}`);
  }

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    return html`${this.renderMatrix(book)}
      <section class="sheet" aria-labelledby="own-checks-h">
        <h2 id="own-checks-h">${this.editing?.check ? `Edit check ${this.editing.check.name}` : 'Add a check of your own'}</h2>
        <p class="why">
          A check is a formula over the variant's parameters (load_w, mains_v…), its parts' ratings
          (switch_v_max…) and other checks, judged by a rule. It is evaluated on every variant at once.
        </p>
        ${this.editing
          ? html`<rb-check-form
              .check=${this.editing.check}
              @check-saved=${this._onCheckSaved}
              @check-cancel=${() => (this.editing = undefined)}
            ></rb-check-form>`
          : html`<div class="toolbar">
              <button type="button" class="primary" @click=${() => (this.editing = { check: undefined })}>Add a check</button>
              <span class="muted">${book.checks.filter((c) => !c.builtIn).length} of your own, ${book.checks.filter((c) => c.builtIn).length} built in</span>
            </div>`}
      </section>
      <rb-ladder-designer .variantId=${this.selected?.variantId ?? ''}></rb-ladder-designer>`;
  }

  private visibleVariants(book: Book): { shown: Variant[]; matching: number } {
    const f = this.filter.trim().toLowerCase();
    const matching = f === '' ? book.variants : book.variants.filter((v) => v.code.toLowerCase().includes(f) || v.name.toLowerCase().includes(f));
    return { shown: matching.slice(0, MAX_COLUMNS), matching: matching.length };
  }

  private renderMatrix(book: Book): TemplateResult {
    const { shown, matching } = this.visibleVariants(book);
    const groups = new Map<string, Check[]>();
    for (const c of book.checks) {
      if (this.onlyProblems) {
        const bad = shown.some((v) => {
          const s = this.result(v.id, c.id)?.status;
          return s === 'fail' || s === 'margin' || s === 'error';
        });
        if (!bad) continue;
      }
      const g = c.group || 'other';
      const list = groups.get(g);
      if (list) list.push(c);
      else groups.set(g, [c]);
    }
    const counts = { pass: 0, margin: 0, fail: 0, 'n/a': 0, error: 0 } as Record<CheckStatus, number>;
    for (const r of this.results.values()) counts[r.status] += 1;
    const cols = shown.length + 1;
    return html`<section class="sheet" aria-labelledby="matrix-h">
      <h2 id="matrix-h">Checks × variants</h2>
      <p class="why">
        ${book.checks.length} checks on ${book.variants.length} variants: ${counts.pass} pass, ${counts.margin} margin,
        ${counts.fail} fail, ${counts.error} error, ${counts['n/a']} n/a. Choose a cell to see its figure, formula, rule
        and note, and to change the variant's parameters or the formula.
      </p>
      <div class="toolbar">
        <input
          type="search"
          aria-label="Show variants whose code or name contains"
          placeholder="filter variants"
          .value=${live(this.filter)}
          @input=${(e: Event) => (this.filter = (e.target as HTMLInputElement).value)}
        />
        <label><input type="checkbox" .checked=${this.onlyProblems} @change=${(e: Event) => (this.onlyProblems = (e.target as HTMLInputElement).checked)} /> only checks
          with a margin, fail or error</label>
        ${matching > shown.length ? html`<span class="muted" role="status">showing ${shown.length} of ${matching} variants; narrow them with the filter</span>` : ''}
      </div>
      <p class="legend">
        <span class="pass">${STATUS_SYMBOL.pass} pass</span><span class="margin">${STATUS_SYMBOL.margin} margin: near the limit</span
        ><span class="fail">${STATUS_SYMBOL.fail} fail</span><span class="na">${STATUS_SYMBOL['n/a']} n/a: does not apply</span
        ><span class="error">${STATUS_SYMBOL.error} error: could not be worked out</span>
      </p>
      ${book.variants.length === 0
        ? html`<p class="empty">No variants yet: add them on the Family page.</p>`
        : html`<div class="scroll">
            <table class="matrix" data-testid="checks-matrix">
              <thead>
                <tr>
                  <th class="check" scope="col">check</th>
                  ${shown.map((v) => html`<th scope="col" title=${v.name} data-variant=${v.code}>${v.code}</th>`)}
                </tr>
              </thead>
              <tbody>
                <tr class="summary">
                  <th class="check" scope="row"><small>worst of the variant</small></th>
                  ${shown.map((v) => {
                    const worst = worstOf(book.checks.map((c) => this.result(v.id, c.id)?.status ?? CHECK_STATUS.na));
                    return html`<td data-variant=${v.code}><span class=${statusClass(worst)}>${STATUS_SYMBOL[worst]} ${worst}</span></td>`;
                  })}
                </tr>
                ${[...groups].map(
                  ([g, checks]) => html`<tr class="group"><th class="check" colspan=${cols}>${g}</th></tr>
                    ${checks.map((c) => this.renderRow(book, c, shown, cols))}`,
                )}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  private renderRow(book: Book, c: Check, shown: Variant[], cols: number): TemplateResult {
    const sel = this.selected;
    const row = html`<tr data-check=${c.name}>
      <th class="check" scope="row"><code>${c.name}</code>${this.formulaDrafts.has(c.id) ? html` <em class="muted">(formula changed, not kept)</em>` : ''}<small>${c.title}</small></th>
      ${shown.map((v) => {
        const r = this.result(v.id, c.id);
        const status = r?.status ?? CHECK_STATUS.error;
        const pressed = sel?.variantId === v.id && sel.checkId === c.id;
        const value = r ? shownValue(r) : '';
        return html`<td>
          <button
            type="button"
            class="cell ${statusClass(status)}"
            data-variant=${v.code}
            data-check=${c.name}
            data-status=${status}
            aria-pressed=${pressed ? 'true' : 'false'}
            aria-label="${c.name} on ${v.code}: ${status}${value ? `, ${value}` : ''}"
            @click=${() => this.select(v.id, c.id)}
          >
            <span class="sym" aria-hidden="true">${STATUS_SYMBOL[status]}</span> ${status}${value ? html`<small>${value}</small>` : ''}
          </button>
        </td>`;
      })}
    </tr>`;
    if (!sel || sel.checkId !== c.id) return row;
    const v = book.variants.find((x) => x.id === sel.variantId);
    if (!v) return row;
    return html`${row}
      <tr class="detail">
        <td colspan=${cols}>${this.renderPanel(book, c, v)}</td>
      </tr>`;
  }

  private select(variantId: string, checkId: string): void {
    const same = this.selected?.variantId === variantId && this.selected.checkId === checkId;
    this.selected = same ? undefined : { variantId, checkId };
    this.paramDrafts = new Map();
    this.paramProblems = new Map();
    this.panelMessage = undefined;
    this.confirmDelete = false;
    this.formulaProblem = undefined;
  }

  /** Parameters a check reads, directly or through the checks it names, that some variant has. */
  private paramsRead(book: Book, check: Check): string[] {
    const paramKeys = new Map<string, string>();
    for (const v of book.variants) for (const k of Object.keys(v.params)) if (!paramKeys.has(nameKey(k))) paramKeys.set(nameKey(k), k);
    const byName = new Map(book.checks.map((c) => [nameKey(c.name), c] as const));
    const out: string[] = [];
    const seen = new Set<string>();
    const visit = (c: Check): void => {
      const texts = [this.formulaDrafts.get(c.id) ?? c.formula, c.appliesWhen, c.rule.limit ?? '', c.rule.low ?? '', c.rule.high ?? ''];
      for (const t of texts) {
        if (t.trim() === '') continue;
        const n = formulaNames(t);
        if (!n.ok) continue;
        for (const key of n.names) {
          if (seen.has(key)) continue;
          seen.add(key);
          const p = paramKeys.get(key);
          if (p) out.push(p);
          const inner = byName.get(key);
          if (inner) visit(inner);
        }
      }
    };
    visit(check);
    return out;
  }

  private renderPanel(book: Book, c: Check, v: Variant): TemplateResult {
    const r = this.result(v.id, c.id);
    const status = r?.status ?? CHECK_STATUS.error;
    const draft = this.formulaDrafts.get(c.id);
    const params = this.paramsRead(book, c);
    return html`<div class="panel" data-testid="check-detail" role="region" aria-label="${c.name} on ${v.code}">
      <h3>
        ${c.title} — ${v.code}<span class="st ${statusClass(status)}" data-testid="detail-status">${STATUS_SYMBOL[status]} ${status}</span>
      </h3>
      <dl class="facts">
        <dt>value</dt>
        <dd data-testid="detail-value">${r ? shownValue(r) || '—' : '—'}${r && typeof r.value === 'number' ? html` <span class="muted">(${r.value})</span>` : ''}</dd>
        <dt>formula</dt>
        <dd><code>${c.formula}</code></dd>
        <dt>rule</dt>
        <dd><code>${formatRule(c.rule)}</code></dd>
        <dt>limit here</dt>
        <dd>${r?.limit ? `${r.limit}${c.unit ? ` ${c.unit}` : ''}` : '—'}</dd>
        <dt>applies when</dt>
        <dd><code>${c.appliesWhen || '(every variant)'}</code></dd>
        <dt>result</dt>
        <dd>${r?.message ?? ''}</dd>
        <dt>note</dt>
        <dd>${c.note || '—'}</dd>
      </dl>
      ${params.length > 0
        ? html`<h4>Parameters of ${v.code} this check reads</h4>
            <div class="edit-grid">
              ${params.map((name) => this.renderParam(v, name))}
            </div>`
        : ''}
      <h4>Formula, for every variant</h4>
      <div class="formula-row">
        <rb-formula-input
          data-field="check-formula"
          .label=${`formula of ${c.name}`}
          .value=${draft ?? c.formula}
          .names=${this.names}
          ?invalid=${Boolean(this.formulaProblem)}
          @formula-input=${(e: CustomEvent<{ value: string }>) => this.tryFormula(c, e.detail.value)}
        ></rb-formula-input>
        <span>
          <button type="button" class="primary" ?disabled=${draft === undefined} @click=${() => void this.keepFormula(c)}>Keep this formula</button>
          <button type="button" ?disabled=${draft === undefined} @click=${() => this.putBack(c)}>Put back</button>
        </span>
      </div>
      ${this.formulaProblem ? html`<div class="problem" role="alert">${this.formulaProblem}</div>` : ''}
      ${draft !== undefined ? html`<div class="muted">Every variant shows the changed formula now; keep it to save it in the Book.</div>` : ''}
      ${this.panelMessage ? html`<div class="problem" role="alert">${this.panelMessage}</div>` : ''}
      <div class="row-actions">
        <button type="button" @click=${() => (this.editing = { check: c })}>Edit the whole check</button>
        ${c.builtIn
          ? html`<span class="muted">built in (from the sheets shipped with Rungbook): it can be changed, not deleted</span>`
          : this.confirmDelete
            ? html`Delete ${c.name} from the Book?
                <button type="button" class="danger" @click=${() => void this.deleteCheck(c)}>Delete</button>
                <button type="button" class="quiet" @click=${() => (this.confirmDelete = false)}>Keep</button>`
            : html`<button type="button" class="danger" @click=${() => (this.confirmDelete = true)}>Delete this check</button>`}
      </div>
    </div>`;
  }

  private renderParam(v: Variant, name: string): TemplateResult {
    const value = ownValue(v.params, name);
    const info = paramInfo(name, value);
    const key = `${v.id}\u0000${name}`;
    const text = this.paramDrafts.get(key) ?? paramText(name, value);
    const problem = this.paramProblems.get(key);
    const id = `param-${name}`;
    return html`<label for=${id}>${name}</label>
      <input
        id=${id}
        data-param=${name}
        type="text"
        autocomplete="off"
        spellcheck="false"
        .value=${live(text)}
        aria-invalid=${problem ? 'true' : 'false'}
        @input=${(e: Event) => {
          this.paramDrafts = new Map(this.paramDrafts).set(key, (e.target as HTMLInputElement).value);
        }}
        @change=${(e: Event) => void this.commitParam(v.id, name, (e.target as HTMLInputElement).value)}
      />
      ${problem
        ? html`<span class="problem" data-problem-for=${name} role="alert">${problem}</span>`
        : html`<span class="hint">${value === undefined ? `${v.code} does not set ${name}` : info.unit ? `in ${info.unit}; engineering notation welcome` : info.kind === 'text' ? 'text' : ''}</span>`}`;
  }

  private setParamProblem(key: string, message: string | undefined): void {
    const next = new Map(this.paramProblems);
    if (message) next.set(key, message);
    else next.delete(key);
    this.paramProblems = next;
  }

  /** Re-evaluates at once through the session, then saves the variant; bad input is refused and changes nothing. */
  private async commitParam(variantId: string, name: string, text: string): Promise<void> {
    const service = this.books.service;
    const session = this.session;
    const v = service?.book.variants.find((x) => x.id === variantId);
    if (!service || !session || !v) return;
    const key = `${v.id}\u0000${name}`;
    const old = ownValue(v.params, name);
    const info = paramInfo(name, old);
    let value: ParamValue;
    if (info.kind === 'text') {
      if (text.trim() === '') return this.setParamProblem(key, `${name} needs a value`);
      value = text.trim();
    } else {
      const r = readNumber(text, info.unit);
      if (!r.ok) return this.setParamProblem(key, r.error);
      value = r.value;
    }
    const set = session.setParam(v.id, name, value);
    if (!set.ok) return this.setParamProblem(key, set.error);
    this.setParamProblem(key, undefined);
    this.refresh();
    this.requestUpdate();
    // Built from the Book as it stands when the write runs, so edits in quick succession never reuse a revision.
    const ok = await this.saveOwn(() => {
      const fresh = service.book.variants.find((x) => x.id === variantId);
      if (!fresh) return Promise.resolve({ ok: false, message: `${v.code} was deleted elsewhere; nothing was saved.` });
      if (ownValue(fresh.params, name) === value) return Promise.resolve({ ok: true });
      return service.save({ put: { variants: [{ ...fresh, params: { ...fresh.params, [name]: value } }] } });
    });
    if (ok) {
      const drafts = new Map(this.paramDrafts);
      drafts.delete(key);
      this.paramDrafts = drafts;
    }
  }

  /**
   * Runs our saves one after another so the Book each brings back is adopted, not recompiled; a failed save
   * recompiles from the Book as stored.
   */
  private saveOwn(write: () => Promise<{ ok: true } | { ok: false; message: string }>): Promise<boolean> {
    this.ownSaves += 1;
    const run = this.writes.then(async () => {
      let result: { ok: true } | { ok: false; message: string };
      try {
        result = await write();
      } catch (e) {
        result = { ok: false, message: String(e) };
      } finally {
        this.ownSaves -= 1;
      }
      const service = this.books.service;
      if (!result.ok) {
        this.panelMessage = result.message;
        if (service) this.rebuild(service.book);
        return false;
      }
      this.panelMessage = undefined;
      if (service) this.sessionBook = service.book;
      return true;
    });
    this.writes = run;
    return run;
  }

  private tryFormula(c: Check, text: string): void {
    const session = this.session;
    if (!session) return;
    this.formulaDrafts = new Map(this.formulaDrafts).set(c.id, text);
    const r = session.setCheckFormula(c.id, text);
    this.formulaProblem = r.ok ? undefined : r.error;
    this.refresh();
    this.requestUpdate();
  }

  private putBack(c: Check): void {
    const drafts = new Map(this.formulaDrafts);
    drafts.delete(c.id);
    this.formulaDrafts = drafts;
    this.formulaProblem = undefined;
    this.session?.setCheckFormula(c.id, c.formula);
    this.refresh();
  }

  private async keepFormula(c: Check): Promise<void> {
    const service = this.books.service;
    const text = this.formulaDrafts.get(c.id);
    if (!service || text === undefined) return;
    if (this.formulaProblem) {
      this.panelMessage = 'Nothing saved: the formula cannot be read.';
      return;
    }
    const body = text.trim().replace(/^=\s*/, '');
    const fresh = service.book.checks.find((x) => x.id === c.id);
    if (!fresh) {
      this.panelMessage = 'This check was deleted elsewhere; nothing was saved.';
      return;
    }
    const ok = await this.saveOwn(() => service.save({ put: { checks: [{ ...fresh, formula: body }] } }));
    if (ok) {
      const drafts = new Map(this.formulaDrafts);
      drafts.delete(c.id);
      // The session already evaluates this formula, so it is adopted with the saved Book rather than rebuilt.
      this.formulaDrafts = drafts;
    }
  }

  private async deleteCheck(c: Check): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    this.confirmDelete = false;
    const result = await service.save({ delete: { checks: [c.id] } });
    if (!result.ok) {
      this.panelMessage = result.message;
      return;
    }
    this.selected = undefined;
    const drafts = new Map(this.formulaDrafts);
    drafts.delete(c.id);
    this.formulaDrafts = drafts;
  }

  private readonly _onCheckSaved = (e: CustomEvent<{ checkId: string }>): void => {
    this.editing = undefined;
    const book = this.books.book;
    const v = this.selected?.variantId ?? book?.variants[0]?.id;
    if (v) this.selected = { variantId: v, checkId: e.detail.checkId };
    const drafts = new Map(this.formulaDrafts);
    drafts.delete(e.detail.checkId);
    this.formulaDrafts = drafts;
  };
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-checks-page': RbChecksPage;
  }
}
