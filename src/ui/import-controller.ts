// The work behind the Import page: the chosen supplier and file, reading and checking it in a Web Worker (stopped
// whenever something it depends on changes), the column mapping and overrides, the plan previewed from the decisions
// on unmatched rows, and the import committed as one Book save. Its host only draws what this holds.
import type { ReactiveController, ReactiveControllerHost } from 'lit';
import type { Book, ColumnMapping, Supplier } from '../domain/book.ts';
import { todayIso } from '../domain/dates.ts';
import { grouped } from '../domain/format.ts';
import type { EncodingChoice } from '../io/price-decode.ts';
import type { Decimal, DateOrder, PriceUnit } from '../io/price-map.ts';
import { knownCurrencies } from '../io/price-import.ts';
import { noPlan, planImportInSlices } from '../io/price-plan.ts';
import type { ImportPlan, UnmatchedDecision } from '../io/price-plan.ts';
import type { Delimiter } from '../io/price-read.ts';
import type { AnalyseOptions, PriceAnalysis } from '../io/price-validate.ts';
import { runPriceImportInWorker } from '../io/price-worker-client.ts';
import type { BookController } from './book-context.ts';

/** Larger files are refused before reading: a price list this big is almost certainly the wrong file. */
export const MAX_FILE_BYTES = 64 * 1024 * 1024;
/** The supplier choice that opens the new-supplier form instead of naming a supplier. */
export const NEW_SUPPLIER = '__new__';

export interface ImportSource {
  name: string;
  bytes: Uint8Array;
  /** Line breaks in the file: the progress bar's end, near enough. */
  lines: number;
}

export interface ImportOverrides {
  /** Unset: found automatically (UTF-8, else Windows-1252, line by line when a UTF-8 file has a few that are not). */
  encoding?: EncodingChoice;
  decimal?: Decimal;
  delimiter?: Delimiter;
  priceUnit?: PriceUnit;
  dateOrder?: DateOrder;
}

export type ImportPhase =
  | { kind: 'idle' }
  | { kind: 'reading'; rows: number; rowsPerSecond: number }
  | { kind: 'read'; analysis: PriceAnalysis; seconds: number }
  | { kind: 'failed'; message: string };

/** What the last import wrote, for the line that confirms it. */
export interface ImportDone {
  fileName: string;
  supplier: string;
  newQuotes: number;
  superseded: number;
  newParts: number;
  skipped: number;
  validOnly: boolean;
  leftOut: number;
  /** The batch written, to tell when it has been undone. */
  batchId: string;
  /** Parts the import created, by id and maker part number: undo removes quotes, not parts. */
  createdParts: { id: string; mpn: string }[];
}

export function countLines(bytes: Uint8Array): number {
  let n = 0;
  for (let i = 0; i < bytes.length; i++) if (bytes[i] === 10) n++;
  return bytes.length > 0 && bytes[bytes.length - 1] !== 10 ? n + 1 : n;
}

/** "1 row", "2,048 rows": a count with its noun. */
export function plural(n: number, one: string, many = `${one}s`): string {
  return `${grouped(n)} ${n === 1 ? one : many}`;
}

/** Whether a file's resolved columns and layout are exactly the mapping remembered for its supplier. */
export function sameColumns(remembered: ColumnMapping | undefined, analysis: PriceAnalysis): boolean {
  if (!remembered || !analysis.readable || analysis.problems.some((p) => p.row === analysis.headerLine)) return false;
  const a = remembered.columns;
  const b = analysis.mapping.columns;
  const keys = Object.keys(a);
  if (keys.length === 0 || keys.length !== Object.keys(b).length || remembered.layout !== analysis.mapping.layout) return false;
  return keys.every((k) => b[k] !== undefined && b[k].trim().toLowerCase() === a[k]!.trim().toLowerCase());
}

export class ImportController implements ReactiveController {
  supplierId = '';
  source: ImportSource | undefined;
  sourceProblem: string | undefined;
  overrides: ImportOverrides = {};
  /** Columns chosen on this page; undefined while the supplier's remembered mapping and guesses stand. */
  chosenColumns: Record<string, string> | undefined;
  /** Keys set to "not used" on this page: they stay so, never guessed again from header words. */
  unusedKeys: string[] = [];
  mappingConfirmed = false;
  /** The file's columns are exactly those remembered for the supplier: the mapping stands confirmed without asking. */
  mappingRemembered = false;
  phase: ImportPhase = { kind: 'idle' };
  decisions: Record<string, UnmatchedDecision> = {};
  allowReimport = false;
  committing = false;
  commitProblem: string | undefined;
  done: ImportDone | undefined;

