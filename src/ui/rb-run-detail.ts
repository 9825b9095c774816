// One run in detail: its costed BOM and totals, freezing and unfreezing, what would change if it were re-costed today,
// the purchase list by supplier with each supplier's order document, the run sheet to print and the two CSV files
// (with the Export page's CSV choices). Costing runs synchronously in the formula engine and is kept until the Book changes.
import { LitElement, css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import type { Book, Run } from '../domain/book.ts';
import { toCents } from '../domain/costing.ts';
import { choiceText } from '../domain/alternates.ts';
import type { CostedLine, Result } from '../domain/costing.ts';
import { todayIso } from '../domain/dates.ts';
import { money } from '../domain/format.ts';
import { compareCostings, freezeRun, unfreezeRun } from '../domain/freeze.ts';
import type { CostingComparison, LineChange } from '../domain/freeze.ts';
import { purchaseDocuments } from '../domain/order-doc.ts';
import type { OrderDocument } from '../domain/order-doc.ts';
import { purchaseList } from '../domain/purchase.ts';
import type { PurchaseList } from '../domain/purchase.ts';
import { DEFAULT_EXPORT_OPTIONS, costVariant, costedTotalLabels, frozenCosting, runSupply } from '../io/run-export.ts';
import type { ExportOptions, RunCosting } from '../io/run-export.ts';
import { BookController } from './book-context.ts';
import type { NoticeDetail } from './rb-book-menu.ts';
import './rb-csv-choices.ts';
import { downloadRunFile } from './rb-export-page.ts';
import { downloadOrderDoc, printOrderDoc } from './rb-order-doc.ts';
import { printRunSheet, runSheetData, runTotalRows } from './rb-run-sheet.ts';
import { pageStyles } from './styles.ts';

// The one money rule (domain/format.ts): a part's price keeps sub-cent digits, a variant's unit cost and every total
// are to the cent, as on the Compare and Family pages.
const total = (n: number): string => money(n, 'total');
const unitCost = (n: number): string => money(n, 'unitCost');
const partPrice = (n: number): string => money(n, 'partPrice');
const signed = (n: number, f: (x: number) => string): string => (Number.isNaN(n) ? '—' : n > 0 ? `+${f(n)}` : n < 0 ? `−${f(-n)}` : '±0');

/** The parts of a line's landed cost, by name (0 where a costing frozen before landed cost has none). */
const LANDED_PARTS = ['freight', 'duty', 'charges'] as const;

/**
 * A line's landed cost in one column, so the costed BOM fits a 1,400-pixel window: the sum, and under it each part
 * that is not zero by name; the cell's title gives the whole sum for a pointer.
 */
function landedCell(l: CostedLine, cur: string): TemplateResult {
  const parts = LANDED_PARTS.map((name) => ({ name, n: l[name] ?? 0 }));
  const sum = parts.reduce((s, p) => s + toCents(p.n), 0) / 100;
  const title = `${parts.map((p) => `${p.name} ${total(p.n)}`).join(' + ')} = ${total(sum)} ${cur}`;
  return html`<td class="num landed" title=${title}>
    ${total(sum)}${parts.filter((p) => p.n !== 0).map((p) => html`<small>${p.name} ${total(p.n)}</small>`)}
  </td>`;
}

const REASON_WORDS = { need: '', moq: 'MOQ', pack: 'whole packs', break: 'cheaper break' } as const;
const CHANGE_WORDS = { same: 'same', changed: '≠ changed', added: '+ added', removed: '− removed' } as const;

interface Costings {
  book: Book;
  run: Run;
  /** What the run shows and exports: the snapshot when frozen, else today's costing. */
  shown: Result<RunCosting>;
  /** Today's costing, for a frozen run's comparison. */
  fresh: Result<RunCosting> | undefined;
  comparison: CostingComparison | undefined;
}

@customElement('rb-run-detail')
export class RbRunDetail extends LitElement {
  static override styles = [
    pageStyles,
    css`
      .facts {
        display: flex;
        flex-wrap: wrap;
        gap: 0.3rem 1.4rem;
        margin: 0 0 0.8rem;
        font-size: 0.92rem;
      }
      .facts b {
        font-family: var(--rb-mono);
        font-size: 0.85rem;
      }
      .toolbar {
        flex-wrap: wrap;
      }
      table.totals {
        border-collapse: collapse;
        font-variant-numeric: tabular-nums;
        margin-top: 0.8rem;
        min-width: 22rem;
      }
      table.totals td {
        padding: 0.15rem 0.6rem;
        border-bottom: 1px solid var(--rb-rule);
      }
      table.totals td.num {
        text-align: right;
        white-space: nowrap;
      }
      table.totals tr.strong td {
        font-weight: 700;
      }
      tr.not-priced td {
        background: var(--rb-fail-bg);
      }
      tr.changed td,
      tr.added td,
      tr.removed td {
        background: var(--rb-margin-bg);
      }
      /* The costed BOM fits a 1,400-pixel window: a part's description, a quote's code and break and the parts of the
         landed cost sit in small type under the figure they belong to, instead of in columns of their own, and the
         columns are set a little closer than other tables'. */
      .bom table.records th,
      .bom table.records td {
        padding-left: 0.45rem;
        padding-right: 0.45rem;
      }
      .bom td small,
      .bom th small {
        display: block;
        font-size: 0.76rem;
        color: var(--rb-na);
        font-weight: normal;
      }
      .bom td.part {
        min-width: 12rem;
        max-width: 22rem;
        white-space: normal;
      }
      .bom td.part small {
        font-family: var(--rb-font);
      }
      .bom td.refs {
        max-width: 8rem;
        white-space: normal;
      }
      .bom td.supplier {
        white-space: nowrap;
      }
      .bom th.landed small {
        white-space: normal;
        max-width: 5.5rem;
        margin-left: auto;
      }
      .bom th:first-child,
      .bom td:first-child {
        position: sticky;
        left: 0;
        background: var(--rb-sheet);
      }
      td.why {
        font-size: 0.82rem;
        color: var(--rb-na);
        white-space: nowrap;
      }
      .late {
        color: var(--rb-fail);
        font-weight: 600;
      }
      h3 {
        font-size: 0.95rem;
        margin: 1rem 0 0.3rem;
        color: var(--rb-accent-ink);
      }
      h3 .muted {
        font-weight: normal;
        font-size: 0.85rem;
      }
      .ok-line::before {
        content: '✓ ';
        color: var(--rb-pass);
        font-weight: 700;
      }
    `,
  ];

  @property({ attribute: false }) runId = '';
  /** The CSV choices of this page's downloads (the Export page's, through the same form). */
  @state() private csv: ExportOptions = { ...DEFAULT_EXPORT_OPTIONS };
  private readonly books = new BookController(this);
  private cache: Costings | undefined;

  /** The run's costings, computed again only when the Book (or the run) changed. */
  private costings(book: Book, run: Run): Costings {
    const c = this.cache;
    if (c && c.book === book && c.run === run) return c;
    const fresh = costVariant(book, run.variantId, run.quantity, runSupply(book, run));
    const shown = run.frozen ? frozenCosting(run) : fresh;
    const comparison = run.frozen && shown.ok && fresh.ok ? compareCostings(shown.value.bom, fresh.value.bom) : undefined;
    this.cache = { book, run, shown, fresh: run.frozen ? fresh : undefined, comparison };
    return this.cache;
  }

  override render() {
    const book = this.books.book;
    const run = book?.runs.find((r) => r.id === this.runId);
    if (!book || !run) return html``;
    const c = this.costings(book, run);
    const variant = book.variants.find((v) => v.id === run.variantId);
    const shown = c.shown;
    const list = shown.ok ? purchaseList(shown.value.bom, { dateWanted: run.dateWanted, today: todayIso() }) : undefined;
    // One statement of what the costing rests on: the quotes valid on the costing date (the Book's, else today).
    const date = shown.ok ? shown.value.bom.date : (book.settings.costingDate ?? todayIso());
    const dateWord = run.frozen ? '' : book.settings.costingDate ? ', the Book’s costing date' : ', today';
    return html`<section class="sheet" aria-labelledby="run-h" data-testid="run-detail">
        <h2 id="run-h">Run ${run.name}</h2>
        <p class="why">
          ${run.frozen
            ? html`❄ Frozen ${run.frozen.at.slice(0, 16).replace('T', ' ')}, costed from the quotes valid on <b data-testid="run-costing-date">${date}</b>: the
                prices, quotes and rates of that moment stay with the run, whatever the quotes say now.`
            : html`↻ Live: costed from the quotes valid on <b data-testid="run-costing-date">${date}</b>${dateWord}. Freeze the run when it is
                decided, so later quotes do not change it.`}
        </p>
        <div class="facts">
          <span>variant <b>${variant?.code ?? '(missing)'}</b> ${variant?.name ?? ''}</span>
          <span>quantity <b>${run.quantity}</b></span>
          <span>date wanted <b>${run.dateWanted}</b></span>
        </div>
        <div class="toolbar">
          ${run.frozen
            ? html`<button type="button" @click=${() => this.unfreeze(run)}>Unfreeze</button>
                <button type="button" @click=${() => this.freeze(book, run, c.fresh, true)}>Re-cost today and freeze again</button>`
            : html`<button type="button" class="primary" @click=${() => this.freeze(book, run, c.fresh ?? shown, false)}>Freeze the costing</button>`}
          <button type="button" ?disabled=${!shown.ok} @click=${() => shown.ok && this.print(book, run, shown.value, true)}>Print run sheet</button>
          <button
            type="button"
            title="The parts and quantities to kit and build, with no supplier, price or total"
            ?disabled=${!shown.ok}
            @click=${() => shown.ok && this.print(book, run, shown.value, false)}
          >
            Print shop-floor sheet
          </button>
          <button type="button" ?disabled=${!shown.ok} @click=${() => shown.ok && this.download(run, variant?.code ?? shown.value.bom.variant, shown.value, 'costed-bom')}>
            Costed BOM CSV
          </button>
          <button type="button" ?disabled=${!shown.ok} @click=${() => shown.ok && this.download(run, variant?.code ?? shown.value.bom.variant, shown.value, 'purchase-list')}>
            Purchase list CSV
          </button>
        </div>
        <details>
          <summary>CSV choices</summary>
          <rb-csv-choices .options=${this.csv} @rb-csv-choices=${(e: CustomEvent<ExportOptions>) => (this.csv = e.detail)}></rb-csv-choices>
        </details>
        ${shown.ok ? '' : html`<p class="notice" role="alert">This run cannot be costed: ${shown.error}</p>`}
      </section>
      ${shown.ok ? this.renderBom(shown.value) : ''} ${c.comparison ? this.renderComparison(c.comparison, shown.ok ? shown.value : undefined) : ''}
      ${run.frozen && c.fresh && !c.fresh.ok
        ? html`<section class="sheet"><h2>If re-costed today</h2><p class="notice" role="alert">Today’s costing fails: ${c.fresh.error}</p></section>`
        : ''}
      ${list ? this.renderPurchase(book, list) : ''}`;
  }

  private renderBom(costing: RunCosting): TemplateResult {
    const bom = costing.bom;
    const cur = bom.currency;
    return html`<section class="sheet" aria-labelledby="bom-h">
      <h2 id="bom-h">Costed BOM</h2>
      <p class="why">
        One row per part bought (lines of the same part together), with the designators this variant places: need
        with attrition, order quantity after MOQ, whole packs and any cheaper higher break, the quote used, and leftover
        stock. Extended amounts are in ${cur} (a quote in another currency shows its own amount under it), rounded to
        cents per line; every total is the sum of its rows. The landed column is the freight, duty and charges that fall
        to us under the quote's delivery term (shown under the supplier), each named under the sum: part of the material
        cost. Under each part: which approved part was bought and why (the cheapest that can be had by the date wanted,
        unless the line pins one), or "single source" for a line with nothing approved to fall back on.
      </p>
      <div class="scroll bom">
        <table class="records" data-testid="run-bom">
          <thead>
            <tr>
              <th>designators</th>
              <th>part</th>
              <th class="num">per unit</th>
              <th class="num">need</th>
              <th class="num">buy</th>
              <th>supplier · code</th>
              <th class="num">unit price <small>at break</small></th>
              <th class="num">extended ${cur}</th>
              <th class="num landed">landed ${cur}<small>freight, duty, charges</small></th>
              <th class="num">leftover</th>
            </tr>
          </thead>
          <tbody>
            ${bom.lines.map(
              (l) => html`<tr>
                <td class="refs">${l.designators}</td>
                <td class="part">
                  <span class="code">${l.mpn}</span><small>${l.description}</small>
                  ${l.partChoice ? html`<small class="choice" data-testid="part-choice">${choiceText(l.partChoice)}</small>` : ''}
                </td>
                <td class="num">${l.qtyPerUnit}</td>
                <td class="num">${l.need}</td>
                <td class="num">${l.buy}</td>
                <td class="supplier">${l.supplier}<small class="code">${l.supplierCode}${l.incoterm ? ` · ${l.incoterm}` : ''}</small></td>
                <td class="num">${partPrice(l.unitPrice)} ${l.currency}<small>from ${l.breakQty}</small></td>
                <td class="num">
                  ${total(l.extendedBase)}${l.currency === cur ? '' : html`<small>${total(l.extended)} ${l.currency}</small>`}
                </td>
                ${landedCell(l, cur)}
                <td class="num">${l.leftover}</td>
              </tr>`,
            )}
            ${bom.problems.map(
              (p) => html`<tr class="not-priced">
                <td>${p.designators ?? ''}</td>
                <td colspan="9">✗ not priced: ${p.message}</td>
              </tr>`,
            )}
          </tbody>
        </table>
      </div>
      <table class="totals" data-testid="run-totals">
        <tbody>
          ${runTotalRows(costing)}
        </tbody>
      </table>
      ${bom.complete ? '' : html`<p class="notice" role="alert">Incomplete: the lines marked not priced are missing from every total.</p>`}
    </section>`;
  }

  private renderComparison(cmp: CostingComparison, frozen: RunCosting | undefined): TemplateResult {
    const cur = frozen?.bom.currency ?? '';
    const labels = costedTotalLabels(cur, frozen?.marginPct ?? 0);
    const moved = cmp.lines.filter((l) => l.kind !== 'same');
    const amount = (field: string, n: number): string => (['materialRun', 'runTotal', 'leftoverValue'].includes(field) ? total(n) : unitCost(n));
    const cell = (l: LineChange, side: 'frozen' | 'fresh'): string => {
      const x = l[side];
      return x ? `${x.buy} × ${partPrice(x.unitPrice)} ${x.currency} from ${x.supplier}` : '—';
    };
    return html`<section class="sheet" aria-labelledby="cmp-h" data-testid="run-comparison">
      <h2 id="cmp-h">If re-costed today</h2>
      <p class="why">What would change if this frozen run were costed again with today’s quotes and rates. Nothing changes until you re-cost it.</p>
      ${cmp.unchanged
        ? html`<p class="ok-line">Nothing would change: every line and every total is the same today.</p>`
        : html`${cmp.currencyChanged ? html`<p class="notice">The Book’s base currency changed since the freeze; money differences are not shown.</p>` : ''}
            ${moved.length
              ? html`<div class="scroll">
                  <table class="records">
                    <thead>
                      <tr><th>change</th><th>designators</th><th>mpn</th><th>frozen</th><th>today</th><th>what differs</th><th class="num">Δ extended ${cur}</th></tr>
                    </thead>
                    <tbody>
                      ${moved.map(
                        (l) => html`<tr class=${l.kind}>
                          <td>${CHANGE_WORDS[l.kind]}</td>
                          <td>${l.designators}</td>
                          <td class="code">${l.mpn}</td>
                          <td>${cell(l, 'frozen')}</td>
                          <td>${cell(l, 'fresh')}</td>
                          <td class="why">${l.fields.join(', ')}</td>
                          <td class="num">${signed(l.deltaBase, total)}</td>
                        </tr>`,
                      )}
                    </tbody>
                  </table>
                </div>`
              : html`<p class="ok-line">Every line is bought the same way today.</p>`}
            ${cmp.freshProblems.map((p) => html`<p class="notice">Today ${p.designators ?? ''} could not be priced: ${p.message}</p>`)}
            <table class="totals" data-testid="comparison-totals">
              <tbody>
                <tr><td></td><td class="num"><b>frozen</b></td><td class="num"><b>today</b></td><td class="num"><b>difference</b></td></tr>
                ${cmp.totals.map(
                  (t) => html`<tr>
                    <td>${labels[t.field]}</td>
                    <td class="num">${amount(t.field, t.frozen)}</td>
                    <td class="num">${amount(t.field, t.fresh)}</td>
                    <td class="num">${signed(t.delta, (n) => amount(t.field, n))}</td>
                  </tr>`,
                )}
              </tbody>
            </table>`}
    </section>`;
  }

  private renderPurchase(book: Book, list: PurchaseList): TemplateResult {
    const docs = purchaseDocuments(book, list.orders, todayIso());
    return html`<section class="sheet" aria-labelledby="buy-h" data-testid="run-purchase">
      <h2 id="buy-h">Purchase list</h2>
      <p class="why">
        What to order from whom: packs × pack quantity = order quantity, with the reason an order is larger than the
        need. Latest order date = date wanted ${list.dateWanted ?? ''} − lead time; a date already past is marked late.
      </p>
      ${list.orders.map(
        (o, i) => html`<h3>
            ${o.supplier} <span class="muted">(${o.currency}, lead up to ${o.leadDays} days${o.orderBy ? `, order by ${o.orderBy}` : ''})</span>
            ${o.late ? html`<span class="late">⚠ late</span>` : ''}
          </h3>
          ${this.renderDocButtons(docs[i]!)}
          <div class="scroll">
            <table class="records">
              <thead>
                <tr>
                  <th>supplier code</th>
                  <th>mpn</th>
                  <th class="num">need</th>
                  <th class="num">packs × pack</th>
                  <th class="num">order qty</th>
                  <th class="num">MOQ</th>
                  <th>why more</th>
                  <th class="num">unit price</th>
                  <th class="num">line price</th>
                  <th class="num">in ${list.currency}</th>
                  <th class="num">lead days</th>
                  <th>order by</th>
                </tr>
              </thead>
              <tbody>
                ${o.lines.map(
                  (p) => html`<tr>
                    <td class="code">${p.line.supplierCode}</td>
                    <td class="code">${p.line.mpn}</td>
                    <td class="num">${p.line.need}</td>
                    <td class="num">${p.packs} × ${p.line.pack}</td>
                    <td class="num">${p.line.buy}</td>
                    <td class="num">${p.line.moq}</td>
                    <td class="why">${REASON_WORDS[p.reason]}</td>
                    <td class="num">${partPrice(p.line.unitPrice)}</td>
                    <td class="num">${total(p.line.extended)}</td>
                    <td class="num">${total(p.line.extendedBase)}</td>
                    <td class="num">${p.line.leadDays}</td>
                    <td class="code">${p.latestOrderDate ?? ''}${p.late ? html` <span class="late">⚠ late</span>` : ''}</td>
                  </tr>`,
                )}
                <tr>
                  <td colspan="8"><b>total ${o.supplier}</b></td>
                  <td class="num"><b>${total(o.total)} ${o.currency}</b></td>
                  <td class="num"><b>${total(o.totalBase)}</b></td>
                  <td colspan="2"></td>
                </tr>
              </tbody>
            </table>
          </div>`,
      )}
      <p><b>All suppliers: ${total(list.totalBase)} ${list.currency}</b></p>
      ${list.missing.map((p) => html`<p class="notice">Not on the list, ${p.designators ?? ''}: ${p.message}</p>`)}
    </section>`;
  }

  /** The supplier's order document for one supplier's part of the list: a draft, numbered when placed as an order. */
  private renderDocButtons(doc: OrderDocument): TemplateResult {
    return html`<div class="toolbar">
      <button type="button" @click=${() => this.notifyProblem(downloadOrderDoc(doc, this.csv))}>Order document CSV for ${doc.supplier.name}</button>
      <button type="button" @click=${() => void printOrderDoc(doc)}>Print order document for ${doc.supplier.name}</button>
    </div>`;
  }

  private notifyProblem(problem: string | undefined): void {
    if (problem) this.notify({ tone: 'problem', title: 'No file was made', lines: [problem] });
  }

  private notify(detail: NoticeDetail): void {
    this.dispatchEvent(new CustomEvent<NoticeDetail>('rb-notice', { detail, bubbles: true, composed: true }));
  }

  private async freeze(book: Book, run: Run, fresh: Result<RunCosting> | undefined, again: boolean): Promise<void> {
    const service = this.books.service;
    if (!service || !fresh) return;
    if (!fresh.ok) {
      this.notify({ tone: 'problem', title: `${run.name} was not frozen`, lines: [fresh.error] });
      return;
    }
    const frozen = freezeRun(again ? unfreezeRun(run) : run, fresh.value.bom, book);
    if (!frozen.ok) {
      this.notify({ tone: 'problem', title: `${run.name} was not frozen`, lines: [frozen.error] });
      return;
    }
    const result = await service.save({ put: { runs: [frozen.value] } });
    if (!result.ok) this.notify({ tone: 'problem', title: `${run.name} was not frozen`, lines: [result.message] });
    else this.notify({ tone: 'done', title: again ? `${run.name} was costed again today and frozen` : `${run.name} is frozen with today’s prices`, lines: [] });
  }

  private async unfreeze(run: Run): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    const result = await service.save({ put: { runs: [unfreezeRun(run)] } });
    if (!result.ok) this.notify({ tone: 'problem', title: `${run.name} was not unfrozen`, lines: [result.message] });
  }

  private async print(book: Book, run: Run, costing: RunCosting, prices: boolean): Promise<void> {
    await printRunSheet(runSheetData(book, run, costing, todayIso(), prices));
  }

  private download(run: Run, variantCode: string, costing: RunCosting, what: 'costed-bom' | 'purchase-list'): void {
    this.notifyProblem(downloadRunFile(costing, run.quantity, run.dateWanted, variantCode, what, this.csv, { run: run.name }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-run-detail': RbRunDetail;
  }
}
