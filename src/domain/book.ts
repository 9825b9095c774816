// The Book: every record kind a user keeps, as plain serialisable data. Pure types and tiny helpers only.

/** Version of the Book data model (the `.rungbook.json` file and the IndexedDB schema follow it). */
export const BOOK_VERSION = 1 as const;
/** Marker string at the top of every Book file. */
export const BOOK_FORMAT = 'rungbook-book' as const;

/** ISO 4217 code, three capital letters. */
export type CurrencyCode = string;

/** Every stored record has a stable id and a revision that rises by one on each save. */
export interface RecordBase {
  id: string;
  rev: number;
}

export const PART_KINDS = [
  'resistor',
  'capacitor',
  'diode',
  'zener',
  'bridge',
  'transistor',
  'mosfet',
  'triac',
  'ic',
  'switch',
  'connector',
  'inductor',
  'fuse',
  'varistor',
  'pcb',
  'enclosure',
  'heatsink',
  'hardware',
  'other',
] as const;
export type PartKind = (typeof PART_KINDS)[number];

/** A component. Ratings are SI numbers keyed by rating name (v_max, i_max, p_max, rds_on, rth_jc, tj_max, vgs_on…). */
export interface Part extends RecordBase {
  mpn: string;
  maker: string;
  description: string;
  kind: PartKind;
  /** Principal value in SI base units (ohm, farad, volt…), when the part has one. */
  value?: number;
  /** Unit symbol of `value`: 'Ω', 'F', 'V', 'H', 'A', 'W'. */
  unit?: string;
  ratings: Record<string, number>;
  package: string;
  /** Placements counted for labour (pins or joints are not modelled; one placement per quantity). */
  placements?: number;
  notes?: string;
}

/** How a supplier's price file columns map to quote fields; saved so the next file from them imports alone. */
export interface ColumnMapping {
  /** Field name → column header as it appears in the file. */
  columns: Record<string, string>;
  layout: 'wide' | 'long';
  decimal?: '.' | ',';
  priceUnit?: 'unit' | 'per100' | 'per1000' | 'pack';
}

export interface Supplier extends RecordBase {
  name: string;
  currency: CurrencyCode;
  notes: string;
  mapping?: ColumnMapping;
}

export interface PriceBreak {
  /** Quantity from which this unit price applies (all-units discount). */
  qty: number;
  /** Unit price in the quote's currency. */
  price: number;
}

export interface Quote extends RecordBase {
  partId: string;
  supplierId: string;
  /** The supplier's own order code for the part. */
  supplierCode: string;
  currency: CurrencyCode;
  /** Ascending by qty, first break is the smallest quantity sold. */
  breaks: PriceBreak[];
  moq: number;
  pack: number;
  leadDays: number;
  /** ISO date (YYYY-MM-DD) the quote was given. */
  date: string;
  /** ISO date after which the quote is no longer valid; absent = no expiry. */
  expires?: string;
  /** File name or 'manual'. */
  source: string;
  batchId?: string;
  /** Set when a newer quote for the same part and supplier replaced this one. */
  supersededBy?: string;
}

export type ParamValue = number | string;

export interface Variant extends RecordBase {
  /** Short code of the variant, unique in the Book (for example "RB5-75-CD"). */
  code: string;
  name: string;
  /** Named parameters: steps, load_w, mains_v, mains_hz, mains_tol, supply, stage, pf, component values… */
  params: Record<string, ParamValue>;
  notes?: string;
}

/** Cost categories used for the split of a unit cost. */
export const COST_CATEGORIES = ['electronics', 'power', 'board', 'enclosure', 'hardware', 'packaging'] as const;
export type CostCategory = (typeof COST_CATEGORIES)[number];

/** One line of the family BOM. Rules are formulas over the variant's parameters. */
export interface BuildLine extends RecordBase {
  /** Order on screen and in exports. */
  position: number;
  designators: string;
  /** Fixed part, used when `partRule` is empty. */
  partId?: string;
  /** Formula evaluating to a maker part number, chosen per variant (for example IF(stage="triac", "…", "…")). */
  partRule?: string;
  /** Formula for quantity per unit (for example "1", "steps - 1"). */
  qtyRule: string;
  /** Formula that is true where the line applies; empty means always. */
  appliesWhen: string;
  category: CostCategory;
  /**
   * Engineering role of the line's part (switch, bridge, xcap, zener, bleeder, snubber_r, snubber_c, timer…).
   * Check formulas read the resolved part's ratings as `<role>_<rating>` (for example switch_v_max).
   */
  role?: string;
  /** Attrition allowance as a fraction (0.02 = 2 %); absent = the Book's default for the part kind. */
  attrition?: number;
  /** When set, run costing buys this line only from this supplier (other quotes are not considered). */
  pinnedSupplierId?: string;
  notes?: string;
}

