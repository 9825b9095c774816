// Curves of a figure against run size, drawn as our own SVG on a logarithmic run-size axis. Each series has its own
// dash pattern and marker shape and is named at the end of its line, so the chart reads without colour; marked run
// sizes (the Book's) get a dotted guide.
import { LitElement, css, html, svg } from 'lit';
import type { SVGTemplateResult, TemplateResult } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import { fixed, grouped } from '../domain/format.ts';
import { chartStyles, niceStep } from './chart-parts.ts';

export interface CurvePoint {
  x: number;
  /** NaN where the figure cannot be computed; the line breaks there. */
  y: number;
}

export interface CurveSeries {
  label: string;
  points: CurvePoint[];
}

const TONES = ['#1f6f5c', '#a1261b', '#3d5a80', '#8a5a00', '#7a3e65', '#2e7d32', '#455a64', '#6d4c41'];
const DASHES = ['', '7 4', '2 3', '10 3 2 3', '4 4', '12 4', '1 4', '6 2 2 2 2 2'];

/** A marker shape per series index, centred on (x, y). */
function marker(i: number, x: number, y: number, tone: string): SVGTemplateResult {
  const r = 3.6;
  switch (i % 6) {
    case 0:
      return svg`<circle cx=${x} cy=${y} r=${r} fill=${tone}></circle>`;
    case 1:
      return svg`<rect x=${x - r} y=${y - r} width=${2 * r} height=${2 * r} fill=${tone}></rect>`;
    case 2:
      return svg`<path d="M${x},${y - r - 1} L${x + r + 1},${y + r} L${x - r - 1},${y + r} Z" fill=${tone}></path>`;
    case 3:
      return svg`<path d="M${x},${y - r - 1} L${x + r + 1},${y} L${x},${y + r + 1} L${x - r - 1},${y} Z" fill=${tone}></path>`;
    case 4:
      return svg`<circle cx=${x} cy=${y} r=${r} fill="var(--rb-sheet)" stroke=${tone} stroke-width="1.8"></circle>`;
    default:
      return svg`<path d="M${x - r},${y - r} L${x + r},${y + r} M${x + r},${y - r} L${x - r},${y + r}" stroke=${tone} stroke-width="2"></path>`;
  }
}

/** Run-size ticks on a log axis: 1, 2 and 5 of each decade inside [lo, hi]. */
export function logTicks(lo: number, hi: number): number[] {
  const out: number[] = [];
  for (let d = 10 ** Math.floor(Math.log10(lo)); d <= hi; d *= 10) {
    for (const m of [1, 2, 5]) if (m * d >= lo && m * d <= hi) out.push(m * d);
  }
  return out;
}

/** Moves label positions apart (keeping their order) so no two are closer than `gap`. */
export function spreadLabels(ys: number[], gap: number, min: number, max: number): number[] {
  const order = ys.map((y, i) => ({ y, i })).sort((a, b) => a.y - b.y);
  for (let k = 1; k < order.length; k++) order[k]!.y = Math.max(order[k]!.y, order[k - 1]!.y + gap);
  const overflow = order.length ? order[order.length - 1]!.y - max : 0;
  if (overflow > 0) for (const o of order) o.y -= overflow;
  for (let k = 0; k < order.length; k++) order[k]!.y = Math.max(order[k]!.y, min + k * gap);
  const out = new Array<number>(ys.length);
  for (const o of order) out[o.i] = o.y;
  return out;
}

@customElement('rb-chart-curves')
export class RbChartCurves extends LitElement {
  static override styles = [
    chartStyles,
    css`
      text.name {
        font-family: var(--rb-mono);
        font-size: 11px;
        font-weight: 600;
      }
      line.grid {
        stroke: var(--rb-rule);
      }
      line.mark {
        stroke: var(--rb-accent);
        stroke-dasharray: 1 3;
      }
      line.axis {
        stroke: var(--rb-ink);
      }
    `,
  ];

  @property({ attribute: false }) series: CurveSeries[] = [];
  /** Run sizes to mark with a guide (the Book's run sizes). */
  @property({ attribute: false }) marks: number[] = [];
  @property() yLabel = '';
  @property() xLabel = 'run size (units, log scale)';
  @property() caption = '';
  @property({ type: Number }) digits = 2;

  private fmt(n: number): string {
    return fixed(n, this.digits);
  }

