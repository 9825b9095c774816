// Export page: choose a run (or a variant and quantity), the CSV choices (delimiter, decimal, byte-order mark), and
// download the costed BOM or the purchase list as CSV, or the whole Book as a Book file. The bytes come from
// io/run-export.ts, the same module the CLI writes with.
import { LitElement, css, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, Run } from '../domain/book.ts';
import type { Result } from '../domain/costing.ts';
import { MAX_RUN_QUANTITY } from '../domain/freeze.ts';
import { isIsoDate } from '../domain/dates.ts';
import { purchaseList } from '../domain/purchase.ts';
import { bookFileName } from '../io/book-file.ts';
import {
  DEFAULT_EXPORT_OPTIONS,
  costVariant,
  costedBomCsv,
  exportBytes,
  exportOptionsProblem,
  purchaseListCsv,
  runCosting,
  runAbout,
  runExportFileName,
} from '../io/run-export.ts';
import type { ExportOptions, RunCosting, RunFileAbout } from '../io/run-export.ts';
import { BookController } from './book-context.ts';
import { downloadBookFile } from './book-download.ts';
import type { NoticeDetail } from './rb-book-menu.ts';
import { choiceStyles } from './rb-csv-choices.ts';
import { sortRuns } from './run-order.ts';
import { pageStyles } from './styles.ts';

