// Quotes page: every supplier offer per part with its price breaks and terms, expired and superseded quotes marked in
// words and symbols, a search with a choice of supplier and of part, add / edit / delete through one Book save each, and the import history with Undo.
import { LitElement, css, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, Part, Quote, Supplier } from '../domain/book.ts';
import { todayIso } from '../domain/dates.ts';
import { grouped } from '../domain/format.ts';
import { currentQuoteIndex, supersede } from '../domain/quotes.ts';
import { BookController } from './book-context.ts';
import { rowActions } from './form-fields.ts';
import './rb-import-batches.ts';
import './rb-quote-form.ts';
import type { QuoteSubmitDetail } from './rb-quote-form.ts';
import { breaksText, leadText, qtyText, quoteStatus } from './quote-text.ts';
import { pageStyles } from './styles.ts';
import { ProgressiveRows } from './progressive.ts';
import type { QuoteDraft } from './quote-text.ts';

/** The quote in the form, why its last save failed, and the draft that failed (shown again). */
type Editing = { quote: Quote | undefined; saveError?: string; draft?: QuoteDraft };

function n(count: number): string {
  return grouped(count);
}

/** Rows drawn at once; a Book with tens of thousands of imported quotes stays quick to show. */
const PAGE_ROWS = 300;
/** Quote rows drawn in each frame while a long list is drawn a slice at a time. */
const QUOTE_ROWS_PER_FRAME = 15;

