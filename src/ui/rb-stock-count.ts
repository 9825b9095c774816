// A stock count file imported as price files are: the part number and count columns guessed from their headers and
// changed by the person, the encoding and delimiter found out (the encoding may be chosen), every bad row named, the
// differences from the ledger previewed and recorded all or nothing as an import batch; earlier counts undone here
// (or in the import history) by their batch.
import { LitElement, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import type { Book, ImportBatch } from '../domain/book.ts';
import { todayIso } from '../domain/dates.ts';
import { grouped } from '../domain/format.ts';
import { undoBatch } from '../domain/quotes.ts';
import { importCount } from '../domain/stock.ts';
import type { CountFile, CountResult } from '../domain/stock.ts';
import { COUNT_FIELDS, COUNT_FIELD_NAMES, analyseCountFile } from '../io/count-import.ts';
import type { CountAnalysis, CountColumns, CountField } from '../io/count-import.ts';
import { ENCODING_CHOICES } from '../io/price-decode.ts';
import type { EncodingChoice } from '../io/price-decode.ts';
import { BookController } from './book-context.ts';
import { buyingStyles } from './buying-styles.ts';
import './rb-import-problems.ts';
import { timeText } from './quote-text.ts';
import { pageStyles, problemStyles } from './styles.ts';

interface Loaded {
  name: string;
  bytes: Uint8Array;
  columns: CountColumns;
  encoding: EncodingChoice;
  analysis: CountAnalysis;
}

@customElement('rb-stock-count')
export class RbStockCount extends LitElement {
  static override styles = [pageStyles, problemStyles, buyingStyles];

  private readonly books = new BookController(this);
  @state() private date = todayIso();
  @state() private loaded: Loaded | undefined;
  @state() private message: { text: string; bad: boolean } | undefined;
  /** Each read replaces the last; an older read finishing late is dropped. */
  private reads = 0;

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const l = this.loaded;
    return html`<section class="sheet" aria-labelledby="count-h">
      <h2 id="count-h">Stock count from a file</h2>
      <p class="why">
        A CSV or text file with a column of maker part numbers and a column of counts, found by their headers; choose
        other columns if the guess is wrong. Every row must name a part of the Book once with a whole count; any
        problem refuses the whole file. A recorded count is kept as an import and can be undone below.
      </p>
      ${this.message ? html`<p class=${this.message.bad ? 'problem' : 'notice'} role=${this.message.bad ? 'alert' : 'status'} data-testid="count-message">${this.message.text}</p>` : ''}
      <div class="fieldrow">
        <label>file <input type="file" accept=".csv,.txt,.tsv,text/csv,text/plain" aria-label="stock count file" @change=${(e: Event) => this._onFile(e, book)} /></label>
        <label>date counted <input type="date" name="count-date" .value=${this.date} @change=${(e: Event) => this._onDate(e)} /></label>
      </div>
      ${l ? this.renderLoaded(book, l) : ''} ${this.renderBatches(book)}
    </section>`;
  }

  private renderLoaded(book: Book, l: Loaded) {
    const a = l.analysis;
    const counted = this.result(book, l);
    return html`<p data-testid="count-read">
        ${l.name}: ${a.readable ? `${a.encoding ?? ''}, ${a.delimiterName ?? ''} separated, header on line ${a.headerLine}, ${grouped(a.dataRows)} rows` : 'not readable as a table'}.
        ${a.encodingWarning ? html`<span class="problem">${a.encodingWarning}</span>` : ''}
      </p>
      <div class="fieldrow" data-testid="count-mapping">
        ${COUNT_FIELDS.map((f) => this.renderColumn(book, l, f))}
        <label
          >encoding
          <select name="encoding" @change=${(e: Event) => void this.reread(book, { encoding: (e.target as HTMLSelectElement).value as EncodingChoice })}>
            ${Object.values(ENCODING_CHOICES).map((c) => html`<option value=${c} ?selected=${c === l.encoding}>${c}</option>`)}
          </select></label
        >
      </div>
      ${a.problems.length
        ? html`<p class="problem" role="alert">Nothing can be counted from ${l.name} until every problem is put right: the whole file is refused.</p>
            <rb-import-problems .problems=${a.problems}></rb-import-problems>`
        : counted.ok
          ? this.renderPreview(book, l, counted.value)
          : html`<p class="problem" role="alert">${l.name} was not counted: ${counted.error}</p>`}`;
  }

  private renderColumn(book: Book, l: Loaded, f: CountField) {
    const a = l.analysis;
    const current = a.columns[f] ?? '';
    return html`<label
      >${COUNT_FIELD_NAMES[f]} column
      <select name=${`column-${f}`} @change=${(e: Event) => void this.reread(book, { columns: { ...a.columns, ...l.columns, [f]: (e.target as HTMLSelectElement).value } })}>
        ${current === '' ? html`<option value="" selected>choose a column</option>` : ''}
        ${a.headers.filter((h) => h.trim() !== '').map((h) => html`<option value=${h} ?selected=${h === current}>${h}</option>`)}
      </select>
      <span class="muted">${a.guessed.includes(f) ? 'guessed from its header' : current ? 'as you chose' : ''}</span></label
    >`;
  }

  private renderPreview(book: Book, l: Loaded, r: CountResult) {
    const mpn = new Map(book.parts.map((p) => [p.id, p.mpn] as const));
    return html`<p>${r.lines.length} parts counted on ${this.date}; ${r.lines.filter((x) => x.difference !== 0).length} differ from the ledger.</p>
      <div class="scroll">
        <table class="records" data-testid="count-preview">
          <thead>
            <tr>
              <th>mpn</th>
              <th class="num">ledger</th>
              <th class="num">counted</th>
              <th class="num">difference</th>
            </tr>
          </thead>
          <tbody>
            ${r.lines.map(
              (x) => html`<tr>
                <td class="code">${mpn.get(x.partId) ?? x.partId}</td>
                <td class="num">${grouped(x.before)}</td>
                <td class="num">${grouped(x.counted)}</td>
                <td class="num">${x.difference > 0 ? '+' : ''}${grouped(x.difference)}</td>
              </tr>`,
            )}
          </tbody>
        </table>
      </div>
      <div class="toolbar">
        <button type="button" class="primary" @click=${() => this.record(book, l)}>Record this count</button>
        <button type="button" class="quiet" @click=${() => (this.loaded = undefined)}>Discard</button>
      </div>`;
  }

  private renderBatches(book: Book) {
    const batches = book.importBatches.filter((b) => b.kind === 'stock count').sort((a, b) => b.at.localeCompare(a.at));
    if (batches.length === 0) return '';
    return html`<h3>Counts imported</h3>
      <div class="scroll">
        <table class="records" data-testid="count-batches">
          <thead>
            <tr>
              <th>file</th>
              <th>time</th>
              <th class="num">rows</th>
              <th class="num">movements</th>
              <th><span class="muted">undo</span></th>
            </tr>
          </thead>
          <tbody>
            ${batches.map(
              (b: ImportBatch) => html`<tr data-id=${b.id}>
                <td class="code">${b.fileName}</td>
                <td class="num">${timeText(b.at)}</td>
                <td class="num">${b.rows}</td>
                <td class="num">${(b.moves ?? []).length}</td>
                <td>${b.undone ? html`<span class="muted">undone</span>` : html`<button type="button" @click=${() => this.undo(b)}>Undo</button>`}</td>
              </tr>`,
            )}
          </tbody>
        </table>
      </div>`;
  }

  /** The count's movements and batch, worked out afresh from the Book of now. */
  private result(book: Book, l: Loaded) {
    const file: CountFile = { fileName: l.name, hash: l.analysis.hash, rows: l.analysis.dataRows, at: new Date().toISOString() };
    return importCount(book, this.date, l.analysis.lines, file);
  }

  private async _onFile(e: Event, book: Book): Promise<void> {
    const input = e.target as HTMLInputElement;
    const file = input.files?.[0];
    input.value = '';
    if (!file) return;
    this.message = undefined;
    const bytes = new Uint8Array(await file.arrayBuffer());
    await this.read(book, { name: file.name, bytes, columns: {}, encoding: ENCODING_CHOICES.auto });
  }

  private _onDate(e: Event): void {
    this.date = (e.target as HTMLInputElement).value;
  }

  private async reread(book: Book, patch: Partial<Pick<Loaded, 'columns' | 'encoding'>>): Promise<void> {
    const l = this.loaded;
    if (!l) return;
    await this.read(book, { name: l.name, bytes: l.bytes, columns: patch.columns ?? l.columns, encoding: patch.encoding ?? l.encoding });
  }

  private async read(book: Book, what: Omit<Loaded, 'analysis'>): Promise<void> {
    const turn = ++this.reads;
    const analysis = await analyseCountFile(book, what.bytes, { columns: what.columns, encoding: what.encoding });
    if (turn === this.reads) this.loaded = { ...what, analysis };
  }

  private async record(book: Book, l: Loaded): Promise<void> {
    const r = this.result(book, l);
    if (!r.ok) return void (this.message = { text: `Nothing recorded: ${r.error}.`, bad: true });
    const saved = await this.books.service?.save(r.value.change);
    if (!saved) return;
    if (!saved.ok) return void (this.message = { text: `Nothing recorded: ${saved.message}`, bad: true });
    this.message = { text: `The count from ${l.name} is recorded: ${(r.value.batch.moves ?? []).length} movements.`, bad: false };
    this.loaded = undefined;
  }

  private async undo(b: ImportBatch): Promise<void> {
    const service = this.books.service;
    if (!service) return;
    const r = undoBatch(service.book, b.id);
    if (!r.ok) return void (this.message = { text: `${b.fileName} not undone: ${r.reason}.`, bad: true });
    const saved = await service.save(r.change);
    this.message = saved.ok ? { text: `The count from ${b.fileName} is undone: ${r.change.put?.stockMoves?.length ?? 0} movements reversed, both kept in the history.`, bad: false } : { text: saved.message, bad: true };
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-stock-count': RbStockCount;
  }
}
