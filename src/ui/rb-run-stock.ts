// One planned run's costing with the stock the plan gives it: per line of its costed BOM, what comes from stock (and
// its value at the Book's rule), what is still bought, and the run's material from both.
import { LitElement, html } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import type { Book } from '../domain/book.ts';
import { prepareCosting, toCents } from '../domain/costing.ts';
import type { Result } from '../domain/costing.ts';
import { grouped, money } from '../domain/format.ts';
import { runFromStock } from '../domain/planning.ts';
import type { Plan } from '../domain/planning.ts';
import { stockCostedBom } from '../domain/stock-costing.ts';
import type { StockCostedBom } from '../domain/stock-costing.ts';
import { costVariant, runSupply } from '../io/run-export.ts';
import { pageStyles, problemStyles } from './styles.ts';

/** The stock-aware costing of a run in a plan. */
export function runStockCosting(book: Book, plan: Plan, runId: string): Result<StockCostedBom> {
  const run = book.runs.find((r) => r.id === runId);
  if (!run) return { ok: false, error: `no run with id ${runId}` };
  const costing = costVariant(book, run.variantId, run.quantity, { ...runSupply(book, run), date: plan.today });
  if (!costing.ok) return costing;
  const ctx = prepareCosting(book, { date: plan.today });
  if (!ctx.ok) return ctx;
  return { ok: true, value: stockCostedBom(book, ctx.value, costing.value.bom, runFromStock(plan, runId)) };
}

@customElement('rb-run-stock')
export class RbRunStock extends LitElement {
  static override styles = [pageStyles, problemStyles];

  @property({ attribute: false }) book: Book | undefined;
  @property({ attribute: false }) plan: Plan | undefined;
  @property() runId = '';
  private cache: { book: Book; plan: Plan; runId: string; result: Result<StockCostedBom> } | undefined;

  override render() {
    const { book, plan, runId } = this;
    if (!book || !plan || !runId) return html``;
    if (this.cache?.book !== book || this.cache.plan !== plan || this.cache.runId !== runId) this.cache = { book, plan, runId, result: runStockCosting(book, plan, runId) };
    const r = this.cache.result;
    if (!r.ok) return html`<p class="problem" role="alert">${r.error}</p>`;
    const c = r.value;
    const base = book.settings.baseCurrency;
    return html`<p class="why">
        Stock on hand goes to runs in date order; this run takes what is left for it and buys the rest from the supplier
        its costing chose. Stock is valued at ${c.valuation === 'lastPaid' ? 'the last price paid (today’s quote where none was paid)' : 'today’s quote'}.
      </p>
      <div class="scroll">
        <table class="records" data-testid="run-stock">
          <thead>
            <tr>
              <th>mpn</th>
              <th class="num">need</th>
              <th class="num">from stock</th>
              <th class="num">stock value (${base})</th>
              <th>valued at</th>
              <th class="num">to buy</th>
              <th class="num">order qty</th>
              <th class="num" title="goods and landed cost (freight, duty, charges)">bought, landed (${base})</th>
            </tr>
          </thead>
          <tbody>
            ${c.lines.map(
              (l) => html`<tr>
                <td class="code">${l.line.mpn}</td>
                <td class="num">${grouped(l.line.need)}</td>
                <td class="num">${grouped(l.fromStock)}</td>
                <td class="num">${money(l.stockValue, 'total')}</td>
                <td>${l.fromStock > 0 ? l.valuedAt : ''}</td>
                <td class="num">${grouped(l.toBuy)}</td>
                <td class="num">${l.problem ? html`<span class="problem">✗ ${l.problem}</span>` : grouped(l.buy)}</td>
                <td class="num">${money((toCents(l.boughtBase) + toCents(l.landedBase)) / 100, 'total')}</td>
              </tr>`,
            )}
          </tbody>
          <tfoot>
            <tr>
              <th colspan="3">material for the run: ${money(c.materialRun, 'total')} ${base} (per unit ${money(c.material, 'unitCost')})</th>
              <th class="num">${money(c.stockRun, 'total')}</th>
              <th colspan="3"></th>
              <th class="num">${money(c.boughtRun, 'total')}${c.landedRun ? html`<div class="muted">of which landed ${money(c.landedRun, 'total')}</div>` : ''}</th>
            </tr>
          </tfoot>
        </table>
      </div>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-run-stock': RbRunStock;
  }
}