/** Hands bytes to the browser as a download. */
export function downloadFile(bytes: Uint8Array, name: string, type: string): void {
  const blob = new Blob([bytes as Uint8Array<ArrayBuffer>], { type });
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  a.click();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/** Downloads a run's costed BOM or purchase list; returns why no file was made, or undefined. */
export function downloadRunFile(
  costing: RunCosting,
  quantity: number,
  dateWanted: string | undefined,
  variantCode: string,
  what: 'costed-bom' | 'purchase-list',
  options: ExportOptions = DEFAULT_EXPORT_OPTIONS,
  about: RunFileAbout = {},
): string | undefined {
  const text = what === 'costed-bom' ? costedBomCsv(costing, options, about) : purchaseListCsv(costing, purchaseList(costing.bom, { dateWanted }), options, about);
  if (!text.ok) return text.error;
  downloadFile(exportBytes(text.value), runExportFileName(variantCode, quantity, what), 'text/csv;charset=utf-8');
  return undefined;
}

type Source = { kind: 'run'; runId: string } | { kind: 'variant'; variantId: string; quantity: string; dateWanted: string };

interface Subject {
  costing: Result<RunCosting>;
  quantity: number;
  dateWanted: string | undefined;
  variantCode: string;
  label: string;
  /** The Run of the Book the files name in their head. */
  about: RunFileAbout;
}

@customElement('rb-export-page')
export class RbExportPage extends LitElement {
  static override styles = [
    pageStyles,
    choiceStyles,
    css`
      fieldset {
        border: none;
        padding: 0;
        margin: 0 0 0.6rem;
        display: flex;
        gap: 1.2rem;
      }
      pre {
        font-family: var(--rb-mono);
        font-size: 0.75rem;
        background: var(--rb-paper);
        border: 1px solid var(--rb-rule);
        padding: 0.5rem;
        overflow-x: auto;
        max-height: 12rem;
        white-space: pre;
      }
      .actions {
        display: flex;
        gap: 0.6rem;
        flex-wrap: wrap;
        margin-top: 0.8rem;
      }
    `,
  ];

  private readonly books = new BookController(this);
  @state() private source: Source | undefined;
  @state() private options: ExportOptions = { ...DEFAULT_EXPORT_OPTIONS };
  private cache: { book: Book; key: string; subject: Subject } | undefined;
  /** The run opened on the Runs page when this page last chose its source (see BookService.openedRunId). */
  private openedRunSeen: string | undefined;

  override willUpdate(): void {
    const opened = this.books.service?.openedRunId;
    if (opened === this.openedRunSeen) return;
    this.openedRunSeen = opened;
    // A run opened on the Runs page since: a run chosen here gives way to it (a variant and quantity stays).
    if (this.source?.kind !== 'variant') this.source = undefined;
  }

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const source = this.source ?? this.defaultSource(book);
    const subject = source ? this.subject(book, source) : undefined;
    const clash = exportOptionsProblem(this.options);
    const preview = subject?.costing.ok && !clash ? costedBomCsv(subject.costing.value, this.options, subject.about) : undefined;
    return html`<section class="sheet" aria-labelledby="what-h">
        <h2 id="what-h">What to export</h2>
        <p class="why">A run exports as it is: a frozen run with its frozen prices. A variant and quantity are costed with today’s quotes.</p>
        <fieldset>
          <label><input type="radio" name="source" .checked=${source?.kind !== 'variant'} @change=${() => this.pickSource(book, 'run')} /> a run</label>
          <label><input type="radio" name="source" .checked=${source?.kind === 'variant'} @change=${() => this.pickSource(book, 'variant')} /> a variant and quantity</label>
        </fieldset>
        <div class="choices">${source ? this.renderSource(book, source) : html`<span></span><p class="empty">The Book has no runs and no variants.</p><span></span>`}</div>
      </section>
      <section class="sheet" aria-labelledby="csv-h">
        <h2 id="csv-h">CSV choices</h2>
        <p class="why">
          RFC 4180 files. Text that a spreadsheet could run as a formula is kept as text behind a leading apostrophe; numbers
          stay numbers. Amounts are rounded to cents per line and totals are the sums of the rows.
        </p>
        <rb-csv-choices .options=${this.options} @rb-csv-choices=${(e: CustomEvent<ExportOptions>) => (this.options = e.detail)}></rb-csv-choices>
        ${subject && !subject.costing.ok ? html`<p class="notice" role="alert">${subject.label} cannot be costed: ${subject.costing.error}</p>` : ''}
        ${subject?.costing.ok && !subject.costing.value.bom.complete
          ? html`<p class="notice" role="alert">Some lines of ${subject.label} are not priced; the files list them and their totals leave them out.</p>`
          : ''}
        <div class="actions">
          <button type="button" class="primary" ?disabled=${!subject?.costing.ok || !!clash} @click=${() => subject && this.download(subject, 'costed-bom')}>
            Download costed BOM CSV
          </button>
          <button type="button" class="primary" ?disabled=${!subject?.costing.ok || !!clash} @click=${() => subject && this.download(subject, 'purchase-list')}>
            Download purchase list CSV
          </button>
        </div>
        ${preview?.ok
          ? html`<h3 class="muted">First lines of the costed BOM file</h3>
              <pre data-testid="export-preview">${preview.value.replace(/^\uFEFF/, '').split('\r\n').slice(0, 6).join('\n')}</pre>`
          : ''}
      </section>
      <section class="sheet" aria-labelledby="book-h">
        <h2 id="book-h">The whole Book</h2>
        <p class="why">Everything in this Book as one ${bookFileName(book)} file, to keep a copy or open it in another browser.</p>
        <button type="button" @click=${() => void this.downloadBook(book)}>Download the Book file</button>
      </section>`;
  }

  private renderSource(book: Book, source: Source) {
    if (source.kind === 'run') {
      const codes = new Map(book.variants.map((v) => [v.id, v.code] as const));
      return html`<label class="k" for="x-run">run</label>
        <select id="x-run" @change=${(e: Event) => (this.source = { kind: 'run', runId: (e.target as HTMLSelectElement).value })}>
          ${book.runs.map(
            (r) => html`<option value=${r.id} ?selected=${r.id === source.runId}>
              ${r.name} — ${codes.get(r.variantId) ?? '?'} × ${r.quantity}${r.frozen ? ' (frozen)' : ''}
            </option>`,
          )}
        </select>
        <span class="hint">${book.runs.length === 0 ? 'no runs yet: add one on the Runs page' : ''}</span>`;
    }
    const q = source.quantity.trim();
    const qtyProblem = /^\d+$/.test(q) && Number(q) >= 1 && Number(q) <= MAX_RUN_QUANTITY ? undefined : `quantity must be a whole number from 1 to ${MAX_RUN_QUANTITY}`;
    const dateProblem = source.dateWanted.trim() === '' || isIsoDate(source.dateWanted.trim()) ? undefined : 'date wanted must be YYYY-MM-DD';
    const set = (patch: Partial<Omit<Source & { kind: 'variant' }, 'kind'>>) => (this.source = { ...source, ...patch });
    return html`<label class="k" for="x-variant">variant</label>
      <select id="x-variant" @change=${(e: Event) => set({ variantId: (e.target as HTMLSelectElement).value })}>
        ${book.variants.map((v) => html`<option value=${v.id} ?selected=${v.id === source.variantId}>${v.code} — ${v.name}</option>`)}
      </select>
      <span></span>
      <label class="k" for="x-quantity">quantity</label>
      <input id="x-quantity" type="text" aria-invalid=${qtyProblem ? 'true' : 'false'} .value=${source.quantity} @input=${(e: Event) => set({ quantity: (e.target as HTMLInputElement).value })} />
      ${qtyProblem ? html`<span class="problem">${qtyProblem}</span>` : html`<span class="hint">finished units</span>`}
      <label class="k" for="x-wanted">date wanted</label>
      <input id="x-wanted" type="text" placeholder="YYYY-MM-DD" aria-invalid=${dateProblem ? 'true' : 'false'} .value=${source.dateWanted} @input=${(e: Event) => set({ dateWanted: (e.target as HTMLInputElement).value })} />
      ${dateProblem ? html`<span class="problem">${dateProblem}</span>` : html`<span class="hint">optional: gives the purchase list its latest order dates</span>`}`;
  }

  /** The run last opened on the Runs page, else the one that page shows first (wanted soonest). */
  private defaultRun(book: Book): Run | undefined {
    const opened = this.books.service?.openedRunId;
    return book.runs.find((r) => r.id === opened) ?? sortRuns(book.runs)[0];
  }

  private defaultSource(book: Book): Source | undefined {
    const run = this.defaultRun(book);
    if (run) return { kind: 'run', runId: run.id };
    if (book.variants.length > 0) return { kind: 'variant', variantId: book.variants[0]!.id, quantity: String(book.settings.runSizes[0] ?? 1000), dateWanted: '' };
    return undefined;
  }

  private pickSource(book: Book, kind: Source['kind']): void {
    if (kind === 'run') {
      const run = this.defaultRun(book);
      this.source = run ? { kind: 'run', runId: run.id } : undefined;
    }
    else if (book.variants[0]) this.source = { kind: 'variant', variantId: book.variants[0].id, quantity: String(book.settings.runSizes[0] ?? 1000), dateWanted: '' };
  }

  /** What the files are made from; costed once per Book and choice. */
  private subject(book: Book, source: Source): Subject | undefined {
    const key = JSON.stringify(source);
    if (this.cache && this.cache.book === book && this.cache.key === key) return this.cache.subject;
    let subject: Subject | undefined;
    if (source.kind === 'run') {
      const run = book.runs.find((r) => r.id === source.runId);
      if (!run) return undefined;
      const code = book.variants.find((v) => v.id === run.variantId)?.code ?? run.variantId;
      subject = { costing: runCosting(book, run), quantity: run.quantity, dateWanted: run.dateWanted, variantCode: code, label: `run ${run.name}`, about: { run: run.name } };
    } else {
      const variant = book.variants.find((v) => v.id === source.variantId);
      const q = source.quantity.trim();
      const quantity = /^\d+$/.test(q) ? Number(q) : NaN;
      if (!variant) return undefined;
      const wanted = source.dateWanted.trim();
      const costing: Result<RunCosting> =
        Number.isSafeInteger(quantity) && quantity >= 1 && quantity <= MAX_RUN_QUANTITY
          ? costVariant(book, variant.id, quantity)
          : { ok: false, error: `quantity must be a whole number from 1 to ${MAX_RUN_QUANTITY}` };
      subject = { costing, quantity, dateWanted: isIsoDate(wanted) ? wanted : undefined, variantCode: variant.code, label: `${variant.code} × ${q}`, about: runAbout(book, variant.id, quantity) };
    }
    this.cache = { book, key, subject };
    return subject;
  }

  private notify(detail: NoticeDetail): void {
    this.dispatchEvent(new CustomEvent<NoticeDetail>('rb-notice', { detail, bubbles: true, composed: true }));
  }

  private download(subject: Subject, what: 'costed-bom' | 'purchase-list'): void {
    if (!subject.costing.ok) return;
    const problem = downloadRunFile(subject.costing.value, subject.quantity, subject.dateWanted, subject.variantCode, what, this.options, subject.about);
    if (problem) this.notify({ tone: 'problem', title: 'No file was made', lines: [problem] });
  }

  private async downloadBook(book: Book): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    const problem = await downloadBookFile(book);
    if (problem) {
      this.notify({ tone: 'problem', title: 'The Book was not downloaded', lines: [problem] });
      return;
    }
    const result = await service.markExported();
    if (!result.ok) this.notify({ tone: 'problem', title: 'The file was made, but the export date was not saved', lines: [result.message] });
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-export-page': RbExportPage;
  }
}
