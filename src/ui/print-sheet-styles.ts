// The look both printable sheets share (the run sheet and the supplier's order document): black on white in a serif,
// tables with ruled rows that keep a row on one page and repeat their header on each.
import { css } from 'lit';

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
`;
