// Suppliers page: who sells the parts and in which currency, with the rate that converts it to the Book's own
// currency. Add, edit and delete with messages beside each field; a supplier with quotes cannot be deleted.
import { LitElement, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, Supplier } from '../domain/book.ts';
import { newId } from '../domain/book.ts';
import { BookController } from './book-context.ts';
import { deleteFromRow, field, nothingSaved, rowActions, saveRecordForm, saveRefusal } from './form-fields.ts';
import type { FieldProblems, SupplierDraft } from './record-forms.ts';
import { supplierDraft, supplierUsers, validateSupplier } from './record-forms.ts';
import { pageStyles } from './styles.ts';

type Editing = { supplier: Supplier | undefined; draft: SupplierDraft; problems: FieldProblems; saveError?: string; conflict?: boolean };

@customElement('rb-suppliers-page')
export class RbSuppliersPage extends LitElement {
  static override styles = pageStyles;

  private readonly books = new BookController(this);
  @state() private editing: Editing | undefined;
  @state() private confirmDelete: string | undefined;
  @state() private rowProblem: { id: string; message: string } | undefined;

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    return html`${this.editing ? this.renderForm(book, this.editing) : ''} ${this.renderList(book)}`;
  }

  private renderList(book: Book) {
    const base = book.settings.baseCurrency;
    const suppliers = [...book.suppliers].sort((a, b) => a.name.localeCompare(b.name));
    const quoteCount = new Map<string, number>();
    for (const q of book.quotes) quoteCount.set(q.supplierId, (quoteCount.get(q.supplierId) ?? 0) + 1);
    return html`<section class="sheet" aria-labelledby="suppliers-h">
      <h2 id="suppliers-h">Suppliers in this Book</h2>
      <p class="why">
        Quotes are kept in each supplier's currency and converted to ${base} at the rate shown (units of ${base} for
        one unit of theirs) when a run is costed.
      </p>
      <div class="toolbar">
        <button type="button" class="primary" @click=${() => this.startEdit(book, undefined)}>Add a supplier</button>
      </div>
      ${suppliers.length === 0
        ? html`<p class="empty">No suppliers yet. Add the first one above.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="suppliers-table">
              <thead>
                <tr>
                  <th>name</th>
                  <th>currency</th>
                  <th class="num">rate (${base})</th>
                  <th class="num">quotes</th>
                  <th>landed cost</th>
                  <th>price file mapping</th>
                  <th>notes</th>
                  <th><span class="muted">actions</span></th>
                </tr>
              </thead>
              <tbody>
                ${suppliers.map((s) => this.renderRow(book, s, quoteCount.get(s.id) ?? 0))}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  private renderRow(book: Book, s: Supplier, quotes: number) {
    const rate = s.currency === book.settings.baseCurrency ? 1 : book.settings.rates[s.currency];
    const confirming = this.confirmDelete === s.id;
    const problem = this.rowProblem?.id === s.id ? this.rowProblem.message : undefined;
    return html`<tr class=${this.editing?.supplier?.id === s.id ? 'editing' : ''} data-id=${s.id}>
      <td>${s.name}</td>
      <td class="code">${s.currency}</td>
      <td class="num">${rate === undefined ? html`<span class="problem">✗ no rate</span>` : String(rate)}</td>
      <td class="num">${quotes}</td>
      <td>${landedSummary(s)}</td>
      <td>${s.mapping ? `saved (${Object.keys(s.mapping.columns).length} columns, ${s.mapping.layout})` : '—'}</td>
      <td>${s.notes}</td>
      <td class="acts">
        ${rowActions({
          confirming,
          question: `Delete ${s.name}?`,
          onDelete: () => this.delete(s),
          onKeep: () => (this.confirmDelete = undefined),
          onEdit: () => this.startEdit(book, s),
          onAskDelete: () => this.askDelete(book, s),
          problem,
        })}
      </td>
    </tr>`;
  }

  private renderForm(book: Book, e: Editing) {
    const d = e.draft;
    const base = book.settings.baseCurrency;
    const cur = d.currency.trim().toUpperCase();
    const set = (patch: Partial<SupplierDraft>) => {
      if (this.editing) this.editing = { ...this.editing, draft: { ...this.editing.draft, ...patch } };
    };
    return html`<section class="sheet" aria-labelledby="supplier-form-h">
      <h2 id="supplier-form-h">${e.supplier ? `Edit supplier ${e.supplier.name}` : 'New supplier'}</h2>
      <p class="why">The rate is shared by every supplier in that currency; changing it here changes it for all of them.</p>
      ${saveRefusal(e.saveError, e.conflict, this.restartFromStored)}
      <form class="record" novalidate @submit=${(ev: Event) => this.submit(ev, book)} aria-label="Supplier">
        ${field({ name: 'name', label: 'name', value: d.name, problem: e.problems.name, hint: 'unique in the Book', onInput: (v) => set({ name: v }) })}
        ${field({
          name: 'currency',
          label: 'currency',
          value: d.currency,
          problem: e.problems.currency,
          hint: 'three-letter code (ISO 4217)',
          onInput: (v) => {
            const c = v.trim().toUpperCase();
            const known = c === base ? 1 : book.settings.rates[c];
            // A rate the person typed stays while they fix the code; the base currency's 1 does not carry over.
            const wasKnown = d.currency.trim().toUpperCase() === base || book.settings.rates[d.currency.trim().toUpperCase()] !== undefined;
            set({ currency: v, rate: known !== undefined ? String(known) : wasKnown ? '' : d.rate });
          },
        })}
        ${cur === base
          ? html`<label>rate</label><span>1</span><span class="hint">the Book's own currency</span>`
          : field({
              name: 'rate',
              label: 'rate',
              value: d.rate,
              problem: e.problems.rate,
              hint: `${base} for one ${cur || 'unit'}`,
              onInput: (v) => set({ rate: v }),
            })}
        ${field({ name: 'notes', label: 'notes', value: d.notes, multiline: true, onInput: (v) => set({ notes: v }) })}
        <div class="group">on our orders to them</div>
        ${field({ name: 'address', label: 'address', value: d.address, problem: e.problems.address, multiline: true, hint: 'where orders go, one line per line; printed on our orders', onInput: (v) => set({ address: v }) })}
        ${field({ name: 'paymentTerms', label: 'payment terms', value: d.paymentTerms, problem: e.problems.paymentTerms, hint: 'as agreed, for example “30 days net”', onInput: (v) => set({ paymentTerms: v }) })}
        <div class="group">landed cost</div>
        <div class="actions">
          <span class="hint">
            What buying from them costs on top of the goods. A quote's Incoterms 2020 term decides which of freight and
            duty fall to us; payment and bank charges always do. Leave a field empty for none.
          </span>
        </div>
        ${field({ name: 'freightPerOrder', label: 'freight per order', value: d.freightPerOrder, problem: e.problems.freightPerOrder, hint: 'charged once per order, shared among its lines by value', onInput: (v) => set({ freightPerOrder: v }) })}
        ${field({ name: 'freightCurrency', label: 'freight currency', value: d.freightCurrency, problem: e.problems.freightCurrency, hint: `empty: ${cur || 'the supplier’s currency'}`, onInput: (v) => set({ freightCurrency: v }) })}
        ${field({ name: 'freightPct', label: 'freight %', value: d.freightPct, problem: e.problems.freightPct, hint: 'of the goods’ value', onInput: (v) => set({ freightPct: v }) })}
        ${field({ name: 'dutyPct', label: 'duty %', value: d.dutyPct, problem: e.problems.dutyPct, hint: 'import duty, of the goods’ value', onInput: (v) => set({ dutyPct: v }) })}
        ${field({ name: 'chargesPerOrder', label: 'charges per order', value: d.chargesPerOrder, problem: e.problems.chargesPerOrder, hint: 'payment and bank charges once per order', onInput: (v) => set({ chargesPerOrder: v }) })}
        ${field({ name: 'chargesCurrency', label: 'charges currency', value: d.chargesCurrency, problem: e.problems.chargesCurrency, hint: `empty: ${base}`, onInput: (v) => set({ chargesCurrency: v }) })}
        ${field({ name: 'chargesPct', label: 'charges %', value: d.chargesPct, problem: e.problems.chargesPct, hint: 'of the goods’ value', onInput: (v) => set({ chargesPct: v }) })}
        <div class="actions">
          <button type="submit" class="primary">${e.supplier ? 'Save the supplier' : 'Add the supplier'}</button>
          <button type="button" @click=${() => (this.editing = undefined)}>Cancel</button>
          ${nothingSaved(e.problems)}
        </div>
      </form>
    </section>`;
  }

  private startEdit(book: Book, supplier: Supplier | undefined): void {
    this.confirmDelete = undefined;
    this.rowProblem = undefined;
    this.editing = { supplier, draft: supplierDraft(book.settings, supplier), problems: {} };
    void this.updateComplete.then(() => this.renderRoot.querySelector<HTMLInputElement>('#f-name')?.focus());
  }

  private async submit(ev: Event, book: Book): Promise<void> {
    ev.preventDefault();
    const e = this.editing;
    const service = this.books.service;
    if (!e || !service) return;
    await saveRecordForm(this, service, e, {
      goneNoun: e.supplier && !book.suppliers.some((s) => s.id === e.supplier!.id) ? 'supplier' : undefined,
      validate: () => validateSupplier(e.draft, book, e.supplier, () => newId('sup')),
      change: ({ record, settings }) => (settings ? { put: { suppliers: [record] }, settings } : { put: { suppliers: [record] } }),
      set: (next) => (this.editing = next),
    });
  }

  /** After a refused save: re-read the Book and reopen the form on the stored version of the record. */
  private readonly restartFromStored = async (): Promise<void> => {
    const service = this.books.service;
    const id = this.editing?.supplier?.id;
    if (!service || !id) return;
    await service.reload();
    const cur = service.book.suppliers.find((r) => r.id === id);
    if (cur) this.startEdit(service.book, cur);
    else this.editing = undefined;
  };

  private askDelete(book: Book, s: Supplier): void {
    const users = supplierUsers(book, s.id);
    if (users) {
      this.rowProblem = { id: s.id, message: users };
      return;
    }
    this.rowProblem = undefined;
    this.confirmDelete = s.id;
  }

  private async delete(s: Supplier): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    this.confirmDelete = undefined;
    const problem = await deleteFromRow(service, { delete: { suppliers: [s.id] } }, (b) => supplierUsers(b, s.id));
    if (problem) this.rowProblem = { id: s.id, message: problem };
    else if (this.editing?.supplier?.id === s.id) this.editing = undefined;
  }
}

/** A supplier's landed terms in a few words ("freight 40 USD/order + 2 %, duty 3.5 %"), or a dash. */
function landedSummary(s: Supplier): string {
  const parts: string[] = [];
  const join = (what: string, amount: { amount: number; currency: string } | undefined, pct: number | undefined): void => {
    const bits = [amount ? `${amount.amount} ${amount.currency}/order` : '', pct ? `${pct} %` : ''].filter((b) => b !== '');
    if (bits.length) parts.push(`${what} ${bits.join(' + ')}`);
  };
  join('freight', s.freightPerOrder, s.freightPct);
  join('duty', undefined, s.dutyPct);
  join('charges', s.chargesPerOrder, s.chargesPct);
  return parts.length ? parts.join(', ') : '—';
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-suppliers-page': RbSuppliersPage;
  }
}
