// Compare view: what makes two variants differ — the build lines fitted in one and not the other, or with another part
// or quantity, with their cost per unit, and the rows that account for the rest of the difference in unit cost.
// The two variants are chosen among those ticked above; the run size is one of the run sizes or any other typed.
// Money: a line's part cost per unit to four decimals (a cheap part reads 0.00 to the cent), sums to the cent.
import { css, html } from 'lit';
import type { PropertyValues, TemplateResult } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { MAX_RUN_QUANTITY } from '../domain/freeze.ts';
import { grouped, money, signedMoney } from '../domain/format.ts';
import { variantDifference } from './build-costing.ts';
import { CompareView } from './compare-view.ts';
import type { CompareRunDetail } from './rb-compare-split.ts';
import { pageStyles, problemStyles, ruledControlStyles } from './styles.ts';

@customElement('rb-compare-difference')
export class RbCompareDifference extends CompareView {
  static override styles = [
    pageStyles,
    problemStyles,
    ruledControlStyles('.toolbar select, .toolbar input', { padX: '0.35rem', ink: false, shrink: true }),
    css`
      tr.sum td {
        border-top: 2px solid var(--rb-ink);
        font-weight: 600;
      }
      tr.rest td {
        color: var(--rb-na);
      }
      .toolbar input[type='number'] {
        width: 7rem;
      }
    `,
  ];

  @property({ attribute: false }) run = 0;
  @state() private diffA = '';
  @state() private diffB = '';
  /** A run size typed here that is not one of the run sizes; undefined follows the page's run size. */
  @state() private ownRun: number | undefined;
  @state() private runProblem = '';

  override willUpdate(changed: PropertyValues<this>): void {
    // A run size chosen in the split view (the page's) replaces one typed here.
    if (changed.has('run') && changed.get('run') !== undefined) this.ownRun = undefined;
    // Both variants are among those ticked above: one unticked gives way to the next ticked.
    const ids = this.chosen.map((v) => v.id);
    if (!ids.includes(this.diffA)) this.diffA = ids[0] ?? '';
    if (!ids.includes(this.diffB) || (this.diffB === this.diffA && ids.length > 1)) this.diffB = ids.find((id) => id !== this.diffA) ?? this.diffA;
  }

  private onPreset(e: Event): void {
    const run = Number((e.target as HTMLSelectElement).value);
    this.ownRun = undefined;
    this.runProblem = '';
    const detail: CompareRunDetail = { run };
    this.dispatchEvent(new CustomEvent<CompareRunDetail>('rb-compare-run', { detail, bubbles: true, composed: true }));
  }

  private onTyped(e: Event): void {
    const t = (e.target as HTMLInputElement).value.trim();
    const n = Number(t);
    if (t === '' || !Number.isSafeInteger(n) || n < 1 || n > MAX_RUN_QUANTITY) {
      this.runProblem = `run size must be a whole number from 1 to ${grouped(MAX_RUN_QUANTITY)}`;
      return;
    }
    this.runProblem = '';
    this.ownRun = n;
  }

  override render() {
    const book = this.book;
    const costs = this.costs;
    if (!book || !costs) return html``;
    const base = book.settings.baseCurrency;
    const pick = (label: string, value: string, set: (id: string) => void) => html`<label
      >${label}
      <select aria-label=${label} @change=${(e: Event) => set((e.target as HTMLSelectElement).value)}>
        ${this.chosen.map((v) => html`<option value=${v.id} ?selected=${v.id === value}>${v.code}</option>`)}
      </select></label
    >`;
    const run = this.ownRun ?? this.run;
    const presets = costs.runSizes(book);
    const va = this.chosen.find((v) => v.id === this.diffA);
    const vb = this.chosen.find((v) => v.id === this.diffB);
    const a = costs.bom(this.diffA, run);
    const b = costs.bom(this.diffB, run);
    const part = (n: number): string => money(n, 'partPrice');
    let body: TemplateResult;
    if (this.chosen.length < 2 || !va || !vb) body = html`<p class="empty">Tick two or more variants above to see what makes two of them differ.</p>`;
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
                <td class="num">${part(l.costA)}</td>
                <td class="num">${part(l.costB)}</td>
                <td class="num">${signedMoney(l.effect, 'partPrice')}</td>
              </tr>`,
            )}
            ${rest.map(
              ([what, v]) => html`<tr class="rest">
                <td colspan="5">${what}</td>
                <td class="num">${signedMoney(v, 'unitCost')}</td>
              </tr>`,
            )}
            <tr class="sum">
              <td colspan="5">unit cost ${vb.code} − ${va.code}</td>
              <td class="num" data-testid="difference-total">${signedMoney(d.total, 'unitCost')}</td>
            </tr>
          </tbody>
        </table>
      </div>`;
    }
    return html`<section class="sheet" aria-labelledby="diff-h">
      <h2 id="diff-h">What makes two variants differ</h2>
      <p class="why">
        Build lines fitted in one variant and not the other, or with another part or quantity, with their cost per unit at
        a run of ${grouped(run)} units, to four decimals so a cheap part shows. The rows below them account for the rest,
        so the effects add up to the difference in unit cost (to the cent).
      </p>
      <div class="toolbar">
        ${pick('variant A', this.diffA, (id) => (this.diffA = id))} ${pick('variant B', this.diffB, (id) => (this.diffB = id))}
        <label
          >run size
          <select aria-label="run size" @change=${this.onPreset}>
            ${presets.map((r) => html`<option value=${r} ?selected=${r === run}>${grouped(r)}</option>`)}
            ${presets.includes(run) ? '' : html`<option value=${run} selected>${grouped(run)}</option>`}
          </select></label
        >
        <label
          >or any run size
          <input
            type="number"
            min="1"
            max=${MAX_RUN_QUANTITY}
            step="1"
            aria-label="any run size"
            data-testid="difference-run"
            aria-invalid=${this.runProblem ? 'true' : 'false'}
            .value=${String(run)}
            @change=${this.onTyped}
          /></label>
        ${this.runProblem ? html`<span class="problem" role="alert">${this.runProblem}</span>` : ''}
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
