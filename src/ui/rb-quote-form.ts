// The form for adding or editing one quote: its price breaks as rows of quantity and price, MOQ, pack quantity, lead
// time and expiry, with each problem beside its field. It checks the draft and hands a good Quote to its page.
import { LitElement, css, html } from 'lit';
import type { PropertyValues } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book, Quote } from '../domain/book.ts';
import { INCOTERMS, newId } from '../domain/book.ts';
import { todayIso } from '../domain/dates.ts';
import { field, group, nothingSaved } from './form-fields.ts';
import type { QuoteDraft, QuoteProblems } from './quote-text.ts';
import { quoteDraft, validateQuote } from './quote-text.ts';
import { pageStyles } from './styles.ts';

/** The quote to save, and the draft it was read from (to show again if the save fails). */
export type QuoteSubmitDetail = { quote: Quote; draft: QuoteDraft };

@customElement('rb-quote-form')
export class RbQuoteForm extends LitElement {
  static override styles = [
    pageStyles,
    css`
      .breaks {
        grid-column: 2 / -1;
        display: grid;
        grid-template-columns: max-content 8rem max-content 8rem max-content minmax(8rem, 1fr);
        gap: 0.3rem 0.5rem;
        align-items: baseline;
      }
      /* Inside form.record, whose shared rules already give the inputs, labels and problems their look. */
      .breaks input {
        text-align: right;
        font-variant-numeric: tabular-nums;
      }
      .breaks-head {
        text-align: right;
      }
    `,
  ];

  @property({ attribute: false }) book: Book | undefined;
  /** The quote being edited; undefined for a new quote. */
  @property({ attribute: false }) quote: Quote | undefined;
  @property({ attribute: false }) saveError: string | undefined;
  /** The draft to show instead of the quote as stored: an edit whose save failed, opened again. */
  @property({ attribute: false }) draftShown: QuoteDraft | undefined;

  @state() private draft: QuoteDraft = quoteDraft(undefined, todayIso());
  @state() private problems: QuoteProblems = {};

  override willUpdate(changed: PropertyValues<this>): void {
    if (changed.has('quote')) {
      this.draft = this.draftShown ?? quoteDraft(this.quote, this.book?.settings.costingDate ?? todayIso());
      this.problems = {};
    }
  }

  override render() {
    const book = this.book;
    if (!book) return html``;
    const d = this.draft;
    const q = this.quote;
    const part = q ? book.parts.find((p) => p.id === q.partId) : undefined;
    const supplier = q ? book.suppliers.find((s) => s.id === q.supplierId) : undefined;
    const set = (patch: Partial<QuoteDraft>): void => {
      this.draft = { ...this.draft, ...patch };
    };
    const parts = [...book.parts].sort((a, b) => a.mpn.localeCompare(b.mpn));
    const suppliers = [...book.suppliers].sort((a, b) => a.name.localeCompare(b.name));
    return html`<section class="sheet" aria-labelledby="quote-form-h">
      <h2 id="quote-form-h">${q ? `Edit the quote for ${part?.mpn ?? q.partId} from ${supplier?.name ?? q.supplierId}` : 'New quote'}</h2>
      <p class="why">
        Prices are per unit in the quote's currency and apply to the whole order from their break quantity up.
        ${q ? '' : 'A new quote replaces the current one from the same supplier for the same part, which is kept as superseded.'}
      </p>
      ${this.saveError ? html`<p class="notice" role="alert">${this.saveError}</p>` : ''}
      <form class="record" novalidate aria-label="Quote" @submit=${this._onSubmit}>
        ${q
          ? ''
          : html`${this.selectField('partId', 'part', d.partId, parts.map((p) => ({ value: p.id, label: `${p.mpn} — ${p.description}` })), (v) => set({ partId: v }))}
            ${this.selectField('supplierId', 'supplier', d.supplierId, suppliers.map((s) => ({ value: s.id, label: `${s.name} (${s.currency})` })), (v) => {
              const s = book.suppliers.find((x) => x.id === v);
              set({ supplierId: v, currency: d.currency.trim() === '' && s ? s.currency : d.currency });
            })}`}
        ${field({ name: 'supplierCode', label: 'supplier code', value: d.supplierCode, problem: this.problems.supplierCode, hint: "the supplier's own order code", onInput: (v) => set({ supplierCode: v }) })}
        ${field({ name: 'currency', label: 'currency', value: d.currency, problem: this.problems.currency, hint: 'three-letter code (ISO 4217)', onInput: (v) => set({ currency: v }) })}
        ${group('price breaks')} ${this.renderBreaks(d)}
        ${group('terms')}
        ${field({ name: 'moq', label: 'moq', value: d.moq, problem: this.problems.moq, hint: 'minimum order quantity', onInput: (v) => set({ moq: v }) })}
        ${field({ name: 'pack', label: 'pack', value: d.pack, problem: this.problems.pack, hint: 'orders are whole packs of this many', onInput: (v) => set({ pack: v }) })}
        ${field({ name: 'lead', label: 'lead time', value: d.lead, problem: this.problems.lead, hint: 'days, or weeks written 4 weeks / 4w', onInput: (v) => set({ lead: v }) })}
        ${field({ name: 'date', label: 'date', value: d.date, problem: this.problems.date, hint: 'the day the quote was given, YYYY-MM-DD', onInput: (v) => set({ date: v }) })}
        ${field({ name: 'expires', label: 'expires', value: d.expires, problem: this.problems.expires, hint: 'last day it is valid; blank = no expiry', onInput: (v) => set({ expires: v }) })}
        ${field({
          name: 'incoterm',
          label: 'delivery term',
          value: d.incoterm,
          choices: INCOTERMS,
          problem: this.problems.incoterm,
          hint: 'Incoterms 2020; decides whether the supplier’s freight and duty fall to us (— = they do)',
          onInput: (v) => set({ incoterm: v }),
        })}
        <div class="actions">
          <button type="submit" class="primary">${q ? 'Save the quote' : 'Add the quote'}</button>
          <button type="button" @click=${this._onCancel}>Cancel</button>
          ${nothingSaved(this.problems)}
        </div>
      </form>
    </section>`;
  }

