// Import step 1: whose prices these are (or a new supplier, created here) and the price file, chosen from disk or
// one of the shipped demo files, with the reading's progress and a Stop.
import { LitElement, css, html } from 'lit';
import type { PropertyValues } from 'lit';
import { customElement, property, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book } from '../domain/book.ts';
import { newId } from '../domain/book.ts';
import { grouped } from '../domain/format.ts';
import { BookController } from './book-context.ts';
import { field, nothingSaved } from './form-fields.ts';
import { NEW_SUPPLIER, plural } from './import-controller.ts';
import type { ImportPhase, ImportSource } from './import-controller.ts';
import type { FieldProblems, SupplierDraft } from './record-forms.ts';
import { supplierDraft, validateSupplier } from './record-forms.ts';
import { disabledButtonStyles, pageStyles, ruledControlStyles } from './styles.ts';

/** The invented demo price files shipped in public/demo, each in another layout. */
export const DEMO_FILES = [
  { file: 'halvern-price-list-2026-09.csv', supplier: 'Halvern Component Supply', what: 'wide layout, comma, EUR' },
  { file: 'kelvaro-quote-2026-08.csv', supplier: 'Kelvaro Parts Direct', what: 'long layout, one row per break, USD' },
  { file: 'brindlecote-passives-2026-07.csv', supplier: 'Brindlecote Electronics', what: 'semicolons, decimal commas, prices per 100, GBP' },
] as const;

export type ImportSupplierDetail = { supplierId: string };
export type ImportFileDetail = { file: File };
export type ImportDemoDetail = { file: string; supplier: string };

@customElement('rb-import-source')
export class RbImportSource extends LitElement {
  static override styles = [
    pageStyles,
    disabledButtonStyles,
    ruledControlStyles('.pick select'),
    css`
      .pick {
        display: flex;
        flex-wrap: wrap;
        gap: 0.6rem 1.2rem;
        align-items: baseline;
      }
      .label {
        font-family: var(--rb-mono);
        font-size: 0.8rem;
        color: var(--rb-accent-ink);
      }
      ul.demo {
        margin: 0.4rem 0 0;
        padding-left: 1.1rem;
      }
      ul.demo li {
        margin: 0.15rem 0;
      }
      .progress {
        display: flex;
        gap: 0.8rem;
        align-items: center;
        margin-top: 0.6rem;
      }
      progress {
        width: 22rem;
        height: 0.9rem;
        accent-color: var(--rb-accent);
      }
      /* The new-supplier form's actions: laid out by the shared form.record rules, and free to wrap. */
      .actions {
        flex-wrap: wrap;
      }
    `,
  ];

  private readonly books = new BookController(this);
  @property({ attribute: false }) supplierId = '';
  @property({ attribute: false }) source: ImportSource | undefined;
  @property({ attribute: false }) sourceProblem: string | undefined;
  @property({ attribute: false }) phase: ImportPhase = { kind: 'idle' };
  @state() private newSupplier: { draft: SupplierDraft; problems: FieldProblems; saveError?: string } | undefined;

  protected override willUpdate(changed: PropertyValues<this>): void {
    // A supplier chosen (or "New supplier…" chosen again) starts the form afresh.
    if (changed.has('supplierId')) this.newSupplier = undefined;
  }

