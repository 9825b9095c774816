// What the two SVG charts (rb-chart-bars, rb-chart-curves) share: the look of the drawing and its text, how a
// figure is written, and the round step of a value axis.
import { css } from 'lit';

export const chartStyles = css`
    :host {
      display: block;
      font-variant-numeric: tabular-nums;
    }
    svg {
      width: 100%;
      max-width: 60rem;
      height: auto;
      font-family: var(--rb-font);
    }
    text {
      fill: var(--rb-ink);
      font-size: 12px;
    }
    text.num {
      font-family: var(--rb-mono);
      font-size: 11px;
    }
`;

/** Round step for an axis: 1, 2 or 5 times a power of ten giving about `count` ticks up to `max`. */
export function niceStep(max: number, count = 5): number {
  if (!(max > 0)) return 1;
  const raw = max / count;
  const p = 10 ** Math.floor(Math.log10(raw));
  const m = raw / p;
  return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * p;
}
