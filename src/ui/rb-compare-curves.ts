// Compare view: each chosen variant's unit cost against run size as a curve on a logarithmic axis, with guides at
// the run sizes compared.
import { html } from 'lit';
import { customElement } from 'lit/decorators.js';
import { grouped } from '../domain/format.ts';
import { curveRunSizes } from './build-costing.ts';
import { CompareView } from './compare-view.ts';
import type { CurveSeries } from './rb-chart-curves.ts';
import './rb-chart-curves.ts';
import { pageStyles } from './styles.ts';

@customElement('rb-compare-curves')
export class RbCompareCurves extends CompareView {
  static override styles = [pageStyles];

  override render() {
    const book = this.book;
    const costs = this.costs;
    if (!book || !costs) return html``;
    const base = book.settings.baseCurrency;
    const marks = costs.runSizes(book);
    const runs = [...new Set([...curveRunSizes(100, 20_000), ...marks])].sort((a, b) => a - b);
    const series: CurveSeries[] = this.chosen.map((v) => ({ label: v.code, points: runs.map((x) => ({ x, y: costs.unitCost(v.id, x).value })) }));
    return html`<section class="sheet" aria-labelledby="curves-h">
      <h2 id="curves-h">Cost against run size</h2>
      <p class="why">
        Unit cost in ${base} from ${grouped(runs[0]!)} to ${grouped(runs[runs.length - 1]!)} units on a
        logarithmic axis. Steps come from price breaks, minimum orders and packs; dotted guides mark the run sizes compared above.
      </p>
      <rb-chart-curves
        data-testid="curve-chart"
        .series=${series}
        .marks=${marks}
        .yLabel=${`unit cost (${base})`}
        .caption=${'Unit cost against run size'}
      ></rb-chart-curves>
    </section>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-compare-curves': RbCompareCurves;
  }
}
