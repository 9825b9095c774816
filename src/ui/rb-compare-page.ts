// Compare page: chosen variants side by side (key parameters, worst check, unit cost at each run size), their cost
// split by category as stacked bars, cost against run size as curves, the build lines that make two of them differ
// with their cost effect, and what-if edits (a quote price, a rate, a cost setting, the run sizes) tried on a scratch
// costing workbook so every figure moves at once without saving, until the person keeps or discards them.
import { LitElement, css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book, Quote, Variant } from '../domain/book.ts';
import { STATUS_SYMBOL } from '../domain/check-status.ts';
import type { CheckStatus } from '../domain/check-status.ts';
import type { CostedBom, Result } from '../domain/costing.ts';
import { grouped, money, signedMoney } from '../domain/format.ts';
import type { CostingWorkbook } from '../engine/costing.ts';
import type { FamilyResolution } from '../engine/family.ts';
import { BookController } from './book-context.ts';
import { CostingService } from './costing-service.ts';
import type { FieldProblems } from './record-forms.ts';
import { paramText } from './record-forms.ts';
import {
  COST_SETTINGS,
  SPLIT_KEYS,
  applyWhatIf,
  categorySplit,
  curveRunSizes,
  emptyWhatIf,
  keepWhatIf,
  readRunSizes,
  variantDifference,
  whatIfCount,
} from './build-costing.ts';
import type { CostSettingName, WhatIf } from './build-costing.ts';
import type { NoticeDetail } from './rb-book-menu.ts';
import type { BarRow, BarSeries } from './rb-chart-bars.ts';
import type { CurveSeries } from './rb-chart-curves.ts';
import { pageStyles } from './styles.ts';
import './rb-chart-bars.ts';
import './rb-chart-curves.ts';

/** Variants chosen when the page opens: all of a small family, else the first few. */
const FIRST_FEW = 4;
/** Most variants drawn as columns, bars and curves at once; more are counted, not drawn (a chart of 200 lines reads as none). */
const MAX_SHOWN = 12;
/** Parameters shown side by side (when any compared variant has them). */
const KEY_PARAMS = ['steps', 'load_w', 'mains_v', 'mains_hz', 'selector', 'stage', 'supply', 'vcc'];

const SPLIT_LABELS: Record<(typeof SPLIT_KEYS)[number], string> = {
  electronics: 'electronics',
  power: 'power',
  board: 'board',
  enclosure: 'enclosure',
  hardware: 'hardware',
  packaging: 'packaging',
  labour: 'labour',
  test: 'test',
  overhead: 'overhead',
};

type Figure = { value: number; problem?: string };

