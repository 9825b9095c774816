// One of the user's own notebook pages: its headed sections with their text and small grids, shown as written.
import { LitElement, html } from 'lit';
import { customElement, property } from 'lit/decorators.js';
import { BookController } from './book-context.ts';
import { pageStyles } from './styles.ts';

@customElement('rb-notebook-page')
export class RbNotebookPage extends LitElement {
  static override styles = pageStyles;

  @property({ attribute: false }) pageId = '';
  private readonly books = new BookController(this);

  override render() {
    const page = this.books.book?.pages.find((p) => p.id === this.pageId);
    if (!page) return html`<p class="empty">This notebook page is not in the Book.</p>`;
    return html`<h1>${page.title || '(untitled page)'}</h1>
      <p class="blurb">A page of your own notes. Cells are shown as written; formulas start with “=”.</p>
      ${page.sections.length === 0 ? html`<p class="empty">This page has no sections yet.</p>` : ''}
      ${page.sections.map(
        (s) => html`<section class="sheet">
          <h2>${s.heading}</h2>
          <p class="why">${s.text}</p>
          ${s.grid.length > 0
            ? html`<div class="scroll">
                <table class="records">
                  <tbody>
                    ${s.grid.map((row) => html`<tr>${row.map((cell) => html`<td class="code">${cell}</td>`)}</tr>`)}
                  </tbody>
                </table>
              </div>`
            : ''}
        </section>`,
      )}`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-notebook-page': RbNotebookPage;
  }
}
