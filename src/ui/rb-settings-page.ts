// Rates page: the Book's costing settings — base currency and exchange rates, the run sizes costed together, labour,
// test, overhead and margin, attrition by part kind, and the costing date — with messages beside each field, saved
// as the settings record in one write.
import { LitElement, css, html, nothing } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book, Settings } from '../domain/book.ts';
import { PART_KINDS } from '../domain/book.ts';
import { BookController } from './book-context.ts';
import { field, fieldId, focusFirstProblem, group, nothingSaved } from './form-fields.ts';
import type { FieldProblems } from './record-forms.ts';
import { COST_SETTINGS, settingsDraft, validateSettings } from './build-costing.ts';
import type { SettingsDraft } from './build-costing.ts';
import type { NoticeDetail } from './rb-book-menu.ts';
import { pageStyles } from './styles.ts';

const SETTING_HINTS: Record<(typeof COST_SETTINGS)[number]['name'], string> = {
  labourRatePerHour: 'cost of one hour of assembly work',
  labourMinutesPerUnit: 'handling, wiring and boxing per finished unit',
  labourMinutesPerPlacement: 'per part placed (a part may count several placements)',
  testCostPerUnit: 'per finished unit',
  overheadPct: 'overhead as a percentage of direct labour cost',
  marginPct: 'gross margin on the price: price = cost / (1 − margin)',
};

