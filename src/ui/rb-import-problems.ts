// Every problem found in a price file, one row each with its file row, column, value and reason; long lists are cut
// to their first rows until asked for in full.
import { LitElement, css, html } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { plural } from './import-controller.ts';
import { pageStyles, verdictStyles } from './styles.ts';

const PROBLEM_ROWS = 200;

export interface ImportProblem {
  row: number;
  column: string;
  value: string;
  reason: string;
}

@customElement('rb-import-problems')
export class RbImportProblems extends LitElement {
  static override styles = [
    pageStyles,
    verdictStyles,
    css`
      table.problems td.reason {
        color: var(--rb-fail);
      }
      table.problems td.value {
        font-family: var(--rb-mono);
        font-size: 0.82rem;
        max-width: 18rem;
        overflow-wrap: anywhere;
      }
    `,
  ];

  @property({ attribute: false }) problems: readonly ImportProblem[] = [];
  @state() private showAll = false;

  override render() {
    const problems = this.problems;
    const shown = this.showAll ? problems : problems.slice(0, PROBLEM_ROWS);
    return html`<p class="bad" data-testid="problem-count">✗ ${plural(problems.length, 'problem')} found.</p>
      <div class="scroll">
        <table class="records problems" data-testid="problems-table">
          <thead>
            <tr>
              <th class="num">row</th>
              <th>column</th>
              <th>value</th>
              <th>reason</th>
            </tr>
          </thead>
          <tbody>
            ${shown.map(
              (p) => html`<tr>
                <td class="num">${p.row || '—'}</td>
                <td class="code">${p.column || '—'}</td>
                <td class="value">${p.value}</td>
                <td class="reason">${p.reason}</td>
              </tr>`,
            )}
          </tbody>
        </table>
      </div>
      ${problems.length > shown.length
        ? html`<p class="muted">
            ${shown.length} of ${problems.length} shown.
            <button type="button" @click=${() => (this.showAll = true)}>Show all ${problems.length}</button>
          </p>`
        : ''}`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-import-problems': RbImportProblems;
  }
}
