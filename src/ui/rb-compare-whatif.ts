// Compare view: what-if edits — an exchange rate, a cost setting, other run sizes or a quote price — tried on the
// Compare page's scratch workbook, each field showing the Book's own figure while it differs, or why it was refused.
import { css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book } from '../domain/book.ts';
import { grouped } from '../domain/format.ts';
import { COST_SETTINGS } from './build-costing.ts';
import type { CostSettingName } from './build-costing.ts';
import type { CompareController } from './compare-controller.ts';
import { CompareView } from './compare-view.ts';
import { pageStyles, problemStyles, ruledControlStyles } from './styles.ts';

@customElement('rb-compare-whatif')
export class RbCompareWhatif extends CompareView {
  static override styles = [
    pageStyles,
    problemStyles,
    ruledControlStyles('.wi-grid input, .wi-grid select', { padX: '0.35rem', ink: false, shrink: true }),
    css`
      section.whatif {
        border-left-color: var(--rb-margin);
        background: repeating-linear-gradient(135deg, var(--rb-sheet) 0 14px, var(--rb-margin-bg) 14px 15px);
      }
      .wi-grid {
        display: grid;
        grid-template-columns: max-content minmax(8rem, 12rem) 1fr;
        gap: 0.3rem 0.8rem;
        align-items: baseline;
        font-size: 0.9rem;
      }
      .wi-grid label {
        font-family: var(--rb-mono);
        font-size: 0.8rem;
        color: var(--rb-accent-ink);
        text-align: right;
      }
      .wi-grid input[aria-invalid='true'] {
        border-bottom-color: var(--rb-fail);
        background: var(--rb-fail-bg);
      }
      .wi-grid input.changed {
        border-bottom-color: var(--rb-margin);
        background: var(--rb-margin-bg);
      }
      .wi-grid .was {
        font-size: 0.8rem;
        color: var(--rb-margin);
      }
      .wi-grid .hint {
        font-size: 0.8rem;
        color: var(--rb-na);
      }
      .wi-grid .group {
        grid-column: 1 / -1;
        font-variant: small-caps;
        letter-spacing: 0.06em;
        color: var(--rb-accent-ink);
        border-bottom: 1px dashed var(--rb-rule);
        margin-top: 0.4rem;
      }
      .wi-quote {
        display: flex;
        flex-wrap: wrap;
        gap: 0.4rem;
        align-items: baseline;
      }
    `,
  ];

  /** The run size whose bought parts offer their quotes for a price edit. */
  @property({ attribute: false }) run = 0;
  @state() private wiQuote = '';
  @state() private wiBreak = 0;

  override render() {
    const book = this.book;
    const c = this.costs;
    if (!book || !c) return html``;
    const s = book.settings;
    const base = s.baseCurrency;
    const currencies = [...new Set([...Object.keys(s.rates), ...book.quotes.map((q) => q.currency)])].filter((x) => x !== base).sort();
    const numberField = (key: string, label: string, current: number, applied: number | undefined, hint: string, apply: (n: number) => string | undefined) => {
      const text = c.wiText.get(key) ?? String(applied ?? current);
      const problem = c.wiProblems[key];
      return html`<label for="wi-${key}">${label}</label>
        <input
          id="wi-${key}"
          data-whatif=${key}
          inputmode="decimal"
          class=${applied !== undefined ? 'changed' : ''}
          aria-invalid=${problem ? 'true' : 'false'}
          .value=${live(text)}
          @input=${(e: Event) => c.tryNumber(key, (e.target as HTMLInputElement).value, current, apply)}
        />
        ${problem
          ? html`<span class="problem" role="alert">${problem}</span>`
          : applied !== undefined
            ? html`<span class="was">what-if; the Book has ${current}</span>`
            : html`<span class="hint">${hint}</span>`}`;
    };
    const runsText = c.wiText.get('runs') ?? c.runSizes(book).join(', ');
    return html`<section class="sheet whatif" aria-labelledby="whatif-h">
      <h2 id="whatif-h">What-if</h2>
      <p class="why">
        Try a rate, a cost setting, a quote price or other run sizes: every figure on this page follows at once. Nothing is
        saved until you keep the edits; discard puts the Book's figures back.
      </p>
      <div class="wi-grid" data-testid="whatif">
        <div class="group">exchange rates (${base} for one unit)</div>
        ${currencies.length === 0 ? html`<span></span><span class="hint">Every quote is in ${base}.</span><span></span>` : ''}
        ${currencies.map((cur) =>
          numberField(`rate:${cur}`, cur, s.rates[cur] ?? NaN, c.whatIf.rates.get(cur), `${base} for one ${cur}`, (n) => {
            if (!(n > 0)) return 'a number above 0';
            return c.applyEdit((w) => w.rates.set(cur, n), (w) => w.rates.delete(cur), n === s.rates[cur]);
          }),
        )}
        <div class="group">cost settings</div>
        ${COST_SETTINGS.map(({ name, label }) =>
          numberField(name, label, s[name], c.whatIf.settings.get(name), name.endsWith('Pct') ? '%' : '', (n) => {
            if (!(n >= 0)) return 'a number, 0 or more';
            if (name === 'marginPct' && n >= 100) return 'below 100';
            return c.applyEdit(
              (w) => w.settings.set(name as CostSettingName, n),
              (w) => w.settings.delete(name as CostSettingName),
              n === s[name],
            );
          }),
        )}
        <div class="group">run sizes</div>
        <label for="wi-runs">run sizes</label>
        <input
          id="wi-runs"
          data-whatif="runs"
          class=${c.whatIf.runSizes ? 'changed' : ''}
          aria-invalid=${c.wiProblems.runs ? 'true' : 'false'}
          .value=${live(runsText)}
          @input=${(e: Event) => c.tryRuns(book, (e.target as HTMLInputElement).value)}
        />
        ${c.wiProblems.runs
          ? html`<span class="problem" role="alert">${c.wiProblems.runs}</span>`
          : c.whatIf.runSizes
            ? html`<span class="was">what-if; the Book has ${s.runSizes.join(', ')}</span>`
            : html`<span class="hint">units per run, separated by commas</span>`}
        <div class="group">a quote price</div>
        ${this.renderQuotePrice(book, c)}
      </div>
    </section>`;
  }

