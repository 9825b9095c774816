// Stacked horizontal bars drawn as our own SVG: one bar per row (a variant), one segment per series (a cost
// category). Each series has a pattern as well as a tone, segments wide enough carry their figure, and the legend
// and a table of the same figures make the chart readable without colour.
import { LitElement, css, html, svg } from 'lit';
import type { SVGTemplateResult, TemplateResult } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import { fixed } from '../domain/format.ts';
import { chartStyles, niceStep } from './chart-parts.ts';

export interface BarSeries {
  key: string;
  label: string;
}

export interface BarRow {
  label: string;
  /** One value per series, in series order; negatives are drawn as zero. */
  values: number[];
  /** Shown at the end of the bar (normally the sum). */
  total: number;
}

/** Tones and fills per series index; the fill is a pattern so neighbours differ in more than colour. */
const TONES = ['#1f6f5c', '#8a5a00', '#3d5a80', '#7a3e65', '#5d625f', '#a1261b', '#2e7d32', '#6d4c41', '#455a64'];
const FILLS = ['solid', 'hatch', 'dots', 'cross', 'hlines', 'vlines', 'back', 'grid', 'zigzag'] as const;

let instance = 0;

function patternDef(id: string, i: number): SVGTemplateResult {
  const tone = TONES[i % TONES.length]!;
  const kind = FILLS[i % FILLS.length]!;
  const bg = svg`<rect width="8" height="8" fill=${tone} fill-opacity="0.28"></rect>`;
  const line = (d: string) => svg`<path d=${d} stroke=${tone} stroke-width="1.6" fill="none"></path>`;
  let body: SVGTemplateResult;
  switch (kind) {
    case 'solid':
      body = svg`<rect width="8" height="8" fill=${tone} fill-opacity="0.85"></rect>`;
      break;
    case 'hatch':
      body = svg`${bg}${line('M-2,2 L2,-2 M0,8 L8,0 M6,10 L10,6')}`;
      break;
    case 'back':
      body = svg`${bg}${line('M-2,6 L2,10 M0,0 L8,8 M6,-2 L10,2')}`;
      break;
    case 'dots':
      body = svg`${bg}<circle cx="4" cy="4" r="1.7" fill=${tone}></circle>`;
      break;
    case 'cross':
      body = svg`${bg}${line('M0,0 L8,8 M8,0 L0,8')}`;
      break;
    case 'hlines':
      body = svg`${bg}${line('M0,4 L8,4')}`;
      break;
    case 'vlines':
      body = svg`${bg}${line('M4,0 L4,8')}`;
      break;
    case 'grid':
      body = svg`${bg}${line('M0,4 L8,4 M4,0 L4,8')}`;
      break;
    default:
      body = svg`${bg}${line('M0,6 L2,2 L4,6 L6,2 L8,6')}`;
  }
  return svg`<pattern id=${id} width="8" height="8" patternUnits="userSpaceOnUse">${body}</pattern>`;
}

@customElement('rb-chart-bars')
export class RbChartBars extends LitElement {
  static override styles = [
    chartStyles,
    css`
      text.seg {
        font-family: var(--rb-mono);
        font-size: 10px;
        paint-order: stroke;
        stroke: var(--rb-sheet);
        stroke-width: 3px;
      }
      line.tick {
        stroke: var(--rb-rule);
      }
      ul.legend {
        list-style: none;
        display: flex;
        flex-wrap: wrap;
        gap: 0.3rem 1rem;
        padding: 0;
        margin: 0.4rem 0 0;
        font-size: 0.84rem;
      }
      ul.legend svg {
        width: 1.1rem;
        height: 0.8rem;
        vertical-align: -0.1rem;
        margin-right: 0.3rem;
        border: 1px solid var(--rb-ink);
      }
      details {
        margin-top: 0.5rem;
        font-size: 0.84rem;
      }
      table {
        border-collapse: collapse;
        font-variant-numeric: tabular-nums;
      }
      th,
      td {
        padding: 0.15rem 0.5rem;
        border-bottom: 1px solid var(--rb-rule);
        text-align: right;
      }
      th:first-child,
      td:first-child {
        text-align: left;
      }
      th {
        font-family: var(--rb-mono);
        font-size: 0.76rem;
        color: var(--rb-accent-ink);
      }
    `,
  ];