@customElement('rb-compare-page')
export class RbComparePage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      .choices {
        display: flex;
        flex-wrap: wrap;
        gap: 0.3rem 1rem;
        margin: 0 0 0.6rem;
        font-size: 0.9rem;
      }
      .choices label {
        font-family: var(--rb-mono);
        font-size: 0.84rem;
        white-space: nowrap;
      }
      table.side th[scope='row'] {
        font-family: var(--rb-mono);
        font-size: 0.78rem;
        font-weight: 600;
        color: var(--rb-accent-ink);
        text-align: left;
        white-space: nowrap;
        border-bottom: 1px solid var(--rb-rule);
        padding: 0.3rem 0.6rem;
      }
      table.side thead th {
        text-align: right;
      }
      table.side td.name {
        text-align: right;
        font-size: 0.82rem;
        min-width: 8rem;
        max-width: 12rem;
      }
      table.side tr.cost td {
        font-weight: 600;
      }
      table.side tr.first td,
      table.side tr.first th {
        border-top: 2px solid var(--rb-ink);
      }
      .low {
        font-size: 0.74rem;
        font-weight: 400;
        color: var(--rb-pass);
        margin-left: 0.3rem;
      }
      .st-pass {
        color: var(--rb-pass);
      }
      .st-margin {
        color: var(--rb-margin);
        background: var(--rb-margin-bg);
        padding: 0 0.3rem;
      }
      .st-fail,
      .st-error {
        color: var(--rb-fail);
        background: var(--rb-fail-bg);
        padding: 0 0.3rem;
        font-weight: 600;
      }
      .st-na {
        color: var(--rb-na);
      }
      .problem {
        color: var(--rb-fail);
        font-size: 0.84rem;
      }
      .problem::before {
        content: '✗ ';
        font-weight: 700;
      }
      td.err {
        color: var(--rb-fail);
        font-size: 0.8rem;
        white-space: normal !important;
        max-width: 14rem;
      }
      section.whatif {
        border-left-color: var(--rb-margin);
        background: repeating-linear-gradient(135deg, var(--rb-sheet) 0 14px, var(--rb-margin-bg) 14px 15px);
      }
      .whatif-bar {
        position: sticky;
        top: 0;
        z-index: 3;
        display: flex;
        flex-wrap: wrap;
        gap: 0.6rem;
        align-items: baseline;
        padding: 0.45rem 0.8rem;
        margin: 0 0 1rem;
        border: 2px dashed var(--rb-margin);
        background: var(--rb-margin-bg);
      }
      .whatif-bar strong {
        color: var(--rb-margin);
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
      .wi-grid input,
      .wi-grid select,
      .toolbar select {
        font: inherit;
        font-size: 0.88rem;
        padding: 0.15rem 0.35rem;
        border: 1px solid var(--rb-rule);
        border-bottom: 2px solid var(--rb-ink);
        background: var(--rb-paper);
        min-width: 0;
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
      .tag-whatif {
        font-size: 0.76rem;
        font-variant: small-caps;
        letter-spacing: 0.05em;
        color: var(--rb-margin);
        border: 1px dashed var(--rb-margin);
        padding: 0 0.35rem;
        margin-left: 0.5rem;
        border-radius: 3px;
      }
      tr.sum td {
        border-top: 2px solid var(--rb-ink);
        font-weight: 600;
      }
      tr.rest td {
        color: var(--rb-na);
      }
    `,
  ];

  private readonly books = new BookController(this);
  private scratch: Result<CostingWorkbook> | undefined;
  private scratchBook: Book | undefined;

  @state() private chosen: string[] | undefined;
  @state() private diffA = '';
  @state() private diffB = '';
  @state() private splitRun = 0;
  @state() private whatIf: WhatIf = emptyWhatIf();
  /** Text typed in what-if fields, by field key, while it differs from the figure in use. */
  @state() private wiText = new Map<string, string>();
  @state() private wiProblems: FieldProblems = {};
  @state() private wiQuote = '';
  @state() private wiBreak = 0;
  @state() private keepError = '';

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    this.closeScratch();
  }

  private closeScratch(): void {
    if (this.scratch?.ok) this.scratch.value.close();
    this.scratch = undefined;
    this.scratchBook = undefined;
  }

  override willUpdate(): void {
    const book = this.books.book;
    const service = this.books.service;
    if (!book || !service) return;
    if (book !== this.scratchBook) this.openScratch(book);
    const ids = new Set(book.variants.map((v) => v.id));
    let chosen = (this.chosen ?? []).filter((id) => ids.has(id));
    if (this.chosen === undefined || (chosen.length === 0 && book.variants.length > 0)) {
      chosen = book.variants.slice(0, book.variants.length <= FIRST_FEW + 2 ? book.variants.length : FIRST_FEW).map((v) => v.id);
    }
    if (chosen.length !== this.chosen?.length) this.chosen = chosen;
    if (!ids.has(this.diffA)) this.diffA = chosen[0] ?? book.variants[0]?.id ?? '';
    if (!ids.has(this.diffB)) this.diffB = chosen[1] ?? book.variants[1]?.id ?? this.diffA;
    const runs = this.runSizes(book);
    if (!runs.includes(this.splitRun)) this.splitRun = runs[Math.min(1, runs.length - 1)] ?? 0;
  }

  /** A private workbook of the Book as it is now, with the what-if edits tried on it again. */
  private openScratch(book: Book): void {
    const service = this.books.service!;
    this.closeScratch();
    this.scratch = CostingService.for(service).scratch();
    this.scratchBook = book;
    if (this.scratch.ok) {
      const errors = applyWhatIf(this.scratch.value, this.whatIf);
      if (errors.length > 0) this.keepError = `Some what-if edits no longer fit the Book and were not applied: ${errors.join('; ')}`;
    }
  }

  private runSizes(book: Book): number[] {
    return this.whatIf.runSizes ?? book.settings.runSizes;
  }

  private get family(): FamilyResolution {
    return CostingService.for(this.books.service!).resolution();
  }

  /** A variant's unit cost at a run size from the scratch workbook (a cell for the Book's run sizes). */
  private unitCost(variantId: string, run: number): Figure {
    const wb = this.scratch;
    if (!wb) return { value: NaN, problem: 'costs are not available' };
    if (!wb.ok) return { value: NaN, problem: wb.error };
    if (wb.value.runSizes.includes(run)) {
      const value = wb.value.unitCost(variantId, run);
      const f: Figure = { value };
      if (!Number.isFinite(value)) f.problem = wb.value.problem(variantId, 'unitCost', run) ?? 'cannot be computed';
      return f;
    }
    const bom = this.bom(variantId, run);
    if (!bom.ok) return { value: NaN, problem: bom.error };
    return { value: bom.value.unitCost };
  }

  /** The costed BOM, or why it is incomplete (a cost that leaves lines out is not a cost). */
  private bom(variantId: string, run: number): Result<CostedBom> {
    const wb = this.scratch;
    if (!wb) return { ok: false, error: 'costs are not available' };
    if (!wb.ok) return wb;
    const r = wb.value.costedBom(variantId, run);
    if (r.ok && !r.value.complete) {
      const p = r.value.problems[0]!;
      return { ok: false, error: `${p.designators || p.lineId || ''}: ${p.message}` };
    }
    return r;
  }

  override render() {
    const book = this.books.book;
    if (!book || !this.chosen) return html``;
    const all = this.chosen.map((id) => book.variants.find((v) => v.id === id)).filter((v): v is Variant => v !== undefined);
    const chosen = all.slice(0, MAX_SHOWN);
    if (book.variants.length === 0) return html`<p class="empty">No variants yet; add them on the Family page.</p>`;
    const n = whatIfCount(this.whatIf);
    return html`${n > 0 || this.keepError ? this.renderWhatIfBar(n) : ''}${this.renderChoice(book)}${this.renderSide(book, chosen)}
    ${this.renderWhatIf(book, chosen)}${this.renderSplit(book, chosen)}${this.renderCurves(book, chosen)}${this.renderDifference(book)}`;
  }

  // -------------------------------------------------------------------------------------------------------------
  // Choosing variants and the side-by-side table

  private renderChoice(book: Book): TemplateResult {
    const chosen = new Set(this.chosen);
    const set = (ids: string[]) => (this.chosen = book.variants.filter((v) => ids.includes(v.id)).map((v) => v.id));
    return html`<section class="sheet" aria-labelledby="choose-h">
      <h2 id="choose-h">Variants compared</h2>
      <p class="why">
        ${chosen.size} of ${book.variants.length} variants chosen. Every figure below is for these${chosen.size > MAX_SHOWN
          ? html`; <strong>only the first ${MAX_SHOWN} are drawn</strong>, choose fewer to see the others`
          : ''}.
      </p>
      <div class="choices" role="group" aria-label="Variants compared" data-testid="compare-choices">
        ${book.variants.map(
          (v) => html`<label title=${v.name}
            ><input
              type="checkbox"
              .checked=${live(chosen.has(v.id))}
              @change=${(e: Event) =>
                set((e.target as HTMLInputElement).checked ? [...chosen, v.id] : [...chosen].filter((id) => id !== v.id))}
            />
            ${v.code}</label
          >`,
        )}
      </div>
      <div class="toolbar">
        <button type="button" @click=${() => set(book.variants.map((v) => v.id))}>All</button>
        <button type="button" @click=${() => set(book.variants.slice(0, FIRST_FEW).map((v) => v.id))}>First ${FIRST_FEW}</button>
        <button type="button" @click=${() => set([])}>None</button>
      </div>
    </section>`;
  }

  private renderSide(book: Book, chosen: Variant[]): TemplateResult {
    const service = this.books.service!;
    const costing = CostingService.for(service);
    const base = book.settings.baseCurrency;
    const runs = this.runSizes(book);
    const params = KEY_PARAMS.filter((p) => chosen.some((v) => v.params[p] !== undefined));
    const costs = runs.map((run) => chosen.map((v) => this.unitCost(v.id, run)));
    const margin = this.whatIf.settings.get('marginPct') ?? book.settings.marginPct;
    const tagged = whatIfCount(this.whatIf) > 0;
    return html`<section class="sheet" aria-labelledby="side-h">
      <h2 id="side-h">Side by side ${tagged ? html`<span class="tag-whatif">with what-if</span>` : ''}</h2>
      <p class="why">
        Key parameters, the worst of each variant's checks, and the unit cost (material, labour, test and overhead) in
        ${base} at each run size; ▼ marks the lowest cost of a row.
      </p>
      ${chosen.length === 0
        ? html`<p class="empty">Choose at least one variant above.</p>`
        : html`<div class="scroll">
            <table class="records side" data-testid="compare-table">
              <thead>
                <tr>
                  <th></th>
                  ${chosen.map((v) => html`<th class="num" title=${v.name}>${v.code}</th>`)}
                </tr>
              </thead>
              <tbody>
                <tr>
                  <th scope="row">name</th>
                  ${chosen.map((v) => html`<td class="name">${v.name}</td>`)}
                </tr>
                ${params.map(
                  (p) => html`<tr>
                    <th scope="row">${p}</th>
                    ${chosen.map((v) => html`<td class="num">${paramText(p, v.params[p])}</td>`)}
                  </tr>`,
                )}
                <tr>
                  <th scope="row">worst check</th>
                  ${chosen.map((v) => {
                    const s: CheckStatus = costing.worstStatus(v.id);
                    return html`<td class="num" data-testid="worst-check"><span class="st-${s === 'n/a' ? 'na' : s}">${STATUS_SYMBOL[s]} ${s}</span></td>`;
                  })}
                </tr>
                ${runs.map((run, k) => {
                  const row = costs[k]!;
                  const finite = row.map((f) => f.value).filter((x) => Number.isFinite(x));
                  const low = finite.length > 1 ? Math.min(...finite) : NaN;
                  return html`<tr class="cost ${k === 0 ? 'first' : ''}">
                    <th scope="row">unit cost at ${grouped(run)} (${base})</th>
                    ${row.map((f, i) =>
                      Number.isFinite(f.value)
                        ? html`<td class="num" data-testid="unit-cost" data-variant=${chosen[i]!.code} data-run=${run} data-value=${f.value}>
                            ${money(f.value)}${f.value === low ? html`<span class="low" title="lowest in this row">▼</span>` : ''}
                          </td>`
                        : html`<td class="err" data-testid="unit-cost" data-variant=${chosen[i]!.code} data-run=${run} data-value="">✗ ${f.problem}</td>`,
                    )}
                  </tr>`;
                })}
                ${runs.map(
                  (run, k) => html`<tr>
                    <th scope="row">price at ${grouped(run)} (${margin} % margin)</th>
                    ${costs[k]!.map((f) => html`<td class="num">${Number.isFinite(f.value) ? money(f.value / (1 - margin / 100)) : '—'}</td>`)}
                  </tr>`,
                )}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  // -------------------------------------------------------------------------------------------------------------
  // What-if

  private renderWhatIfBar(n: number): TemplateResult {
    return html`<div class="whatif-bar" role="status" data-testid="whatif-bar">
      ${n > 0
        ? html`<strong>⚑ What-if: ${n} ${n === 1 ? 'edit' : 'edits'} tried, not saved.</strong>
            <span>Every figure on this page shows them; other pages and the Book do not.</span>
            <button type="button" class="primary" @click=${() => this.keep()}>Keep in the Book</button>
            <button type="button" @click=${() => this.discard()}>Discard</button>`
        : ''}
      ${this.keepError ? html`<span class="problem" role="alert">${this.keepError}</span>` : ''}
    </div>`;
  }

  private renderWhatIf(book: Book, chosen: Variant[]): TemplateResult {
    const s = book.settings;
    const base = s.baseCurrency;
    const currencies = [...new Set([...Object.keys(s.rates), ...book.quotes.map((q) => q.currency)])].filter((c) => c !== base).sort();
    const numberField = (key: string, label: string, current: number, applied: number | undefined, hint: string, apply: (n: number) => string | undefined) => {
      const text = this.wiText.get(key) ?? String(applied ?? current);
      const problem = this.wiProblems[key];
      return html`<label for="wi-${key}">${label}</label>
        <input
          id="wi-${key}"
          data-whatif=${key}
          inputmode="decimal"
          class=${applied !== undefined ? 'changed' : ''}
          aria-invalid=${problem ? 'true' : 'false'}
          .value=${live(text)}
          @input=${(e: Event) => this.tryNumber(key, (e.target as HTMLInputElement).value, current, apply)}
        />
        ${problem
          ? html`<span class="problem" role="alert">${problem}</span>`
          : applied !== undefined
            ? html`<span class="was">what-if; the Book has ${current}</span>`
            : html`<span class="hint">${hint}</span>`}`;
    };
    const runsText = this.wiText.get('runs') ?? this.runSizes(book).join(', ');
    return html`<section class="sheet whatif" aria-labelledby="whatif-h">
      <h2 id="whatif-h">What-if</h2>
      <p class="why">
        Try a rate, a cost setting, a quote price or other run sizes: every figure on this page follows at once. Nothing is
        saved until you keep the edits; discard puts the Book's figures back.
      </p>
      <div class="wi-grid" data-testid="whatif">
        <div class="group">exchange rates (${base} for one unit)</div>
        ${currencies.length === 0 ? html`<span></span><span class="hint">Every quote is in ${base}.</span><span></span>` : ''}
        ${currencies.map((c) =>
          numberField(`rate:${c}`, c, s.rates[c] ?? NaN, this.whatIf.rates.get(c), `${base} for one ${c}`, (n) => {
            if (!(n > 0)) return 'a number above 0';
            return this.applyEdit((wb) => wb.setRate(c, n), (w) => w.rates.set(c, n), (w) => w.rates.delete(c), n === s.rates[c]);
          }),
        )}
        <div class="group">cost settings</div>
        ${COST_SETTINGS.map(({ name, label }) =>
          numberField(name, label, s[name], this.whatIf.settings.get(name), name.endsWith('Pct') ? '%' : '', (n) => {
            if (!(n >= 0)) return 'a number, 0 or more';
            if (name === 'marginPct' && n >= 100) return 'below 100';
            return this.applyEdit(
              (wb) => wb.setCostSetting(name, n),
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
          class=${this.whatIf.runSizes ? 'changed' : ''}
          aria-invalid=${this.wiProblems.runs ? 'true' : 'false'}
          .value=${live(runsText)}
          @input=${(e: Event) => this.tryRuns(book, (e.target as HTMLInputElement).value)}
        />
        ${this.wiProblems.runs
          ? html`<span class="problem" role="alert">${this.wiProblems.runs}</span>`
          : this.whatIf.runSizes
            ? html`<span class="was">what-if; the Book has ${s.runSizes.join(', ')}</span>`
            : html`<span class="hint">units per run, separated by commas</span>`}
        <div class="group">a quote price</div>
        ${this.renderQuotePrice(book, chosen)}
      </div>
    </section>`;
  }

  /** Quotes of the parts the chosen variants buy at the split run size, by part. */
  private quotesInUse(book: Book, chosen: Variant[]): Quote[] {
    const parts = new Set<string>();
    for (const v of chosen) {
      const r = this.scratch?.ok ? this.scratch.value.costedBom(v.id, this.splitRun) : undefined;
      if (r?.ok) for (const l of r.value.lines) parts.add(l.partId);
    }
    const mpn = new Map(book.parts.map((p) => [p.id, p.mpn] as const));
    return book.quotes
      .filter((q) => parts.has(q.partId) && q.supersededBy === undefined)
      .sort((a, b) => (mpn.get(a.partId) ?? '').localeCompare(mpn.get(b.partId) ?? '') || a.supplierCode.localeCompare(b.supplierCode));
  }

  private renderQuotePrice(book: Book, chosen: Variant[]): TemplateResult {
    const quotes = this.quotesInUse(book, chosen);
    const mpn = new Map(book.parts.map((p) => [p.id, p.mpn] as const));
    const supplier = new Map(book.suppliers.map((s) => [s.id, s.name] as const));
    const q = quotes.find((x) => x.id === this.wiQuote) ?? quotes[0];
    if (!q) return html`<span></span><span class="hint">No quotes in use by the chosen variants.</span><span></span>`;
    const b = Math.min(this.wiBreak, q.breaks.length - 1);
    const key = `${q.id}#${b}`;
    const held = q.breaks[b]!.price;
    const applied = this.whatIf.prices.get(key);
    const text = this.wiText.get(`price:${key}`) ?? String(applied ?? held);
    const problem = this.wiProblems[`price:${key}`];
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
              ${mpn.get(x.partId) ?? x.partId} · ${supplier.get(x.supplierId) ?? x.supplierId} · ${x.supplierCode}${[...this.whatIf.prices.keys()].some((k) => k.startsWith(`${x.id}#`)) ? ' ⚑' : ''}
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
          this.tryNumber(`price:${key}`, (e.target as HTMLInputElement).value, held, (n) => {
            if (!(n >= 0)) return 'a price, 0 or more';
            return this.applyEdit((wb) => wb.setQuotePrice(q.id, b, n), (w) => w.prices.set(key, n), (w) => w.prices.delete(key), n === held);
          })}
      />
      ${problem
        ? html`<span class="problem" role="alert">${problem}</span>`
        : applied !== undefined
          ? html`<span class="was">what-if; the quote has ${held}</span>`
          : html`<span class="hint">at the break from ${grouped(q.breaks[b]!.qty)}</span>`}`;
  }

  /** Reads a typed number; a bad one is shown beside its field and changes nothing. */
  private tryNumber(key: string, text: string, current: number, apply: (n: number) => string | undefined): void {
    const wiText = new Map(this.wiText);
    wiText.set(key, text);
    this.wiText = wiText;
    const t = text.trim().replace(/\s*%$/, '');
    const n = t === '' ? NaN : Number(t);
    const problems = { ...this.wiProblems };
    delete problems[key];
    const error = Number.isFinite(n) ? apply(n) : `a number, for example ${current}`;
    if (error) problems[key] = error;
    this.wiProblems = problems;
  }

  /**
   * Tries an edit on the scratch workbook (the engine's own setter checks it; a refused edit changes nothing) and
   * records it as what-if, or drops it from the list when the value is the Book's own again.
   */
  private applyEdit(
    edit: (wb: CostingWorkbook) => Result<unknown>,
    set: (w: WhatIf) => void,
    drop: (w: WhatIf) => void,
    same: boolean,
  ): string | undefined {
    const wb = this.scratch;
    if (!wb?.ok) return wb ? wb.error : 'costs are not available';
    const r = edit(wb.value);
    if (!r.ok) return r.error;
    const w: WhatIf = {
      prices: new Map(this.whatIf.prices),
      rates: new Map(this.whatIf.rates),
      settings: new Map(this.whatIf.settings),
      runSizes: this.whatIf.runSizes,
    };
    if (same) drop(w);
    else set(w);
    this.whatIf = w;
    this.keepError = '';
    return undefined;
  }

  private tryRuns(book: Book, text: string): void {
    const wiText = new Map(this.wiText);
    wiText.set('runs', text);
    this.wiText = wiText;
    const problems = { ...this.wiProblems };
    delete problems.runs;
    const r = readRunSizes(text);
    if (!r.ok) problems.runs = r.error;
    else {
      const same = r.value.join(',') === book.settings.runSizes.join(',');
      this.whatIf = { ...this.whatIf, runSizes: same ? undefined : r.value };
    }
    this.wiProblems = problems;
  }

  private async keep(): Promise<void> {
    const service = this.books.service;
    const book = this.books.book;
    if (!service || !book) return;
    const change = keepWhatIf(book, this.whatIf);
    const result = await service.save(change);
    if (!result.ok) {
      this.keepError = `Nothing was kept: ${result.message}`;
      return;
    }
    const n = whatIfCount(this.whatIf);
    this.whatIf = emptyWhatIf();
    this.wiText = new Map();
    this.wiProblems = {};
    this.keepError = '';
    this.dispatchEvent(
      new CustomEvent<NoticeDetail>('rb-notice', {
        detail: { tone: 'done', title: `${n} what-if ${n === 1 ? 'edit' : 'edits'} kept in the Book`, lines: [] },
        bubbles: true,
        composed: true,
      }),
    );
  }

  private discard(): void {
    this.whatIf = emptyWhatIf();
    this.wiText = new Map();
    this.wiProblems = {};
    this.keepError = '';
    this.openScratch(this.books.book!);
  }

  // -------------------------------------------------------------------------------------------------------------
  // Charts

  private renderRunSelect(book: Book, label: string): TemplateResult {
    return html`<label
      >${label}
      <select aria-label=${label} @change=${(e: Event) => (this.splitRun = Number((e.target as HTMLSelectElement).value))}>
        ${this.runSizes(book).map((r) => html`<option value=${r} ?selected=${r === this.splitRun}>${grouped(r)}</option>`)}
      </select></label
    >`;
  }

  private renderSplit(book: Book, chosen: Variant[]): TemplateResult {
    const base = book.settings.baseCurrency;
    const series: BarSeries[] = SPLIT_KEYS.map((k) => ({ key: k, label: SPLIT_LABELS[k] }));
    const rows: BarRow[] = [];
    const problems: string[] = [];
    for (const v of chosen) {
      const bom = this.bom(v.id, this.splitRun);
      if (!bom.ok) {
        problems.push(`${v.code}: ${bom.error}`);
        continue;
      }
      const split = categorySplit(book, bom.value);
      rows.push({ label: v.code, values: SPLIT_KEYS.map((k) => split[k]), total: bom.value.unitCost });
    }
    return html`<section class="sheet" aria-labelledby="split-h">
      <h2 id="split-h">Cost split by category</h2>
      <p class="why">
        Unit cost in ${base} at one run size: purchased material by build-line category, then labour, test and overhead.
        Each part has its own pattern; figures sit on segments wide enough to hold them.
      </p>
      <div class="toolbar">${this.renderRunSelect(book, 'run size')}</div>
      ${problems.map((p) => html`<p class="problem">${p}</p>`)}
      ${rows.length
        ? html`<rb-chart-bars
            data-testid="split-chart"
            .series=${series}
            .rows=${rows}
            .unit=${base}
            .caption=${`Unit cost split by category at a run of ${this.splitRun}`}
          ></rb-chart-bars>`
        : ''}
    </section>`;
  }

  private renderCurves(book: Book, chosen: Variant[]): TemplateResult {
    const base = book.settings.baseCurrency;
    const marks = this.runSizes(book);
    const runs = [...new Set([...curveRunSizes(100, 20_000), ...marks])].sort((a, b) => a - b);
    const series: CurveSeries[] = chosen.map((v) => ({ label: v.code, points: runs.map((x) => ({ x, y: this.unitCost(v.id, x).value })) }));
    return html`<section class="sheet" aria-labelledby="curves-h">
      <h2 id="curves-h">Cost against run size</h2>
      <p class="why">
        Unit cost in ${base} from ${grouped(runs[0]!)} to ${grouped(runs[runs.length - 1]!)} units on a
        logarithmic axis. Steps come from price breaks, minimum orders and packs; dotted guides mark the run sizes compared above.
      </p>
      <rb-chart-curves
        data-testid="curve-chart"
        .series=${series}
        .marks=${marks}
        .yLabel=${`unit cost (${base})`}
        .caption=${'Unit cost against run size'}
      ></rb-chart-curves>
    </section>`;
  }

  // -------------------------------------------------------------------------------------------------------------
  // Differences between two variants

  private renderDifference(book: Book): TemplateResult {
    const base = book.settings.baseCurrency;
    const pick = (label: string, value: string, set: (id: string) => void) => html`<label
      >${label}
      <select aria-label=${label} @change=${(e: Event) => set((e.target as HTMLSelectElement).value)}>
        ${book.variants.map((v) => html`<option value=${v.id} ?selected=${v.id === value}>${v.code}</option>`)}
      </select></label
    >`;
    const va = book.variants.find((v) => v.id === this.diffA);
    const vb = book.variants.find((v) => v.id === this.diffB);
    const a = this.bom(this.diffA, this.splitRun);
    const b = this.bom(this.diffB, this.splitRun);
    let body: TemplateResult;
    if (!va || !vb) body = html`<p class="empty">Choose two variants.</p>`;
    else if (!a.ok || !b.ok) body = html`<p class="problem">${!a.ok ? `${va.code}: ${a.error}` : ''} ${!b.ok ? `${vb.code}: ${b.error}` : ''}</p>`;
    else {
      const d = variantDifference(book, this.family, a.value, b.value);
      const rest: [string, number][] = [
        ['shared lines bought at other quantities or breaks', d.sharedLines],
        ['labour (placements)', d.labour],
        ['test', d.test],
        ['overhead', d.overhead],
      ];
      body = html`<div class="scroll">
        <table class="records" data-testid="difference-table">
          <thead>
            <tr>
              <th>designators</th>
              <th>${va.code}</th>
              <th>${vb.code}</th>
              <th class="num">${va.code} (${base}/unit)</th>
              <th class="num">${vb.code} (${base}/unit)</th>
              <th class="num">effect</th>
            </tr>
          </thead>
          <tbody>
            ${d.lines.length === 0 ? html`<tr><td colspan="6" class="empty">Both variants are built from the same lines.</td></tr>` : ''}
            ${d.lines.map(
              (l) => html`<tr data-line=${l.lineId}>
                <td class="code">${l.designators}</td>
                <td class="code">${l.a || html`<span class="muted">not fitted</span>`}</td>
                <td class="code">${l.b || html`<span class="muted">not fitted</span>`}</td>
                <td class="num">${money(l.costA)}</td>
                <td class="num">${money(l.costB)}</td>
                <td class="num">${signedMoney(l.effect)}</td>
              </tr>`,
            )}
            ${rest.map(
              ([what, v]) => html`<tr class="rest">
                <td colspan="5">${what}</td>
                <td class="num">${signedMoney(v)}</td>
              </tr>`,
            )}
            <tr class="sum">
              <td colspan="5">unit cost ${vb.code} − ${va.code}</td>
              <td class="num" data-testid="difference-total">${signedMoney(d.total)}</td>
            </tr>
          </tbody>
        </table>
      </div>`;
    }
    return html`<section class="sheet" aria-labelledby="diff-h">
      <h2 id="diff-h">What makes two variants differ</h2>
      <p class="why">
        Build lines fitted in one variant and not the other, or with another part or quantity, with their cost per unit at
        a run of ${grouped(this.splitRun)} units. The rows below them
        account for the rest, so the effects add up to the difference in unit cost.
      </p>
      <div class="toolbar">
        ${pick('variant A', this.diffA, (id) => (this.diffA = id))} ${pick('variant B', this.diffB, (id) => (this.diffB = id))}
        ${this.renderRunSelect(book, 'run size ')}
      </div>
      ${body}
    </section>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-compare-page': RbComparePage;
  }
}
