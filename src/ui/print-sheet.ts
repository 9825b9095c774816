// What the printable sheets (the run sheet, the supplier's order document) share: printing one alone, and their look —
// black on white in a serif, tables with ruled rows that keep a row on one page and repeat their header on each.
import { css } from 'lit';
import type { LitElement } from 'lit';

/** The sheets print.css prints: each lives directly in the document body, hidden on screen. */
const PRINTABLES = ['rb-run-sheet', 'rb-order-doc'] as const;
type Printable = (typeof PRINTABLES)[number];

/**
 * Puts the sheet `tag` in the document body, fills it, and opens the print dialogue. Any other sheet left from an
 * earlier print is taken out first, so only this one prints.
 */
export async function printAlone<K extends Printable>(tag: K, fill: (sheet: HTMLElementTagNameMap[K]) => void): Promise<void> {
  for (const other of PRINTABLES) if (other !== tag) document.body.querySelector(`:scope > ${other}`)?.remove();
  let sheet = document.body.querySelector(`:scope > ${tag}`) as HTMLElementTagNameMap[K] | null;
  if (!sheet) {
    sheet = document.createElement(tag);
    document.body.append(sheet);
  }
  fill(sheet);
  await (sheet as LitElement).updateComplete;
  window.print();
}

export const printSheetStyles = css`
  :host {
    display: block;
    color: #000;
    background: #fff;
    font-family: Georgia, 'DejaVu Serif', serif;
    font-size: 9.5pt;
    line-height: 1.3;
    /* Plain letters copy and search better than ligature glyphs. */
    font-variant-ligatures: none;
  }
  table {
    border-collapse: collapse;
    width: 100%;
    font-variant-numeric: tabular-nums;
  }
  th {
    text-align: left;
    font-size: 8pt;
    font-weight: 600;
    border-bottom: 1pt solid #000;
    padding: 2pt 3pt;
    vertical-align: bottom;
  }
  td {
    border-bottom: 0.5pt solid #999;
    padding: 1pt 3pt;
    vertical-align: top;
  }
  thead {
    display: table-header-group;
  }
  tr {
    break-inside: avoid;
  }
  .num {
    text-align: right;
    white-space: nowrap;
  }
  .code {
    font-family: 'DejaVu Sans Mono', monospace;
    font-size: 8pt;
  }
  dt {
    font-variant: small-caps;
    letter-spacing: 0.04em;
    color: #333;
  }
  dd {
    margin: 0;
  }
`;