@customElement('rb-quotes-page')
export class RbQuotesPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      .status {
        white-space: nowrap;
      }
      .status.current {
        color: var(--rb-pass);
      }
      .status.expired {
        color: var(--rb-margin);
        font-weight: 600;
      }
      .status.superseded {
        color: var(--rb-na);
      }
      tr.superseded td:not(.acts):not(.status-cell) {
        color: var(--rb-na);
        text-decoration: line-through;
        text-decoration-color: var(--rb-rule);
      }
      tr.expired td {
        background: var(--rb-margin-bg);
      }
      td.supplier {
        white-space: nowrap;
      }
      td.status-cell {
        max-width: 11rem;
      }
      td.breaks {
        font-family: var(--rb-mono);
        font-size: 0.82rem;
        min-width: 14rem;
      }
      .part-desc {
        display: block;
        font-family: var(--rb-font);
        font-size: 0.78rem;
        color: var(--rb-na);
        white-space: normal;
        max-width: 18rem;
      }
      .problem {
        color: var(--rb-fail);
        font-size: 0.84rem;
      }
      .find {
        display: flex;
        flex-wrap: wrap;
        gap: 0.5rem 0.9rem;
        align-items: baseline;
        margin: 0 0 0.6rem;
        font-size: 0.9rem;
      }
      .find input[type='search'] {
        min-width: 16rem;
      }
      .find select {
        max-width: 16rem;
      }
      tr.saving td {
        color: var(--rb-na);
      }
      label.check {
        font-size: 0.9rem;
      }
    `,
  ];

  private readonly books = new BookController(this);
  /**
   * A long list draws a slice of rows per frame. Quote rows are heavy to lay out (wrapped price breaks and part
   * descriptions): a frame laying out 30 of them held the page for 40–57 ms with the reference family's 185 quotes,
   * one laying out 15 for 33–41 ms (Chrome trace, CPU time, under load), so the slices are half the usual size. Fixed
   * column widths did not shorten these frames: the table's columns are still worked out from their content.
   */
  private readonly drawn = new ProgressiveRows(this, QUOTE_ROWS_PER_FRAME);
  @state() private editing: Editing | undefined;
  @state() private filter = '';
  /** Only this supplier's quotes, or every supplier's when ''. */
  @state() private supplierId = '';
  /** Only the quotes for this part, or for every part when ''. */
  @state() private partId = '';
  @state() private hideSuperseded = false;
  @state() private shown = PAGE_ROWS;
  @state() private confirmDelete: string | undefined;
  @state() private rowProblem: { id: string; message: string } | undefined;
  /**
   * Quote edits shown in the list while they are stored: the form closes at once and the row shows the edit marked
   * as saving. A save that fails puts the row back as stored and opens the form again with the edit and the reason
   * (or, when another quote is in the form by then, says it on the row).
   */
  @state() private saving: ReadonlyMap<string, Quote> = new Map();
  private rowCache: { key: unknown[]; rows: Quote[] } | undefined;

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    return html`${this.editing
        ? html`<rb-quote-form
            .book=${book}
            .quote=${this.editing.quote}
            .saveError=${this.editing.saveError}
            .draftShown=${this.editing.draft}
            @rb-quote-submit=${this._onSubmit}
            @rb-quote-cancel=${() => (this.editing = undefined)}
          ></rb-quote-form>`
        : ''}
      ${this.renderList(book)}
      <rb-import-batches></rb-import-batches>`;
  }

  private renderList(book: Book) {
    const date = book.settings.costingDate ?? todayIso();
    const parts = new Map(book.parts.map((p) => [p.id, p] as const));
    const suppliers = new Map(book.suppliers.map((s) => [s.id, s] as const));
    const byId = new Map(book.quotes.map((q) => [q.id, q] as const));
    const f = this.filter.trim().toLowerCase();
    const rows = this.sortedRows(book, f, parts, suppliers);
    const current = book.quotes.filter((q) => q.supersededBy === undefined);
    const expired = current.filter((q) => q.expires !== undefined && q.expires < date).length;
    const superseded = book.quotes.length - current.length;
    const visible = rows.slice(0, this.shown);
    return html`<section class="sheet" aria-labelledby="quotes-h">
      <h2 id="quotes-h">Quotes in this Book</h2>
      <p class="why" data-testid="quotes-summary">
        ${n(book.quotes.length)} quotes: ${n(current.length - expired)} current, ${n(expired)} expired, ${n(superseded)} superseded.
        Expiry is judged at ${date}${book.settings.costingDate ? ' (the Book’s costing date)' : ' (today)'}. Prices are per
        unit in the quote’s currency, written “from quantity @ price”.
      </p>
      <div class="toolbar">
        <button type="button" class="primary" @click=${() => this.startEdit(undefined)}>Add a quote</button>
      </div>
      <div class="find" role="search" aria-label="Find quotes">
        <input
          type="search"
          placeholder="Search part number, description, supplier or code…"
          aria-label="Filter quotes"
          .value=${this.filter}
          @input=${(e: Event) => {
            this.filter = (e.target as HTMLInputElement).value;
            this.shown = PAGE_ROWS;
          }}
        />
        <label
          >supplier
          <select aria-label="Supplier" data-testid="quotes-supplier" @change=${(e: Event) => this.choose({ supplierId: (e.target as HTMLSelectElement).value })}>
            <option value="" ?selected=${this.supplierId === ''}>every supplier</option>
            ${[...book.suppliers]
              .sort((a, b) => a.name.localeCompare(b.name))
              .map((x) => html`<option value=${x.id} ?selected=${x.id === this.supplierId}>${x.name}</option>`)}
          </select></label
        >
        <label
          >part
          <select aria-label="Part" data-testid="quotes-part" @change=${(e: Event) => this.choose({ partId: (e.target as HTMLSelectElement).value })}>
            <option value="" ?selected=${this.partId === ''}>every part</option>
            ${this.quotedParts(book).map((p) => html`<option value=${p.id} ?selected=${p.id === this.partId}>${p.mpn}</option>`)}
          </select></label
        >
        <label class="check"
          ><input
            type="checkbox"
            .checked=${this.hideSuperseded}
            @change=${(e: Event) => (this.hideSuperseded = (e.target as HTMLInputElement).checked)}
          />
          hide superseded</label
        >
        <span class="muted" data-testid="quotes-shown">${n(rows.length)} of ${n(book.quotes.length)} shown</span>
        ${f || this.supplierId || this.partId || this.hideSuperseded
          ? html`<button type="button" class="quiet" @click=${this.clearFind}>show all</button>`
          : ''}
      </div>
      ${rows.length === 0
        ? html`<p class="empty">${book.quotes.length === 0 ? 'No quotes yet. Add one above or import a supplier price file.' : 'No quote matches the search and choices above.'}</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="quotes-table">
              <thead>
                <tr>
                  <th>part</th>
                  <th>supplier</th>
                  <th>status</th>
                  <th>price breaks</th>
                  <th>currency</th>
                  <th class="num">moq</th>
                  <th class="num">pack</th>
                  <th class="num">lead time</th>
                  <th>date</th>
                  <th>expires</th>
                  <th>supplier code</th>
                  <th>source</th>
                  <th><span class="muted">actions</span></th>
                </tr>
              </thead>
              <tbody>
                ${this.drawn.take(visible).map((q) => this.renderRow(q, parts.get(q.partId), suppliers.get(q.supplierId), date, byId))}
              </tbody>
            </table>
          </div>
          ${rows.length > visible.length
            ? html`<p class="muted">
                Showing ${visible.length} of ${rows.length}.
                <button type="button" @click=${() => (this.shown += PAGE_ROWS)}>Show ${Math.min(PAGE_ROWS, rows.length - visible.length)} more</button>
              </p>`
            : ''}`}
    </section>`;
  }

  /** Filtered and sorted quotes, kept until the Book or the filter changes (typing must not re-sort 50,000 rows). */
  private sortedRows(book: Book, f: string, parts: Map<string, Part>, suppliers: Map<string, Supplier>): Quote[] {
    const key = [book.quotes, book.parts, book.suppliers, f, this.hideSuperseded, this.supplierId, this.partId];
    const c = this.rowCache;
    if (c && c.key.every((k, i) => k === key[i])) return c.rows;
    const collator = new Intl.Collator('en', { numeric: true });
    const partName = (q: Quote): string => parts.get(q.partId)?.mpn ?? q.partId;
    const supplierName = (q: Quote): string => suppliers.get(q.supplierId)?.name ?? q.supplierId;
    const rows = book.quotes
      .filter((q) => !this.hideSuperseded || q.supersededBy === undefined)
      .filter((q) => (this.supplierId === '' || q.supplierId === this.supplierId) && (this.partId === '' || q.partId === this.partId))
      .filter((q) => {
        if (!f) return true;
        const p = parts.get(q.partId);
        return `${p?.mpn ?? ''} ${p?.description ?? ''} ${supplierName(q)} ${q.supplierCode}`.toLowerCase().includes(f);
      })
      .sort(
        (a, b) =>
          collator.compare(partName(a), partName(b)) ||
          collator.compare(supplierName(a), supplierName(b)) ||
          Number(a.supersededBy !== undefined) - Number(b.supersededBy !== undefined) ||
          (a.date < b.date ? 1 : a.date > b.date ? -1 : 0),
      );
    this.rowCache = { key, rows };
    return rows;
  }

  /** Parts that have a quote, by part number: the part choice offers only those. */
  private quotedParts(book: Book): Part[] {
    const quoted = new Set(book.quotes.map((q) => q.partId));
    const collator = new Intl.Collator('en', { numeric: true });
    return book.parts.filter((p) => quoted.has(p.id)).sort((a, b) => collator.compare(a.mpn, b.mpn));
  }

  private choose(patch: { supplierId?: string; partId?: string }): void {
    if (patch.supplierId !== undefined) this.supplierId = patch.supplierId;
    if (patch.partId !== undefined) this.partId = patch.partId;
    this.shown = PAGE_ROWS;
  }

  private readonly clearFind = (): void => {
    this.filter = '';
    this.supplierId = '';
    this.partId = '';
    this.hideSuperseded = false;
    this.shown = PAGE_ROWS;
  };

  private renderRow(stored: Quote, part: Part | undefined, supplier: Supplier | undefined, date: string, byId: Map<string, Quote>) {
    const pending = this.saving.get(stored.id);
    const q = pending ?? stored;
    const status = quoteStatus(q, date, q.supersededBy ? byId.get(q.supersededBy) : undefined);
    const confirming = this.confirmDelete === q.id;
    const problem = this.rowProblem?.id === q.id ? this.rowProblem.message : undefined;
    const editing = this.editing?.quote?.id === q.id;
    return html`<tr class="${status.state}${editing ? ' editing' : ''}${pending ? ' saving' : ''}" data-id=${q.id} data-state=${status.state}>
      <td class="code">${part?.mpn ?? `(missing part ${q.partId})`}<span class="part-desc">${part?.description ?? ''}</span></td>
      <td class="supplier">${supplier?.name ?? q.supplierId}</td>
      <td class="status-cell">
        ${pending
          ? html`<span class="status" role="status">saving…</span>`
          : html`<span class="status ${status.state}">${status.symbol} ${status.words}</span>`}
      </td>
      <td class="breaks">${breaksText(q.breaks)}</td>
      <td class="code">${q.currency}</td>
      <td class="num">${qtyText(q.moq)}</td>
      <td class="num">${qtyText(q.pack)}</td>
      <td class="num">${leadText(q.leadDays)}</td>
      <td class="num">${q.date}</td>
      <td class="num">${q.expires ?? '—'}</td>
      <td class="code">${q.supplierCode}</td>
      <td class="code">${q.source}</td>
      <td class="acts">
        ${pending
          ? ''
          : rowActions({
          confirming,
          question: `Delete this quote?`,
          onDelete: () => this.delete(q),
          onKeep: () => (this.confirmDelete = undefined),
          onEdit: () => this.startEdit(q),
              onAskDelete: () => this.askDelete(q),
            })}
        ${problem ? html`<div class="problem" role="alert">✗ ${problem}</div>` : ''}
      </td>
    </tr>`;
  }

  private startEdit(quote: Quote | undefined): void {
    this.confirmDelete = undefined;
    this.rowProblem = undefined;
    this.editing = { quote };
    void this.updateComplete.then(() => {
      const form = this.renderRoot.querySelector('rb-quote-form');
      form?.scrollIntoView({ block: 'start' });
    });
  }

  private readonly _onSubmit = async (ev: CustomEvent<QuoteSubmitDetail>): Promise<void> => {
    const service = this.books.service;
    const e = this.editing;
    if (!service || !e) return;
    const book = service.book;
    const q = ev.detail.quote;
    if (e.quote && !book.quotes.some((x) => x.id === e.quote!.id)) {
      this.editing = { ...e, saveError: 'This quote was deleted elsewhere; nothing was saved.' };
      return;
    }
    // A new quote for a part and supplier replaces their current one, which stays in the Book as superseded.
    const replaced = e.quote ? [] : supersede(currentQuoteIndex(book.quotes), q);
    // An edited quote is shown in the list at once, marked as saving, while it is stored.
    if (e.quote) this.showSaving(q.id, q);
    const result = await service.save({ put: { quotes: [...replaced, q] } });
    if (e.quote) this.showSaving(q.id, undefined);
    if (result.ok) {
      if (!e.quote) this.editing = undefined;
    } else if (!e.quote || this.editing === undefined) this.editing = { ...e, saveError: result.message, draft: ev.detail.draft };
    else this.rowProblem = { id: q.id, message: result.message };
  };

  /** Shows `quote` in the list in place of the stored quote `id` while it saves (closing its form), or stops. */
  private showSaving(id: string, quote: Quote | undefined): void {
    const next = new Map(this.saving);
    if (quote) next.set(id, quote);
    else next.delete(id);
    this.saving = next;
    if (quote && this.editing?.quote?.id === id) this.editing = undefined;
  }

  private askDelete(q: Quote): void {
    this.rowProblem = undefined;
    this.confirmDelete = q.id;
  }

  private async delete(q: Quote): Promise<void> {
    const service = this.books.service;
    this.confirmDelete = undefined;
    if (!service) return;
    // The quotes this one replaced become current again, as if it had never come.
    const restored = service.book.quotes
      .filter((x) => x.supersededBy === q.id)
      .map(({ supersededBy: _gone, ...rest }) => rest);
    const result = await service.save({ put: { quotes: restored }, delete: { quotes: [q.id] } });
    if (!result.ok) this.rowProblem = { id: q.id, message: result.message };
    else if (this.editing?.quote?.id === q.id) this.editing = undefined;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-quotes-page': RbQuotesPage;
  }
}
