// The planning and order settings of the Book (order number prefix and next number, kitting and assembly days, safety
// days, planning horizon, how stock is valued in a run's costing), edited as part of the settings record.
import { LitElement, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { StockValuation } from '../domain/book.ts';
import { BookController } from './book-context.ts';
import { draftOf, readPlanSettings } from './plan-settings-form.ts';
import type { PlanSettingsDraft } from './plan-settings-form.ts';
import { buyingStyles } from './buying-styles.ts';
import { pageStyles, problemStyles } from './styles.ts';

const VALUATIONS: Record<StockValuation, string> = { lastPaid: 'last price paid', quote: "today's quote" };

@customElement('rb-plan-settings')
export class RbPlanSettings extends LitElement {
  static override styles = [pageStyles, problemStyles, buyingStyles];

  private readonly books = new BookController(this);
  @state() private draft: PlanSettingsDraft | undefined;
  @state() private problems: Partial<Record<keyof PlanSettingsDraft, string>> = {};
  @state() private note: { text: string; bad: boolean } | undefined;

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const d = this.draft ?? draftOf(book.settings);
    const set = (patch: Partial<PlanSettingsDraft>): void => void (this.draft = { ...d, ...patch });
    const input = (k: Exclude<keyof PlanSettingsDraft, 'stockValuation'>, label: string) =>
      html`<label
        >${label}
        <input name=${k} size="8" .value=${d[k]} aria-invalid=${this.problems[k] ? 'true' : 'false'} @input=${(e: Event) => set({ [k]: (e.target as HTMLInputElement).value })} />
        ${this.problems[k] ? html`<span class="problem">${this.problems[k]}</span>` : ''}</label
      >`;
    return html`<section class="sheet" aria-labelledby="plan-settings-h">
      <h2 id="plan-settings-h">Planning and order settings</h2>
      <p class="why">Kept with the Book's costing settings. Stock taken by a run is valued at the rule chosen here.</p>
      ${this.note ? html`<p class=${this.note.bad ? 'problem' : 'notice'} role=${this.note.bad ? 'alert' : 'status'}>${this.note.text}</p>` : ''}
      <form class="fieldrow" novalidate aria-label="Planning settings" @submit=${(e: Event) => this.save(e, d)}>
        ${input('orderPrefix', 'order number prefix')} ${input('nextOrderNumber', 'next order number')} ${input('kittingDays', 'kitting and assembly days')}
        ${input('safetyDays', 'safety days')} ${input('horizonDays', 'horizon (days)')}
        <label
          >stock valued at
          <select name="stockValuation" @change=${(e: Event) => set({ stockValuation: (e.target as HTMLSelectElement).value as StockValuation })}>
            ${(Object.keys(VALUATIONS) as StockValuation[]).map((v) => html`<option value=${v} ?selected=${v === d.stockValuation}>${VALUATIONS[v]}</option>`)}
          </select></label
        >
        <button type="submit" class="primary">Save</button>
      </form>
    </section>`;
  }

  private async save(e: Event, d: PlanSettingsDraft): Promise<void> {
    e.preventDefault();
    const service = this.books.service;
    const book = this.books.book;
    if (!service || !book) return;
    const r = readPlanSettings(d, book.settings);
    if (!r.ok) {
      this.problems = r.problems;
      this.note = { text: 'Nothing saved: correct the fields marked.', bad: true };
      return;
    }
    this.problems = {};
    const saved = await service.save({ settings: r.settings });
    this.note = saved.ok ? { text: 'Saved.', bad: false } : { text: `Nothing saved: ${saved.message}`, bad: true };
    if (saved.ok) this.draft = undefined;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-plan-settings': RbPlanSettings;
  }
}