  private selectField(
    name: string,
    label: string,
    value: string,
    choices: { value: string; label: string }[],
    onChange: (v: string) => void,
  ) {
    const id = `f-${name}`;
    const problem = this.problems[name];
    return html`<label for=${id}>${label}</label>
      <select
        id=${id}
        name=${name}
        .value=${live(value)}
        aria-invalid=${problem ? 'true' : 'false'}
        aria-describedby=${`${id}-${problem ? 'problem' : 'hint'}`}
        @change=${(e: Event) => onChange((e.target as HTMLSelectElement).value)}
      >
        <option value="" ?selected=${value === ''}>—</option>
        ${choices.map((c) => html`<option value=${c.value} ?selected=${c.value === value}>${c.label}</option>`)}
      </select>
      ${problem
        ? html`<span class="problem" id="${id}-problem" data-problem-for=${name}>${problem}</span>`
        : html`<span class="hint" id="${id}-hint"></span>`}`;
  }

  private renderBreaks(d: QuoteDraft) {
    const setBreak = (i: number, patch: Partial<{ qty: string; price: string }>): void => {
      this.draft = { ...this.draft, breaks: this.draft.breaks.map((b, j) => (j === i ? { ...b, ...patch } : b)) };
    };
    const remove = (i: number): void => {
      this.draft = { ...this.draft, breaks: this.draft.breaks.filter((_, j) => j !== i) };
    };
    const add = (): void => {
      this.draft = { ...this.draft, breaks: [...this.draft.breaks, { qty: '', price: '' }] };
    };
    return html`<div class="breaks" role="group" aria-label="Price breaks" data-testid="quote-breaks">
      ${d.breaks.map((b, i) => {
        const qp = this.problems[`break-qty-${i}`];
        const pp = this.problems[`break-price-${i}`];
        return html`<label for="f-break-qty-${i}">from qty</label>
          <input
            id="f-break-qty-${i}"
            name="break-qty-${i}"
            inputmode="numeric"
            autocomplete="off"
            .value=${live(b.qty)}
            aria-invalid=${qp ? 'true' : 'false'}
            aria-describedby="f-break-${i}-problem"
            @input=${(e: Event) => setBreak(i, { qty: (e.target as HTMLInputElement).value })}
          />
          <label for="f-break-price-${i}">@ price</label>
          <input
            id="f-break-price-${i}"
            name="break-price-${i}"
            inputmode="decimal"
            autocomplete="off"
            .value=${live(b.price)}
            aria-invalid=${pp ? 'true' : 'false'}
            aria-describedby="f-break-${i}-problem"
            @input=${(e: Event) => setBreak(i, { price: (e.target as HTMLInputElement).value })}
          />
          <button type="button" class="quiet" aria-label="Remove break ${i + 1}" @click=${() => remove(i)}>remove</button>
          <span id="f-break-${i}-problem">
            ${qp ? html`<span class="problem" data-problem-for="break-qty-${i}">${qp}</span> ` : ''}
            ${pp ? html`<span class="problem" data-problem-for="break-price-${i}">${pp}</span>` : ''}
          </span>`;
      })}
      <span></span>
      <span>
        <button type="button" @click=${add}>Add a break</button>
      </span>
      ${this.problems.breaks ? html`<span class="problem" data-problem-for="breaks" style="grid-column: 3 / -1">${this.problems.breaks}</span>` : ''}
    </div>`;
  }

  private _onSubmit(ev: Event): void {
    ev.preventDefault();
    const book = this.book;
    if (!book) return;
    const r = validateQuote(this.draft, book, this.quote, () => newId('quote'));
    if (!r.ok) {
      this.problems = r.problems;
      return;
    }
    this.problems = {};
    this.dispatchEvent(new CustomEvent<QuoteSubmitDetail>('rb-quote-submit', { detail: { quote: r.quote, draft: this.draft }, bubbles: true, composed: true }));
  }

  private _onCancel(): void {
    this.dispatchEvent(new CustomEvent('rb-quote-cancel', { bubbles: true, composed: true }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-quote-form': RbQuoteForm;
  }
  interface HTMLElementEventMap {
    'rb-quote-submit': CustomEvent<QuoteSubmitDetail>;
    'rb-quote-cancel': CustomEvent<undefined>;
  }
}
