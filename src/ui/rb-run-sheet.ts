// The printable run sheet: header (Book, variant, run, dates), the variant's check summary with the mains caution,
// the costed BOM and its totals; or, for the shop floor, the same sheet without a price (what to kit and build). It lives directly in the document body so the print stylesheet (print.css) can
// print it alone; `printRunSheet` fills it and opens the browser's print dialogue.
import { LitElement, css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import type { Book, Run } from '../domain/book.ts';
import { CHECK_STATUS, STATUS_SEVERITY, STATUS_SYMBOL } from '../domain/check-status.ts';
import type { CheckStatus } from '../domain/check-status.ts';
import { formatValue } from '../domain/units.ts';
import { evaluateChecks } from '../engine/family.ts';
import { money } from '../domain/format.ts';
import { costedTotalLabels } from '../io/run-export.ts';
import type { RunCosting } from '../io/run-export.ts';
import { MAINS_CAUTION } from './rb-mains-caution.ts';
import './print.css';
import { printAlone, printSheetStyles } from './print-sheet.ts';

export interface SheetCheck {
  name: string;
  title: string;
  status: CheckStatus;
  value: string;
  limit: string;
  message: string;
}

export interface RunSheetData {
  bookName: string;
  company: string;
  runName: string;
  variantCode: string;
  variantName: string;
  quantity: number;
  dateWanted: string;
  notes: string;
  costing: RunCosting;
  /** Every check of the variant, worst first. */
  checks: SheetCheck[];
  /** When the sheet was made (ISO date). */
  printedOn: string;
  /** False for the shop-floor sheet: parts and quantities to kit, no supplier, price or total. */
  prices: boolean;
}

const STATUS_ORDER: CheckStatus[] = [CHECK_STATUS.fail, CHECK_STATUS.error, CHECK_STATUS.margin, CHECK_STATUS.pass, CHECK_STATUS.na];

/** The variant's check results as the sheet lists them (only this variant is evaluated). */
export function sheetChecks(book: Book, variantId: string): SheetCheck[] {
  const variant = book.variants.find((v) => v.id === variantId);
  if (!variant || book.checks.length === 0) return [];
  const titles = new Map(book.checks.map((c) => [c.id, c.title] as const));
  return evaluateChecks({ ...book, variants: [variant] })
    .map(
      (r): SheetCheck => ({
        name: r.checkName,
        title: titles.get(r.checkId) ?? r.checkName,
        status: r.status,
        value: typeof r.value === 'number' ? formatValue(r.value, r.unit) : r.value === null ? '' : String(r.value),
        limit: r.limit,
        message: r.message,
      }),
    )
    .sort((a, b) => STATUS_SEVERITY[b.status] - STATUS_SEVERITY[a.status] || a.name.localeCompare(b.name));
}

/** Everything the sheet shows for a run, gathered once. */
export function runSheetData(book: Book, run: Run, costing: RunCosting, today: string, prices = true): RunSheetData {
  const variant = book.variants.find((v) => v.id === run.variantId);
  return {
    bookName: book.settings.bookName,
    company: book.settings.company,
    runName: run.name,
    variantCode: variant?.code ?? costing.bom.variant,
    variantName: variant?.name ?? '',
    quantity: run.quantity,
    dateWanted: run.dateWanted,
    notes: run.notes,
    costing,
    checks: sheetChecks(book, run.variantId),
    printedOn: today,
    prices,
  };
}

/** Puts the sheet for `data` in the document and opens the print dialogue. */
export async function printRunSheet(data: RunSheetData): Promise<void> {
  await printAlone('rb-run-sheet', (sheet) => (sheet.data = data));
}

// The one money rule (domain/format.ts): a part's price keeps sub-cent digits, a variant's unit cost and every total
// are to the cent, as on the Compare and Family pages.
const total = (n: number): string => money(n, 'total');
const unitCost = (n: number): string => money(n, 'unitCost');
const partPrice = (n: number): string => money(n, 'partPrice');

/** The rows of a run's totals table, as both the run detail on screen and the printed run sheet show them. */
export function runTotalRows(costing: RunCosting): TemplateResult {
  const bom = costing.bom;
  const labels = costedTotalLabels(bom.currency, costing.marginPct);
  return html`<tr><td>${labels.material}</td><td class="num">${unitCost(bom.material)}</td></tr>
    <tr><td>${labels.labour}</td><td class="num">${unitCost(bom.labour)}</td></tr>
    <tr><td>${labels.test}</td><td class="num">${unitCost(bom.test)}</td></tr>
    <tr><td>${labels.overhead}</td><td class="num">${unitCost(bom.overhead)}</td></tr>
    <tr class="strong"><td>${labels.unitCost}</td><td class="num">${unitCost(bom.unitCost)}</td></tr>
    <tr><td>${labels.price}</td><td class="num">${unitCost(bom.price)}</td></tr>
    <tr><td>${labels.materialRun}</td><td class="num">${total(bom.materialRun)}</td></tr>
    ${bom.landedRun ? html`<tr><td>${labels.landedRun}</td><td class="num">${total(bom.landedRun)}</td></tr>` : ''}
    <tr class="strong"><td>${labels.runTotal}</td><td class="num">${total(bom.runTotal)}</td></tr>
    <tr><td>${labels.leftoverValue}</td><td class="num">${total(bom.leftoverValue)}</td></tr>`;
}

@customElement('rb-run-sheet')
export class RbRunSheet extends LitElement {
  static override styles = [
    printSheetStyles,
    css`
      header {
        display: flex;
        justify-content: space-between;
        align-items: flex-end;
        border-bottom: 2pt solid #000;
        padding-bottom: 3pt;
        margin-bottom: 6pt;
      }
      h1 {
        font-size: 14pt;
        margin: 0;
        font-weight: 600;
      }
      .book {
        text-align: right;
        font-size: 9pt;
      }
      dl.facts {
        display: grid;
        grid-template-columns: repeat(3, max-content 1fr);
        gap: 1pt 8pt;
        margin: 0 0 8pt;
      }
      dd {
        font-weight: 600;
      }
      .caution {
        border: 1pt solid #000;
        border-left-width: 4pt;
        padding: 4pt 7pt;
        margin: 0 0 9pt;
      }
      h2 {
        font-size: 11pt;
        font-variant: small-caps;
        letter-spacing: 0.05em;
        margin: 10pt 0 3pt;
        border-bottom: 0.75pt solid #000;
        break-after: avoid;
      }
      .code {
        white-space: nowrap;
      }
      /* A part is its number followed by its description in small type, in the widest column, and a supplier keeps
         its name on one line with the code under it: a line of the BOM takes two lines of the sheet, not four. */
      table.bom {
        table-layout: fixed;
      }
      table.bom td {
        line-height: 1.2;
        overflow-wrap: anywhere;
      }
      .desc {
        font-size: 7.5pt;
        color: #222;
      }
      td.supplier {
        font-size: 7pt;
        white-space: nowrap;
        overflow: hidden;
        text-overflow: ellipsis;
      }
      table.bom th {
        font-size: 7.5pt;
      }
      table.bom td.num {
        font-size: 8.5pt;
      }
      .sub {
        display: block;
        font-size: 7pt;
        color: #333;
      }
      td.refs {
        max-width: 6em;
        font-size: 8.5pt;
      }
      td.tick {
        width: 2.2em;
        border-left: 0.5pt solid #999;
      }
      .summary {
        margin: 0 0 3pt;
      }
      table.totals {
        width: auto;
        margin-left: auto;
        break-inside: avoid;
      }
      table.totals td:first-child {
        padding-right: 16pt;
      }
      table.totals tr.strong td {
        font-weight: 700;
        border-top: 1pt solid #000;
      }
      .problem {
        font-weight: 700;
      }
      .sign {
        display: grid;
        grid-template-columns: repeat(3, 1fr);
        gap: 12pt;
        margin-top: 18pt;
        break-inside: avoid;
      }
      .sign div {
        border-top: 0.75pt solid #000;
        padding-top: 2pt;
        font-size: 8pt;
      }
    `,
  ];

  @property({ attribute: false }) data: RunSheetData | undefined;

  override render() {
    const d = this.data;
    if (!d) return html``;
    const bom = d.costing.bom;
    const frozen = d.costing.frozen;
    const counts = STATUS_ORDER.map((s) => [s, d.checks.filter((x) => x.status === s).length] as const).filter(([, n]) => n > 0);
    const notable = d.checks.filter((x) => x.status !== CHECK_STATUS.pass && x.status !== CHECK_STATUS.na);
    return html`<article aria-label=${d.prices ? 'Run sheet' : 'Shop-floor sheet'}>
      <header>
        <div>
          <h1>${d.prices ? 'Run sheet' : 'Shop-floor sheet'} · ${d.runName}</h1>
          <div>${d.variantCode} — ${d.variantName}</div>
        </div>
        <div class="book">${d.bookName}${d.company ? html`<br />${d.company}` : ''}</div>
      </header>
      <dl class="facts">
        <dt>variant</dt>
        <dd>${d.variantCode}</dd>
        <dt>quantity</dt>
        <dd>${d.quantity} units</dd>
        <dt>date wanted</dt>
        <dd>${d.dateWanted}</dd>
        ${d.prices
          ? html`<dt>costed from</dt>
              <dd>quotes valid on ${bom.date}</dd>
              <dt>costing</dt>
              <dd>${frozen ? `frozen ${frozen.at.slice(0, 10)}` : 'live (not frozen)'}</dd>`
          : html`<dt>lines</dt>
              <dd>${bom.lines.length} parts</dd>
              <dt>pieces per unit</dt>
              <dd>${bom.lines.reduce((n, l) => n + l.qtyPerUnit, 0)}</dd>`}
        <dt>printed</dt>
        <dd>${d.printedOn}</dd>
      </dl>
      <p class="caution" role="note"><strong>⚠ Mains caution.</strong> ${MAINS_CAUTION}</p>

      <h2>Checks for ${d.variantCode}</h2>
      ${d.checks.length === 0
        ? html`<p class="summary">No checks in this Book.</p>`
        : html`<p class="summary">
              ${counts.map(([s, n], i) => html`${i ? ' · ' : ''}${STATUS_SYMBOL[s]} ${n} ${s}`)}
              ${notable.length === 0 ? ' — every check that applies passes.' : ''}
            </p>
            ${notable.length
              ? html`<table>
                  <thead>
                    <tr><th>status</th><th>check</th><th class="num">value</th><th>limit</th><th>note</th></tr>
                  </thead>
                  <tbody>
                    ${notable.map(
                      (x) => html`<tr>
                        <td class="problem">${STATUS_SYMBOL[x.status]} ${x.status}</td>
                        <td>${x.title}</td>
                        <td class="num">${x.value}</td>
                        <td>${x.limit}</td>
                        <td>${x.message}</td>
                      </tr>`,
                    )}
                  </tbody>
                </table>`
              : ''}`}

      <h2>${d.prices ? 'Bill of materials' : 'Parts to kit'} for ${d.quantity} units</h2>
      ${d.prices ? this.renderPriced(d) : this.renderShopFloor(d)}
      ${d.notes ? html`<h2>Notes</h2><p>${d.notes}</p>` : ''}
      <div class="sign"><div>kitted by / date</div><div>built by / date</div><div>tested by / date</div></div>
    </article>`;
  }

  /** The costed BOM: what each line buys, from whom, at what price, and the run's totals. */
  private renderPriced(d: RunSheetData): TemplateResult {
    const bom = d.costing.bom;
    return html`<table class="bom" data-testid="sheet-bom">
        <colgroup>
          <col style="width: 10%" />
          <col style="width: 30%" />
          <col style="width: 5.5%" />
          <col style="width: 6.5%" />
          <col style="width: 6.5%" />
          <col style="width: 20%" />
          <col style="width: 11%" />
          <col style="width: 10.5%" />
        </colgroup>
        <thead>
          <tr>
            <th>designators</th>
            <th>part</th>
            <th class="num">per unit</th>
            <th class="num">need</th>
            <th class="num">buy</th>
            <th>supplier · code</th>
            <th class="num">unit price</th>
            <th class="num">extended ${bom.currency}</th>
          </tr>
        </thead>
        <tbody>
          ${bom.lines.map(
            (l) => html`<tr>
              <td class="refs">${l.designators}</td>
              <td class="part"><span class="code">${l.mpn}</span> <span class="desc">${l.description}</span></td>
              <td class="num">${l.qtyPerUnit}</td>
              <td class="num">${l.need}</td>
              <td class="num">${l.buy}</td>
              <td class="supplier">${l.supplier}<span class="sub code">${l.supplierCode}</span></td>
              <td class="num">${partPrice(l.unitPrice)} ${l.currency}</td>
              <td class="num">${total(l.extendedBase)}</td>
            </tr>`,
          )}
          ${bom.problems.map(
            (p) => html`<tr>
              <td>${p.designators ?? ''}</td>
              <td colspan="7" class="problem">NOT PRICED: ${p.message}</td>
            </tr>`,
          )}
        </tbody>
      </table>

      <h2>Totals</h2>
      <table class="totals" data-testid="sheet-totals">
        <tbody>
          ${runTotalRows(d.costing)}
        </tbody>
      </table>
      ${bom.complete ? '' : html`<p class="problem">Incomplete: the lines marked NOT PRICED are missing from every total.</p>`}`;
  }

  /** For the shop floor: each part, where it goes and how many to kit, with a box to tick; no supplier or price. */
  private renderShopFloor(d: RunSheetData): TemplateResult {
    const bom = d.costing.bom;
    return html`<table class="bom" data-testid="sheet-kit">
        <colgroup>
          <col style="width: 12%" />
          <col style="width: 58%" />
          <col style="width: 9%" />
          <col style="width: 11%" />
          <col style="width: 10%" />
        </colgroup>
        <thead>
          <tr>
            <th>designators</th>
            <th>part</th>
            <th class="num">per unit</th>
            <th class="num">to kit</th>
            <th>kitted</th>
          </tr>
        </thead>
        <tbody>
          ${bom.lines.map(
            (l) => html`<tr>
              <td class="refs">${l.designators}</td>
              <td class="part"><span class="code">${l.mpn}</span> <span class="desc">${l.description}</span></td>
              <td class="num">${l.qtyPerUnit}</td>
              <td class="num">${l.need}</td>
              <td class="tick"></td>
            </tr>`,
          )}
          ${bom.problems.map(
            (p) => html`<tr>
              <td>${p.designators ?? ''}</td>
              <td colspan="4" class="problem">NOT ON THIS SHEET: ${p.message}</td>
            </tr>`,
          )}
        </tbody>
      </table>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-run-sheet': RbRunSheet;
  }
}