  private renderQuotePrice(book: Book, c: CompareController): TemplateResult {
    const quotes = c.quotesInUse(book, this.chosen);
    const mpn = new Map(book.parts.map((p) => [p.id, p.mpn] as const));
    const supplier = new Map(book.suppliers.map((s) => [s.id, s.name] as const));
    const q = quotes.find((x) => x.id === this.wiQuote) ?? quotes[0];
    if (!q) return html`<span></span><span class="hint">No quotes in use by the chosen variants.</span><span></span>`;
    const b = Math.min(this.wiBreak, q.breaks.length - 1);
    const key = `${q.id}#${b}`;
    const held = q.breaks[b]!.price;
    const applied = c.whatIf.prices.get(key);
    const text = c.wiText.get(`price:${key}`) ?? String(applied ?? held);
    const problem = c.wiProblems[`price:${key}`];
    return html`<label for="wi-quote">quote</label>
      <div class="wi-quote">
        <select
          id="wi-quote"
          aria-label="Quote"
          @change=${(e: Event) => {
            this.wiQuote = (e.target as HTMLSelectElement).value;
            this.wiBreak = 0;
          }}
        >
          ${quotes.map(
            (x) => html`<option value=${x.id} ?selected=${x.id === q.id}>
              ${mpn.get(x.partId) ?? x.partId} · ${supplier.get(x.supplierId) ?? x.supplierId} · ${x.supplierCode}${[...c.whatIf.prices.keys()].some((k) => k.startsWith(`${x.id}#`)) ? ' ⚑' : ''}
            </option>`,
          )}
        </select>
        <select aria-label="Price break" @change=${(e: Event) => (this.wiBreak = Number((e.target as HTMLSelectElement).value))}>
          ${q.breaks.map((x, i) => html`<option value=${i} ?selected=${i === b}>from ${grouped(x.qty)}</option>`)}
        </select>
      </div>
      <span class="hint">${q.expires && q.expires < (book.settings.costingDate ?? '') ? 'expired: not used in costing' : `in ${q.currency}`}</span>
      <label for="wi-price">unit price (${q.currency})</label>
      <input
        id="wi-price"
        data-whatif="price"
        inputmode="decimal"
        class=${applied !== undefined ? 'changed' : ''}
        aria-invalid=${problem ? 'true' : 'false'}
        .value=${live(text)}
        @input=${(e: Event) =>
          c.tryNumber(`price:${key}`, (e.target as HTMLInputElement).value, held, (n) => {
            if (!(n >= 0)) return 'a price, 0 or more';
            return c.applyEdit((w) => w.prices.set(key, n), (w) => w.prices.delete(key), n === held);
          })}
      />
      ${problem
        ? html`<span class="problem" role="alert">${problem}</span>`
        : applied !== undefined
          ? html`<span class="was">what-if; the quote has ${held}</span>`
          : html`<span class="hint">at the break from ${grouped(q.breaks[b]!.qty)}</span>`}`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-compare-whatif': RbCompareWhatif;
  }
}
