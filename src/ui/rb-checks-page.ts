// Checks page: every check against every variant as a matrix of statuses (word, symbol and colour), the selected
// cell's figure, formula, rule, limit and note opened under its row, with the variant's parameters and the check's
// formula editable in place (a live check session re-evaluates at once); adding and editing checks; the step ladder.
import { LitElement, css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book, Check, Variant } from '../domain/book.ts';
import { CHECK_STATUS, STATUS_SYMBOL, worstOf } from '../domain/check-status.ts';
import type { CheckStatus } from '../domain/check-status.ts';
import { BookController } from './book-context.ts';
import { ChecksController, shownValue, statusClass } from './checks-controller.ts';
import './rb-check-detail.ts';
import './rb-check-form.ts';
import './rb-ladder-designer.ts';
import { checkStatusStyles, pageStyles, toolbarSearchStyles } from './styles.ts';

/** Most variant columns drawn at once; a larger family is narrowed with the filter (the rest are counted). */
const MAX_COLUMNS = 40;

type Selection = { variantId: string; checkId: string };
type Editing = { check: Check | undefined };

@customElement('rb-checks-page')
export class RbChecksPage extends LitElement {
  static override styles = [
    pageStyles,
    checkStatusStyles,
    toolbarSearchStyles,
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
      button.cell.pending {
        color: var(--rb-na);
        font-style: italic;
      }
      button.cell small {
        display: block;
        font-family: var(--rb-mono);
        font-size: 0.72rem;
        color: var(--rb-ink);
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
  private readonly checks = new ChecksController(this, this.books);

  @state() private selected: Selection | undefined;
  @state() private filter = '';
  @state() private onlyProblems = false;
  @state() private editing: Editing | undefined;

  override willUpdate(): void {
    const book = this.books.book;
    if (book) this.checks.sync(book);
  }

  private result(variantId: string, checkId: string) {
    return this.checks.result(variantId, checkId);
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
    for (const r of this.checks.allResults()) counts[r.status] += 1;
    const cols = shown.length + 1;
    return html`<section class="sheet" aria-labelledby="matrix-h">
      <h2 id="matrix-h">Checks × variants</h2>
      <p class="why">
        ${book.checks.length} checks on ${book.variants.length} variants${this.checks.hasResults
          ? `: ${counts.pass} pass, ${counts.margin} margin, ${counts.fail} fail, ${counts.error} error, ${counts['n/a']} n/a`
          : ''}. Choose a cell to see its figure, formula, rule and note, and to change the variant's parameters or the
        formula.
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
      ${this.checks.problem ? html`<p class="problem" role="alert">${this.checks.problem}</p>` : ''}
      ${this.checks.pending ? html`<p class="muted" role="status" data-testid="checks-pending">${this.checks.hasResults ? 'Updating the checks…' : 'Working out every check on every variant…'}</p>` : ''}
      ${book.variants.length === 0
        ? html`<p class="empty">No variants yet: add them on the Family page.</p>`
        : !this.checks.hasResults && this.checks.pending
          ? ''
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
      <th class="check" scope="row"><code>${c.name}</code>${this.checks.formulaDrafts.has(c.id) ? html` <em class="muted">(formula changed, not kept)</em>` : ''}<small>${c.title}</small></th>
      ${shown.map((v) => {
        const r = this.result(v.id, c.id);
        const pressed = sel?.variantId === v.id && sel.checkId === c.id;
        // A check just added has no result until the figures worker has worked it out: say so, not "error".
        const pending = !r && this.checks.pending;
        const status = r?.status ?? CHECK_STATUS.error;
        const value = r ? shownValue(r) : '';
        const said = pending ? 'being worked out' : status;
        return html`<td>
          <button
            type="button"
            class="cell ${pending ? 'pending' : statusClass(status)}"
            data-variant=${v.code}
            data-check=${c.name}
            data-status=${pending ? 'pending' : status}
            aria-pressed=${pressed ? 'true' : 'false'}
            aria-label="${c.name} on ${v.code}: ${said}${value ? `, ${value}` : ''}"
            @click=${() => this.select(v.id, c.id)}
          >
            <span class="sym" aria-hidden="true">${pending ? '…' : STATUS_SYMBOL[status]}</span> ${said}${value ? html`<small>${value}</small>` : ''}
          </button>
        </td>`;
      })}
    </tr>`;
    if (!sel || sel.checkId !== c.id) return row;
    const v = book.variants.find((x) => x.id === sel.variantId);
    if (!v) return row;
    return html`${row}
      <tr class="detail">
        <td colspan=${cols}>
          <rb-check-detail
            .check=${c}
            .variant=${v}
            .checks=${this.checks}
            .revision=${this.checks.revision}
            @rb-check-edit=${(e: HTMLElementEventMap['rb-check-edit']) => (this.editing = { check: e.detail.check })}
            @rb-check-deleted=${() => (this.selected = undefined)}
          ></rb-check-detail>
        </td>
      </tr>`;
  }

  private select(variantId: string, checkId: string): void {
    const same = this.selected?.variantId === variantId && this.selected.checkId === checkId;
    this.selected = same ? undefined : { variantId, checkId };
  }

  private readonly _onCheckSaved = (e: CustomEvent<{ checkId: string }>): void => {
    this.editing = undefined;
    const book = this.books.book;
    const v = this.selected?.variantId ?? book?.variants[0]?.id;
    if (v) this.selected = { variantId: v, checkId: e.detail.checkId };
    this.checks.dropDraft(e.detail.checkId);
  };
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-checks-page': RbChecksPage;
  }
}