  @property({ attribute: false }) series: BarSeries[] = [];
  @property({ attribute: false }) rows: BarRow[] = [];
  /** Unit of the values (a currency code), named on the axis. */
  @property() unit = '';
  /** What the chart shows, for its accessible name. */
  @property() caption = '';
  /** Decimals of the figures. */
  @property({ type: Number }) digits = 2;

  private readonly uid = `bars${++instance}`;

  private fmt(n: number): string {
    return fixed(n, this.digits);
  }

  override render(): TemplateResult {
    const labelW = 120;
    const totalW = 90;
    const width = 760;
    const plotW = width - labelW - totalW;
    const rowH = 34;
    const top = 22;
    const height = top + this.rows.length * rowH + 8;
    const max = Math.max(0, ...this.rows.map((r) => r.values.reduce((s, v) => s + Math.max(0, v), 0)));
    const step = niceStep(max);
    const axisMax = max > 0 ? Math.ceil(max / step) * step : 1;
    const x = (v: number): number => (v / axisMax) * plotW;
    const ticks: number[] = [];
    for (let t = 0; t <= axisMax + step / 2; t += step) ticks.push(t);
    const pid = (i: number): string => `${this.uid}-p${i}`;
    return html`<svg viewBox="0 0 ${width} ${height}" role="img" aria-label=${this.caption}>
        <defs>${this.series.map((_, i) => patternDef(pid(i), i))}</defs>
        ${ticks.map(
          (t) => svg`<line class="tick" x1=${labelW + x(t)} x2=${labelW + x(t)} y1=${top - 4} y2=${height - 6}></line>
            <text class="num" x=${labelW + x(t)} y=${top - 8} text-anchor="middle">${this.fmt(t)}</text>`,
        )}
        <text x=${labelW - 26} y=${top - 8} text-anchor="end">${this.unit} per unit</text>
        ${this.rows.map((r, ri) => {
          const y = top + ri * rowH + 5;
          const h = rowH - 12;
          let at = 0;
          const segs = r.values.map((v, i) => {
            const w = x(Math.max(0, v));
            const s = this.series[i];
            const seg = svg`<g data-series=${s?.key ?? ''}>
              <rect x=${labelW + at} y=${y} width=${w} height=${h} fill="url(#${pid(i)})" stroke="var(--rb-ink)" stroke-width="0.6">
                <title>${r.label} · ${s?.label ?? ''}: ${this.fmt(v)} ${this.unit}</title>
              </rect>
              ${w >= 44 ? svg`<text class="seg" x=${labelW + at + w / 2} y=${y + h / 2 + 3.5} text-anchor="middle">${this.fmt(v)}</text>` : ''}
            </g>`;
            at += w;
            return seg;
          });
          return svg`<g data-row=${r.label}>
            <text x=${labelW - 8} y=${y + h / 2 + 4} text-anchor="end">${r.label}</text>
            ${segs}
            <text class="num" x=${labelW + at + 6} y=${y + h / 2 + 4}>${this.fmt(r.total)}</text>
          </g>`;
        })}
      </svg>
      <ul class="legend" aria-label="Legend">
        ${this.series.map(
          (s, i) => html`<li>
            <svg viewBox="0 0 16 10" aria-hidden="true"><defs>${patternDef(`${pid(i)}-l`, i)}</defs><rect width="16" height="10" fill="url(#${pid(i)}-l)"></rect></svg>${s.label}
          </li>`,
        )}
      </ul>
      <details>
        <summary>The same figures as a table</summary>
        <table>
          <thead>
            <tr>
              <th></th>
              ${this.series.map((s) => html`<th>${s.label}</th>`)}
              <th>total</th>
            </tr>
          </thead>
          <tbody>
            ${this.rows.map(
              (r) => html`<tr>
                <td>${r.label}</td>
                ${r.values.map((v) => html`<td>${this.fmt(v)}</td>`)}
                <td>${this.fmt(r.total)}</td>
              </tr>`,
            )}
          </tbody>
        </table>
      </details>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-chart-bars': RbChartBars;
  }
}
