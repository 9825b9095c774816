// The detail of one check on one variant, opened under its row on the Checks page: figure, formula, rule, limit and
// note; the variant's parameters the check reads and the check's formula, both editable in place (the live session
// re-evaluates every variant at once) and saved in the Book; and the way to edit or delete the whole check.
import { LitElement, css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book, Check, ParamValue, Variant } from '../domain/book.ts';
import { CHECK_STATUS, STATUS_SYMBOL } from '../domain/check-status.ts';
import { ownValue } from '../domain/params.ts';
import { formulaNames, nameKey } from '../engine/formula-names.ts';
import { formatRule } from '../engine/check-sheets.ts';
import { BookController } from './book-context.ts';
import { shownValue, statusClass } from './checks-controller.ts';
import type { ChecksController } from './checks-controller.ts';
import { paramInfo, paramText, readNumber } from './record-forms.ts';
import './rb-formula-input.ts';
import { checkStatusStyles, pageStyles, problemStyles, ruledControlStyles } from './styles.ts';

export type CheckEditDetail = { check: Check };
export type CheckDeletedDetail = { checkId: string };

@customElement('rb-check-detail')
export class RbCheckDetail extends LitElement {
  static override styles = [
    pageStyles,
    checkStatusStyles,
    problemStyles,
    ruledControlStyles('.edit-grid input', { ink: false }),
    css`
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
      .edit-grid input[aria-invalid='true'] {
        border-bottom-color: var(--rb-fail);
        background: var(--rb-fail-bg);
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
    `,
  ];

  private readonly books = new BookController(this);
  @property({ attribute: false }) check: Check | undefined;
  @property({ attribute: false }) variant: Variant | undefined;
  @property({ attribute: false }) checks: ChecksController | undefined;
  /** The checks' revision: a new one draws the figures again. */
  @property({ attribute: false }) revision = 0;

  @state() private paramDrafts = new Map<string, string>();
  @state() private paramProblems = new Map<string, string>();
  @state() private formulaProblem: string | undefined;
  @state() private panelMessage: string | undefined;
  @state() private confirmDelete = false;
  /** The cell the panel was last drawn for: another cell starts the panel afresh. */
  private shownFor = '';

  protected override willUpdate(): void {
    const key = `${this.variant?.id ?? ''}\u0000${this.check?.id ?? ''}`;
    if (key === this.shownFor) return;
    this.shownFor = key;
    this.paramDrafts = new Map();
    this.paramProblems = new Map();
    this.panelMessage = undefined;
    this.confirmDelete = false;
    this.formulaProblem = undefined;
  }

  override render() {
    const book = this.books.book;
    const c = this.check;
    const v = this.variant;
    const checks = this.checks;
    if (!book || !c || !v || !checks) return html``;
    const r = checks.result(v.id, c.id);
    const status = r?.status ?? CHECK_STATUS.error;
    const draft = checks.formulaDrafts.get(c.id);
    const params = this.paramsRead(book, c, checks.formulaDrafts);
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
          .names=${checks.names}
          ?invalid=${Boolean(this.formulaProblem)}
          @formula-input=${(e: CustomEvent<{ value: string }>) => (this.formulaProblem = checks.tryFormula(c, e.detail.value))}
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
        <button type="button" @click=${() => this.emit('rb-check-edit', { check: c })}>Edit the whole check</button>
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

  /** Parameters a check reads, directly or through the checks it names, that some variant has. */
  private paramsRead(book: Book, check: Check, drafts: ReadonlyMap<string, string>): string[] {
    const paramKeys = new Map<string, string>();
    for (const v of book.variants) for (const k of Object.keys(v.params)) if (!paramKeys.has(nameKey(k))) paramKeys.set(nameKey(k), k);
    const byName = new Map(book.checks.map((c) => [nameKey(c.name), c] as const));
    const out: string[] = [];
    const seen = new Set<string>();
    const visit = (c: Check): void => {
      const texts = [drafts.get(c.id) ?? c.formula, c.appliesWhen, c.rule.limit ?? '', c.rule.low ?? '', c.rule.high ?? ''];
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
    const checks = this.checks;
    const v = service?.book.variants.find((x) => x.id === variantId);
    if (!service || !checks || !v) return;
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
    const refused = checks.tryParam(v.id, name, value);
    if (refused) return this.setParamProblem(key, refused);
    this.setParamProblem(key, undefined);
    // Built from the Book as it stands when the write runs, so edits in quick succession never reuse a revision.
    const saved = await checks.saveOwn(() => {
      const fresh = service.book.variants.find((x) => x.id === variantId);
      if (!fresh) return Promise.resolve({ ok: false, message: `${v.code} was deleted elsewhere; nothing was saved.` });
      if (ownValue(fresh.params, name) === value) return Promise.resolve({ ok: true });
      return service.save({ put: { variants: [{ ...fresh, params: { ...fresh.params, [name]: value } }] } });
    });
    this.panelMessage = saved.ok ? undefined : saved.message;
    if (saved.ok) {
      const drafts = new Map(this.paramDrafts);
      drafts.delete(key);
      this.paramDrafts = drafts;
    }
  }

  private putBack(c: Check): void {
    this.formulaProblem = undefined;
    this.checks?.putBack(c);
  }

  private async keepFormula(c: Check): Promise<void> {
    const service = this.books.service;
    const checks = this.checks;
    const text = checks?.formulaDrafts.get(c.id);
    if (!service || !checks || text === undefined) return;
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
    const saved = await checks.saveOwn(() => service.save({ put: { checks: [{ ...fresh, formula: body }] } }));
    this.panelMessage = saved.ok ? undefined : saved.message;
    // The session already evaluates this formula, so it is adopted with the saved Book rather than rebuilt.
    if (saved.ok) checks.dropDraft(c.id);
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
    this.checks?.dropDraft(c.id);
    this.emit('rb-check-deleted', { checkId: c.id });
  }

  private emit<K extends 'rb-check-edit' | 'rb-check-deleted'>(type: K, detail: HTMLElementEventMap[K]['detail']): void {
    this.dispatchEvent(new CustomEvent(type, { detail, bubbles: true, composed: true }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-check-detail': RbCheckDetail;
  }
  interface HTMLElementEventMap {
    'rb-check-edit': CustomEvent<CheckEditDetail>;
    'rb-check-deleted': CustomEvent<CheckDeletedDetail>;
  }
}
