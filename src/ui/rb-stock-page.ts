// Stock page: on hand per part as the sum of its movements, each part's history, a form to record a count, a receipt
// not on an order, scrap or a correction, and a stock count file imported as an undoable batch (rb-stock-count).
import { LitElement, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, Part, StockMoveKind } from '../domain/book.ts';
import type { BookChange } from '../domain/book-ops.ts';
import { todayIso } from '../domain/dates.ts';
import { grouped } from '../domain/format.ts';
import { isOpen, outstanding } from '../domain/orders.ts';
import { onHandByPart, partHistory, recordMove, stockCount } from '../domain/stock.ts';
import type { Outcome } from '../domain/stock.ts';
import { BookController } from './book-context.ts';
import { buyingStyles } from './buying-styles.ts';
import './rb-stock-count.ts';
import { pageStyles, problemStyles } from './styles.ts';

/** What the form records, in the words on screen. */
const ENTRY_KINDS = {
  count: 'count (the number found)',
  receipt: 'receipt not on an order',
  scrap: 'scrap',
  adjust: 'correction (+ or −)',
} as const;
type EntryKind = keyof typeof ENTRY_KINDS;

@customElement('rb-stock-page')
export class RbStockPage extends LitElement {
  static override styles = [pageStyles, problemStyles, buyingStyles];

