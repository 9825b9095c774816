// Orders page: the orders placed with suppliers, their lines and what has come in; receive an order whole or line by
// line in part (each receipt a stock movement), or cancel what is still to come (the order stays as history). An open
// order shows the document its supplier receives, to download as CSV or print.
import { LitElement, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, Order } from '../domain/book.ts';
import type { BookChange } from '../domain/book-ops.ts';
import { todayIso } from '../domain/dates.ts';
import { grouped, money } from '../domain/format.ts';
import { orderDocumentOf, quoteUsed } from '../domain/order-doc.ts';
import { cancelOrder, isOpen, outstanding, receive, receiveAll } from '../domain/orders.ts';
import { DEFAULT_EXPORT_OPTIONS } from '../io/csv-write.ts';
import type { ExportOptions } from '../io/csv-write.ts';
import type { Outcome } from '../domain/stock.ts';
import { BookController } from './book-context.ts';
import { buyingStyles } from './buying-styles.ts';
import './rb-csv-choices.ts';
import { downloadOrderDoc, printOrderDoc } from './rb-order-doc.ts';
import { pageStyles, problemStyles } from './styles.ts';

@customElement('rb-orders-page')
export class RbOrdersPage extends LitElement {
  static override styles = [pageStyles, problemStyles, buyingStyles];

