// Import step 2: what the price file looks like as read (encoding, delimiter, decimal mark, price unit, date order),
// each with a choice to override it, and any warning or note from the reading.
import { LitElement, css, html } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { EncodingChoice } from '../io/price-decode.ts';
import type { Decimal, DateOrder, PriceUnit } from '../io/price-map.ts';
import { DELIMITER_NAMES } from '../io/price-read.ts';
import type { Delimiter } from '../io/price-read.ts';
import type { PriceAnalysis } from '../io/price-validate.ts';
import type { ImportOverrides } from './import-controller.ts';
import { pageStyles, ruledControlStyles, warnStyles } from './styles.ts';

/** Overrides changed here, to merge into those that stand; the file is read again with them. */
export type ImportOverridesDetail = { patch: ImportOverrides };

const UNIT_WORDS: Record<PriceUnit, string> = { unit: 'per unit', per100: 'per 100', per1000: 'per 1000', pack: 'per pack' };

@customElement('rb-import-format')
export class RbImportFormat extends LitElement {
  static override styles = [
    pageStyles,
    warnStyles,
    ruledControlStyles('.overrides select'),
    css`
      dl.found {
        display: grid;
        grid-template-columns: max-content minmax(16rem, max-content) max-content;
        justify-content: start;
        gap: 0.3rem 1rem;
        margin: 0;
        align-items: baseline;
      }
      dl.found dt {
        font-family: var(--rb-mono);
        font-size: 0.8rem;
        color: var(--rb-accent-ink);
      }
      dl.found dd {
        margin: 0;
      }
      ul.notes {
        margin: 0.4rem 0 0;
        padding-left: 1.1rem;
        font-size: 0.88rem;
        color: var(--rb-na);
      }
    `,
  ];

  @property({ attribute: false }) analysis: PriceAnalysis | undefined;
  @property({ attribute: false }) overrides: ImportOverrides = {};

  override render() {
    const a = this.analysis;
    if (!a) return html``;
    const o = this.overrides;
    return html`<section class="sheet" aria-labelledby="import-format-h">
      <h2 id="import-format-h">What the file looks like</h2>
      <p class="why">Found by reading the file. Override any line that is wrong and the file is read again.</p>
      <dl class="found overrides" data-testid="file-format">
        <dt>encoding</dt>
        <dd data-testid="found-encoding">${a.encoding ?? 'unknown'}</dd>
        <dd>
          ${this.renderSelect<EncodingChoice>(
            'ov-encoding',
            o.encoding,
            [['utf-8', 'UTF-8'], ['windows-1252', 'Windows-1252']] as const,
            (v) => this.emitOverride({ encoding: v }),
          )}
        </dd>
        <dt>delimiter</dt>
        <dd data-testid="found-delimiter">${a.delimiterName ?? 'unknown'}${a.headerLine > 1 ? `; header on line ${a.headerLine}` : ''}</dd>
        <dd>
          ${this.renderSelect<Delimiter>(
            'ov-delimiter',
            o.delimiter,
            (Object.keys(DELIMITER_NAMES) as Delimiter[]).map((d) => [d, DELIMITER_NAMES[d]] as const),
            (v) => this.emitOverride({ delimiter: v }),
          )}
        </dd>
        <dt>decimal</dt>
        <dd data-testid="found-decimal">${a.decimalReason || (a.decimal === ',' ? 'decimal comma' : 'decimal point')}</dd>
        <dd>
          ${this.renderSelect<Decimal>('ov-decimal', o.decimal, [['.', 'decimal point'], [',', 'decimal comma']] as const, (v) => this.emitOverride({ decimal: v }))}
        </dd>
        <dt>prices</dt>
        <dd data-testid="found-price-unit">${UNIT_WORDS[a.mapping.priceUnit ?? 'unit']}</dd>
        <dd>
          ${this.renderSelect<PriceUnit>(
            'ov-price-unit',
            o.priceUnit,
            (Object.keys(UNIT_WORDS) as PriceUnit[]).map((u) => [u, UNIT_WORDS[u]] as const),
            (v) => this.emitOverride({ priceUnit: v }),
          )}
        </dd>
        <dt>dates</dt>
        <dd>${a.dateOrder === 'dmy' ? 'day before month (31/12/2026)' : 'month before day (12/31/2026)'} where written with slashes</dd>
        <dd>
          ${this.renderSelect<DateOrder>('ov-date-order', o.dateOrder, [['dmy', 'day first'], ['mdy', 'month first']] as const, (v) =>
            this.emitOverride({ dateOrder: v }),
          )}
        </dd>
      </dl>
      ${a.encodingWarning ? html`<p class="warn" role="status" data-testid="encoding-warning">⚠ ${a.encodingWarning}</p>` : ''}
      ${a.notes.length ? html`<ul class="notes">${a.notes.map((n) => html`<li>${n}</li>`)}</ul>` : ''}
    </section>`;
  }

  /** A choice of "as found" or one of the given values. */
  private renderSelect<T extends string>(id: string, value: T | undefined, choices: readonly (readonly [T, string])[], onChange: (v: T | undefined) => void) {
    return html`<select
      id=${id}
      .value=${live(value ?? '')}
      @change=${(e: Event) => {
        const v = (e.target as HTMLSelectElement).value;
        onChange(v === '' ? undefined : (v as T));
      }}
    >
      <option value="" ?selected=${value === undefined}>as found</option>
      ${choices.map(([v, label]) => html`<option value=${v} ?selected=${v === value}>${label}</option>`)}
    </select>`;
  }

  private emitOverride(patch: ImportOverrides): void {
    this.dispatchEvent(new CustomEvent<ImportOverridesDetail>('rb-import-overrides', { detail: { patch }, bubbles: true, composed: true }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-import-format': RbImportFormat;
  }
  interface HTMLElementEventMap {
    'rb-import-overrides': CustomEvent<ImportOverridesDetail>;
  }
}
