// Price lists page: the Book's customer price lists (a margin or markup, a currency, a rounding rule each) and, per
// list, every variant's price at each run size, with a CSV of the prices for customers. Unit costs come from the
// costing service; the prices from domain/price-lists.ts, as the CLI's `prices` command gives them.
import { LitElement, css, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, PriceList } from '../domain/book.ts';
import { PRICE_BASES, newId } from '../domain/book.ts';
import { priceListDraft, priceTable, validatePriceList } from '../domain/price-lists.ts';
import type { CostCell, PriceListDraft, PriceListProblems, PriceTable } from '../domain/price-lists.ts';
import { ROUNDING_MODES } from '../domain/schema.ts';
import { exportBytes } from '../io/csv-write.ts';
import { priceListCsv, priceListFileName } from '../io/price-list-export.ts';
import { BookController } from './book-context.ts';
import { CostingService } from './costing-service.ts';
import { deleteFromRow, field, nothingSaved, rowActions, saveRecordForm, saveRefusal } from './form-fields.ts';
import { downloadFile } from './rb-export-page.ts';
import { pageStyles } from './styles.ts';

type Editing = { list: PriceList | undefined; draft: PriceListDraft; problems: PriceListProblems; saveError?: string; conflict?: boolean };

@customElement('rb-price-lists-page')
export class RbPriceListsPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      td.price {
        font-variant-numeric: tabular-nums;
        text-align: right;
      }
    `,
  ];

  private readonly books = new BookController(this);
  @state() private editing: Editing | undefined;
  @state() private confirmDelete: string | undefined;
  /** Why a row's delete was refused, said on that row. */
  @state() private rowProblem: { id: string; message: string } | undefined;
  @state() private downloadProblem: string | undefined;
  private costing: CostingService | undefined;
  private syncQueued = false;
  private readonly onCostsChanged = (): void => this.requestUpdate();

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    this.costing?.removeEventListener('change', this.onCostsChanged);
    this.costing = undefined;
  }

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const costs = this.unitCosts(book);
    const tables = costs ? book.priceLists.map((l) => priceTable(l, book, costs)) : undefined;
    return html`${this.editing ? this.renderForm(book, this.editing) : ''} ${this.renderLists(book, tables)}
    ${tables ? tables.map((t) => this.renderTable(t)) : html`<section class="sheet"><p class="empty">Working out the unit costs…</p></section>`}`;
  }

  /** Every variant's unit cost at each of the Book's run sizes, or undefined while the costing is being worked out. */
  private unitCosts(book: Book): CostCell[] | undefined {
    const service = this.books.service;
    if (!service) return undefined;
    const costing = CostingService.for(service);
    if (costing !== this.costing) {
      this.costing?.removeEventListener('change', this.onCostsChanged);
      costing.addEventListener('change', this.onCostsChanged);
      this.costing = costing;
    }
    if (costing.pending) {
      this.queueSync(costing);
      return undefined;
    }
    return book.variants.flatMap((v) =>
      costing.runSizes.map((run): CostCell => {
        const unitCost = costing.unitCost(v.id, run);
        const error = Number.isFinite(unitCost) ? undefined : costing.costProblem(v.id, run);
        return error === undefined ? { variantId: v.id, variant: v.code, run, unitCost } : { variantId: v.id, variant: v.code, run, unitCost, error };
      }),
    );
  }

  private queueSync(costing: CostingService): void {
    if (this.syncQueued) return;
    this.syncQueued = true;
    setTimeout(() => {
      this.syncQueued = false;
      if (costing.sync().kind !== 'pending') this.requestUpdate();
    }, 0);
  }

  private renderLists(book: Book, tables: PriceTable[] | undefined) {
    const base = book.settings.baseCurrency;
    return html`<section class="sheet" aria-labelledby="lists-h">
      <h2 id="lists-h">Price lists in this Book</h2>
      <p class="why">
        Each list prices the unit cost in ${base} at its own margin on price (price = cost / (1 − margin)) or markup
        on cost (price = cost × (1 + markup)), converts it to its currency at the Book's rate, and rounds once: to the
        cent, or to its step.
      </p>
      <div class="toolbar">
        <button type="button" class="primary" @click=${() => this.startEdit(undefined)}>Add a price list</button>
        <button type="button" ?disabled=${!tables || tables.length === 0} @click=${() => tables && this.download(book, tables)}>Price lists CSV</button>
        ${this.downloadProblem ? html`<span class="problem" role="alert">${this.downloadProblem}</span>` : ''}
      </div>
      ${book.priceLists.length === 0
        ? html`<p class="empty">No price lists yet. Add the first one above (wholesale, export…).</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="price-lists-table">
              <thead>
                <tr>
                  <th>name</th>
                  <th>currency</th>
                  <th>basis</th>
                  <th class="num">percent</th>
                  <th>rounding</th>
                  <th>notes</th>
                  <th><span class="muted">actions</span></th>
                </tr>
              </thead>
              <tbody>
                ${book.priceLists.map(
                  (l) => html`<tr data-id=${l.id} class=${this.editing?.list?.id === l.id ? 'editing' : ''}>
                    <td>${l.name}</td>
                    <td class="code">${l.currency}</td>
                    <td>${l.basis}</td>
                    <td class="num">${l.pct}</td>
                    <td>${roundingWords(l)}</td>
                    <td>${l.notes}</td>
                    <td class="acts">
                      ${rowActions({
                        confirming: this.confirmDelete === l.id,
                        question: `Delete ${l.name}?`,
                        onDelete: () => this.delete(l),
                        onKeep: () => (this.confirmDelete = undefined),
                        onEdit: () => this.startEdit(l),
                        onAskDelete: () => {
                          this.rowProblem = undefined;
                          this.confirmDelete = l.id;
                        },
                        problem: this.rowProblem?.id === l.id ? this.rowProblem.message : undefined,
                      })}
                    </td>
                  </tr>`,
                )}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  private renderTable(t: PriceTable) {
    const l = t.list;
    const id = `list-${l.id.replace(/[^\w-]/g, '_')}-h`;
    return html`<section class="sheet" aria-labelledby=${id}>
      <h2 id=${id}>${l.name} <small class="muted">${l.currency}</small></h2>
      <p class="why">${l.pct} % ${l.basis === 'markup' ? 'markup on cost' : 'margin on price'}, ${roundingWords(l)}. ${l.notes}</p>
      <div class="scroll">
        <table class="records" data-testid="price-table">
          <thead>
            <tr>
              <th>variant</th>
              <th>name</th>
              ${t.runs.map((r) => html`<th class="num">at ${r.toLocaleString('en-GB')} (${l.currency})</th>`)}
            </tr>
          </thead>
          <tbody>
            ${t.rows.map(
              (r) => html`<tr>
                <td class="code">${r.variant}</td>
                <td>${r.name}</td>
                ${r.cells.map((c) =>
                  c.price === undefined
                    ? html`<td class="price"><span class="problem" title=${c.error ?? ''}>✗ no price</span></td>`
                    : html`<td class="price">${c.price.toFixed(Math.max(2, decimals(c.price)))}</td>`,
                )}
              </tr>`,
            )}
          </tbody>
        </table>
      </div>
    </section>`;
  }

  private renderForm(book: Book, e: Editing) {
    const d = e.draft;
    const set = (patch: Partial<PriceListDraft>): void => {
      if (this.editing) this.editing = { ...this.editing, draft: { ...this.editing.draft, ...patch } };
    };
    return html`<section class="sheet" aria-labelledby="price-list-form-h">
      <h2 id="price-list-form-h">${e.list ? `Edit price list ${e.list.name}` : 'New price list'}</h2>
      ${saveRefusal(e.saveError, e.conflict, () => this.startEdit(this.books.book?.priceLists.find((x) => x.id === e.list?.id)))}
      <form class="record" novalidate aria-label="Price list" @submit=${(ev: Event) => this.submit(ev, book)}>
        ${field({ name: 'name', label: 'name', value: d.name, problem: e.problems.name, hint: 'unique in the Book', onInput: (v) => set({ name: v }) })}
        ${field({ name: 'currency', label: 'currency', value: d.currency, problem: e.problems.currency, hint: `three letters; the Book needs a rate for it (${book.settings.baseCurrency} is its own)`, onInput: (v) => set({ currency: v }) })}
        ${field({ name: 'basis', label: 'basis', value: d.basis, choices: PRICE_BASES, problem: e.problems.basis, hint: 'margin: a share of the price; markup: a share of the cost', onInput: (v) => set({ basis: v }) })}
        ${field({ name: 'pct', label: 'percent', value: d.pct, problem: e.problems.pct, hint: 'a margin below 100', onInput: (v) => set({ pct: v }) })}
        ${field({ name: 'roundingStep', label: 'rounding step', value: d.roundingStep, problem: e.problems.roundingStep, hint: 'for example 0.05 or 1; empty = to the cent', onInput: (v) => set({ roundingStep: v }) })}
        ${field({ name: 'roundingMode', label: 'rounding', value: d.roundingMode, choices: ROUNDING_MODES, problem: e.problems.roundingMode, hint: 'to the nearest step, or up', onInput: (v) => set({ roundingMode: v }) })}
        ${field({ name: 'notes', label: 'notes', value: d.notes, multiline: true, problem: e.problems.notes, onInput: (v) => set({ notes: v }) })}
        <div class="actions">
          <button type="submit" class="primary">${e.list ? 'Save the price list' : 'Add the price list'}</button>
          <button type="button" @click=${() => (this.editing = undefined)}>Cancel</button>
          ${nothingSaved(e.problems)}
        </div>
      </form>
    </section>`;
  }

  private startEdit(list: PriceList | undefined): void {
    this.confirmDelete = undefined;
    this.editing = { list, draft: priceListDraft(list), problems: {} };
    void this.updateComplete.then(() => this.renderRoot.querySelector<HTMLInputElement>('#f-name')?.focus());
  }

  private async submit(ev: Event, book: Book): Promise<void> {
    ev.preventDefault();
    const e = this.editing;
    const service = this.books.service;
    if (!e || !service) return;
    await saveRecordForm(this, service, e, {
      goneNoun: e.list && !book.priceLists.some((l) => l.id === e.list!.id) ? 'price list' : undefined,
      validate: () => validatePriceList(e.draft, book, e.list ?? { id: newId('pl'), rev: 0 }),
      change: (record) => ({ put: { priceLists: [record] } }),
      set: (next) => (this.editing = next),
    });
  }

  private async delete(l: PriceList): Promise<void> {
    const service = this.books.service;
    this.confirmDelete = undefined;
    if (!service) return;
    const problem = await deleteFromRow(service, { delete: { priceLists: [l.id] } });
    if (problem) this.rowProblem = { id: l.id, message: problem };
    else if (this.editing?.list?.id === l.id) this.editing = undefined;
  }

  private download(book: Book, tables: PriceTable[]): void {
    const text = priceListCsv(tables);
    this.downloadProblem = text.ok ? undefined : text.error;
    if (text.ok) downloadFile(exportBytes(text.value), priceListFileName(book.settings.bookName), 'text/csv;charset=utf-8');
  }
}

function decimals(n: number): number {
  const s = String(n);
  return s.includes('.') ? s.length - s.indexOf('.') - 1 : 0;
}

/** A list's rounding rule in words. */
function roundingWords(l: PriceList): string {
  if (!l.rounding) return 'rounded to the cent';
  return `rounded ${l.rounding.mode === 'up' ? 'up' : 'to the nearest'} ${l.rounding.step}`;
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-price-lists-page': RbPriceListsPage;
  }
}