  private readonly books = new BookController(this);
  @state() private date = todayIso();
  @state() private open: string | undefined;
  @state() private confirmCancel: string | undefined;
  @state() private message: { orderId: string; text: string; bad: boolean } | undefined;
  @state() private csv: ExportOptions = { ...DEFAULT_EXPORT_OPTIONS };
  private readonly qty = new Map<string, string>();

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const orders = [...book.orders].sort((a, b) => (a.orderedDate < b.orderedDate ? 1 : a.orderedDate > b.orderedDate ? -1 : b.number.localeCompare(a.number, 'en', { numeric: true })));
    const suppliers = new Map(book.suppliers.map((s) => [s.id, s.name] as const));
    return html`<section class="sheet" aria-labelledby="orders-h">
      <h2 id="orders-h">Orders</h2>
      <p class="why">
        Orders are placed from the Plan page. Receiving writes a stock movement per line received; an order is
        part-received until every line is in. Cancelling stops what is still to come and keeps what came.
      </p>
      <div class="toolbar">
        <label>date received <input type="date" name="receive-date" .value=${this.date} @change=${(e: Event) => (this.date = (e.target as HTMLInputElement).value)} /></label>
      </div>
      ${orders.length === 0
        ? html`<p class="empty">No orders yet.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="orders-table">
              <thead>
                <tr>
                  <th>order</th>
                  <th>supplier</th>
                  <th>status</th>
                  <th>ordered</th>
                  <th>due</th>
                  <th class="num">lines</th>
                  <th><span class="muted">actions</span></th>
                </tr>
              </thead>
              <tbody>
                ${orders.map(
                  (o) => html`<tr data-order=${o.number}>
                    <td class="code">${o.number}</td>
                    <td>${suppliers.get(o.supplierId) ?? o.supplierId}</td>
                    <td>${statusText(o, this.date)}</td>
                    <td>${o.orderedDate}</td>
                    <td>${o.dueDate}</td>
                    <td class="num">${o.lines.length}</td>
                    <td><button type="button" @click=${() => (this.open = this.open === o.id ? undefined : o.id)}>${this.open === o.id ? 'Close' : 'Open'}</button></td>
                  </tr>`,
                )}
              </tbody>
            </table>
          </div>`}
      ${orders.filter((o) => o.id === this.open).map((o) => this.renderOrder(book, o, suppliers.get(o.supplierId) ?? o.supplierId))}
    </section>`;
  }

  private renderOrder(book: Book, o: Order, supplier: string) {
    const mpn = new Map(book.parts.map((p) => [p.id, p.mpn] as const));
    const active = isOpen(o);
    const msg = this.message?.orderId === o.id ? this.message : undefined;
    // The quote each line's price came from, named as the order document names it.
    const doc = orderDocumentOf(book, o).lines;
    return html`<div class="order" data-testid="order-detail" data-order=${o.number}>
      <h3>${o.number} — ${supplier}, ${statusText(o, this.date)}</h3>
      ${o.notes ? html`<p class="muted">${o.notes}</p>` : ''}
      ${msg ? html`<p class=${msg.bad ? 'problem' : 'notice'} role=${msg.bad ? 'alert' : 'status'}>${msg.text}</p>` : ''}
      <div class="scroll">
        <table class="records">
          <thead>
            <tr>
              <th class="num">line</th>
              <th>mpn</th>
              <th class="num">ordered</th>
              <th class="num">received</th>
              <th class="num">to come</th>
              <th class="num">unit price</th>
              <th>currency</th>
              <th class="num">line price</th>
              <th>quote used</th>
              ${active ? html`<th class="num">receive now</th>` : ''}
            </tr>
          </thead>
          <tbody>
            ${o.lines.map((l, i) => {
              const key = `${o.id}:${i}`;
              return html`<tr data-line=${i + 1} data-mpn=${mpn.get(l.partId) ?? l.partId}>
                <td class="num">${i + 1}</td>
                <td class="code">${mpn.get(l.partId) ?? l.partId}</td>
                <td class="num">${grouped(l.quantity)}</td>
                <td class="num">${grouped(l.received)}</td>
                <td class="num">${grouped(outstanding(l))}</td>
                <td class="num">${l.price}</td>
                <td class="code">${l.currency}</td>
                <td class="num">${money(Math.round(l.quantity * l.price * 100) / 100, 'total')}</td>
                <td data-testid="quote-used">${quoteUsed(l.quoteId, doc[i]!)}</td>
                ${active
                  ? html`<td class="num">
                      <input class="qty" inputmode="numeric" aria-label=${`receive on line ${i + 1}`} .value=${this.qty.get(key) ?? ''} @input=${(e: Event) => this.qty.set(key, (e.target as HTMLInputElement).value)} />
                    </td>`
                  : ''}
              </tr>`;
            })}
          </tbody>
        </table>
      </div>
      ${active
        ? html`<div class="toolbar">
            <button type="button" class="primary" @click=${() => this.receiveTyped(book, o)}>Receive the quantities typed</button>
            <button type="button" @click=${() => this.apply(o, receiveAll(book, o.id, this.date), 'Received everything still to come.')}>Receive all</button>
            ${this.confirmCancel === o.id
              ? html`<span>Cancel what is still to come on ${o.number}?</span>
                  <button type="button" class="danger" @click=${() => this.apply(o, cancelOrder(book, o.id), `${o.number} is cancelled; what came stays in stock.`)}>Cancel the order</button>
                  <button type="button" class="quiet" @click=${() => (this.confirmCancel = undefined)}>Keep it</button>`
              : html`<button type="button" class="quiet" @click=${() => (this.confirmCancel = o.id)}>Cancel…</button>`}
          </div>`
        : ''}
    </div>
    ${this.renderDocument(book, o)}`;
  }

  /** The document the supplier receives: shown as they will read it, downloaded as CSV or printed. */
  private renderDocument(book: Book, o: Order) {
    if (o.status === 'cancelled') {
      return html`<p class="muted" data-testid="order-doc">${o.number} is cancelled: there is no order document to send.</p>`;
    }
    const doc = orderDocumentOf(book, o);
    return html`<section class="supplier-doc" aria-labelledby="doc-h" data-testid="order-doc">
      <h3 id="doc-h">The supplier’s order document</h3>
      <p class="why">
        What ${doc.supplier.name} receives: our order number, ship-to address, their part numbers and ours, the quote
        each price came from, quantities, prices in their currency and the terms. Nothing of our own workings is on it.
        The ship-to address is set on the Settings page, a supplier’s address and payment terms on the Suppliers page.
      </p>
      <details>
        <summary>CSV choices</summary>
        <rb-csv-choices .options=${this.csv} @rb-csv-choices=${(e: CustomEvent<ExportOptions>) => (this.csv = e.detail)}></rb-csv-choices>
      </details>
      <div class="toolbar">
        <button type="button" class="primary" @click=${() => this.downloadDoc(o, downloadOrderDoc(doc, this.csv))}>Download order ${o.number} CSV</button>
        <button type="button" @click=${() => void printOrderDoc(doc)}>Print order ${o.number}</button>
      </div>
      <rb-order-doc .doc=${doc}></rb-order-doc>
    </section>`;
  }

  private downloadDoc(o: Order, problem: string | undefined): void {
    if (problem) this.message = { orderId: o.id, text: `No file was made: ${problem}`, bad: true };
  }

  private receiveTyped(book: Book, o: Order): void {
    const receipts: { line: number; quantity: number }[] = [];
    for (let i = 0; i < o.lines.length; i++) {
      const t = (this.qty.get(`${o.id}:${i}`) ?? '').trim().replace(/[\s,_]/g, '');
      if (t === '') continue;
      if (!/^\d+$/.test(t)) {
        this.message = { orderId: o.id, text: `Nothing received: line ${i + 1}: “${t}” is not a whole number of parts.`, bad: true };
        return;
      }
      receipts.push({ line: i, quantity: Number(t) });
    }
    void this.apply(o, receive(book, o.id, this.date, receipts), 'Received.');
  }

  private async apply(o: Order, change: Outcome<BookChange>, done: string): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    this.confirmCancel = undefined;
    if (!change.ok) {
      this.message = { orderId: o.id, text: `Nothing changed: ${change.error}`, bad: true };
      return;
    }
    const saved = await service.save(change.value);
    if (saved.ok) for (let i = 0; i < o.lines.length; i++) this.qty.delete(`${o.id}:${i}`);
    this.message = saved.ok ? { orderId: o.id, text: done, bad: false } : { orderId: o.id, text: `Nothing changed: ${saved.message}`, bad: true };
  }
}

/** An order's status in words, with a mark: overdue when open past its due date. */
function statusText(o: Order, today: string): string {
  if (o.status === 'cancelled') return '○ cancelled';
  if (o.status === 'received') return '✓ received';
  const overdue = o.dueDate < today ? ' ⚠ overdue' : '';
  return `${o.status === 'open' ? '◇ open' : '◆ part-received'}${overdue}`;
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-orders-page': RbOrdersPage;
  }
}
