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
      .done.undone {
        border-left-color: var(--rb-na);
      }
    `,
  ];

  @property({ attribute: false }) done: ImportDone | undefined;
  /** The import's batch has since been undone. */
  @property({ type: Boolean }) undone = false;
  /** Maker part numbers of the parts the import created that are still in the Book. */
  @property({ attribute: false }) remainingParts: readonly string[] = [];

  override render() {
    const d = this.done;
    if (!d) return html``;
    if (this.undone) {
      const n = this.remainingParts.length;
      return html`<div class="done undone" role="status" data-testid="import-done">
        ↶ The import of ${d.fileName} for ${d.supplier} was undone: its ${plural(d.newQuotes, 'quote')} were removed and the
        ${plural(d.superseded, 'quote')} it superseded are current again.
        ${n > 0
          ? html`<span data-testid="undo-parts-kept"
              >Undo removes quotes, not parts: the ${plural(n, 'part')} it created ${n === 1 ? 'stays' : 'stay'} in the Book
              (${this.remainingParts.join(', ')}). Delete ${n === 1 ? 'it' : 'them'} on the <a href="#/parts">Parts page</a> if not wanted.</span
            >`
          : ''}
      </div>`;
    }
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
