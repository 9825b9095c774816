// The Book: every record kind a user keeps, as plain serialisable data. Its shape is the schema (schema.ts); this
// file re-exports the types and keeps the small helpers that make and name records.
import { BOOK_FORMAT, BOOK_VERSION, COLLECTION_KEYS } from './schema.ts';
import type { Book, Settings } from './schema.ts';

export { BOOK_FORMAT, BOOK_VERSION, CHECK_RULE_KINDS, COST_CATEGORIES, INCOTERMS, PART_KINDS, PRICE_BASES } from './schema.ts';
export type {
  Book,
  BuildLine,
  Check,
  CheckRule,
  CheckRuleKind,
  ColumnMapping,
  CostCategory,
  CurrencyCode,
  FrozenRun,
  ImportBatch,
  NotebookPage,
  NotebookSection,
  Order,
  OrderLine,
  OrderStatus,
  ParamValue,
  Part,
  PartKind,
  PerOrder,
  PriceBreak,
  PriceList,
  Quote,
  Run,
  RunStatus,
  Settings,
  StockMove,
  StockMoveKind,
  StockValuation,
  Supplier,
  Variant,
} from './schema.ts';

/** Every stored record has a stable id and a revision that rises by one on each save. */
export interface RecordBase {
  id: string;
  rev: number;
}

/** Record collections of a Book, by their key in the Book and store name in IndexedDB (the schema's list, in file order). */
export const COLLECTIONS = COLLECTION_KEYS;
export type CollectionName = (typeof COLLECTIONS)[number];

export type CollectionRecord<C extends CollectionName> = Book[C][number];

export function defaultSettings(): Settings {
  return {
    id: 'settings',
    rev: 1,
    bookName: 'New Book',
    company: '',
    baseCurrency: 'EUR',
    rates: { EUR: 1 },
    runSizes: [500, 2000, 10000],
    labourRatePerHour: 0,
    labourMinutesPerUnit: 0,
    labourMinutesPerPlacement: 0,
    testCostPerUnit: 0,
    overheadPct: 0,
    marginPct: 0,
    attrition: { default: 0.01 },
    orderPrefix: 'ORD-',
    nextOrderNumber: 1,
    kittingDays: 5,
    safetyDays: 2,
    horizonDays: 90,
    stockValuation: 'lastPaid',
  };
}

export function emptyBook(): Book {
  return {
    format: BOOK_FORMAT,
    version: BOOK_VERSION,
    settings: defaultSettings(),
    parts: [],
    suppliers: [],
    quotes: [],
    variants: [],
    buildLines: [],
    checks: [],
    runs: [],
    importBatches: [],
    pages: [],
    orders: [],
    stockMoves: [],
    priceLists: [],
  };
}

/** A fresh record id: a prefix and random base-36 digits. Not a security token. */
export function newId(prefix: string): string {
  const bytes = new Uint8Array(8);
  globalThis.crypto.getRandomValues(bytes);
  let s = '';
  for (const b of bytes) s += (b % 36).toString(36);
  return `${prefix}_${s}`;
}

/** Normalises a maker part number for matching: case, spaces, dashes, dots and slashes ignored. */
export function mpnKey(mpn: string): string {
  return mpn.toUpperCase().replace(/[\s\-./_]/g, '');
}
