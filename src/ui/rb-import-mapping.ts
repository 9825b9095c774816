// The column mapping of a price file, shown for the person to confirm or change: one select per quote field listing
// the file's headers, with where each choice came from (remembered for the supplier, guessed, or chosen here).
import { LitElement, css, html } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import { PRICE_FIELDS } from '../io/price-map.ts';
import type { PriceAnalysis } from '../io/price-validate.ts';
import { pageStyles, ruledControlStyles } from './styles.ts';

export type MappingChangeDetail = { key: string; header: string };

const FIELD_LABELS: Record<string, string> = {
  mpn: 'maker part number',
  supplierCode: 'supplier code',
  description: 'description',
  maker: 'maker',
  qty: 'break quantity',
  price: 'unit price',
  currency: 'currency',
  moq: 'MOQ',
  pack: 'pack quantity',
  leadTime: 'lead time',
  date: 'quote date',
  expires: 'expires',
  priceUnit: 'price per (1, 100, 1000, pack)',
};

/** Words for a mapping key: a quote field, or one column of a wide layout's price breaks. */
export function mappingKeyLabel(key: string): string {
  const known = FIELD_LABELS[key];
  if (known) return known;
  let m = /^qty(\d+)$/.exec(key);
  if (m) return `break ${m[1]} quantity`;
  m = /^price(\d+)$/.exec(key);
  if (m) return `break ${m[1]} price`;
  m = /^price@(\d+)$/.exec(key);
  if (m) return `price from ${m[1]}`;
  return key;
}

/** The keys to offer: every field that applies to the layout, then the break columns found, in break order. */
export function mappingKeys(analysis: PriceAnalysis): string[] {
  const wide = analysis.layout === 'wide';
  const fields = PRICE_FIELDS.filter((f) => !(wide && (f === 'qty' || f === 'price')));
  const breakKeys = Object.keys(analysis.mapping.columns).filter((k) => !(PRICE_FIELDS as readonly string[]).includes(k));
  const order = (k: string): number => {
    const m = /(\d+)$/.exec(k);
    return m ? Number(m[1]) * 2 + (k.startsWith('qty') ? 0 : 1) : 0;
  };
  return [...fields, ...breakKeys.sort((a, b) => order(a) - order(b))];
}

@customElement('rb-import-mapping')
export class RbImportMapping extends LitElement {
  static override styles = [
    pageStyles,
    ruledControlStyles('select'),
    css`
      select {
        max-width: 22rem;
      }
      .from {
        font-size: 0.8rem;
        color: var(--rb-na);
      }
      .from.chosen {
        color: var(--rb-accent-ink);
        font-weight: 600;
      }
      .from.none {
        font-style: italic;
      }
      .confirm {
        display: flex;
        gap: 0.8rem;
        align-items: baseline;
        margin-top: 0.7rem;
      }
      .ok {
        color: var(--rb-pass);
        font-weight: 600;
      }
    `,
  ];

  @property({ attribute: false }) analysis: PriceAnalysis | undefined;
  /** Columns remembered on the supplier (from an earlier import), if any. */
  @property({ attribute: false }) remembered: Record<string, string> | undefined;
  /** Columns the person chose here, if any. */
  @property({ attribute: false }) chosen: Record<string, string> | undefined;
  /** Keys the person set to "not used" here. */
  @property({ attribute: false }) unused: readonly string[] = [];
  @property({ type: Boolean }) confirmed = false;
  /** Confirmed because the file's columns are exactly those remembered for the supplier. */
  @property({ type: Boolean }) matchesRemembered = false;

  override render() {
    const a = this.analysis;
    if (!a) return html``;
    const keys = mappingKeys(a);
    return html`<div class="scroll">
        <table class="records" data-testid="mapping-table">
          <thead>
            <tr>
              <th>quote field</th>
              <th>column in the file</th>
              <th>from</th>
            </tr>
          </thead>
          <tbody>
            ${keys.map((k) => this.renderRow(a, k))}
          </tbody>
        </table>
      </div>
      <p class="muted">
        Layout: <strong>${a.layout === 'wide' ? 'wide — several quantity / price pairs on one row' : 'long — one row per price break'}</strong>.
        A field set to “not used” stays unused until you choose a column for it.
      </p>
      <div class="confirm">
        ${this.confirmed && this.matchesRemembered
          ? html`<span class="ok" data-testid="mapping-confirmed">✓ Same columns as remembered for this supplier: ready to import</span>
              <span class="muted">Change any field above to check the mapping again.</span>`
          : this.confirmed
          ? html`<span class="ok" data-testid="mapping-confirmed">✓ Mapping confirmed</span>`
          : html`<button type="button" class="primary" @click=${this._onConfirm}>Confirm this mapping</button>
              <span class="muted">Check each field reads the right column before importing.</span>`}
      </div>`;
  }

  private renderRow(a: PriceAnalysis, key: string) {
    const header = a.mapping.columns[key] ?? '';
    const from =
      header === ''
        ? this.unused.includes(key)
          ? { cls: 'chosen', text: 'not used, chosen here' }
          : { cls: 'none', text: 'not found' }
        : this.chosen?.[key] === header
          ? { cls: 'chosen', text: 'chosen here' }
          : this.remembered?.[key] === header
            ? { cls: '', text: 'remembered for this supplier' }
            : { cls: '', text: 'guessed from the header' };
    const id = `map-${key.replace(/[^A-Za-z0-9_-]/g, '_')}`;
    return html`<tr data-key=${key}>
      <td><label for=${id}>${mappingKeyLabel(key)}</label></td>
      <td>
        <select id=${id} .value=${live(header)} @change=${(e: Event) => this.change(key, (e.target as HTMLSelectElement).value)}>
          <option value="" ?selected=${header === ''}>— not used —</option>
          ${a.headers.map((h) => (h.trim() === '' ? '' : html`<option value=${h} ?selected=${h === header}>${h}</option>`))}
        </select>
      </td>
      <td><span class="from ${from.cls}">${from.text}</span></td>
    </tr>`;
  }

  private change(key: string, header: string): void {
    this.dispatchEvent(new CustomEvent<MappingChangeDetail>('rb-mapping-change', { detail: { key, header }, bubbles: true, composed: true }));
  }

  private _onConfirm(): void {
    this.dispatchEvent(new CustomEvent('rb-mapping-confirm', { bubbles: true, composed: true }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-import-mapping': RbImportMapping;
  }
  interface HTMLElementEventMap {
    'rb-mapping-change': CustomEvent<MappingChangeDetail>;
    'rb-mapping-confirm': CustomEvent<undefined>;
  }
}