  override render(): TemplateResult {
    const width = 760;
    const height = 360;
    const left = 64;
    const right = 130;
    const top = 18;
    const bottom = 44;
    const plotW = width - left - right;
    const plotH = height - top - bottom;
    const xs = this.series.flatMap((s) => s.points.map((p) => p.x)).filter((x) => x > 0);
    const ys = this.series.flatMap((s) => s.points.map((p) => p.y)).filter((y) => Number.isFinite(y));
    if (xs.length === 0 || ys.length === 0) return html`<p class="empty">Nothing to draw: no costs could be computed.</p>`;
    const x0 = Math.min(...xs);
    const x1 = Math.max(...xs);
    const lx = (x: number): number => left + (x1 === x0 ? plotW / 2 : ((Math.log10(x) - Math.log10(x0)) / (Math.log10(x1) - Math.log10(x0))) * plotW);
    const yMinRaw = Math.min(...ys);
    const yMaxRaw = Math.max(...ys);
    const step = niceStep(Math.max(yMaxRaw - yMinRaw, Math.abs(yMaxRaw) * 0.05), 5);
    const y0 = Math.floor(yMinRaw / step) * step;
    const y1 = Math.max(Math.ceil(yMaxRaw / step) * step, y0 + step);
    const ly = (y: number): number => top + plotH - ((y - y0) / (y1 - y0)) * plotH;
    const yTicks: number[] = [];
    for (let t = y0; t <= y1 + step / 2; t += step) yTicks.push(Number(t.toPrecision(10)));
    const ends = this.series.map((s) => {
      const last = [...s.points].reverse().find((p) => Number.isFinite(p.y));
      return last ? ly(last.y) : top;
    });
    const labelYs = spreadLabels(ends, 13, top + 4, top + plotH);
    return html`<svg viewBox="0 0 ${width} ${height}" role="img" aria-label=${this.caption}>
      ${yTicks.map(
        (t) => svg`<line class="grid" x1=${left} x2=${left + plotW} y1=${ly(t)} y2=${ly(t)}></line>
          <text class="num" x=${left - 6} y=${ly(t) + 4} text-anchor="end">${this.fmt(t)}</text>`,
      )}
      ${logTicks(x0, x1).map(
        (t) => svg`<line class="grid" x1=${lx(t)} x2=${lx(t)} y1=${top} y2=${top + plotH}></line>
          <text class="num" x=${lx(t)} y=${top + plotH + 15} text-anchor="middle">${grouped(t)}</text>`,
      )}
      ${this.marks
        .filter((m) => m >= x0 && m <= x1)
        .map((m) => svg`<line class="mark" x1=${lx(m)} x2=${lx(m)} y1=${top} y2=${top + plotH}><title>run size ${m}</title></line>`)}
      <line class="axis" x1=${left} x2=${left + plotW} y1=${top + plotH} y2=${top + plotH}></line>
      <line class="axis" x1=${left} x2=${left} y1=${top} y2=${top + plotH}></line>
      <text x=${left + plotW / 2} y=${height - 6} text-anchor="middle">${this.xLabel}</text>
      <text x=${14} y=${top + plotH / 2} text-anchor="middle" transform="rotate(-90 14 ${top + plotH / 2})">${this.yLabel}</text>
      ${this.series.map((s, i) => {
        const tone = TONES[i % TONES.length]!;
        const segments: string[] = [];
        let current = '';
        for (const p of s.points) {
          if (!Number.isFinite(p.y)) {
            if (current) segments.push(current);
            current = '';
            continue;
          }
          current += `${current ? 'L' : 'M'}${lx(p.x).toFixed(1)},${ly(p.y).toFixed(1)} `;
        }
        if (current) segments.push(current);
        const end = [...s.points].reverse().find((p) => Number.isFinite(p.y));
        return svg`<g data-series=${s.label}>
          ${segments.map((d) => svg`<path d=${d} fill="none" stroke=${tone} stroke-width="2" stroke-dasharray=${DASHES[i % DASHES.length]!}></path>`)}
          ${s.points.filter((p) => Number.isFinite(p.y)).map((p) => svg`<g>${marker(i, lx(p.x), ly(p.y), tone)}<title>${s.label} at ${grouped(p.x)}: ${this.fmt(p.y)}</title></g>`)}
          ${end
            ? svg`${marker(i, left + plotW + 12, labelYs[i]!, tone)}<text class="name" x=${left + plotW + 20} y=${labelYs[i]! + 4}>${s.label}</text>`
            : ''}
        </g>`;
      })}
    </svg>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-chart-curves': RbChartCurves;
  }
}
