// The detail of one check on one variant, opened under its row on the Checks page: figure, formula, rule, limit and
// note; everything the check reads, each editable where it lives — the variant's parameters (the live session
// re-evaluates every variant at once) and the ratings of the parts its lines give (the part record) — with undo;
// the check's formula, tried on every variant before it is kept; and the way to edit or delete the whole check.
import { LitElement, css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { ifDefined } from 'lit/directives/if-defined.js';
import { live } from 'lit/directives/live.js';
import type { Check, ParamValue, Part, Variant } from '../domain/book.ts';
import { CHECK_STATUS, STATUS_SYMBOL } from '../domain/check-status.ts';
import { PART_RATINGS, ownValue } from '../domain/params.ts';
import { isPartValueUnit } from '../domain/schema.ts';
import { checkInputs } from '../engine/check-inputs.ts';
import type { ParamInput, RatingInput } from '../engine/check-inputs.ts';
import { formatRule } from '../engine/check-sheets.ts';
import { BookController } from './book-context.ts';
import { shownValue, statusClass } from './checks-controller.ts';
import type { ChecksController } from './checks-controller.ts';
import { KIND_VALUE_UNITS, paramInfo, paramText, readNumber, valueText } from './record-forms.ts';
import { DIRECTIONS } from './undo.ts';
import type { Direction } from './undo.ts';
import './rb-formula-input.ts';
import { checkStatusStyles, pageStyles, problemStyles, ruledControlStyles } from './styles.ts';

/** A build line as the detail names it: its designators, and its role. */
function lineName(line: { designators: string; role?: string | undefined; id: string }): string {
  const where = line.designators || line.id;
  return line.role ? `${where} (${line.role})` : where;
}

/** The unit a part's value or rating is read in: the part's own unit for its value, the rating's for a rating. */
function ratingUnit(part: Part, rating: string): string {
  if (rating === 'value') return part.unit ?? KIND_VALUE_UNITS[part.kind] ?? '';
  return PART_RATINGS.find((r) => r.name === rating)?.unit ?? '';
}

/** What the detail says beside a parameter: its unit or that the variant lacks it, and the line it chooses for. */
function paramHint(v: Variant, input: ParamInput, value: ParamValue | undefined, info: { unit: string; kind: 'number' | 'text' }): string {
  const about =
    value === undefined ? `${v.code} does not set ${input.name}` : info.unit ? `in ${info.unit}; engineering notation welcome` : info.kind === 'text' ? 'text' : '';
  const chooses = input.line ? `chooses the part of line ${lineName(input.line)}` : '';
  return [about, chooses].filter((t) => t !== '').join('; ');
}

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
    const formulaProblem = draft === undefined ? undefined : checks.formulaProblems.get(c.id);
    const inputs = checkInputs(book, c, checks.resolved(v.id), (x) => checks.formulaDrafts.get(x.id) ?? x.formula);
    const undoStep = checks.history.peek(DIRECTIONS.undo);
    const redoStep = checks.history.peek(DIRECTIONS.redo);
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
      ${inputs.params.length > 0
        ? html`<h4>Parameters of ${v.code} this check reads</h4>
            <div class="edit-grid" data-testid="detail-params">
              ${inputs.params.map((p) => this.renderParam(v, p))}
            </div>`
        : ''}
      ${inputs.ratings.length > 0
        ? html`<h4>Part ratings this check reads</h4>
            <div class="edit-grid" data-testid="detail-ratings">
              ${inputs.ratings.map((r) => this.renderRating(v, r))}
            </div>`
        : ''}
      ${undoStep || redoStep
        ? html`<div class="row-actions">
            <button type="button" data-testid="detail-undo" ?disabled=${!undoStep} @click=${() => void this.step(DIRECTIONS.undo)}>
              ↶ Undo${undoStep ? html` <span class="muted">${undoStep.label}</span>` : ''}
            </button>
            <button type="button" data-testid="detail-redo" ?disabled=${!redoStep} @click=${() => void this.step(DIRECTIONS.redo)}>
              ↷ Redo${redoStep ? html` <span class="muted">${redoStep.label}</span>` : ''}
            </button>
          </div>`
        : ''}
      <h4>Formula, for every variant</h4>
      <div class="formula-row">
        <rb-formula-input
          data-field="check-formula"
          .label=${`formula of ${c.name}`}
          .value=${draft ?? c.formula}
          .names=${checks.names}
          ?invalid=${Boolean(formulaProblem)}
          @formula-input=${(e: CustomEvent<{ value: string }>) => checks.tryFormula(c, e.detail.value)}
        ></rb-formula-input>
        <span>
          <button type="button" class="primary" ?disabled=${draft === undefined} @click=${() => void this.keepFormula(c)}>Keep this formula</button>
          <button type="button" ?disabled=${draft === undefined} @click=${() => this.putBack(c)}>Put back</button>
        </span>
      </div>
      ${formulaProblem ? html`<div class="problem" role="alert">${formulaProblem}</div>` : ''}
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

  private renderParam(v: Variant, input: ParamInput): TemplateResult {
    const name = input.name;
    const value = ownValue(v.params, name);
    const info = paramInfo(name, value);
    return this.renderField({
      kind: 'param',
      name,
      key: `${v.id}\u0000${name}`,
      shown: paramText(name, value),
      hint: paramHint(v, input, value, info),
      commit: (text) => this.commitParam(v.id, name, text),
    });
  }

  private renderRating(v: Variant, input: RatingInput): TemplateResult {
    const part = input.part;
    if (!part || !input.line) {
      return html`<label for=${`rating-${input.key}`}>${input.key}</label>
        <span id=${`rating-${input.key}`} data-rating=${input.key}>—</span>
        <span class="hint">no build line that applies to ${v.code} gives a part with the role ${input.role}</span>`;
    }
    const unit = ratingUnit(part, input.rating);
    const figure = input.rating === 'value' ? part.value : ownValue(part.ratings, input.rating);
    // The line's approved alternates are judged too: their figures, so the weaker one is seen beside the own part.
    const alternates = (input.line.alternates ?? []).flatMap((id) => {
      const alt = this.books.book?.parts.find((p) => p.id === id);
      if (!alt) return [];
      const f = input.rating === 'value' ? alt.value : ownValue(alt.ratings, input.rating);
      return [`${alt.mpn} ${f === undefined ? 'not set' : valueText(f, unit)}`];
    });
    const judged = alternates.length > 0 ? `; approved alternates, judged too: ${alternates.join(', ')}` : '';
    return this.renderField({
      kind: 'rating',
      name: input.key,
      key: `${part.id}\u0000${input.rating}`,
      shown: valueText(figure, unit),
      hint: `${input.rating} of part ${part.mpn} (line ${lineName(input.line)})${figure === undefined ? ', not set' : ''}${judged}: a change edits the part, for every variant and line that use it`,
      commit: (text) => this.commitRating(part.id, input.rating, unit, text),
    });
  }

  /** One editable input of the detail: its label, the text typed or the figure stored, and its problem or hint. */
  private renderField(f: { kind: 'param' | 'rating'; name: string; key: string; shown: string; hint: string; commit: (text: string) => Promise<void> }): TemplateResult {
    const id = `${f.kind}-${f.name}`;
    const problem = this.paramProblems.get(f.key);
    return html`<label for=${id}>${f.name}</label>
      <input
        id=${id}
        data-param=${ifDefined(f.kind === 'param' ? f.name : undefined)}
        data-rating=${ifDefined(f.kind === 'rating' ? f.name : undefined)}
        type="text"
        autocomplete="off"
        spellcheck="false"
        .value=${live(this.paramDrafts.get(f.key) ?? f.shown)}
        aria-invalid=${problem ? 'true' : 'false'}
        @input=${(e: Event) => {
          this.paramDrafts = new Map(this.paramDrafts).set(f.key, (e.target as HTMLInputElement).value);
        }}
        @change=${(e: Event) => void f.commit((e.target as HTMLInputElement).value)}
      />
      ${problem
        ? html`<span class="problem" data-problem-for=${f.name} role="alert">${problem}</span>`
        : html`<span class="hint">${f.hint}</span>`}`;
  }

  /** Saves a part's value or rating to the part record; the checks then follow the Book. Bad input changes nothing. */
  private async commitRating(partId: string, rating: string, unit: string, text: string): Promise<void> {
    const service = this.books.service;
    const checks = this.checks;
    const fresh = service?.book.parts.find((p) => p.id === partId);
    if (!service || !checks || !fresh) return;
    const key = `${partId}\u0000${rating}`;
    const r = readNumber(text, unit);
    if (!r.ok) return this.setParamProblem(key, r.error);
    this.setParamProblem(key, undefined);
    const old = rating === 'value' ? fresh.value : ownValue(fresh.ratings, rating);
    if (old === r.value) return this.dropDraft(key);
    const next: Part =
      rating === 'value'
        ? { ...fresh, value: r.value, ...(fresh.unit === undefined && isPartValueUnit(unit) ? { unit } : {}) }
        : { ...fresh, ratings: { ...fresh.ratings, [rating]: r.value } };
    const saved = await service.save({ put: { parts: [next] } });
    this.panelMessage = saved.ok ? undefined : saved.message;
    if (!saved.ok) return;
    checks.recordEdit('parts', fresh, `${rating} of ${fresh.mpn}`);
    this.dropDraft(key);
  }

  private dropDraft(key: string): void {
    const drafts = new Map(this.paramDrafts);
    drafts.delete(key);
    this.paramDrafts = drafts;
  }

  private async step(direction: Direction): Promise<void> {
    const done = await this.checks?.step(direction);
    this.panelMessage = done && !done.ok ? done.message : undefined;
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
    this.setParamProblem(key, undefined);
    // Built from the Book as it stands when the write runs, so edits in quick succession never reuse a revision.
    const saved = await checks.saveOwn(() => {
      const fresh = service.book.variants.find((x) => x.id === variantId);
      if (!fresh) return Promise.resolve({ ok: false, message: `${v.code} was deleted elsewhere; nothing was saved.` });
      if (ownValue(fresh.params, name) === value) return Promise.resolve({ ok: true });
      return service.save({ put: { variants: [{ ...fresh, params: { ...fresh.params, [name]: value } }] } }).then((result) => {
        if (result.ok) checks.recordEdit('variants', fresh, `${name} of ${fresh.code}`);
        return result;
      });
    });
    this.panelMessage = saved.ok ? undefined : saved.message;
    if (saved.ok) this.dropDraft(key);
  }

  private putBack(c: Check): void {
    this.checks?.putBack(c);
  }

  private async keepFormula(c: Check): Promise<void> {
    const service = this.books.service;
    const checks = this.checks;
    const text = checks?.formulaDrafts.get(c.id);
    if (!service || !checks || text === undefined) return;
    // The formula as typed last is tried first: one that cannot be read is never saved.
    await checks.tried();
    if (checks.formulaProblems.has(c.id) || checks.formulaDrafts.get(c.id) !== text) {
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
