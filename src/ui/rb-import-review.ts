// Import step 3: the plan reviewed before anything is written — the first quotes read with the part each matched,
// every problem, and the rows without a part, each to create as a new part or to skip.
import { LitElement, css, html } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import { grouped } from '../domain/format.ts';
import type { ImportPlan, UnmatchedDecision } from '../io/price-plan.ts';
import type { PriceAnalysis } from '../io/price-validate.ts';
import { plural } from './import-controller.ts';
import { breaksText, leadText } from './quote-text.ts';
import './rb-import-problems.ts';
import { pageStyles, ruledControlStyles, verdictStyles } from './styles.ts';

const PREVIEW_ROWS = 20;
const UNMATCHED_ROWS = 200;

/** The choice for every unmatched row, by row key, as it stands after a change here. */
export type ImportDecisionsDetail = { decisions: Record<string, UnmatchedDecision> };

/** The warning for quotes whose pack or MOQ the import replaces with the defaults, naming the missing columns. */
export function lostPackOrMoqText(a: PriceAnalysis, count: number): string {
  const missing = [a.mapping.columns['moq'] === undefined ? 'MOQ' : '', a.mapping.columns['pack'] === undefined ? 'pack' : ''].filter(Boolean);
  return `⚠ This file has no ${missing.join(' or ')} column: ${plural(count, 'quote')} it supersedes had a pack or MOQ above 1, and the new ${count === 1 ? 'quote' : 'quotes'} will have pack 1 and the first break as MOQ. Map the column if the file has one under another name, or check those quotes after importing.`;
}

@customElement('rb-import-review')
export class RbImportReview extends LitElement {
  static override styles = [
    pageStyles,
    verdictStyles,
    ruledControlStyles('td select'),
    css`
      td.desc {
        max-width: 22rem;
        overflow-wrap: anywhere;
      }
      td.breaks {
        font-family: var(--rb-mono);
        font-size: 0.8rem;
      }
    `,
  ];

  @property({ attribute: false }) analysis: PriceAnalysis | undefined;
  @property({ attribute: false }) plan: ImportPlan | undefined;
  @property({ attribute: false }) decisions: Record<string, UnmatchedDecision> = {};
  @state() private showAllUnmatched = false;

  override render() {
    const a = this.analysis;
    const plan = this.plan;
    if (!a || !plan) return html``;
    return html`${this.renderPreview(a, plan)}
      <section class="sheet" aria-labelledby="import-problems-h">
        <h2 id="import-problems-h">Problems</h2>
        <p class="why">Every row is checked before anything is written. Each problem names its file line, column and value.</p>
        ${plan.problems.length === 0
          ? html`<p class="good" data-testid="no-problems">✓ No problems: every row can be imported.</p>`
          : html`<rb-import-problems .problems=${plan.problems}></rb-import-problems>`}
      </section>
      ${this.renderUnmatched(plan)}`;
  }

