// Import page: a supplier's price file read and checked in a Web Worker (progress in rows and rows/s), its detected
// format and column mapping shown to confirm or change, every problem listed by row and column, unmatched rows decided
// one by one, and the import committed as one Book save: everything, or only the valid rows when asked for explicitly.
import { LitElement, css, html } from 'lit';
import { customElement, state } from 'lit/decorators.js';
import { live } from 'lit/directives/live.js';
import type { Book, ColumnMapping, Supplier } from '../domain/book.ts';
import { newId } from '../domain/book.ts';
import { todayIso } from '../domain/dates.ts';
import { grouped } from '../domain/format.ts';
import type { EncodingChoice } from '../io/price-decode.ts';
import type { Decimal, DateOrder, PriceUnit } from '../io/price-map.ts';
import { knownCurrencies } from '../io/price-import.ts';
import { planImport } from '../io/price-plan.ts';
import type { ImportPlan, UnmatchedDecision } from '../io/price-plan.ts';
import { DELIMITER_NAMES } from '../io/price-read.ts';
import type { Delimiter } from '../io/price-read.ts';
import type { AnalyseOptions, PriceAnalysis } from '../io/price-validate.ts';
import { runPriceImportInWorker } from '../io/price-worker-client.ts';
import { BookController } from './book-context.ts';
import { field, nothingSaved } from './form-fields.ts';
import type { FieldProblems, SupplierDraft } from './record-forms.ts';
import { supplierDraft, validateSupplier } from './record-forms.ts';
import './rb-import-batches.ts';
import './rb-import-mapping.ts';
import type { MappingChangeDetail } from './rb-import-mapping.ts';
import { breaksText, leadText } from './quote-text.ts';
import { pageStyles } from './styles.ts';

/** The invented demo price files shipped in public/demo, each in another layout. */
export const DEMO_FILES = [
  { file: 'halvern-price-list-2026-09.csv', supplier: 'Halvern Component Supply', what: 'wide layout, comma, EUR' },
  { file: 'kelvaro-quote-2026-08.csv', supplier: 'Kelvaro Parts Direct', what: 'long layout, one row per break, USD' },
  { file: 'brindlecote-passives-2026-07.csv', supplier: 'Brindlecote Electronics', what: 'semicolons, decimal commas, prices per 100, GBP' },
] as const;

/** Larger files are refused before reading: a price list this big is almost certainly the wrong file. */
const MAX_FILE_BYTES = 64 * 1024 * 1024;
const PREVIEW_ROWS = 20;
const PROBLEM_ROWS = 200;
const UNMATCHED_ROWS = 200;
const NEW_SUPPLIER = '__new__';

interface Source {
  name: string;
  bytes: Uint8Array;
  /** Line breaks in the file: the progress bar's end, near enough. */
  lines: number;
}

interface Overrides {
  /** Unset: found automatically (UTF-8, else Windows-1252, line by line when a UTF-8 file has a few that are not). */
  encoding?: EncodingChoice;
  decimal?: Decimal;
  delimiter?: Delimiter;
  priceUnit?: PriceUnit;
  dateOrder?: DateOrder;
}

type Phase =
  | { kind: 'idle' }
  | { kind: 'reading'; rows: number; rowsPerSecond: number }
  | { kind: 'read'; analysis: PriceAnalysis; seconds: number }
  | { kind: 'failed'; message: string };

interface Done {
  fileName: string;
  supplier: string;
  newQuotes: number;
  superseded: number;
  newParts: number;
  skipped: number;
  validOnly: boolean;
  leftOut: number;
}

function countLines(bytes: Uint8Array): number {
  let n = 0;
  for (let i = 0; i < bytes.length; i++) if (bytes[i] === 10) n++;
  return bytes.length > 0 && bytes[bytes.length - 1] !== 10 ? n + 1 : n;
}

function plural(n: number, one: string, many = `${one}s`): string {
  return `${grouped(n)} ${n === 1 ? one : many}`;
}

