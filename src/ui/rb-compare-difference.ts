// Compare view: what makes two variants differ — the build lines fitted in one and not the other, or with another part
// or quantity, with their cost per unit, and the rows that account for the rest of the difference in unit cost.
import { css, html } from 'lit';
import type { TemplateResult } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { grouped, money, signedMoney } from '../domain/format.ts';
import { variantDifference } from './build-costing.ts';
import { CompareView } from './compare-view.ts';
import { runSelect } from './rb-compare-split.ts';
import { pageStyles, problemStyles, ruledControlStyles } from './styles.ts';

@customElement('rb-compare-difference')
export class RbCompareDifference extends CompareView {
  static override styles = [
    pageStyles,
    problemStyles,
    ruledControlStyles('.toolbar select', { padX: '0.35rem', ink: false, shrink: true }),
    css`
      tr.sum td {
        border-top: 2px solid var(--rb-ink);
        font-weight: 600;
      }
      tr.rest td {
        color: var(--rb-na);
      }
    `,
  ];

  @property({ attribute: false }) run = 0;
  @state() private diffA = '';
  @state() private diffB = '';

  override willUpdate(): void {
    const book = this.book;
    if (!book) return;
    const ids = new Set(book.variants.map((v) => v.id));
    if (!ids.has(this.diffA)) this.diffA = this.chosen[0]?.id ?? book.variants[0]?.id ?? '';
    if (!ids.has(this.diffB)) this.diffB = this.chosen[1]?.id ?? book.variants[1]?.id ?? this.diffA;
  }

  override render() {
    const book = this.book;
    const costs = this.costs;
    if (!book || !costs) return html``;
    const base = book.settings.baseCurrency;
    const pick = (label: string, value: string, set: (id: string) => void) => html`<label
      >${label}
      <select aria-label=${label} @change=${(e: Event) => set((e.target as HTMLSelectElement).value)}>
        ${book.variants.map((v) => html`<option value=${v.id} ?selected=${v.id === value}>${v.code}</option>`)}
      </select></label
    >`;
    const va = book.variants.find((v) => v.id === this.diffA);
    const vb = book.variants.find((v) => v.id === this.diffB);
    const a = costs.bom(this.diffA, this.run);
    const b = costs.bom(this.diffB, this.run);
    let body: TemplateResult;
    if (!va || !vb) body = html`<p class="empty">Choose two variants.</p>`;
    else if (!a.ok || !b.ok) body = html`<p class="problem">${!a.ok ? `${va.code}: ${a.error}` : ''} ${!b.ok ? `${vb.code}: ${b.error}` : ''}</p>`;
    else {
      const d = variantDifference(book, costs.family, a.value, b.value);
      const rest: [string, number][] = [
        ['shared lines bought at other quantities or breaks', d.sharedLines],
        ['labour (placements)', d.labour],
        ['test', d.test],
        ['overhead', d.overhead],
      ];
      body = html`<div class="scroll">
        <table class="records" data-testid="difference-table">
          <thead>
            <tr>
              <th>designators</th>
              <th>${va.code}</th>
              <th>${vb.code}</th>
              <th class="num">${va.code} (${base}/unit)</th>
              <th class="num">${vb.code} (${base}/unit)</th>
              <th class="num">effect</th>
            </tr>
          </thead>
          <tbody>
            ${d.lines.length === 0 ? html`<tr><td colspan="6" class="empty">Both variants are built from the same lines.</td></tr>` : ''}
            ${d.lines.map(
              (l) => html`<tr data-line=${l.lineId}>
                <td class="code">${l.designators}</td>
                <td class="code">${l.a || html`<span class="muted">not fitted</span>`}</td>
                <td class="code">${l.b || html`<span class="muted">not fitted</span>`}</td>
                <td class="num">${money(l.costA)}</td>
                <td class="num">${money(l.costB)}</td>
                <td class="num">${signedMoney(l.effect)}</td>
              </tr>`,
            )}
            ${rest.map(
              ([what, v]) => html`<tr class="rest">
                <td colspan="5">${what}</td>
                <td class="num">${signedMoney(v)}</td>
              </tr>`,
            )}
            <tr class="sum">
              <td colspan="5">unit cost ${vb.code} − ${va.code}</td>
              <td class="num" data-testid="difference-total">${signedMoney(d.total)}</td>
            </tr>
          </tbody>
        </table>
      </div>`;
    }
    return html`<section class="sheet" aria-labelledby="diff-h">
      <h2 id="diff-h">What makes two variants differ</h2>
      <p class="why">
        Build lines fitted in one variant and not the other, or with another part or quantity, with their cost per unit at
        a run of ${grouped(this.run)} units. The rows below them
        account for the rest, so the effects add up to the difference in unit cost.
      </p>
      <div class="toolbar">
        ${pick('variant A', this.diffA, (id) => (this.diffA = id))} ${pick('variant B', this.diffB, (id) => (this.diffB = id))}
        ${runSelect(this, costs.runSizes(book), this.run, 'run size ')}
      </div>
      ${body}
    </section>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-compare-difference': RbCompareDifference;
  }
}