  private abort: AbortController | undefined;
  /** The preview's plan for the inputs in `key`; `plan` is absent while it is being worked out. */
  private planCache: { key: unknown[]; plan?: ImportPlan; abort: AbortController } | undefined;

  constructor(
    private readonly host: ReactiveControllerHost,
    private readonly books: BookController,
  ) {
    host.addController(this);
  }

  hostDisconnected(): void {
    this.abort?.abort();
    this.planCache?.abort.abort();
    this.planCache = undefined;
  }

  /** The chosen supplier, if it is (still) in the Book. */
  get supplier(): Supplier | undefined {
    return this.books.book?.suppliers.find((s) => s.id === this.supplierId);
  }

  /** A supplier chosen from the list, or NEW_SUPPLIER while one is being created (nothing is read meanwhile). */
  chooseSupplier(id: string): void {
    this.supplierId = id;
    if (id === NEW_SUPPLIER) {
      this.abort?.abort();
      this.phase = { kind: 'idle' };
      this.host.requestUpdate();
      return;
    }
    this.reanalyse({ chosenColumns: undefined });
  }

  async chooseFile(file: File): Promise<void> {
    if (file.size > MAX_FILE_BYTES) {
      this.sourceProblem = `${file.name} is ${plural(file.size, 'byte')}; price files above ${MAX_FILE_BYTES / 1024 / 1024} MB are refused. Nothing was read.`;
      this.host.requestUpdate();
      return;
    }
    try {
      const bytes = new Uint8Array(await file.arrayBuffer());
      this.useSource(file.name, bytes);
    } catch (e) {
      this.sourceProblem = `${file.name} could not be read: ${e instanceof Error ? e.message : String(e)}. Nothing was changed.`;
      this.host.requestUpdate();
    }
  }