@customElement('rb-settings-page')
export class RbSettingsPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      form.record .base {
        font-family: var(--rb-mono);
        font-size: 0.86rem;
      }
      .kinds {
        grid-column: 1 / -1;
        display: grid;
        grid-template-columns: repeat(auto-fill, minmax(13rem, 1fr));
        gap: 0.35rem 1.2rem;
      }
      .kinds p.hint {
        grid-column: 1 / -1;
        margin: 0;
      }
      .kind {
        display: grid;
        grid-template-columns: 6.5rem 4.5rem auto;
        gap: 0 0.4rem;
        align-items: baseline;
      }
      .kind input {
        width: 100%;
        text-align: right;
      }
      .kind .pct {
        font-size: 0.84rem;
        color: var(--rb-na);
      }
      .kind .problem {
        grid-column: 1 / -1;
      }
      .saved {
        color: var(--rb-pass);
        font-size: 0.88rem;
      }
      .saved::before {
        content: '✓ ';
        font-weight: 700;
      }
    `,
  ];

  private readonly books = new BookController(this);
  /** The settings the draft was made from; the save carries their revision. */
  private from: Settings | undefined;
  @state() private draft: SettingsDraft | undefined;
  @state() private problems: FieldProblems = {};
  @state() private dirty = false;
  @state() private saveError = '';
  @state() private conflict = false;
  @state() private savedAt: Date | undefined;

  override willUpdate(): void {
    const book = this.books.book;
    if (!book) return;
    // A clean form follows the Book (another page or tab may change the settings); a form being edited keeps its text.
    if (!this.draft || (!this.dirty && book.settings !== this.from)) this.restart(book);
  }

  private restart(book: Book): void {
    this.from = book.settings;
    this.draft = settingsDraft(book);
    this.problems = {};
    this.dirty = false;
    this.saveError = '';
    this.conflict = false;
  }

  override render() {
    const book = this.books.book;
    const d = this.draft;
    if (!book || !d) return html``;
    const p = this.problems;
    const set = (patch: Partial<SettingsDraft>) => {
      this.draft = { ...this.draft!, ...patch };
      this.dirty = true;
      this.savedAt = undefined;
    };
    const base = d.baseCurrency.trim().toUpperCase();
    const changedBase = base !== book.settings.baseCurrency;
    return html`<section class="sheet" aria-labelledby="rates-h">
      <h2 id="rates-h">Costing settings of this Book</h2>
      <p class="why">
        Every run, the Family and Compare pages and the exports cost with these figures. Money is in the base currency;
        quotes in other currencies are converted at the rates below.
      </p>
      ${this.saveError
        ? html`<p class="notice" role="alert">
            ${this.saveError}
            ${this.conflict ? html`<button type="button" @click=${() => this.reloadAndRestart()}>Start again from the saved settings</button>` : ''}
          </p>`
        : ''}
      <form class="record" novalidate aria-label="Costing settings" @submit=${(e: Event) => this.submit(e)}>
        ${group('currency')}
        ${field({
          name: 'baseCurrency',
          label: 'base currency',
          value: d.baseCurrency,
          problem: p.baseCurrency,
          hint: changedBase ? 'a new base: give every rate again, in the new currency' : 'ISO 4217 code; costs and prices are shown in it',
          onInput: (v) => this.setBase(book, v),
        })}
        ${Object.keys(d.rates).map((c) =>
          c === base
            ? html`<label>${c}</label><span class="base">1 (the base currency)</span><span></span>`
            : field({
                name: `rate:${c}`,
                label: `rate ${c}`,
                value: d.rates[c] ?? '',
                problem: p[`rate:${c}`],
                hint: `${base} for one ${c}${this.usedBy(book, c)}`,
                onInput: (v) => set({ rates: { ...this.draft!.rates, [c]: v } }),
              }),
        )}
        ${field({ name: 'newCurrency', label: 'add a currency', value: d.newCurrency, problem: p.newCurrency, hint: 'code of another currency, e.g. CHF', onInput: (v) => set({ newCurrency: v }) })}
        ${field({ name: 'newRate', label: 'its rate', value: d.newRate, problem: p.newRate, hint: `${base} for one unit of it`, onInput: (v) => set({ newRate: v }) })}
        ${group('runs')}
        ${field({ name: 'runSizes', label: 'run sizes', value: d.runSizes, problem: p.runSizes, hint: 'units per run, costed together, e.g. 500, 2000, 10000', onInput: (v) => set({ runSizes: v }) })}
        ${field({ name: 'costingDate', label: 'costing date', value: d.costingDate, problem: p.costingDate, hint: 'YYYY-MM-DD; quotes expired by then are not used. Blank = today', onInput: (v) => set({ costingDate: v }) })}
        ${group('labour, test, overhead, margin')}
        ${COST_SETTINGS.map(({ name, label, unit }) =>
          field({
            name,
            label: `${label}${unit === 'money' ? ` (${base})` : unit === 'min' ? ' (min)' : ''}`,
            value: d[name],
            problem: p[name],
            hint: SETTING_HINTS[name],
            onInput: (v) => set({ [name]: v }),
          }),
        )}
        ${group('on our orders to suppliers')}
        ${field({ name: 'company', label: 'our firm', value: d.company, problem: p.company, hint: 'the name suppliers see on our orders', onInput: (v) => set({ company: v }) })}
        ${field({ name: 'shipTo', label: 'ship-to address', value: d.shipTo, problem: p.shipTo, multiline: true, hint: 'where suppliers deliver, one line per line of the address', onInput: (v) => set({ shipTo: v }) })}
        ${group('attrition by part kind (%)')}
        <div class="kinds" role="group" aria-label="Attrition by part kind">
          <p class="hint">Extra parts bought for losses, as a percentage of the need. A kind left blank takes the default.</p>
          ${(['default', ...PART_KINDS] as const).map((k) => {
            const name = `attrition:${k}`;
            const id = fieldId(name);
            const problem = p[name];
            return html`<div class="kind">
              <label for=${id}>${k}</label>
              <input
                id=${id}
                name=${name}
                inputmode="decimal"
                autocomplete="off"
                placeholder=${k === 'default' ? '' : (d.attrition['default'] ?? '')}
                .value=${live(d.attrition[k] ?? '')}
                aria-invalid=${problem ? 'true' : 'false'}
                aria-describedby=${problem ? `${id}-problem` : nothing}
                @input=${(e: Event) => set({ attrition: { ...this.draft!.attrition, [k]: (e.target as HTMLInputElement).value } })}
              /><span class="pct">%</span>
              ${problem ? html`<span class="problem" id="${id}-problem" data-problem-for=${name}>${problem}</span>` : ''}
            </div>`;
          })}
        </div>
        <div class="actions">
          <button type="submit" class="primary" ?disabled=${!this.dirty}>Save the settings</button>
          <button type="button" ?disabled=${!this.dirty} @click=${() => this.restart(book)}>Undo my changes</button>
          ${nothingSaved(p)}
          ${this.savedAt ? html`<span class="saved" role="status" data-testid="settings-saved">Saved.</span>` : ''}
        </div>
      </form>
    </section>`;
  }

  private usedBy(book: Book, c: string): TemplateResult | string {
    const suppliers = book.suppliers.filter((s) => s.currency === c).length;
    const quotes = book.quotes.filter((q) => q.currency === c).length;
    if (suppliers + quotes === 0) return ' (not used; clear it to drop the rate)';
    return ` (${suppliers} ${suppliers === 1 ? 'supplier' : 'suppliers'}, ${quotes} ${quotes === 1 ? 'quote' : 'quotes'})`;
  }

  /** A new base currency makes every rate meaningless; they are cleared until the base is the Book's own again. */
  private setBase(book: Book, text: string): void {
    const d = this.draft!;
    const base = text.trim().toUpperCase();
    const original = settingsDraft(book).rates;
    const rates: Record<string, string> = {};
    for (const c of Object.keys(d.rates)) {
      rates[c] = base === book.settings.baseCurrency ? (original[c] ?? '') : c === base ? '1' : '';
    }
    this.draft = { ...d, baseCurrency: text, rates };
    this.dirty = true;
    this.savedAt = undefined;
  }

  private async submit(e: Event): Promise<void> {
    e.preventDefault();
    const service = this.books.service;
    const book = this.books.book;
    if (!service || !book || !this.draft || !this.from) return;
    const v = validateSettings(this.draft, { ...book, settings: this.from });
    if (!v.ok) {
      this.problems = v.problems;
      await focusFirstProblem(this);
      return;
    }
    this.problems = {};
    const result = await service.save({ settings: v.record });
    if (!result.ok) {
      this.saveError = result.message;
      this.conflict = result.conflict;
      return;
    }
    this.restart(service.book);
    this.savedAt = new Date();
    this.dispatchEvent(
      new CustomEvent<NoticeDetail>('rb-notice', { detail: { tone: 'done', title: 'Costing settings saved', lines: [] }, bubbles: true, composed: true }),
    );
  }

  private async reloadAndRestart(): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    await service.reload();
    this.restart(service.book);
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-settings-page': RbSettingsPage;
  }
}
