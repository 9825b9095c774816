// The Book menu: start an empty Book, put the demo Book back, download the Book as a file, open a Book file.
// Anything that replaces the Book asks first; a file with problems is refused whole and the Book stays as it was.
import { LitElement, css, html } from 'lit';
import { customElement, query, state } from 'lit/decorators.js';
import type { Book } from '../domain/book.ts';
import { bookFileSizeProblem } from '../io/book-file.ts';
import { openBookFileInWorker } from '../io/book-worker-client.ts';
import type { BookFileStage } from '../io/book-worker-client.ts';
import { BookController } from './book-context.ts';
import { downloadBookFile } from './book-download.ts';
import type { RbConfirm } from './rb-confirm.ts';
import './rb-confirm.ts';
import { pageStyles } from './styles.ts';

/** Shown by the shell above the page: a result the person should read (problems in a file, a refused write). */
export interface NoticeDetail {
  tone: 'problem' | 'done';
  title: string;
  lines: string[];
}

/** How many problems of a refused file are listed; the rest are counted. */
const PROBLEMS_SHOWN = 8;

const STAGE_TEXT: Record<BookFileStage | 'writing' | 'saving', string> = {
  reading: 'Reading the Book file…',
  checking: 'Checking the Book file…',
  saving: 'Saving the opened Book…',
  writing: 'Writing the Book file…',
};

function counts(book: Book): string {
  return `${book.variants.length} variants, ${book.parts.length} parts, ${book.suppliers.length} suppliers, ${book.quotes.length} quotes`;
}

@customElement('rb-book-menu')
export class RbBookMenu extends LitElement {
  static override styles = [
    pageStyles,
    css`
      :host {
        display: block;
      }
      ul {
        list-style: none;
        margin: 0;
        padding: 0;
        display: grid;
        gap: 0.15rem;
      }
      button.item {
        border: none;
        background: none;
        border-radius: 0;
        padding: 0.15rem 0;
        text-align: left;
        font-size: 0.88rem;
        color: var(--rb-ink);
        text-decoration: underline;
        text-decoration-color: var(--rb-rule);
        text-underline-offset: 0.2em;
      }
      button.item:hover {
        background: none;
        text-decoration-color: var(--rb-accent);
        color: var(--rb-accent-ink);
      }
      input[type='file'] {
        display: none;
      }
      .busy {
        margin: 0.3rem 0 0;
        font-size: 0.85rem;
        color: var(--rb-accent-ink);
      }
    `,
  ];

  private readonly books = new BookController(this);
  @query('rb-confirm') private confirm!: RbConfirm;
  @query('input[type=file]') private fileInput!: HTMLInputElement;
  /** What the menu is doing with a Book file, shown while it works (the page stays usable meanwhile). */
  @state() private busy: BookFileStage | 'writing' | 'saving' | undefined;

  override render() {
    const busy = this.busy !== undefined;
    return html`<ul>
        <li><button class="item" type="button" ?disabled=${busy} @click=${this._onDownload}>Download this Book as a file</button></li>
        <li><button class="item" type="button" ?disabled=${busy} @click=${this._onPickFile}>Open a Book file…</button></li>
        <li><button class="item" type="button" ?disabled=${busy} @click=${this._onEmpty}>Start an empty Book…</button></li>
        <li><button class="item" type="button" ?disabled=${busy} @click=${this._onDemo}>Put the demo Book back…</button></li>
      </ul>
      ${busy ? html`<p class="busy" role="status" data-testid="book-file-progress">${STAGE_TEXT[this.busy!]}</p>` : ''}
      <input type="file" accept=".json,application/json" aria-label="Book file to open" @change=${this._onFile} />
      <rb-confirm></rb-confirm>`;
  }

  private notify(detail: NoticeDetail): void {
    this.dispatchEvent(new CustomEvent<NoticeDetail>('rb-notice', { detail, bubbles: true, composed: true }));
  }