@customElement('rb-import-page')
export class RbImportPage extends LitElement {
  static override styles = [
    pageStyles,
    css`
      button:disabled {
        opacity: 0.45;
        cursor: not-allowed;
      }
      .pick {
        display: flex;
        flex-wrap: wrap;
        gap: 0.6rem 1.2rem;
        align-items: baseline;
      }
      .pick select,
      .overrides select,
      td select {
        font: inherit;
        font-size: 0.88rem;
        padding: 0.15rem 0.3rem;
        border: 1px solid var(--rb-rule);
        border-bottom: 2px solid var(--rb-ink);
        background: var(--rb-paper);
        color: var(--rb-ink);
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
      dl.found {
        display: grid;
        grid-template-columns: max-content minmax(16rem, max-content) max-content;
        justify-content: start;
        gap: 0.3rem 1rem;
        margin: 0;
        align-items: baseline;
      }
      dl.found dt {
        font-family: var(--rb-mono);
        font-size: 0.8rem;
        color: var(--rb-accent-ink);
      }
      dl.found dd {
        margin: 0;
      }
      .good {
        color: var(--rb-pass);
      }
      .bad {
        color: var(--rb-fail);
      }
      .warn {
        padding: 0.4rem 0.7rem;
        border-left: 3px solid var(--rb-margin);
        background: var(--rb-margin-bg);
        margin: 0 0 0.8rem;
      }
      .done {
        padding: 0.5rem 0.8rem;
        border-left: 4px solid var(--rb-pass);
        background: var(--rb-highlight);
        margin: 0 0 1rem;
      }
      .actions {
        display: flex;
        flex-wrap: wrap;
        gap: 0.8rem;
        align-items: baseline;
      }
      td.desc {
        max-width: 22rem;
        overflow-wrap: anywhere;
      }
      td.breaks {
        font-family: var(--rb-mono);
        font-size: 0.8rem;
      }
      table.problems td.reason {
        color: var(--rb-fail);
      }
      table.problems td.value {
        font-family: var(--rb-mono);
        font-size: 0.82rem;
        max-width: 18rem;
        overflow-wrap: anywhere;
      }
      ul.notes {
        margin: 0.4rem 0 0;
        padding-left: 1.1rem;
        font-size: 0.88rem;
        color: var(--rb-na);
      }
    `,
  ];

  private readonly books = new BookController(this);
  @state() private supplierId = '';
  @state() private newSupplier: { draft: SupplierDraft; problems: FieldProblems; saveError?: string } | undefined;
  @state() private source: Source | undefined;
  @state() private sourceProblem: string | undefined;
  @state() private overrides: Overrides = {};
  /** Columns chosen on this page; undefined while the supplier's remembered mapping and guesses stand. */
  @state() private chosenColumns: Record<string, string> | undefined;
  @state() private mappingConfirmed = false;
  @state() private phase: Phase = { kind: 'idle' };
  @state() private decisions: Record<string, UnmatchedDecision> = {};
  @state() private allowReimport = false;
  @state() private showAllProblems = false;
  @state() private showAllUnmatched = false;
  @state() private committing = false;
  @state() private commitProblem: string | undefined;
  @state() private done: Done | undefined;

  private abort: AbortController | undefined;
  private planCache: { key: unknown[]; plan: ImportPlan } | undefined;

  override disconnectedCallback(): void {
    super.disconnectedCallback();
    this.abort?.abort();
  }

  override render() {
    const book = this.books.book;
    if (!book) return html``;
    const supplier = book.suppliers.find((s) => s.id === this.supplierId);
    return html`${this.done ? this.renderDone(this.done) : ''} ${this.renderSource(book, supplier)}
      ${this.renderRead(book, supplier)}
      <rb-import-batches></rb-import-batches>`;
  }

  // ---- step 1: supplier and file ------------------------------------------------------------------------------

