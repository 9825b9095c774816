// Plan page: the planned runs wanted within the horizon planned together — each run's date wanted, the date its
// parts must be in and the part that limits it; per part the gross need, stock, open orders in time and net need;
// and the orders to place per supplier, each placed in one step. A run marked built issues its parts from stock.
import { LitElement, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, Run } from '../domain/book.ts';
import { todayIso, isIsoDate } from '../domain/dates.ts';
import { grouped, money } from '../domain/format.ts';
import { suggestionDocuments } from '../domain/order-doc.ts';
import { acceptSuggestions } from '../domain/planning.ts';
import type { Plan, SupplierSuggestion } from '../domain/planning.ts';
import type { Result } from '../domain/costing.ts';
import { buildRun } from '../domain/stock.ts';
import { partStatus, planBook, runNeeds, runStatus } from '../io/plan-export.ts';
import { CostingService } from './costing-service.ts';
import { BookController } from './book-context.ts';
import { downloadOrderDoc, printOrderDoc } from './rb-order-doc.ts';
import './rb-plan-settings.ts';
import './rb-run-stock.ts';
import { buyingStyles } from './buying-styles.ts';
import { pageStyles, problemStyles } from './styles.ts';

@customElement('rb-plan-page')
export class RbPlanPage extends LitElement {
  static override styles = [pageStyles, problemStyles, buyingStyles];

  private readonly books = new BookController(this, { figures: true });
  @state() private date = todayIso();
  @state() private horizon = '';
  @state() private message: { text: string; bad: boolean } | undefined;
  @state() private busy = false;
  /** The run whose costing with stock is shown. */
  @state() private costed: string | undefined;
  private cache: { book: Book; key: string; figures: number; plan: Result<Plan> } | undefined;

  private horizonDays(book: Book): number | undefined {
    const t = this.horizon.trim();
    if (t === '') return book.settings.horizonDays;
    return /^\d+$/.test(t) ? Number(t) : NaN;
  }