  private async _onDownload(): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    if (this.busy) return;
    this.busy = 'writing';
    let problem: string | undefined;
    try {
      problem = await downloadBookFile(service.book);
    } finally {
      this.busy = undefined;
    }
    if (problem) {
      this.notify({ tone: 'problem', title: 'The Book was not downloaded', lines: [problem] });
      return;
    }
    const result = await service.markExported();
    if (!result.ok) this.notify({ tone: 'problem', title: 'The file was made, but the export date was not saved', lines: [result.message] });
  }

  private _onPickFile(): void {
    this.fileInput.value = '';
    this.fileInput.click();
  }

  private async _onFile(): Promise<void> {
    const service = this.books.service;
    const file = this.fileInput.files?.[0];
    if (!service || !file) return;
    const tooBig = bookFileSizeProblem(file.size);
    if (tooBig) {
      this.notify({ tone: 'problem', title: `${file.name} was not opened: the Book in this browser is unchanged`, lines: [tooBig.message] });
      return;
    }
    if (this.busy) return;
    // Reading, JSON.parse and validation run in a worker: the page keeps drawing and shows which stage it is in.
    this.busy = 'reading';
    let parsed: Awaited<ReturnType<typeof openBookFileInWorker>>;
    try {
      parsed = await openBookFileInWorker(file, (stage) => (this.busy = stage));
    } catch (e) {
      this.notify({ tone: 'problem', title: `Could not read ${file.name}: the Book in this browser is unchanged`, lines: [e instanceof Error ? e.message : String(e)] });
      return;
    } finally {
      this.busy = undefined;
    }
    if (!parsed.ok) {
      const shown = parsed.problems.slice(0, PROBLEMS_SHOWN).map((p) => `${p.path || '(whole file)'}: ${p.message}`);
      const more = Math.max(parsed.total, parsed.problems.length) - shown.length;
      if (more > 0) shown.push(`… and ${more} more problem${more === 1 ? '' : 's'}.`);
      this.notify({
        tone: 'problem',
        title: `${file.name} was not opened: the Book in this browser is unchanged`,
        lines: shown,
      });
      return;
    }
    const yes = await this.confirm.ask({
      title: 'Replace this Book with the file?',
      message: `“${parsed.book.settings.bookName}” (${counts(parsed.book)}) will replace everything in this browser's Book. Download the current Book first if you may want it again.`,
      confirmLabel: 'Replace with the file',
    });
    if (!yes) return;
    this.busy = 'saving';
    let result: Awaited<ReturnType<typeof service.replaceBook>>;
    try {
      // The opened file is a copy of the Book as it now is: the reminder to download one counts from here.
      result = await service.replaceBook(parsed.book, new Date());
    } finally {
      this.busy = undefined;
    }
    this.notify(
      result.ok
        ? { tone: 'done', title: `Opened ${file.name}`, lines: [counts(parsed.book)] }
        : { tone: 'problem', title: `${file.name} was not opened`, lines: [result.message] },
    );
  }

  private async _onEmpty(): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    const yes = await this.confirm.ask({
      title: 'Start an empty Book?',
      message: 'Every variant, part, supplier, quote and run in this browser will be removed; the built-in checks stay. Download the current Book first if you may want it again.',
      confirmLabel: 'Empty the Book',
    });
    if (!yes) return;
    const result = await service.replaceBook(service.empty());
    if (!result.ok) this.notify({ tone: 'problem', title: 'The Book was not emptied', lines: [result.message] });
  }

  private async _onDemo(): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    const yes = await this.confirm.ask({
      title: 'Put the demo Book back?',
      message: 'The invented demo family replaces everything in this browser. Download the current Book first if you may want it again.',
      confirmLabel: 'Load the demo Book',
    });
    if (!yes) return;
    const result = await service.replaceBook(service.demo());
    if (!result.ok) this.notify({ tone: 'problem', title: 'The demo Book was not loaded', lines: [result.message] });
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-book-menu': RbBookMenu;
  }
  interface HTMLElementEventMap {
    'rb-notice': CustomEvent<NoticeDetail>;
  }
}