  private renderSource(book: Book, supplier: Supplier | undefined) {
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
              <button type="button" class="quiet" @click=${() => this.loadDemo(book, d.file, d.supplier)}>${d.file}</button>
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
        <button type="button" @click=${() => this.cancel()}>Stop</button>
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

  // ---- step 2: what was read ----------------------------------------------------------------------------------

  private renderRead(book: Book, supplier: Supplier | undefined) {
    const p = this.phase;
    if (p.kind !== 'read' || !supplier || !this.source) return '';
    const a = p.analysis;
    if (!a.readable) {
      return html`<section class="sheet" aria-labelledby="import-unreadable-h">
        <h2 id="import-unreadable-h">The file could not be read</h2>
        <p class="why">Nothing can be imported from it. Check it is the supplier’s price list saved as CSV or text.</p>
        ${this.renderProblems(a.problems)}
        ${this.overrides.encoding
          ? html`<button type="button" data-testid="encoding-auto" @click=${() => this.reanalyse({ overrides: { ...this.overrides, encoding: undefined } })}>
              Read it again with the encoding found automatically
            </button>`
          : ''}
      </section>`;
    }
    const plan = this.previewPlan(book, supplier, a, this.source.name);
    return html`${this.renderFormat(a)}
      <section class="sheet" aria-labelledby="import-mapping-h">
        <h2 id="import-mapping-h">Columns</h2>
        <p class="why">
          Which column holds which quote field. Change any that is wrong; the confirmed mapping is remembered for
          ${supplier.name} and used for their next file.
        </p>
        <rb-import-mapping
          .analysis=${a}
          .remembered=${supplier.mapping?.columns}
          .chosen=${this.chosenColumns}
          ?confirmed=${this.mappingConfirmed}
          @rb-mapping-change=${this._onMappingChange}
          @rb-mapping-confirm=${() => (this.mappingConfirmed = true)}
        ></rb-import-mapping>
      </section>
      ${this.renderPreview(a, plan)}
      <section class="sheet" aria-labelledby="import-problems-h">
        <h2 id="import-problems-h">Problems</h2>
        <p class="why">Every row is checked before anything is written. Each problem names its file line, column and value.</p>
        ${plan.problems.length === 0
          ? html`<p class="good" data-testid="no-problems">✓ No problems: every row can be imported.</p>`
          : this.renderProblems(plan.problems)}
      </section>
      ${this.renderUnmatched(plan)} ${this.renderCommit(supplier, a, plan)}`;
  }

  private renderFormat(a: PriceAnalysis) {
    const o = this.overrides;
    const select = <T extends string>(
      id: string,
      value: T | undefined,
      choices: readonly (readonly [T, string])[],
      onChange: (v: T | undefined) => void,
    ) => html`<select
      id=${id}
      .value=${live(value ?? '')}
      @change=${(e: Event) => {
        const v = (e.target as HTMLSelectElement).value;
        onChange(v === '' ? undefined : (v as T));
      }}
    >
      <option value="" ?selected=${value === undefined}>as found</option>
      ${choices.map(([v, label]) => html`<option value=${v} ?selected=${v === value}>${label}</option>`)}
    </select>`;
    const setOverride = (patch: Overrides): void => this.reanalyse({ overrides: { ...this.overrides, ...patch } });
    const unitWords: Record<PriceUnit, string> = { unit: 'per unit', per100: 'per 100', per1000: 'per 1000', pack: 'per pack' };
    return html`<section class="sheet" aria-labelledby="import-format-h">
      <h2 id="import-format-h">What the file looks like</h2>
      <p class="why">Found by reading the file. Override any line that is wrong and the file is read again.</p>
      <dl class="found overrides" data-testid="file-format">
        <dt>encoding</dt>
        <dd data-testid="found-encoding">${a.encoding ?? 'unknown'}</dd>
        <dd>
          ${select<EncodingChoice>(
            'ov-encoding',
            o.encoding,
            [['utf-8', 'UTF-8'], ['windows-1252', 'Windows-1252']] as const,
            (v) => setOverride({ encoding: v }),
          )}
        </dd>
        <dt>delimiter</dt>
        <dd data-testid="found-delimiter">${a.delimiterName ?? 'unknown'}${a.headerLine > 1 ? `; header on line ${a.headerLine}` : ''}</dd>
        <dd>
          ${select<Delimiter>(
            'ov-delimiter',
            o.delimiter,
            (Object.keys(DELIMITER_NAMES) as Delimiter[]).map((d) => [d, DELIMITER_NAMES[d]] as const),
            (v) => setOverride({ delimiter: v }),
          )}
        </dd>
        <dt>decimal</dt>
        <dd data-testid="found-decimal">${a.decimalReason || (a.decimal === ',' ? 'decimal comma' : 'decimal point')}</dd>
        <dd>${select<Decimal>('ov-decimal', o.decimal, [['.', 'decimal point'], [',', 'decimal comma']] as const, (v) => setOverride({ decimal: v }))}</dd>
        <dt>prices</dt>
        <dd data-testid="found-price-unit">${unitWords[a.mapping.priceUnit ?? 'unit']}</dd>
        <dd>
          ${select<PriceUnit>(
            'ov-price-unit',
            o.priceUnit,
            (Object.keys(unitWords) as PriceUnit[]).map((u) => [u, unitWords[u]] as const),
            (v) => setOverride({ priceUnit: v }),
          )}
        </dd>
        <dt>dates</dt>
        <dd>${a.dateOrder === 'dmy' ? 'day before month (31/12/2026)' : 'month before day (12/31/2026)'} where written with slashes</dd>
        <dd>${select<DateOrder>('ov-date-order', o.dateOrder, [['dmy', 'day first'], ['mdy', 'month first']] as const, (v) => setOverride({ dateOrder: v }))}</dd>
      </dl>
      ${a.encodingWarning ? html`<p class="warn" role="status" data-testid="encoding-warning">⚠ ${a.encodingWarning}</p>` : ''}
      ${a.notes.length ? html`<ul class="notes">${a.notes.map((n) => html`<li>${n}</li>`)}</ul>` : ''}
    </section>`;
  }

  private renderPreview(a: PriceAnalysis, plan: ImportPlan) {
    const unmatched = new Set(plan.unmatched.map((u) => u.key));
    const rows = a.offers.slice(0, PREVIEW_ROWS);
    return html`<section class="sheet" aria-labelledby="import-preview-h">
      <h2 id="import-preview-h">Preview</h2>
      <p class="why" data-testid="import-counts">
        ${plural(a.dataRows, 'row')} read into ${plural(a.offers.length, 'quote')}${a.rejectedOffers ? html`; <span class="bad">${plural(a.rejectedOffers, 'part')} left out for problems</span>` : ''}.
        ${plan.matchedByMpn + plan.matchedByCode} matched to parts (${plan.matchedByMpn} by maker part number,
        ${plan.matchedByCode} by supplier code), ${plural(plan.unmatched.length, 'unmatched row')}.
        ${a.offers.length > rows.length ? `The first ${rows.length} are shown.` : ''}
      </p>
      ${rows.length === 0
        ? html`<p class="empty">No row could be read into a quote.</p>`
        : html`<div class="scroll">
            <table class="records" data-testid="preview-table">
              <thead>
                <tr>
                  <th class="num">line</th>
                  <th>mpn</th>
                  <th>supplier code</th>
                  <th>description</th>
                  <th>price breaks</th>
                  <th>currency</th>
                  <th class="num">moq</th>
                  <th class="num">pack</th>
                  <th class="num">lead time</th>
                  <th>date</th>
                  <th>part</th>
                </tr>
              </thead>
              <tbody>
                ${rows.map(
                  (o) => html`<tr>
                    <td class="num">${o.line}</td>
                    <td class="code">${o.mpn}</td>
                    <td class="code">${o.supplierCode}</td>
                    <td class="desc">${o.description}</td>
                    <td class="breaks">${breaksText(o.breaks)}</td>
                    <td class="code">${o.currency}</td>
                    <td class="num">${o.moq}</td>
                    <td class="num">${o.pack}</td>
                    <td class="num">${leadText(o.leadDays)}</td>
                    <td class="num">${o.date}${o.expires ? ` → ${o.expires}` : ''}</td>
                    <td>${unmatched.has(o.key) ? html`<span class="bad">✗ no part</span>` : html`<span class="good">✓ matched</span>`}</td>
                  </tr>`,
                )}
              </tbody>
            </table>
          </div>`}
    </section>`;
  }

  private renderProblems(problems: readonly { row: number; column: string; value: string; reason: string }[]) {
    const shown = this.showAllProblems ? problems : problems.slice(0, PROBLEM_ROWS);
    return html`<p class="bad" data-testid="problem-count">✗ ${plural(problems.length, 'problem')} found.</p>
      <div class="scroll">
        <table class="records problems" data-testid="problems-table">
          <thead>
            <tr>
              <th class="num">row</th>
              <th>column</th>
              <th>value</th>
              <th>reason</th>
            </tr>
          </thead>
          <tbody>
            ${shown.map(
              (p) => html`<tr>
                <td class="num">${p.row || '—'}</td>
                <td class="code">${p.column || '—'}</td>
                <td class="value">${p.value}</td>
                <td class="reason">${p.reason}</td>
              </tr>`,
            )}
          </tbody>
        </table>
      </div>
      ${problems.length > shown.length
        ? html`<p class="muted">
            ${shown.length} of ${problems.length} shown.
            <button type="button" @click=${() => (this.showAllProblems = true)}>Show all ${problems.length}</button>
          </p>`
        : ''}`;
  }

  private renderUnmatched(plan: ImportPlan) {
    if (plan.unmatched.length === 0) return '';
    const setAll = (d: UnmatchedDecision): void => {
      this.decisions = Object.fromEntries(plan.unmatched.map((u) => [u.key, d]));
    };
    const shown = this.showAllUnmatched ? plan.unmatched : plan.unmatched.slice(0, UNMATCHED_ROWS);
    const creating = plan.unmatched.filter((u) => (this.decisions[u.key] ?? 'skip') === 'create').length;
    return html`<section class="sheet" aria-labelledby="import-unmatched-h">
      <h2 id="import-unmatched-h">Rows without a part in the Book</h2>
      <p class="why">
        These rows match no part by maker part number or by an earlier quote’s supplier code. Create each as a new part
        (kind “other”, to complete on the Parts page) or skip it.
      </p>
      <div class="toolbar">
        <button type="button" @click=${() => setAll('create')}>Create all as new parts</button>
        <button type="button" @click=${() => setAll('skip')}>Skip all</button>
        <span class="muted" data-testid="unmatched-choice">${plural(plan.unmatched.length, 'row')}: ${grouped(creating)} to create, ${grouped(plan.unmatched.length - creating)} to skip</span>
      </div>
      <div class="scroll">
        <table class="records" data-testid="unmatched-table">
          <thead>
            <tr>
              <th class="num">line</th>
              <th>mpn</th>
              <th>supplier code</th>
              <th>description</th>
              <th>choice</th>
            </tr>
          </thead>
          <tbody>
            ${shown.map(
              (u) => html`<tr data-key=${u.key}>
                <td class="num">${u.line}</td>
                <td class="code">${u.mpn}</td>
                <td class="code">${u.supplierCode}</td>
                <td class="desc">${u.description}</td>
                <td>
                  <select
                    aria-label="Choice for line ${u.line}"
                    .value=${live(this.decisions[u.key] ?? 'skip')}
                    @change=${(e: Event) => {
                      this.decisions = { ...this.decisions, [u.key]: (e.target as HTMLSelectElement).value as UnmatchedDecision };
                    }}
                  >
                    <option value="skip">skip</option>
                    <option value="create" ?disabled=${!u.mpn}>create as new part</option>
                  </select>
                  ${u.note ? html`<div class="bad">✗ ${u.note}</div>` : ''}
                </td>
              </tr>`,
            )}
          </tbody>
        </table>
      </div>
      ${plan.unmatched.length > shown.length
        ? html`<p class="muted">
            ${shown.length} of ${plan.unmatched.length} shown.
            <button type="button" @click=${() => (this.showAllUnmatched = true)}>Show all ${plan.unmatched.length}</button>
          </p>`
        : ''}
    </section>`;
  }

  private renderCommit(supplier: Supplier, a: PriceAnalysis, plan: ImportPlan) {
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
        ${supplier.name} for the same part; the replaced ones are kept as superseded, and the whole import can be undone.
      </p>
      ${reimport
        ? html`<div class="warn" role="status" data-testid="reimport-notice">
            ⟳ This exact file was already imported for ${supplier.name} on ${reimport.at.slice(0, 16).replace('T', ' ')}
            (${reimport.fileName}).
            <label
              ><input
                type="checkbox"
                .checked=${this.allowReimport}
                @change=${(e: Event) => (this.allowReimport = (e.target as HTMLInputElement).checked)}
              />
              Import it again anyway</label
            >
          </div>`
        : ''}
      ${this.commitProblem ? html`<p class="notice" role="alert" data-testid="commit-problem">${this.commitProblem}</p>` : ''}
      <div class="actions">
        <button
          type="button"
          class="primary"
          ?disabled=${why !== '' || this.committing}
          @click=${() => this.commit(false)}
        >
          Import all
        </button>
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

  private renderDone(d: Done) {
    return html`<div class="done" role="status" data-testid="import-done">
      ✓ Imported ${d.fileName} for ${d.supplier}: ${plural(d.newQuotes, 'new quote')}, ${plural(d.superseded, 'quote')} superseded,
      ${plural(d.newParts, 'new part')}${d.skipped ? `, ${plural(d.skipped, 'row')} skipped` : ''}${d.validOnly
        ? `; only the valid rows were imported (${plural(d.leftOut, 'problem')} left out)`
        : ''}.
      <a href="#/quotes">See them on the Quotes page</a>.
    </div>`;
  }

  // ---- actions ------------------------------------------------------------------------------------------------

  private readonly _onSupplier = (ev: Event): void => {
    const id = (ev.target as HTMLSelectElement).value;
    this.supplierId = id;
    if (id === NEW_SUPPLIER) {
      const book = this.books.book;
      if (book) this.newSupplier = { draft: supplierDraft(book.settings), problems: {} };
      this.abort?.abort();
      this.phase = { kind: 'idle' };
      return;
    }
    this.newSupplier = undefined;
    this.reanalyse({ chosenColumns: undefined });
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
    this.newSupplier = undefined;
    this.supplierId = record.id;
    this.reanalyse({ chosenColumns: undefined });
  }

  private readonly _onFile = async (ev: Event): Promise<void> => {
    const input = ev.target as HTMLInputElement;
    const file = input.files?.[0];
    if (!file) return;
    if (file.size > MAX_FILE_BYTES) {
      this.sourceProblem = `${file.name} is ${plural(file.size, 'byte')}; price files above ${MAX_FILE_BYTES / 1024 / 1024} MB are refused. Nothing was read.`;
      return;
    }
    try {
      const bytes = new Uint8Array(await file.arrayBuffer());
      this.useSource(file.name, bytes);
    } catch (e) {
      this.sourceProblem = `${file.name} could not be read: ${e instanceof Error ? e.message : String(e)}. Nothing was changed.`;
    }
  };

  private async loadDemo(book: Book, file: string, supplierName: string): Promise<void> {
    try {
      const res = await fetch(new URL(`demo/${file}`, document.baseURI));
      if (!res.ok) throw new Error(`the server answered ${res.status}`);
      const bytes = new Uint8Array(await res.arrayBuffer());
      if (this.supplierId === '' || this.supplierId === NEW_SUPPLIER) {
        const s = book.suppliers.find((x) => x.name === supplierName);
        if (s) {
          this.supplierId = s.id;
          this.newSupplier = undefined;
        }
      }
      this.useSource(file, bytes);
    } catch (e) {
      this.sourceProblem = `The demo file ${file} could not be loaded: ${e instanceof Error ? e.message : String(e)}.`;
    }
  }

  private useSource(name: string, bytes: Uint8Array): void {
    this.source = { name, bytes, lines: countLines(bytes) };
    this.sourceProblem = undefined;
    this.done = undefined;
    this.decisions = {};
    this.allowReimport = false;
    this.reanalyse({ chosenColumns: undefined, overrides: {} });
  }

  private readonly _onMappingChange = (ev: CustomEvent<MappingChangeDetail>): void => {
    if (this.phase.kind !== 'read') return;
    const { key, header } = ev.detail;
    const columns: Record<string, string> = { ...(this.chosenColumns ?? this.phase.analysis.mapping.columns) };
    // One column feeds one field: choosing it here takes it away from any other field.
    for (const [k, h] of Object.entries(columns)) if (h === header && k !== key) delete columns[k];
    if (header === '') delete columns[key];
    else columns[key] = header;
    this.reanalyse({ chosenColumns: columns });
  };

  private cancel(): void {
    this.abort?.abort();
    this.phase = { kind: 'idle' };
    this.sourceProblem = 'Reading stopped. Nothing was changed; choose the file again to read it.';
  }

  /** Reads the chosen file again with the current supplier, overrides and mapping; any earlier reading is stopped. */
  private reanalyse(patch: { chosenColumns?: Record<string, string> | undefined; overrides?: Overrides }): void {
    if ('chosenColumns' in patch) this.chosenColumns = patch.chosenColumns;
    if (patch.overrides) this.overrides = patch.overrides;
    this.mappingConfirmed = false;
    this.commitProblem = undefined;
    this.showAllProblems = false;
    this.showAllUnmatched = false;
    this.abort?.abort();
    const book = this.books.book;
    const supplier = book?.suppliers.find((s) => s.id === this.supplierId);
    const source = this.source;
    if (!book || !source) return;
    if (!supplier) {
      this.phase = { kind: 'idle' };
      if (this.supplierId !== NEW_SUPPLIER) this.sourceProblem = 'Choose the supplier this price file is from; it is read as soon as you do.';
      return;
    }
    this.sourceProblem = undefined;
    const options: AnalyseOptions = {
      defaultCurrency: supplier.currency,
      knownCurrencies: knownCurrencies(book),
      today: book.settings.costingDate ?? todayIso(),
    };
    const mapping = this.mappingForAnalysis(supplier);
    if (mapping) options.mapping = mapping;
    const o = this.overrides;
    if (o.encoding) options.encoding = o.encoding;
    if (o.decimal) options.decimal = o.decimal;
    if (o.delimiter) options.delimiter = o.delimiter;
    if (o.priceUnit) options.priceUnit = o.priceUnit;
    if (o.dateOrder) options.dateOrder = o.dateOrder;

    const abort = new AbortController();
    this.abort = abort;
    this.phase = { kind: 'reading', rows: 0, rowsPerSecond: 0 };
    const started = performance.now();
    // The worker gets a copy: the page keeps the bytes to read again after a mapping change.
    runPriceImportInWorker(
      source.bytes.slice(),
      options,
      (p) => {
        if (!abort.signal.aborted) this.phase = { kind: 'reading', rows: p.rows, rowsPerSecond: p.rowsPerSecond };
      },
      abort.signal,
    ).then(
      (analysis) => {
        if (abort.signal.aborted) return;
        this.planCache = undefined;
        this.phase = { kind: 'read', analysis, seconds: (performance.now() - started) / 1000 };
      },
      (e: unknown) => {
        if (abort.signal.aborted) return;
        this.phase = { kind: 'failed', message: `The price file could not be read: ${e instanceof Error ? e.message : String(e)}. Nothing was changed.` };
      },
    );
  }

  private mappingForAnalysis(supplier: Supplier): ColumnMapping | undefined {
    if (!this.chosenColumns) return supplier.mapping;
    const layout = this.phase.kind === 'read' ? this.phase.analysis.layout : (supplier.mapping?.layout ?? 'long');
    const m: ColumnMapping = { columns: this.chosenColumns, layout };
    if (supplier.mapping?.priceUnit) m.priceUnit = supplier.mapping.priceUnit;
    return m;
  }

  /** The plan as it would be made now, for the preview: recomputed only when its inputs change. */
  private previewPlan(book: Book, supplier: Supplier, analysis: PriceAnalysis, fileName: string): ImportPlan {
    const key = [book, supplier, analysis, this.decisions, fileName];
    const c = this.planCache;
    if (c && c.key.length === key.length && c.key.every((k, i) => k === key[i])) return c.plan;
    const plan = planImport(book, analysis, {
      supplierId: supplier.id,
      fileName,
      at: new Date().toISOString(),
      decisions: this.decisions,
      validRowsOnly: false,
      allowReimport: true,
    });
    // Re-import is reported, not hidden: planImport says which batch it repeats even when allowed.
    this.planCache = { key, plan };
    return plan;
  }

  private async commit(validRowsOnly: boolean): Promise<void> {
    const service = this.books.service;
    const p = this.phase;
    const source = this.source;
    if (!service || p.kind !== 'read' || !source || !this.mappingConfirmed) return;
    const book = service.book;
    const supplier = book.suppliers.find((s) => s.id === this.supplierId);
    if (!supplier) {
      this.commitProblem = 'The supplier is no longer in the Book; nothing was imported.';
      return;
    }
    const plan = planImport(book, p.analysis, {
      supplierId: supplier.id,
      fileName: source.name,
      at: new Date().toISOString(),
      decisions: this.decisions,
      validRowsOnly,
      allowReimport: this.allowReimport,
    });
    if (!plan.ok || !plan.change) {
      this.commitProblem = `Nothing was imported: ${plan.reason ?? 'the plan could not be made'}.`;
      return;
    }
    this.committing = true;
    this.commitProblem = undefined;
    const saved = await service.save(plan.change);
    this.committing = false;
    if (!saved.ok) {
      this.commitProblem = `Nothing was imported: ${saved.message}`;
      return;
    }
    this.done = {
      fileName: source.name,
      supplier: supplier.name,
      newQuotes: plan.newQuotes,
      superseded: plan.supersededQuotes,
      newParts: plan.newParts,
      skipped: plan.skippedOffers,
      validOnly: validRowsOnly,
      leftOut: plan.problems.length,
    };
    // The file is spent: a second click must not import it twice.
    this.source = undefined;
    this.phase = { kind: 'idle' };
    this.chosenColumns = undefined;
    this.mappingConfirmed = false;
    this.decisions = {};
    this.allowReimport = false;
    const input = this.renderRoot.querySelector<HTMLInputElement>('#import-file');
    if (input) input.value = '';
  }
}

declare global {
  interface HTMLElementTagNameMap {
    'rb-import-page': RbImportPage;
  }
}
