// The supplier's order document as a page: shown on the Orders, Runs and Plan pages as the supplier will read it, and
// printed alone (print.css) when `printOrderDoc` puts a copy directly in the document body. The labels, columns and
// figures are the CSV's own (io/order-doc-export.ts), so the page and the file say the same.
import { LitElement, css, html } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import type { OrderDocument } from '../domain/order-doc.ts';
import { exportBytes, numberText } from '../io/csv-write.ts';
import { DRAFT_NUMBER, ORDER_DOC_COLUMNS, orderDocCsv, orderDocFileName, orderDocHead, orderTotalLabel } from '../io/order-doc-export.ts';
import type { ExportOptions } from '../io/csv-write.ts';
import { downloadFile } from './rb-export-page.ts';
import './print.css';
import { printAlone, printSheetStyles } from './print-sheet.ts';

/** Downloads the document's CSV; returns why no file was made, or undefined. */
export function downloadOrderDoc(doc: OrderDocument, options?: ExportOptions): string | undefined {
  const text = orderDocCsv(doc, options);
  if (!text.ok) return text.error;
  downloadFile(exportBytes(text.value), orderDocFileName(doc), 'text/csv;charset=utf-8');
  return undefined;
}

/** Puts the document alone in the document body (print.css prints only it) and opens the print dialogue. */
export async function printOrderDoc(doc: OrderDocument): Promise<void> {
  await printAlone('rb-order-doc', (sheet) => (sheet.doc = doc));
}

const money = (n: number): string => numberText({ n, kind: 'money' });
const price = (n: number): string => numberText({ n, kind: 'price' });
const qty = (n: number): string => numberText({ n, kind: 'qty' });
const NUMERIC = new Set<string>(['line', 'quantity', 'unit_price', 'line_total']);

@customElement('rb-order-doc')
export class RbOrderDoc extends LitElement {
  static override styles = [
    printSheetStyles,
    css`
      :host {
        padding: 0.6rem;
      }
      h1 {
        font-size: 14pt;
        margin: 0 0 6pt;
        border-bottom: 2pt solid #000;
        padding-bottom: 3pt;
        font-weight: 600;
      }
      dl {
        display: grid;
        grid-template-columns: max-content 1fr;
        gap: 2pt 10pt;
        margin: 0 0 8pt;
      }
      dd {
        white-space: pre-line;
      }
      table.totals {
        width: auto;
        margin: 6pt 0 0 auto;
      }
      table.totals td {
        font-weight: 700;
        border-top: 1pt solid #000;
        border-bottom: none;
        padding-left: 16pt;
      }
    `,
  ];

  @property({ attribute: false }) doc: OrderDocument | undefined;

  override render() {
    const doc = this.doc;
    if (!doc) return html``;
    const head = orderDocHead(doc);
    return html`<article data-testid="order-doc-page">
      <h1>Purchase order ${doc.number ?? `(${DRAFT_NUMBER})`}</h1>
      <dl>
        ${head.slice(1).map(([k, v]) => html`<dt>${k}</dt><dd>${v}</dd>`)}
      </dl>
      <table>
        <thead>
          <tr>
            ${ORDER_DOC_COLUMNS.map((c) => html`<th class=${NUMERIC.has(c) ? 'num' : ''}>${c.replace(/_/g, ' ')}</th>`)}
          </tr>
        </thead>
        <tbody>
          ${doc.lines.map(
            (l) => html`<tr>
              <td class="num">${l.line}</td>
              <td class="code">${l.supplierCode}</td>
              <td class="code">${l.mpn}</td>
              <td>${l.maker}</td>
              <td>${l.description}</td>
              <td class="num">${qty(l.quantity)}</td>
              <td class="num">${price(l.unitPrice)}</td>
              <td class="code">${l.currency}</td>
              <td class="num">${money(l.lineTotal)}</td>
              <td class="code">${l.deliveryTerm}</td>
              <td>${l.quoteRef}</td>
            </tr>`,
          )}
        </tbody>
      </table>
      <table class="totals">
        ${doc.totals.map((t) => html`<tr><td>${orderTotalLabel(t.currency)}</td><td class="num">${money(t.total)}</td></tr>`)}
      </table>
    </article>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-order-doc': RbOrderDoc;
  }
}
