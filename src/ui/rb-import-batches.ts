// Past imports of the Book: file, supplier (or stock count), rows, time, what each created and replaced, whether it
// repeats an earlier import of the same file, and an Undo that deletes its quotes and restores the ones it superseded,
// or takes a stock count's movements out of the ledger.
import { LitElement, css, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, ImportBatch } from '../domain/book.ts';
import { undoBatch } from '../domain/quotes.ts';
import { BookController } from './book-context.ts';
import { timeText } from './quote-text.ts';
import { pageStyles } from './styles.ts';

/** The earlier batch that imported the same bytes for the same supplier, if any. */
export function earlierSameFile(book: Book, batch: ImportBatch): ImportBatch | undefined {
  return book.importBatches
    .filter((b) => b.id !== batch.id && b.hash === batch.hash && b.supplierId === batch.supplierId && b.at < batch.at)
    .sort((a, b) => a.at.localeCompare(b.at))[0];
}

@customElement('rb-import-batches')
export class RbImportBatches extends LitElement {
  static override styles = [
    pageStyles,
    css`
      .undone {
        color: var(--rb-na);
      }
      .again {
        color: var(--rb-margin);
      }
      .problem {
        color: var(--rb-fail);
        font-size: 0.84rem;
      }
      .done {
        color: var(--rb-pass);
      }
    `,
  ];

  private readonly books = new BookController(this);
  @state() private confirming: string | undefined;
  @state() private message: { id: string; text: string; ok: boolean } | undefined;

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const batches = [...book.importBatches].sort((a, b) => b.at.localeCompare(a.at));
    return html`<section class="sheet" aria-labelledby="batches-h">
      <h2 id="batches-h">Import history</h2>
      <p class="why">
        Each price file and stock count import is kept as a batch. Undo deletes the quotes a batch created and makes
        the quotes it replaced current again (undo the newest batch for a supplier first), or takes a count's
        movements out of the stock ledger.
      </p>
      ${batches.length === 0
        ? html`<p class="empty">No price file or stock count has been imported into this Book yet.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="batches-table">
              <thead>
                <tr>
                  <th>file</th>
                  <th>supplier</th>
                  <th class="num">rows</th>
                  <th>time</th>
                  <th class="num">quotes created</th>
                  <th class="num">quotes replaced</th>
                  <th>status</th>
                  <th><span class="muted">actions</span></th>
                </tr>
              </thead>
              <tbody>
                ${batches.map((b) => this.renderRow(book, b))}
              </tbody>
            </table>
          </div>`}
      ${this.renderMessage()}
    </section>`;
  }

  private renderRow(book: Book, b: ImportBatch) {
    const supplier = book.suppliers.find((s) => s.id === b.supplierId);
    const again = earlierSameFile(book, b);
    return html`<tr data-id=${b.id} class=${b.undone ? 'undone' : ''}>
      <td class="code">${b.fileName}</td>
      <td>${b.kind === 'stock count' ? html`<span class="muted">stock count</span>` : (supplier?.name ?? b.supplierId)}</td>
      <td class="num">${b.rows}</td>
      <td class="num">${timeText(b.at)}</td>
      <td class="num">${b.kind === 'stock count' ? `${(b.moves ?? []).length} movements` : b.created.length}</td>
      <td class="num">${b.superseded.length}</td>
      <td>
        ${b.undone ? html`<span class="undone">↶ undone</span>` : html`<span class="done">✓ in use</span>`}
        ${again
          ? html`<div class="again" data-testid="reimport">⟳ same file as the import of ${timeText(again.at)}</div>`
          : ''}
      </td>
      <td class="acts">
        ${b.undone
          ? ''
          : this.confirming === b.id
            ? html`Undo this import?
                <button type="button" class="danger" @click=${() => this.undo(b)}>Undo</button>
                <button type="button" class="quiet" @click=${() => (this.confirming = undefined)}>Keep</button>`
            : html`<button type="button" class="quiet" @click=${() => this.ask(b)}>undo</button>`}
      </td>
    </tr>`;
  }

  /** The outcome of the last undo, under the table where it has the full width (the actions column does not wrap). */
  private renderMessage() {
    const msg = this.message;
    if (!msg) return '';
    return html`<p class=${msg.ok ? 'done' : 'problem'} role=${msg.ok ? 'status' : 'alert'} data-testid="undo-result">${msg.ok ? '✓' : '✗'} ${msg.text}</p>`;
  }

  private ask(b: ImportBatch): void {
    this.message = undefined;
    this.confirming = b.id;
  }

  private async undo(b: ImportBatch): Promise<void> {
    const service = this.books.service;
    this.confirming = undefined;
    if (!service) return;
    const r = undoBatch(service.book, b.id);
    if (!r.ok) {
      this.message = { id: b.id, text: `${b.fileName} not undone: ${r.reason}.`, ok: false };
      return;
    }
    const restored = r.change.put?.quotes?.length ?? 0;
    const removed = r.change.delete?.quotes?.length ?? 0;
    const what = b.kind === 'stock count' ? `${r.change.put?.stockMoves?.length ?? 0} counted movement(s) reversed, both kept in the history` : `${removed} quote(s) removed, ${restored} restored`;
    const saved = await service.save(r.change);
    this.message = saved.ok
      ? { id: b.id, text: `Undone the import of ${b.fileName}: ${what}.`, ok: true }
      : { id: b.id, text: saved.message, ok: false };
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-import-batches': RbImportBatches;
  }
}
