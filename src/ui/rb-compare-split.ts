// Compare view: each chosen variant's unit cost at one run size as a stacked bar, split into purchased material by
// build-line category, then labour, test and overhead.
import { html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import { grouped } from '../domain/format.ts';
import { SPLIT_KEYS, categorySplit } from './build-costing.ts';
import { CompareView } from './compare-view.ts';
import type { BarRow, BarSeries } from './rb-chart-bars.ts';
import './rb-chart-bars.ts';
import { pageStyles, problemStyles, ruledControlStyles } from './styles.ts';

const SPLIT_LABELS: Record<(typeof SPLIT_KEYS)[number], string> = {
  electronics: 'electronics',
  power: 'power',
  board: 'board',
  enclosure: 'enclosure',
  hardware: 'hardware',
  packaging: 'packaging',
  labour: 'labour',
  test: 'test',
  overhead: 'overhead',
};

/** The run size the split and the differences are costed at, as the person chose it. */
export type CompareRunDetail = { run: number };

/** A choice of run size for a Compare view; the choice is announced to the page, which gives it to every view. */
export function runSelect(host: HTMLElement, runs: readonly number[], run: number, label: string): TemplateResult {
  const change = (e: Event): void => {
    const detail: CompareRunDetail = { run: Number((e.target as HTMLSelectElement).value) };
    host.dispatchEvent(new CustomEvent<CompareRunDetail>('rb-compare-run', { detail, bubbles: true, composed: true }));
  };
  return html`<label
    >${label}
    <select aria-label=${label} @change=${change}>
      ${runs.map((r) => html`<option value=${r} ?selected=${r === run}>${grouped(r)}</option>`)}
    </select></label
  >`;
}

@customElement('rb-compare-split')
export class RbCompareSplit extends CompareView {
  static override styles = [pageStyles, problemStyles, ruledControlStyles('.toolbar select', { padX: '0.35rem', ink: false, shrink: true })];

  @property({ attribute: false }) run = 0;

  override render() {
    const book = this.book;
    const costs = this.costs;
    if (!book || !costs) return html``;
    const base = book.settings.baseCurrency;
    const series: BarSeries[] = SPLIT_KEYS.map((k) => ({ key: k, label: SPLIT_LABELS[k] }));
    const rows: BarRow[] = [];
    const problems: string[] = [];
    for (const v of this.chosen) {
      const bom = costs.bom(v.id, this.run);
      if (!bom.ok) {
        problems.push(`${v.code}: ${bom.error}`);
        continue;
      }
      const split = categorySplit(book, bom.value);
      rows.push({ label: v.code, values: SPLIT_KEYS.map((k) => split[k]), total: bom.value.unitCost });
    }
    return html`<section class="sheet" aria-labelledby="split-h">
      <h2 id="split-h">Cost split by category</h2>
      <p class="why">
        Unit cost in ${base} at one run size: purchased material by build-line category, then labour, test and overhead.
        Each part has its own pattern; figures sit on segments wide enough to hold them.
      </p>
      <div class="toolbar">${runSelect(this, costs.runSizes(book), this.run, 'run size')}</div>
      ${problems.map((p) => html`<p class="problem">${p}</p>`)}
      ${rows.length
        ? html`<rb-chart-bars
            data-testid="split-chart"
            .series=${series}
            .rows=${rows}
            .unit=${base}
            .caption=${`Unit cost split by category at a run of ${this.run}`}
          ></rb-chart-bars>`
        : ''}
    </section>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-compare-split': RbCompareSplit;
  }
  interface HTMLElementEventMap {
    'rb-compare-run': CustomEvent<CompareRunDetail>;
  }
}
