// One call from price file bytes to a new Book: read, check, match, plan, apply in memory. Used by the CLI and the
// benchmark; the app runs the same steps split between its worker (analysePriceFile) and the store (planImport).
import type { Book, ColumnMapping, Supplier } from '../domain/book.ts';
import { applyChange } from '../domain/book-ops.ts';
import { todayIso } from '../domain/dates.ts';
import type { EncodingChoice } from './price-decode.ts';
import type { DateOrder, Decimal, PriceProblem, PriceUnit } from './price-map.ts';
import { planImport } from './price-plan.ts';
import type { ImportPlan, UnmatchedDecision } from './price-plan.ts';
import { analysePriceFile } from './price-validate.ts';
import type { AnalyseOptions, PriceAnalysis } from './price-validate.ts';

export interface ImportPricesOptions {
  /** Supplier name (any case) or id. */
  supplier: string;
  fileName: string;
  /** Column mapping to use instead of the supplier's saved one. */
  mapping?: ColumnMapping;
  decimal?: Decimal;
  dateOrder?: DateOrder;
  priceUnit?: PriceUnit;
  /** How to read the file's bytes (default: find out). */
  encoding?: EncodingChoice;
  validRowsOnly?: boolean;
  createParts?: boolean;
  decisions?: Record<string, UnmatchedDecision>;
  allowReimport?: boolean;
  /** Import time; default now. */
  now?: Date;
  onRows?: (rows: number) => void;
}

/** The plan's counts, as they are reported after an import. */
type PlanCounts = Pick<ImportPlan, 'matchedByMpn' | 'matchedByCode' | 'newQuotes' | 'supersededQuotes' | 'newParts' | 'skippedOffers'>;

export interface ImportSummary extends PlanCounts {
  fileName: string;
  supplier: string;
  encoding: string;
  delimiter: string;
  decimal: string;
  layout: string;
  headerLine: number;
  dataRows: number;
  columns: Record<string, string>;
  rejectedOffers: number;
  unmatched: { line: number; mpn: string; supplierCode: string; decision: UnmatchedDecision; note?: string }[];
  notes: string[];
  batchId?: string;
  reimportOf?: string;
}

export interface ImportPricesResult {
  ok: boolean;
  /** The new Book when ok; the input Book is never modified. */
  book?: Book;
  /** Why nothing was imported, in one sentence. */
  reason?: string;
  problems: PriceProblem[];
  summary: ImportSummary;
  analysis?: PriceAnalysis;
  plan?: ImportPlan;
}

export function findSupplier(book: Book, nameOrId: string): Supplier | undefined {
  const want = nameOrId.trim().toLowerCase();
  return book.suppliers.find((s) => s.id === nameOrId) ?? book.suppliers.find((s) => s.name.trim().toLowerCase() === want);
}

/** The currencies a Book can convert: its base and every currency with a rate. */
export function knownCurrencies(book: Book): string[] {
  return [...new Set([book.settings.baseCurrency, ...Object.keys(book.settings.rates)])];
}

function emptySummary(fileName: string, supplier: string): ImportSummary {
  return {
    fileName,
    supplier,
    encoding: '',
    delimiter: '',
    decimal: '',
    layout: '',
    headerLine: 0,
    dataRows: 0,
    columns: {},
    matchedByMpn: 0,
    matchedByCode: 0,
    newQuotes: 0,
    supersededQuotes: 0,
    newParts: 0,
    skippedOffers: 0,
    rejectedOffers: 0,
    unmatched: [],
    notes: [],
  };
}

export async function importPrices(book: Book, bytes: Uint8Array, options: ImportPricesOptions): Promise<ImportPricesResult> {
  const supplier = findSupplier(book, options.supplier);
  if (!supplier) {
    const known = book.suppliers.map((s) => s.name).join(', ') || 'none';
    const reason = `no supplier named '${options.supplier}' in the Book (suppliers: ${known})`;
    return { ok: false, reason, problems: [{ row: 0, column: '', value: options.supplier, reason }], summary: emptySummary(options.fileName, options.supplier) };
  }
  const now = options.now ?? new Date();
  const analyseOptions: AnalyseOptions = {
    defaultCurrency: supplier.currency,
    knownCurrencies: knownCurrencies(book),
    // A row without a date is quoted on the Book's costing date, else on the day of the import.
    today: book.settings.costingDate ?? todayIso(now),
  };
  const mapping = options.mapping ?? supplier.mapping;
  if (mapping) analyseOptions.mapping = mapping;
  if (options.decimal) analyseOptions.decimal = options.decimal;
  if (options.dateOrder) analyseOptions.dateOrder = options.dateOrder;
  if (options.priceUnit) analyseOptions.priceUnit = options.priceUnit;
  if (options.encoding) analyseOptions.encoding = options.encoding;
  const analysis = await analysePriceFile(bytes, analyseOptions, options.onRows);
  const plan = planImport(book, analysis, {
    supplierId: supplier.id,
    fileName: options.fileName,
    at: now.toISOString(),
    ...(options.decisions ? { decisions: options.decisions } : {}),
    createParts: options.createParts === true,
    validRowsOnly: options.validRowsOnly === true,
    allowReimport: options.allowReimport === true,
  });
  const summary: ImportSummary = {
    ...emptySummary(options.fileName, supplier.name),
    encoding: analysis.encoding ?? '',
    delimiter: analysis.delimiterName ?? '',
    decimal: analysis.decimalReason,
    layout: analysis.layout,
    headerLine: analysis.headerLine,
    dataRows: analysis.dataRows,
    columns: analysis.mapping.columns,
    matchedByMpn: plan.matchedByMpn,
    matchedByCode: plan.matchedByCode,
    newQuotes: plan.newQuotes,
    supersededQuotes: plan.supersededQuotes,
    newParts: plan.newParts,
    skippedOffers: plan.skippedOffers,
    rejectedOffers: analysis.rejectedOffers,
    unmatched: plan.unmatched.map((u) => ({ line: u.line, mpn: u.mpn, supplierCode: u.supplierCode, decision: u.decision, ...(u.note ? { note: u.note } : {}) })),
    notes: analysis.notes,
  };
  if (plan.batchId) summary.batchId = plan.batchId;
  if (plan.reimportOf) summary.reimportOf = plan.reimportOf.id;
  if (!plan.ok || !plan.change) {
    return { ok: false, reason: plan.reason ?? 'nothing imported', problems: plan.problems, summary, analysis, plan };
  }
  const applied = applyChange(book, plan.change);
  if (!applied.ok) {
    const c = applied.conflict;
    const reason = `${c.collection} record ${c.recordId} changed while importing (held revision ${c.storedRev}, plan made from ${c.givenRev})`;
    return { ok: false, reason, problems: plan.problems, summary, analysis, plan };
  }
  return { ok: true, book: applied.book, problems: plan.problems, summary, analysis, plan };
}
