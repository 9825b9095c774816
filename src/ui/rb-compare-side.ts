// Compare view: the chosen variants side by side — key parameters, the worst of each one's checks, and the unit cost
// and price at each run size, with the lowest cost of a row marked.
import { css, html } from 'lit';
import { customElement } from 'lit/decorators.js';
import { STATUS_SYMBOL } from '../domain/check-status.ts';
import { grouped, money } from '../domain/format.ts';
import { whatIfCount } from './build-costing.ts';
import { CompareView } from './compare-view.ts';
import { paramText } from './record-forms.ts';
import { pageStyles } from './styles.ts';

/** Parameters shown side by side (when any compared variant has them). */
const KEY_PARAMS = ['steps', 'load_w', 'mains_v', 'mains_hz', 'selector', 'stage', 'supply', 'vcc'];

@customElement('rb-compare-side')
export class RbCompareSide extends CompareView {
  static override styles = [
    pageStyles,
    css`
      table.side th[scope='row'] {
        font-family: var(--rb-mono);
        font-size: 0.78rem;
        font-weight: 600;
        color: var(--rb-accent-ink);
        text-align: left;
        white-space: nowrap;
        border-bottom: 1px solid var(--rb-rule);
        padding: 0.3rem 0.6rem;
      }
      table.side thead th {
        text-align: right;
      }
      table.side td.name {
        text-align: right;
        font-size: 0.82rem;
        min-width: 8rem;
        max-width: 12rem;
      }
      table.side tr.cost td {
        font-weight: 600;
      }
      table.side tr.first td,
      table.side tr.first th {
        border-top: 2px solid var(--rb-ink);
      }
      .low {
        font-size: 0.74rem;
        font-weight: 400;
        color: var(--rb-pass);
        margin-left: 0.3rem;
      }
      .st-pass {
        color: var(--rb-pass);
      }
      .st-margin {
        color: var(--rb-margin);
        background: var(--rb-margin-bg);
        padding: 0 0.3rem;
      }
      .st-fail,
      .st-error {
        color: var(--rb-fail);
        background: var(--rb-fail-bg);
        padding: 0 0.3rem;
        font-weight: 600;
      }
      .st-na {
        color: var(--rb-na);
      }
      td.err {
        color: var(--rb-fail);
        font-size: 0.8rem;
        white-space: normal !important;
        max-width: 14rem;
      }
      .tag-whatif {
        font-size: 0.76rem;
        font-variant: small-caps;
        letter-spacing: 0.05em;
        color: var(--rb-margin);
        border: 1px dashed var(--rb-margin);
        padding: 0 0.35rem;
        margin-left: 0.5rem;
        border-radius: 3px;
      }
    `,
  ];

  override render() {
    const book = this.book;
    const costs = this.costs;
    if (!book || !costs) return html``;
    const chosen = this.chosen;
    const base = book.settings.baseCurrency;
    const runs = costs.runSizes(book);
    const params = KEY_PARAMS.filter((p) => chosen.some((v) => v.params[p] !== undefined));
    const figures = runs.map((run) => chosen.map((v) => costs.unitCost(v.id, run)));
    const margin = costs.whatIf.settings.get('marginPct') ?? book.settings.marginPct;
    const tagged = whatIfCount(costs.whatIf) > 0;
    return html`<section class="sheet" aria-labelledby="side-h">
      <h2 id="side-h">Side by side ${tagged ? html`<span class="tag-whatif">with what-if</span>` : ''}</h2>
      <p class="why">
        Key parameters, the worst of each variant's checks, and the unit cost (material, labour, test and overhead) in
        ${base} at each run size; ▼ marks the lowest cost of a row.
      </p>
      ${chosen.length === 0
        ? html`<p class="empty">Choose at least one variant above.</p>`
        : html`<div class="scroll">
            <table class="records side" data-testid="compare-table">
              <thead>
                <tr>
                  <th></th>
                  ${chosen.map((v) => html`<th class="num" title=${v.name}>${v.code}</th>`)}
                </tr>
              </thead>
              <tbody>
                <tr>
                  <th scope="row">name</th>
                  ${chosen.map((v) => html`<td class="name">${v.name}</td>`)}
                </tr>
                ${params.map(
                  (p) => html`<tr>
                    <th scope="row">${p}</th>
                    ${chosen.map((v) => html`<td class="num">${paramText(p, v.params[p])}</td>`)}
                  </tr>`,
                )}
                <tr>
                  <th scope="row">worst check</th>
                  ${chosen.map((v) => {
                    const s = costs.worstStatus(v.id);
                    return html`<td class="num" data-testid="worst-check"><span class="st-${s === 'n/a' ? 'na' : s}">${STATUS_SYMBOL[s]} ${s}</span></td>`;
                  })}
                </tr>
                ${runs.map((run, k) => {
                  const row = figures[k]!;
                  const finite = row.map((f) => f.value).filter((x) => Number.isFinite(x));
                  const low = finite.length > 1 ? Math.min(...finite) : NaN;
                  return html`<tr class="cost ${k === 0 ? 'first' : ''}">
                    <th scope="row">unit cost at ${grouped(run)} (${base})</th>
                    ${row.map((f, i) =>
                      Number.isFinite(f.value)
                        ? html`<td class="num" data-testid="unit-cost" data-variant=${chosen[i]!.code} data-run=${run} data-value=${f.value}>
                            ${money(f.value, 'unitCost')}${f.value === low ? html`<span class="low" title="lowest in this row">▼</span>` : ''}
                          </td>`
                        : html`<td class="err" data-testid="unit-cost" data-variant=${chosen[i]!.code} data-run=${run} data-value="">✗ ${f.problem}</td>`,
                    )}
                  </tr>`;
                })}
                ${runs.map(
                  (run, k) => html`<tr>
                    <th scope="row">price at ${grouped(run)} (${margin} % margin)</th>
                    ${figures[k]!.map((f) => html`<td class="num">${Number.isFinite(f.value) ? money(f.value / (1 - margin / 100), 'unitCost') : '—'}</td>`)}
                  </tr>`,
                )}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-compare-side': RbCompareSide;
  }
}