  private renderPreview(a: PriceAnalysis, plan: ImportPlan) {
    const unmatched = new Set(plan.unmatched.map((u) => u.key));
    const rows = a.offers.slice(0, PREVIEW_ROWS);
    return html`<section class="sheet" aria-labelledby="import-preview-h">
      <h2 id="import-preview-h">Preview</h2>
      <p class="why" data-testid="import-counts">
        ${plural(a.dataRows, 'row')} read into ${plural(a.offers.length, 'quote')}${a.rejectedOffers ? html`; <span class="bad">${plural(a.rejectedOffers, 'part')} left out for problems</span>` : ''}.
        ${plan.matchedByMpn + plan.matchedByCode} matched to parts (${plan.matchedByMpn} by maker part number,
        ${plan.matchedByCode} by supplier code), ${plural(plan.unmatched.length, 'unmatched row')}.
        ${a.offers.length > rows.length ? `The first ${rows.length} are shown.` : ''}
      </p>
      ${plan.lostPackOrMoq > 0 ? html`<p class="notice" data-testid="lost-pack-moq">${lostPackOrMoqText(a, plan.lostPackOrMoq)}</p>` : ''}
      ${rows.length === 0
        ? html`<p class="empty">No row could be read into a quote.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="preview-table">
              <thead>
                <tr>
                  <th class="num">line</th>
                  <th>mpn</th>
                  <th>supplier code</th>
                  <th>description</th>
                  <th>price breaks</th>
                  <th>currency</th>
                  <th class="num">moq</th>
                  <th class="num">pack</th>
                  <th class="num">lead time</th>
                  <th>date</th>
                  <th>part</th>
                </tr>
              </thead>
              <tbody>
                ${rows.map(
                  (o) => html`<tr>
                    <td class="num">${o.line}</td>
                    <td class="code">${o.mpn}</td>
                    <td class="code">${o.supplierCode}</td>
                    <td class="desc">${o.description}</td>
                    <td class="breaks">${breaksText(o.breaks)}</td>
                    <td class="code">${o.currency}</td>
                    <td class="num">${o.moq}</td>
                    <td class="num">${o.pack}</td>
                    <td class="num">${leadText(o.leadDays)}</td>
                    <td class="num">${o.date}${o.expires ? ` → ${o.expires}` : ''}</td>
                    <td>${unmatched.has(o.key) ? html`<span class="bad">✗ no part</span>` : html`<span class="good">✓ matched</span>`}</td>
                  </tr>`,
                )}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  private renderUnmatched(plan: ImportPlan) {
    if (plan.unmatched.length === 0) return '';
    const setAll = (d: UnmatchedDecision): void => this.decide(Object.fromEntries(plan.unmatched.map((u) => [u.key, d])));
    const shown = this.showAllUnmatched ? plan.unmatched : plan.unmatched.slice(0, UNMATCHED_ROWS);
    const creating = plan.unmatched.filter((u) => (this.decisions[u.key] ?? 'skip') === 'create').length;
    return html`<section class="sheet" aria-labelledby="import-unmatched-h">
      <h2 id="import-unmatched-h">Rows without a part in the Book</h2>
      <p class="why">
        These rows match no part by maker part number or by an earlier quote’s supplier code. Create each as a new part
        (kind “other”, to complete on the Parts page) or skip it.
      </p>
      <div class="toolbar">
        <button type="button" @click=${() => setAll('create')}>Create all as new parts</button>
        <button type="button" @click=${() => setAll('skip')}>Skip all</button>
        <span class="muted" data-testid="unmatched-choice">${plural(plan.unmatched.length, 'row')}: ${grouped(creating)} to create, ${grouped(plan.unmatched.length - creating)} to skip</span>
      </div>
      <div class="scroll">
        <table class="records" data-testid="unmatched-table">
          <thead>
            <tr>
              <th class="num">line</th>
              <th>mpn</th>
              <th>supplier code</th>
              <th>description</th>
              <th>choice</th>
            </tr>
          </thead>
          <tbody>
            ${shown.map(
              (u) => html`<tr data-key=${u.key}>
                <td class="num">${u.line}</td>
                <td class="code">${u.mpn}</td>
                <td class="code">${u.supplierCode}</td>
                <td class="desc">${u.description}</td>
                <td>
                  <select
                    aria-label="Choice for line ${u.line}"
                    .value=${live(this.decisions[u.key] ?? 'skip')}
                    @change=${(e: Event) => this.decide({ ...this.decisions, [u.key]: (e.target as HTMLSelectElement).value as UnmatchedDecision })}
                  >
                    <option value="skip">skip</option>
                    <option value="create" ?disabled=${!u.mpn}>create as new part</option>
                  </select>
                  ${u.note ? html`<div class="bad">✗ ${u.note}</div>` : ''}
                </td>
              </tr>`,
            )}
          </tbody>
        </table>
      </div>
      ${plan.unmatched.length > shown.length
        ? html`<p class="muted">
            ${shown.length} of ${plan.unmatched.length} shown.
            <button type="button" @click=${() => (this.showAllUnmatched = true)}>Show all ${plan.unmatched.length}</button>
          </p>`
        : ''}
    </section>`;
  }

  private decide(decisions: Record<string, UnmatchedDecision>): void {
    this.dispatchEvent(new CustomEvent<ImportDecisionsDetail>('rb-import-decisions', { detail: { decisions }, bubbles: true, composed: true }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-import-review': RbImportReview;
  }
  interface HTMLElementEventMap {
    'rb-import-decisions': CustomEvent<ImportDecisionsDetail>;
  }
}
