// The CSV choices every CSV download offers (delimiter, decimal, byte-order mark): one form used by the Export page,
// a run's page and the Orders page, so the choices read and refuse the same everywhere. A clash is named beside the
// field; the element emits `rb-csv-choices` with the new choices on every change.
import { LitElement, css, html } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import { DEFAULT_EXPORT_OPTIONS, exportOptionsProblem } from '../io/csv-write.ts';
import { ruledControlStyles } from './styles.ts';
import type { DecimalStyle, DelimiterName, ExportOptions } from '../io/csv-write.ts';

const DELIMITER_WORDS: Record<DelimiterName, string> = { comma: 'comma ,', semicolon: 'semicolon ;', tab: 'tab' };
const DECIMAL_WORDS: Record<DecimalStyle, string> = { point: 'point 1.25', comma: 'comma 1,25' };

/** A grid of labelled choices: label, field, hint or problem per row (the Export page's source uses it too). */
export const choiceStyles = css`
  .choices {
    display: grid;
    grid-template-columns: max-content minmax(12rem, 24rem) minmax(10rem, 1fr);
    gap: 0.4rem 0.8rem;
    align-items: baseline;
  }
  .choices label.k {
    font-family: var(--rb-mono);
    font-size: 0.8rem;
    color: var(--rb-accent-ink);
    text-align: right;
  }
  ${ruledControlStyles(".choices select, .choices input[type='text']", { form: true, ink: false })}
  .choices .hint {
    font-size: 0.8rem;
    color: var(--rb-na);
  }
  .choices .problem {
    font-size: 0.84rem;
    color: var(--rb-fail);
  }
  .choices .problem::before {
    content: '✗ ';
    font-weight: 700;
  }
`;

@customElement('rb-csv-choices')
export class RbCsvChoices extends LitElement {
  static override styles = [
    choiceStyles,
    css`
      :host {
        display: block;
      }
    `,
  ];

  @property({ attribute: false }) options: ExportOptions = { ...DEFAULT_EXPORT_OPTIONS };

  override render() {
    const o = this.options;
    const clash = exportOptionsProblem(o);
    return html`<div class="choices">
      <label class="k" for="x-delimiter">delimiter</label>
      <select id="x-delimiter" @change=${(e: Event) => this._set({ delimiter: (e.target as HTMLSelectElement).value as DelimiterName })}>
        ${(Object.keys(DELIMITER_WORDS) as DelimiterName[]).map((d) => html`<option value=${d} ?selected=${o.delimiter === d}>${DELIMITER_WORDS[d]}</option>`)}
      </select>
      <span class="hint">between the fields of a row</span>
      <label class="k" for="x-decimal">decimal</label>
      <select id="x-decimal" aria-invalid=${clash ? 'true' : 'false'} @change=${(e: Event) => this._set({ decimal: (e.target as HTMLSelectElement).value as DecimalStyle })}>
        ${(Object.keys(DECIMAL_WORDS) as DecimalStyle[]).map((d) => html`<option value=${d} ?selected=${o.decimal === d}>${DECIMAL_WORDS[d]}</option>`)}
      </select>
      ${clash ? html`<span class="problem" role="alert">${clash}</span>` : html`<span class="hint">as your spreadsheet program reads numbers</span>`}
      <label class="k" for="x-bom">byte-order mark</label>
      <span><input id="x-bom" type="checkbox" .checked=${o.bom} @change=${(e: Event) => this._set({ bom: (e.target as HTMLInputElement).checked })} /></span>
      <span class="hint">UTF-8 with a byte-order mark, for programs that otherwise misread accents and symbols such as Ω</span>
    </div>`;
  }

  private _set(patch: Partial<ExportOptions>): void {
    this.options = { ...this.options, ...patch };
    this.dispatchEvent(new CustomEvent<ExportOptions>('rb-csv-choices', { detail: this.options, bubbles: true, composed: true }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-csv-choices': RbCsvChoices;
  }
}
