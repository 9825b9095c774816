// Import page: a supplier's price file read and checked in a Web Worker (progress in rows and rows/s), its detected
// format and column mapping shown to confirm or change, every problem listed by row and column, unmatched rows decided
// one by one, and the import committed as one Book save: everything, or only the valid rows when asked for explicitly.
// The work sits in ImportController; each step of the page is an element of its own, and this one lays them out.
import { LitElement, html } from 'lit';
import { customElement } from 'lit/decorators.js';
import type { Book, Supplier } from '../domain/book.ts';
import { grouped } from '../domain/format.ts';
import { BookController } from './book-context.ts';
import { ImportController } from './import-controller.ts';
import type { ImportSource } from './import-controller.ts';
import type { PriceAnalysis } from '../io/price-validate.ts';
import './rb-import-batches.ts';
import './rb-import-commit.ts';
import './rb-import-done.ts';
import './rb-import-format.ts';
import './rb-import-mapping.ts';
import './rb-import-problems.ts';
import './rb-import-review.ts';
import './rb-import-source.ts';
import { pageStyles } from './styles.ts';

@customElement('rb-import-page')
export class RbImportPage extends LitElement {
  static override styles = [pageStyles];

  private readonly books = new BookController(this);
  private readonly work = new ImportController(this, this.books);

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const w = this.work;
    const p = w.phase;
    const done = w.done;
    const undone = done !== undefined && book.importBatches.some((b) => b.id === done.batchId && b.undone === true);
    const remaining = done ? done.createdParts.filter((c) => book.parts.some((x) => x.id === c.id)).map((c) => c.mpn) : [];
    return html`${done ? html`<rb-import-done .done=${done} ?undone=${undone} .remainingParts=${remaining}></rb-import-done>` : ''}
      <rb-import-source
        .supplierId=${w.supplierId}
        .source=${w.source}
        .sourceProblem=${w.sourceProblem}
        .phase=${p}
        @rb-import-supplier=${(e: HTMLElementEventMap['rb-import-supplier']) => w.chooseSupplier(e.detail.supplierId)}
        @rb-import-file=${(e: HTMLElementEventMap['rb-import-file']) => void w.chooseFile(e.detail.file)}
        @rb-import-demo=${(e: HTMLElementEventMap['rb-import-demo']) => void w.loadDemo(e.detail.file, e.detail.supplier)}
        @rb-import-stop=${() => w.cancel()}
      ></rb-import-source>
      ${p.kind === 'read' && w.supplier && w.source ? this.renderRead(book, w.supplier, p.analysis, w.source) : ''}
      <rb-import-batches></rb-import-batches>`;
  }

  private renderRead(book: Book, supplier: Supplier, a: PriceAnalysis, source: ImportSource) {
    const w = this.work;
    if (!a.readable) {
      return html`<section class="sheet" aria-labelledby="import-unreadable-h">
        <h2 id="import-unreadable-h">The file could not be read</h2>
        <p class="why">Nothing can be imported from it. Check it is the supplier’s price list saved as CSV or text.</p>
        <rb-import-problems .problems=${a.problems}></rb-import-problems>
        ${w.overrides.encoding
          ? html`<button type="button" data-testid="encoding-auto" @click=${() => w.setOverrides({ encoding: undefined })}>
              Read it again with the encoding found automatically
            </button>`
          : ''}
      </section>`;
    }
    const plan = w.previewPlan(book, supplier, a, source.name);
    return html`<rb-import-format
        .analysis=${a}
        .overrides=${w.overrides}
        @rb-import-overrides=${(e: HTMLElementEventMap['rb-import-overrides']) => w.setOverrides(e.detail.patch)}
      ></rb-import-format>
      <section class="sheet" aria-labelledby="import-mapping-h">
        <h2 id="import-mapping-h">Columns</h2>
        <p class="why">
          Which column holds which quote field. Change any that is wrong; the confirmed mapping is remembered for
          ${supplier.name} and used for their next file.
        </p>
        <rb-import-mapping
          .analysis=${a}
          .remembered=${supplier.mapping?.columns}
          .chosen=${w.chosenColumns}
          .unused=${w.unusedKeys}
          ?confirmed=${w.mappingConfirmed}
          .matchesRemembered=${w.mappingRemembered}
          @rb-mapping-change=${(e: HTMLElementEventMap['rb-mapping-change']) => w.mapColumn(e.detail.key, e.detail.header)}
          @rb-mapping-confirm=${() => w.confirmMapping()}
        ></rb-import-mapping>
      </section>
      ${plan
        ? ''
        : html`<p class="muted" role="status" data-testid="import-planning">Matching the file’s ${grouped(a.offers.length)} offers to the Book’s parts…</p>`}
      <rb-import-review
        .analysis=${a}
        .plan=${plan}
        .decisions=${w.decisions}
        @rb-import-decisions=${(e: HTMLElementEventMap['rb-import-decisions']) => w.setDecisions(e.detail.decisions)}
      ></rb-import-review>
      <rb-import-commit
        .supplierName=${supplier.name}
        .analysis=${a}
        .plan=${plan}
        .mappingConfirmed=${w.mappingConfirmed}
        .allowReimport=${w.allowReimport}
        .committing=${w.committing}
        .commitProblem=${w.commitProblem}
        @rb-import-allow-reimport=${(e: HTMLElementEventMap['rb-import-allow-reimport']) => w.setAllowReimport(e.detail.allow)}
        @rb-import-commit=${(e: HTMLElementEventMap['rb-import-commit']) => void w.commit(e.detail.validRowsOnly)}
      ></rb-import-commit>`;
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-import-page': RbImportPage;
  }
}