  /** Loads a demo price file shipped with the app; with no supplier chosen yet, chooses the demo's own. */
  async loadDemo(file: string, supplierName: string): Promise<void> {
    try {
      const res = await fetch(new URL(`demo/${file}`, document.baseURI));
      if (!res.ok) throw new Error(`the server answered ${res.status}`);
      const bytes = new Uint8Array(await res.arrayBuffer());
      if (this.supplierId === '' || this.supplierId === NEW_SUPPLIER) {
        const s = this.books.book?.suppliers.find((x) => x.name === supplierName);
        if (s) this.supplierId = s.id;
      }
      this.useSource(file, bytes);
    } catch (e) {
      this.sourceProblem = `The demo file ${file} could not be loaded: ${e instanceof Error ? e.message : String(e)}.`;
      this.host.requestUpdate();
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

  /** One field read from another column (or none, for header ''); the file is read again. */
  mapColumn(key: string, header: string): void {
    if (this.phase.kind !== 'read') return;
    const columns: Record<string, string> = { ...(this.chosenColumns ?? this.phase.analysis.mapping.columns) };
    // One column feeds one field: choosing it here takes it away from any other field.
    for (const [k, h] of Object.entries(columns)) if (h === header && k !== key) delete columns[k];
    if (header === '') delete columns[key];
    else columns[key] = header;
    this.unusedKeys = header === '' ? [...new Set([...this.unusedKeys, key])] : this.unusedKeys.filter((k) => k !== key);
    this.reanalyse({ chosenColumns: columns });
  }

  confirmMapping(): void {
    this.mappingConfirmed = true;
    this.host.requestUpdate();
  }

  setOverrides(patch: ImportOverrides): void {
    this.reanalyse({ overrides: { ...this.overrides, ...patch } });
  }

  setDecisions(decisions: Record<string, UnmatchedDecision>): void {
    this.decisions = decisions;
    this.host.requestUpdate();
  }

  setAllowReimport(allow: boolean): void {
    this.allowReimport = allow;
    this.host.requestUpdate();
  }

  cancel(): void {
    this.abort?.abort();
    this.phase = { kind: 'idle' };
    this.sourceProblem = 'Reading stopped. Nothing was changed; choose the file again to read it.';
    this.host.requestUpdate();
  }

  /** Reads the chosen file again with the current supplier, overrides and mapping; any earlier reading is stopped. */
  reanalyse(patch: { chosenColumns?: Record<string, string> | undefined; overrides?: ImportOverrides }): void {
    if ('chosenColumns' in patch) this.chosenColumns = patch.chosenColumns;
    if (!this.chosenColumns) this.unusedKeys = [];
    if (patch.overrides) this.overrides = patch.overrides;
    this.mappingConfirmed = false;
    this.mappingRemembered = false;
    this.commitProblem = undefined;
    this.abort?.abort();
    this.host.requestUpdate();
    const book = this.books.book;
    const supplier = this.supplier;
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
    if (this.unusedKeys.length > 0) options.unused = [...this.unusedKeys];
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
        if (abort.signal.aborted) return;
        this.phase = { kind: 'reading', rows: p.rows, rowsPerSecond: p.rowsPerSecond };
        this.host.requestUpdate();
      },
      abort.signal,
    ).then(
      (analysis) => {
        if (abort.signal.aborted) return;
        this.planCache = undefined;
        this.phase = { kind: 'read', analysis, seconds: (performance.now() - started) / 1000 };
        this.mappingRemembered = !this.chosenColumns && sameColumns(supplier.mapping, analysis);
        if (this.mappingRemembered) this.mappingConfirmed = true;
        this.host.requestUpdate();
      },
      (e: unknown) => {
        if (abort.signal.aborted) return;
        this.phase = { kind: 'failed', message: `The price file could not be read: ${e instanceof Error ? e.message : String(e)}. Nothing was changed.` };
        this.host.requestUpdate();
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

  /**
   * The plan as it would be made now, for the preview. It is worked out a slice at a time (a 50,000-row file takes
   * about a third of a second), so the page keeps drawing: until it is ready this gives the plan for the inputs before
   * (a decision just changed, say), or nothing on a file just read, and the page draws again when it is ready.
   */
  previewPlan(book: Book, supplier: Supplier, analysis: PriceAnalysis, fileName: string): ImportPlan | undefined {
    const key = [book, supplier, analysis, this.decisions, fileName];
    const c = this.planCache;
    if (c && c.key.length === key.length && c.key.every((k, i) => k === key[i])) return c.plan;
    c?.abort.abort();
    const entry: NonNullable<typeof this.planCache> = { key, abort: new AbortController() };
    // Only the same file's plan stands in while the new one is worked out.
    const before = c?.key[2] === analysis ? c.plan : undefined;
    this.planCache = entry;
    // Re-import is reported, not hidden: planImport says which batch it repeats even when allowed.
    const options = { supplierId: supplier.id, fileName, at: new Date().toISOString(), decisions: this.decisions, validRowsOnly: false, allowReimport: true };
    planImportInSlices(book, analysis, options, entry.abort.signal).then(
      (plan) => {
        if (this.planCache !== entry) return;
        entry.plan = plan;
        this.host.requestUpdate();
      },
      (e: unknown) => {
        if (entry.abort.signal.aborted) return;
        this.commitProblem = `The import could not be worked out: ${e instanceof Error ? e.message : String(e)}. Nothing was changed.`;
        this.host.requestUpdate();
      },
    );
    return before;
  }

  /** Writes the import as one Book save; afterwards the file is spent and must be chosen again to import it again. */
  async commit(validRowsOnly: boolean): Promise<void> {
    const service = this.books.service;
    const p = this.phase;
    const source = this.source;
    if (!service || p.kind !== 'read' || !source || !this.mappingConfirmed) return;
    const book = service.book;
    const supplier = book.suppliers.find((s) => s.id === this.supplierId);
    if (!supplier) {
      this.commitProblem = 'The supplier is no longer in the Book; nothing was imported.';
      this.host.requestUpdate();
      return;
    }
    if (this.committing) return;
    this.committing = true;
    this.commitProblem = undefined;
    this.host.requestUpdate();
    const plan = await planImportInSlices(book, p.analysis, {
      supplierId: supplier.id,
      fileName: source.name,
      at: new Date().toISOString(),
      decisions: this.decisions,
      validRowsOnly,
      allowReimport: this.allowReimport,
    }).catch((e: unknown) => noPlan([], e instanceof Error ? e.message : String(e)));
    if (!plan.ok || !plan.change) {
      this.committing = false;
      this.commitProblem = `Nothing was imported: ${plan.reason ?? 'the plan could not be made'}.`;
      this.host.requestUpdate();
      return;
    }
    const saved = await service.save(plan.change);
    this.committing = false;
    this.host.requestUpdate();
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
      batchId: plan.batchId ?? '',
      createdParts: (plan.change.put?.parts ?? []).map((x) => ({ id: x.id, mpn: x.mpn })),
    };
    // The file is spent: a second click must not import it twice.
    this.source = undefined;
    this.phase = { kind: 'idle' };
    this.chosenColumns = undefined;
    this.unusedKeys = [];
    this.mappingConfirmed = false;
    this.decisions = {};
    this.allowReimport = false;
  }
}
