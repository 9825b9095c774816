// Import step 4: the import written in one step — everything, or only the valid rows when asked for explicitly —
// with why it cannot be written yet, and a second import of the same file allowed only when ticked.
import { LitElement, css, html } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import type { ImportPlan } from '../io/price-plan.ts';
import type { PriceAnalysis } from '../io/price-validate.ts';
import { plural } from './import-controller.ts';
import { disabledButtonStyles, pageStyles, warnStyles } from './styles.ts';

export type ImportCommitDetail = { validRowsOnly: boolean };
export type ImportAllowReimportDetail = { allow: boolean };

@customElement('rb-import-commit')
export class RbImportCommit extends LitElement {
  static override styles = [
    pageStyles,
    disabledButtonStyles,
    warnStyles,
    css`
      .actions {
        display: flex;
        flex-wrap: wrap;
        gap: 0.8rem;
        align-items: baseline;
      }
    `,
  ];

  @property({ attribute: false }) supplierName = '';
  @property({ attribute: false }) analysis: PriceAnalysis | undefined;
  @property({ attribute: false }) plan: ImportPlan | undefined;
  @property({ attribute: false }) mappingConfirmed = false;
  @property({ attribute: false }) allowReimport = false;
  @property({ attribute: false }) committing = false;
  @property({ attribute: false }) commitProblem: string | undefined;

  override render() {
    const a = this.analysis;
    const plan = this.plan;
    if (!a || !plan) return html``;
    const problems = plan.problems.length;
    const toImport = plan.newQuotes > 0 || plan.ok;
    const reimport = plan.reimportOf;
    const blockedByReimport = reimport !== undefined && !this.allowReimport;
    const why = !this.mappingConfirmed
      ? 'Confirm the column mapping first.'
      : problems > 0
        ? `Import all is off: ${plural(problems, 'problem')} must be fixed in the file first.`
        : blockedByReimport
          ? 'This file was imported before; tick the box above to import it again.'
          : !toImport
            ? (plan.reason ?? 'Nothing to import.')
            : '';
    const validOffers = a.offers.length - plan.skippedOffers;
    return html`<section class="sheet" aria-labelledby="import-commit-h">
      <h2 id="import-commit-h">Import</h2>
      <p class="why">
        The import is written in one step: every quote or none. New quotes replace the current quote from
        ${this.supplierName} for the same part; the replaced ones are kept as superseded, and the whole import can be undone.
      </p>
      ${reimport
        ? html`<div class="warn" role="status" data-testid="reimport-notice">
            ⟳ This exact file was already imported for ${this.supplierName} on ${reimport.at.slice(0, 16).replace('T', ' ')}
            (${reimport.fileName}).
            <label
              ><input type="checkbox" .checked=${this.allowReimport} @change=${this._onAllowReimport} />
              Import it again anyway</label
            >
          </div>`
        : ''}
      ${this.commitProblem ? html`<p class="notice" role="alert" data-testid="commit-problem">${this.commitProblem}</p>` : ''}
      <div class="actions">
        <button type="button" class="primary" ?disabled=${why !== '' || this.committing} @click=${() => this.commit(false)}>Import all</button>
        ${problems > 0
          ? html`<button
              type="button"
              class="danger"
              ?disabled=${!this.mappingConfirmed || blockedByReimport || validOffers <= 0 || this.committing}
              @click=${() => this.commit(true)}
            >
              Import only the valid rows (${plural(Math.max(validOffers, 0), 'quote')}; rows with problems left out)
            </button>`
          : ''}
        ${why ? html`<span class="muted" data-testid="import-why">${why}</span>` : ''}
        ${this.committing ? html`<span role="status">Writing to the Book…</span>` : ''}
      </div>
    </section>`;
  }

  private readonly _onAllowReimport = (e: Event): void => {
    const allow = (e.target as HTMLInputElement).checked;
    this.dispatchEvent(new CustomEvent<ImportAllowReimportDetail>('rb-import-allow-reimport', { detail: { allow }, bubbles: true, composed: true }));
  };

  private commit(validRowsOnly: boolean): void {
    this.dispatchEvent(new CustomEvent<ImportCommitDetail>('rb-import-commit', { detail: { validRowsOnly }, bubbles: true, composed: true }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-import-commit': RbImportCommit;
  }
  interface HTMLElementEventMap {
    'rb-import-commit': CustomEvent<ImportCommitDetail>;
    'rb-import-allow-reimport': CustomEvent<ImportAllowReimportDetail>;
  }
}