export const CHECK_RULE_KINDS = ['max', 'min', 'between', 'true'] as const;
export type CheckRuleKind = (typeof CHECK_RULE_KINDS)[number];

/**
 * A pass / margin / fail rule. For `max`: value ≤ limit passes, within `margin` (a fraction of the limit) of it is
 * `margin`, above is `fail`. `min` mirrors it. `between` needs both. `true` passes on a true value.
 * Limits are formulas so they can refer to the variant (for example a part rating).
 */
export interface CheckRule {
  kind: CheckRuleKind;
  limit?: string;
  low?: string;
  high?: string;
  /** Fraction of the limit that counts as margin (0.1 = within 10 %). */
  margin?: number;
}

export interface Check extends RecordBase {
  name: string;
  title: string;
  formula: string;
  unit: string;
  rule: CheckRule;
  /** Formula true where the check applies; otherwise the check reports n/a. */
  appliesWhen: string;
  note: string;
  /** True for checks loaded from sheets/; the user may still edit them. */
  builtIn: boolean;
  group: string;
}

export interface Run extends RecordBase {
  name: string;
  variantId: string;
  quantity: number;
  /** ISO date the finished units are wanted. */
  dateWanted: string;
  notes: string;
  /** When frozen, the costed BOM as computed then; later quote changes do not alter it. */
  frozen?: FrozenRun;
}

export interface FrozenRun {
  at: string;
  /** Opaque costed BOM snapshot (see domain/costing). */
  snapshot: unknown;
}

/** Cost rates and conversion used for every run. */
export interface Settings {
  id: 'settings';
  rev: number;
  bookName: string;
  company: string;
  baseCurrency: CurrencyCode;
  /** Units of base currency for one unit of each currency (base itself is 1). */
  rates: Record<CurrencyCode, number>;
  /** Run sizes costed together on the Family and Compare pages. */
  runSizes: number[];
  labourRatePerHour: number;
  labourMinutesPerUnit: number;
  labourMinutesPerPlacement: number;
  testCostPerUnit: number;
  overheadPct: number;
  marginPct: number;
  /** Default attrition by part kind; 'default' for the rest. */
  attrition: Record<string, number>;
  /** Date used to decide quote expiry; absent = today. */
  costingDate?: string;
  lastExportAt?: string;
  editsSinceExport?: number;
}

export interface ImportBatch extends RecordBase {
  fileName: string;
  /** SHA-256 of the file bytes, hex. */
  hash: string;
  supplierId: string;
  rows: number;
  at: string;
  /** Ids of quotes this batch created. */
  created: string[];
  /** Ids of quotes this batch superseded (restored on undo). */
  superseded: string[];
  undone?: boolean;
}

/** A user notebook page: headed sections, each text or a small formula grid. */
export interface NotebookPage extends RecordBase {
  title: string;
  position: number;
  sections: NotebookSection[];
}

export interface NotebookSection {
  heading: string;
  text: string;
  /** Rows of cells; a cell is a value or a formula starting with "=". Empty array for text-only sections. */
  grid: string[][];
}

/** The whole Book in memory. */
export interface Book {
  format: typeof BOOK_FORMAT;
  version: typeof BOOK_VERSION;
  settings: Settings;
  parts: Part[];
  suppliers: Supplier[];
  quotes: Quote[];
  variants: Variant[];
  buildLines: BuildLine[];
  checks: Check[];
  runs: Run[];
  importBatches: ImportBatch[];
  pages: NotebookPage[];
}

/** Record collections of a Book, by their key in the Book and store name in IndexedDB. */
export const COLLECTIONS = [
  'parts',
  'suppliers',
  'quotes',
  'variants',
  'buildLines',
  'checks',
  'runs',
  'importBatches',
  'pages',
] as const;
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
