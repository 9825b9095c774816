// The result of an import: what it wrote (new quotes, superseded ones, new parts, rows skipped or left out), with the
// way to the Quotes page.
import { LitElement, css, html } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import type { ImportDone } from './import-controller.ts';
import { plural } from './import-controller.ts';
import { pageStyles } from './styles.ts';

@customElement('rb-import-done')
export class RbImportDone extends LitElement {
  static override styles = [
    pageStyles,
    css`
      .done {
        padding: 0.5rem 0.8rem;
        border-left: 4px solid var(--rb-pass);
        background: var(--rb-highlight);
        margin: 0 0 1rem;
      }
    `,
  ];

  @property({ attribute: false }) done: ImportDone | undefined;

  override render() {
    const d = this.done;
    if (!d) return html``;
    return html`<div class="done" role="status" data-testid="import-done">
      ✓ Imported ${d.fileName} for ${d.supplier}: ${plural(d.newQuotes, 'new quote')}, ${plural(d.superseded, 'quote')} superseded,
      ${plural(d.newParts, 'new part')}${d.skipped ? `, ${plural(d.skipped, 'row')} skipped` : ''}${d.validOnly
        ? `; only the valid rows were imported (${plural(d.leftOut, 'problem')} left out)`
        : ''}.
      <a href="#/quotes">See them on the Quotes page</a>.
    </div>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-import-done': RbImportDone;
  }
}