  private readonly books = new BookController(this);
  @state() private selected: string | undefined;
  @state() private entry = { partId: '', kind: 'count' as EntryKind, quantity: '', date: todayIso(), reason: '' };
  @state() private message: { text: string; bad: boolean } | undefined;

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    return html`${this.renderOnHand(book)} ${this.renderEntry(book)} <rb-stock-count></rb-stock-count> ${this.renderHistory(book)}`;
  }

  private renderOnHand(book: Book) {
    const have = onHandByPart(book.stockMoves);
    const onOrder = new Map<string, number>();
    for (const o of book.orders) if (isOpen(o)) for (const l of o.lines) onOrder.set(l.partId, (onOrder.get(l.partId) ?? 0) + outstanding(l));
    const parts = [...book.parts].filter((p) => have.has(p.id) || onOrder.has(p.id)).sort((a, b) => a.mpn.localeCompare(b.mpn));
    return html`<section class="sheet" aria-labelledby="stock-h">
      <h2 id="stock-h">On hand</h2>
      <p class="why">On hand is the sum of a part's stock movements: counts, receipts, issues to runs, scrap and corrections. Nothing is overwritten.</p>
      ${parts.length === 0
        ? html`<p class="empty">No stock recorded yet: record a count below, or receive an order.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="stock-table">
              <thead>
                <tr>
                  <th>mpn</th>
                  <th>description</th>
                  <th class="num">on hand</th>
                  <th class="num">on open orders</th>
                  <th><span class="muted">history</span></th>
                </tr>
              </thead>
              <tbody>
                ${parts.map(
                  (p) => html`<tr data-mpn=${p.mpn}>
                    <td class="code">${p.mpn}</td>
                    <td>${p.description}</td>
                    <td class="num" data-testid="on-hand">${grouped(have.get(p.id) ?? 0)}</td>
                    <td class="num">${grouped(onOrder.get(p.id) ?? 0)}</td>
                    <td><button type="button" @click=${() => (this.selected = p.id)}>History</button></td>
                  </tr>`,
                )}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  private renderEntry(book: Book) {
    const e = this.entry;
    const set = (patch: Partial<typeof e>): void => void (this.entry = { ...this.entry, ...patch });
    const parts = [...book.parts].sort((a, b) => a.mpn.localeCompare(b.mpn));
    return html`<section class="sheet" aria-labelledby="entry-h">
      <h2 id="entry-h">Record a movement</h2>
      <p class="why">A count writes the difference from the ledger; scrap takes parts out; a correction may go either way.</p>
      ${this.message ? html`<p class=${this.message.bad ? 'problem' : 'notice'} role=${this.message.bad ? 'alert' : 'status'}>${this.message.text}</p>` : ''}
      <form class="fieldrow" novalidate @submit=${(ev: Event) => this.submit(ev, book)} aria-label="Stock movement">
        <label
          >part
          <select name="part" .value=${e.partId} @change=${(ev: Event) => set({ partId: (ev.target as HTMLSelectElement).value })}>
            <option value="">choose a part</option>
            ${parts.map((p: Part) => html`<option value=${p.id} ?selected=${p.id === e.partId}>${p.mpn}</option>`)}
          </select></label
        >
        <label
          >what
          <select name="kind" @change=${(ev: Event) => set({ kind: (ev.target as HTMLSelectElement).value as EntryKind })}>
            ${(Object.keys(ENTRY_KINDS) as EntryKind[]).map((k) => html`<option value=${k} ?selected=${k === e.kind}>${ENTRY_KINDS[k]}</option>`)}
          </select></label
        >
        <label>quantity <input name="quantity" inputmode="numeric" size="8" .value=${e.quantity} @input=${(ev: Event) => set({ quantity: (ev.target as HTMLInputElement).value })} /></label>
        <label>date <input type="date" name="date" .value=${e.date} @change=${(ev: Event) => set({ date: (ev.target as HTMLInputElement).value })} /></label>
        <label>reason <input name="reason" size="24" .value=${e.reason} @input=${(ev: Event) => set({ reason: (ev.target as HTMLInputElement).value })} /></label>
        <button type="submit" class="primary">Record</button>
      </form>
    </section>`;
  }

  private renderHistory(book: Book) {
    const part = book.parts.find((p) => p.id === this.selected);
    if (!part) return '';
    const orders = new Map(book.orders.map((o) => [o.id, o.number] as const));
    const runs = new Map(book.runs.map((r) => [r.id, r.name || r.id] as const));
    const lines = partHistory(book.stockMoves, part.id);
    return html`<section class="sheet" aria-labelledby="history-h">
      <h2 id="history-h">History of ${part.mpn}</h2>
      <div class="scroll">
        <table class="records" data-testid="stock-history">
          <thead>
            <tr>
              <th>date</th>
              <th>movement</th>
              <th class="num">quantity</th>
              <th class="num">balance</th>
              <th>from</th>
              <th>reason</th>
            </tr>
          </thead>
          <tbody>
            ${lines.map(
              ({ move: m, balance }) => html`<tr>
                <td>${m.date}</td>
                <td>${m.kind}</td>
                <td class="num">${m.quantity > 0 ? '+' : ''}${grouped(m.quantity)}</td>
                <td class="num">${grouped(balance)}</td>
                <td>${m.orderId ? `order ${orders.get(m.orderId) ?? m.orderId}, line ${(m.orderLine ?? 0) + 1}` : m.runId ? `run ${runs.get(m.runId) ?? m.runId}` : ''}</td>
                <td>${m.reason}</td>
              </tr>`,
            )}
          </tbody>
        </table>
      </div>
    </section>`;
  }

  private async submit(ev: Event, book: Book): Promise<void> {
    ev.preventDefault();
    const e = this.entry;
    const t = e.quantity.trim().replace(/[\s,_]/g, '');
    const n = /^[+-]?\d+$/.test(t) ? Number(t) : NaN;
    if (!e.partId) return void (this.message = { text: 'Nothing recorded: choose a part.', bad: true });
    if (!Number.isSafeInteger(n)) return void (this.message = { text: `Nothing recorded: “${e.quantity}” is not a whole number of parts.`, bad: true });
    let change: Outcome<BookChange>;
    if (e.kind === 'count') {
      const r = stockCount(book, e.date, [{ partId: e.partId, counted: n }], e.reason || 'count');
      change = r.ok ? { ok: true, value: r.value.change } : r;
    } else {
      const kind: StockMoveKind = e.kind === 'receipt' ? 'received' : e.kind === 'scrap' ? 'scrapped' : 'adjusted';
      const quantity = e.kind === 'scrap' ? -Math.abs(n) : e.kind === 'receipt' ? Math.abs(n) : n;
      change = recordMove(book, { partId: e.partId, date: e.date, quantity, kind, reason: e.reason });
    }
    if (!change.ok) return void (this.message = { text: `Nothing recorded: ${change.error}.`, bad: true });
    if ((change.value.put?.stockMoves ?? []).length === 0) return void (this.message = { text: 'The count agrees with the ledger: nothing to record.', bad: false });
    await this.save(change.value, 'Recorded.');
    if (!this.message?.bad) this.entry = { ...this.entry, quantity: '', reason: '' };
  }

  private async save(change: BookChange, done: string): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    const saved = await service.save(change);
    this.message = saved.ok ? { text: done, bad: false } : { text: `Nothing recorded: ${saved.message}`, bad: true };
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-stock-page': RbStockPage;
  }
}