  protected override updated(changed: PropertyValues<this>): void {
    // The file is spent once imported: the input forgets it, so choosing it again reads it again.
    if (changed.has('source') && !this.source) {
      const input = this.renderRoot.querySelector<HTMLInputElement>('#import-file');
      if (input) input.value = '';
    }
  }

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const supplier = book.suppliers.find((s) => s.id === this.supplierId);
    const suppliers = [...book.suppliers].sort((a, b) => a.name.localeCompare(b.name));
    const creating = this.supplierId === NEW_SUPPLIER;
    return html`<section class="sheet" aria-labelledby="import-source-h">
      <h2 id="import-source-h">Supplier and price file</h2>
      <p class="why">
        Choose whose prices these are, then a CSV or text file as the supplier sent it. Nothing is written to the Book
        until you import; reading happens in the background and can be repeated as often as you like.
      </p>
      <div class="pick">
        <span>
          <label class="label" for="import-supplier">supplier</label>
          <select id="import-supplier" .value=${live(this.supplierId)} @change=${this._onSupplier}>
            <option value="" ?selected=${this.supplierId === ''}>— choose —</option>
            ${suppliers.map((s) => html`<option value=${s.id} ?selected=${s.id === this.supplierId}>${s.name} (${s.currency})</option>`)}
            <option value=${NEW_SUPPLIER} ?selected=${creating}>New supplier…</option>
          </select>
        </span>
        ${supplier
          ? html`<span class="muted" data-testid="supplier-mapping"
              >${supplier.mapping
                ? `A column mapping from an earlier import is remembered for ${supplier.name}.`
                : `No mapping remembered for ${supplier.name} yet: columns are guessed from the header words.`}</span
            >`
          : ''}
      </div>
      ${creating ? this.renderNewSupplier(book) : ''}
      <div class="pick" style="margin-top: 0.8rem">
        <span>
          <label class="label" for="import-file">price file</label>
          <input id="import-file" type="file" accept=".csv,.txt,.tsv,text/csv,text/plain" data-testid="price-file" @change=${this._onFile} />
        </span>
        ${this.source ? html`<span>Chosen: <strong class="code" data-testid="file-name">${this.source.name}</strong> (${plural(this.source.bytes.length, 'byte')})</span>` : ''}
      </div>
      <div>
        <span class="muted">Or try one of the demo price files (invented suppliers and prices):</span>
        <ul class="demo">
          ${DEMO_FILES.map(
            (d) => html`<li>
              <button type="button" class="quiet" @click=${() => this.emit('rb-import-demo', { file: d.file, supplier: d.supplier })}>${d.file}</button>
              <span class="muted">— ${d.supplier}; ${d.what}</span>
            </li>`,
          )}
        </ul>
      </div>
      ${this.sourceProblem ? html`<p class="notice" role="alert">${this.sourceProblem}</p>` : ''}
      ${this.renderProgress()}
    </section>`;
  }

  private renderNewSupplier(book: Book) {
    const ns = this.newSupplier ?? { draft: supplierDraft(book.settings), problems: {} };
    const d = ns.draft;
    const base = book.settings.baseCurrency;
    const cur = d.currency.trim().toUpperCase();
    const set = (patch: Partial<SupplierDraft>): void => {
      this.newSupplier = { ...ns, draft: { ...d, ...patch } };
    };
    return html`<form class="record" novalidate aria-label="New supplier" style="margin-top: 0.8rem" @submit=${(e: Event) => this.createSupplier(e, book, ns.draft)}>
      ${field({ name: 'name', label: 'name', value: d.name, problem: ns.problems.name, hint: 'unique in the Book', onInput: (v) => set({ name: v }) })}
      ${field({
        name: 'currency',
        label: 'currency',
        value: d.currency,
        problem: ns.problems.currency,
        hint: 'prices without a currency are read in this one (ISO 4217)',
        selectOnFocus: true,
        onInput: (v) => {
          const c = v.trim().toUpperCase();
          const known = c === base ? '1' : book.settings.rates[c];
          set({ currency: v, rate: known === undefined ? d.rate : String(known) });
        },
      })}
      ${cur === base
        ? ''
        : field({ name: 'rate', label: 'rate', value: d.rate, problem: ns.problems.rate, hint: `${base} for one ${cur || 'unit'}`, onInput: (v) => set({ rate: v }) })}
      ${ns.saveError ? html`<p class="notice" role="alert" style="grid-column: 1 / -1">${ns.saveError}</p>` : ''}
      <div class="actions">
        <button type="submit" class="primary">Create the supplier</button>
        ${nothingSaved(ns.problems)}
      </div>
    </form>`;
  }

  private renderProgress() {
    const p = this.phase;
    if (p.kind === 'reading') {
      const max = Math.max(this.source?.lines ?? 1, p.rows, 1);
      return html`<div class="progress" role="status" data-testid="import-progress">
        <progress max=${max} value=${p.rows} aria-label="Rows read"></progress>
        <span>${plural(p.rows, 'row')} read · ${grouped(p.rowsPerSecond)} rows/s</span>
        <button type="button" @click=${() => this.emit('rb-import-stop', undefined)}>Stop</button>
      </div>`;
    }
    if (p.kind === 'read') {
      const rate = p.seconds > 0 ? Math.round(p.analysis.dataRows / p.seconds) : 0;
      return html`<div class="progress" data-testid="import-progress">
        <progress max="1" value="1" aria-label="Rows read"></progress>
        <span>${plural(p.analysis.dataRows, 'row')} read and checked in ${p.seconds.toFixed(2)} s${rate ? ` · ${grouped(rate)} rows/s` : ''}</span>
      </div>`;
    }
    if (p.kind === 'failed') return html`<p class="notice" role="alert">${p.message}</p>`;
    return '';
  }

  private readonly _onSupplier = (ev: Event): void => {
    this.emit('rb-import-supplier', { supplierId: (ev.target as HTMLSelectElement).value });
  };

  private readonly _onFile = (ev: Event): void => {
    const file = (ev.target as HTMLInputElement).files?.[0];
    if (file) this.emit('rb-import-file', { file });
  };

  private async createSupplier(ev: Event, book: Book, draft: SupplierDraft): Promise<void> {
    ev.preventDefault();
    const service = this.books.service;
    if (!service) return;
    const r = validateSupplier(draft, book, undefined, () => newId('sup'));
    if (!r.ok) {
      this.newSupplier = { draft, problems: r.problems };
      return;
    }
    const { record, settings } = r.record;
    const saved = await service.save(settings ? { put: { suppliers: [record] }, settings } : { put: { suppliers: [record] } });
    if (!saved.ok) {
      this.newSupplier = { draft, problems: {}, saveError: saved.message };
      return;
    }
    this.emit('rb-import-supplier', { supplierId: record.id });
  }

  private emit<K extends 'rb-import-supplier' | 'rb-import-file' | 'rb-import-demo' | 'rb-import-stop'>(
    type: K,
    detail: HTMLElementEventMap[K]['detail'],
  ): void {
    this.dispatchEvent(new CustomEvent(type, { detail, bubbles: true, composed: true }));
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-import-source': RbImportSource;
  }
  interface HTMLElementEventMap {
    'rb-import-supplier': CustomEvent<ImportSupplierDetail>;
    'rb-import-file': CustomEvent<ImportFileDetail>;
    'rb-import-demo': CustomEvent<ImportDemoDetail>;
    'rb-import-stop': CustomEvent<undefined>;
  }
}