  private plan(book: Book): Result<Plan> {
    const h = this.horizonDays(book);
    if (!isIsoDate(this.date)) return { ok: false, error: 'the plan date must be a calendar date YYYY-MM-DD' };
    if (h === undefined || !Number.isInteger(h) || h < 1 || h > 3650) return { ok: false, error: 'the horizon must be a whole number of days from 1 to 3,650' };
    const key = `${this.date}|${h}`;
    // Each variant's lines as the live figures resolve them (off the page's thread); planned again when they move.
    const costing = CostingService.for(this.books.service!);
    const resolution = costing.resolution();
    if (costing.empty) return { ok: false, error: 'The plan follows once every variant\'s build lines are worked out…' };
    if (this.cache?.book !== book || this.cache.key !== key || this.cache.figures !== costing.version) {
      this.cache = { book, key, figures: costing.version, plan: planBook(book, { today: this.date, horizonDays: h }, resolution) };
    }
    return this.cache.plan;
  }

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const plan = this.plan(book);
    return html`<section class="sheet" aria-labelledby="plan-h">
        <h2 id="plan-h">Plan</h2>
        <p class="why">
          Runs not yet built and wanted within the horizon are planned together. A run's parts must be in by its date
          wanted less ${book.settings.kittingDays} kitting and assembly days and ${book.settings.safetyDays} safety days;
          an order must go by that date less the supplier's lead time. Needs are met in date order from stock on hand,
          then from open orders due in time; the rest is the net need.
        </p>
        <div class="fieldrow">
          <label>plan date <input type="date" name="plan-date" .value=${this.date} @change=${(e: Event) => (this.date = (e.target as HTMLInputElement).value)} /></label>
          <label
            >horizon (days)
            <input name="horizon" inputmode="numeric" size="6" placeholder=${String(book.settings.horizonDays)} .value=${this.horizon} @change=${(e: Event) => (this.horizon = (e.target as HTMLInputElement).value)}
          /></label>
        </div>
        ${this.message ? html`<p class=${this.message.bad ? 'problem' : 'notice'} role=${this.message.bad ? 'alert' : 'status'}>${this.message.text}</p>` : ''}
        ${plan.ok ? '' : html`<p class="problem" role="alert">${plan.error}</p>`}
      </section>
      ${plan.ok
        ? html`${this.renderRuns(book, plan.value)} ${this.renderCosted(book, plan.value)} ${this.renderOrders(book, plan.value)}
          ${this.renderParts(plan.value)}`
        : ''}
      <rb-plan-settings></rb-plan-settings>`;
  }

  private renderRuns(book: Book, plan: Plan) {
    const variants = new Map(book.variants.map((v) => [v.id, v.code] as const));
    const built = book.runs.filter((r) => r.status === 'built');
    return html`<section class="sheet" aria-labelledby="plan-runs-h">
      <h2 id="plan-runs-h">Planned runs</h2>
      ${plan.runs.length === 0
        ? html`<p class="empty">No planned runs. Add runs on the Runs page; runs marked built leave the plan.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="plan-runs">
              <thead>
                <tr>
                  <th>run</th>
                  <th>variant</th>
                  <th class="num">quantity</th>
                  <th>date wanted</th>
                  <th>parts in by</th>
                  <th>limited by</th>
                  <th>earliest date wanted</th>
                  <th>status</th>
                  <th><span class="muted">actions</span></th>
                </tr>
              </thead>
              <tbody>
                ${plan.runs.map(
                  (r) => html`<tr data-run=${r.run.id}>
                    <td>${r.run.name || r.run.id}</td>
                    <td class="code">${variants.get(r.run.variantId) ?? r.run.variantId}</td>
                    <td class="num">${grouped(r.run.quantity)}</td>
                    <td>${r.run.dateWanted}</td>
                    <td>${r.needDate}</td>
                    <td class="code">${r.limiting?.mpn ?? '—'}</td>
                    <td>${!r.limiting ? '—' : 'problem' in r.limiting ? 'none: a part cannot be bought' : r.limiting.earliestWanted}</td>
                    <td class="flag">${runFlag(r)}</td>
                    <td>
                      <button type="button" ?disabled=${this.busy} @click=${() => this.build(book, r.run)}>Mark built</button>
                      ${r.inHorizon ? html`<button type="button" class="quiet" @click=${() => (this.costed = r.run.id)}>Cost with stock</button>` : ''}
                    </td>
                  </tr>`,
                )}
              </tbody>
            </table>
          </div>`}
      ${built.length
        ? html`<p class="muted" data-testid="built-runs">Built: ${built.map((r) => `${r.name || r.id} (${r.builtDate})`).join(', ')}</p>`
        : ''}
    </section>`;
  }

  private renderCosted(book: Book, plan: Plan) {
    const rp = plan.runs.find((r) => r.run.id === this.costed && r.inHorizon);
    if (!rp) return '';
    return html`<section class="sheet" aria-labelledby="run-stock-h">
      <h2 id="run-stock-h">${rp.run.name || rp.run.id}: costed with stock</h2>
      <rb-run-stock .book=${book} .plan=${plan} .runId=${rp.run.id}></rb-run-stock>
    </section>`;
  }

  private renderOrders(book: Book, plan: Plan) {
    const base = book.settings.baseCurrency;
    return html`<section class="sheet" aria-labelledby="plan-orders-h">
      <h2 id="plan-orders-h">Orders to place</h2>
      ${plan.suggestions.length === 0
        ? html`<p class="empty" data-testid="no-suggestions">Nothing to order: stock on hand and open orders cover every need in the horizon.</p>`
        : html`<p class="why">
              MOQ, whole packs and buying up to a cheaper price break are applied to each part's combined net need.
              Placing an order gives it the next order number (${book.settings.orderPrefix}${book.settings.nextOrderNumber}
              next), dated the plan date and due after its longest lead time.
            </p>
            <div class="toolbar">
              <button type="button" class="primary" ?disabled=${this.busy} @click=${() => this.accept(book, plan.suggestions)}>
                Place all ${plan.suggestions.length} orders
              </button>
            </div>
            ${plan.suggestions.map((s) => [s, suggestionDocuments(book, [s], plan.today)[0]!] as const).map(
              ([s, doc]) => html`<div class="order" data-testid="suggestion" data-supplier=${s.supplierId}>
                <h3>${s.supplier} — ${s.currency}, ${money(s.total, 'total')} (${money(s.totalBase, 'total')} ${base})</h3>
                <p>
                  Order by ${s.orderBy}${s.late ? html` <span class="problem flag">⚠ late</span>` : ''}; due ${s.dueIfPlacedToday} if placed on
                  ${plan.today}.
                  <button type="button" ?disabled=${this.busy} @click=${() => this.accept(book, [s])}>Place this order</button>
                  <button type="button" title="The document the supplier receives, unnumbered until the order is placed" @click=${() => this.docProblem(downloadOrderDoc(doc))}>
                    Draft order document CSV
                  </button>
                  <button type="button" @click=${() => void printOrderDoc(doc)}>Print draft order</button>
                </p>
                <div class="scroll">
                  <table class="records">
                    <thead>
                      <tr>
                        <th>mpn</th>
                        <th>supplier code</th>
                        <th class="num">net need</th>
                        <th class="num">order qty</th>
                        <th class="num">unit price</th>
                        <th class="num">line price</th>
                        <th>order by</th>
                      </tr>
                    </thead>
                    <tbody>
                      ${s.lines.map(
                        (l) => html`<tr>
                          <td class="code">${l.mpn}</td>
                          <td class="code">${l.supplierCode}</td>
                          <td class="num">${grouped(l.net)}</td>
                          <td class="num">${grouped(l.buy)}</td>
                          <td class="num">${l.unitPrice}</td>
                          <td class="num">${money(l.extended, 'total')}</td>
                          <td>${l.orderBy}${l.pastDue ? ' ✗ past due' : l.late ? ' ⚠ late' : ''}</td>
                        </tr>`,
                      )}
                    </tbody>
                  </table>
                </div>
              </div>`,
            )}`}
    </section>`;
  }

  private renderParts(plan: Plan) {
    const runName = new Map(plan.runs.map((r) => [r.run.id, r.run.name || r.run.id] as const));
    return html`<section class="sheet" aria-labelledby="plan-parts-h">
      <h2 id="plan-parts-h">Parts: gross to net</h2>
      ${plan.parts.length === 0
        ? html`<p class="empty">No part is needed by a planned run in the horizon.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="plan-parts">
              <thead>
                <tr>
                  <th>mpn</th>
                  <th>needed by</th>
                  <th class="num">gross need</th>
                  <th class="num">on hand</th>
                  <th class="num">on order in time</th>
                  <th class="num">net need</th>
                  <th>status</th>
                </tr>
              </thead>
              <tbody>
                ${plan.parts.map(
                  (p) => html`<tr data-part=${p.partId} data-runs=${p.gross.length}>
                    <td class="code">${p.mpn}</td>
                    <td>${p.gross.map((g) => `${runName.get(g.runId) ?? g.runId} (${grouped(g.qty)} by ${g.date})`).join('; ')}</td>
                    <td class="num">${grouped(p.grossTotal)}</td>
                    <td class="num">${grouped(p.onHand)}</td>
                    <td class="num">${grouped(p.fromOrders)}</td>
                    <td class="num">${grouped(p.net)}</td>
                    <td class="flag">${partFlag(p)}</td>
                  </tr>`,
                )}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  private docProblem(problem: string | undefined): void {
    if (problem) this.message = { text: `No file was made: ${problem}`, bad: true };
  }

  private async accept(book: Book, list: readonly SupplierSuggestion[]): Promise<void> {
    const service = this.books.service;
    if (!service || this.busy) return;
    const r = acceptSuggestions(book, list, this.date);
    if (!r.ok) {
      this.message = { text: `No order placed: ${r.error}`, bad: true };
      return;
    }
    this.busy = true;
    const saved = await service.save(r.value.change);
    this.busy = false;
    this.message = saved.ok
      ? { text: `Placed ${r.value.orders.map((o) => o.number).join(', ')}. Receive them on the Orders page.`, bad: false }
      : { text: `No order placed: ${saved.message}`, bad: true };
  }

  private async build(book: Book, run: Run): Promise<void> {
    const service = this.books.service;
    if (!service || this.busy) return;
    const needs = runNeeds(book, run, this.date);
    const change = needs.ok ? buildRun(book, run, this.date, needs.value) : needs;
    if (!change.ok) {
      this.message = { text: `${run.name || run.id} was not marked built: ${change.error}`, bad: true };
      return;
    }
    this.busy = true;
    const saved = await service.save(change.value);
    this.busy = false;
    this.message = saved.ok
      ? { text: `${run.name || run.id} is built on ${this.date}: its parts were issued from stock; what is left over stays on hand.`, bad: false }
      : { text: `${run.name || run.id} was not marked built: ${saved.message}`, bad: true };
  }
}

function runFlag(r: Plan['runs'][number]): string {
  const s = runStatus(r);
  const mark = !r.inHorizon ? '○' : s === 'in time' ? '✓' : s === 'late' ? '⚠' : '✗';
  return `${mark} ${s}`;
}

function partFlag(p: Plan['parts'][number]): string {
  const s = partStatus(p);
  const mark = s === 'covered' || s === 'in time' ? '✓' : s === 'late' ? '⚠' : '✗';
  const late = p.lateReceipts.length ? `; ${p.lateReceipts.map((r) => r.number).join(', ')} due after it is needed` : '';
  return `${mark} ${s}${late}`;
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-plan-page': RbPlanPage;
  }
}
