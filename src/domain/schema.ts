// The one schema of a Book and every record in it (valibot). The TypeScript types of the Book are inferred from it;
// the Book file reader, the command line and every IndexedDB read validate through it, so a shape is written once.
// Messages name the place (`quotes[3].breaks[1].qty`) and say what is wrong in plain words.
import * as v from 'valibot';
import { isIsoDate, isIsoTime } from './dates.ts';

export const BOOK_FORMAT = 'rungbook-book' as const;
/** Version of the Book file format. The IndexedDB schema has its own numbered steps (store/migrations). */
export const BOOK_VERSION = 2 as const;

/**
 * Bounds that real data never reaches but that keep a hostile or damaged Book from freezing or exhausting the app:
 * text lengths in characters, list lengths in items, numbers by what the trade can mean.
 */
export const LIMITS = {
  id: 120,
  name: 200,
  shortText: 500,
  description: 4_000,
  notes: 20_000,
  formula: 4_000,
  pageText: 100_000,
  cell: 4_000,
  /** A notebook grid: side calculations, not tables of data. */
  gridRows: 100,
  gridColumns: 26,
  sections: 200,
  keys: 500,
  parts: 100_000,
  quotes: 1_000_000,
  records: 100_000,
  breaks: 100,
  /** Largest run: far above any run of a small maker, low enough that every figure stays exact. */
  runQuantity: 10_000_000,
  /** Magnitude of any engineering value in SI units (1 TΩ, 1 pF … all well inside). */
  siValue: 1e15,
  /** A unit price in any currency. */
  price: 1e7,
  quantity: 1e9,
  leadDays: 3_650,
  rate: 1e6,
  money: 1e12,
  /** A landed-cost share (freight, duty, charges) as a percentage of the goods' value. */
  landedPct: 1_000,
  /** A price list's markup on cost, in percent. */
  markupPct: 10_000,
  /** Approved alternates of one build line. */
  alternates: 20,
  /** Lines of one supplier order. */
  orderLines: 1_000,
  /** Stock movements: a busy store over many seasons. */
  stockMoves: 1_000_000,
  /** Days of a planning horizon, kitting or safety allowance. */
  planDays: 3_650,
} as const;

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

/** Cost categories used for the split of a unit cost. */
export const COST_CATEGORIES = ['electronics', 'power', 'board', 'enclosure', 'hardware', 'packaging'] as const;
export type CostCategory = (typeof COST_CATEGORIES)[number];

export const CHECK_RULE_KINDS = ['max', 'min', 'between', 'true'] as const;
export type CheckRuleKind = (typeof CHECK_RULE_KINDS)[number];

/** Unit symbols a part's principal value may carry. */
export const PART_VALUE_UNITS = ['Ω', 'F', 'V', 'H', 'A', 'W', 'Hz', 's', 'K/W', '°C'] as const;
export type PartValueUnit = (typeof PART_VALUE_UNITS)[number];
export function isPartValueUnit(u: string): u is PartValueUnit {
  return (PART_VALUE_UNITS as readonly string[]).includes(u);
}

export const MAPPING_LAYOUTS = ['wide', 'long'] as const;

/** What an import batch brought in: a supplier's price file (quotes) or a stock count file (counted movements). */
export const IMPORT_KINDS = ['prices', 'stock count'] as const;
export type ImportKind = (typeof IMPORT_KINDS)[number];

/** Why stock moved: a count's difference, a receipt from an order, an issue to a run, scrap, a correction. */
export const STOCK_MOVE_KINDS = ['counted', 'received', 'issued', 'scrapped', 'adjusted'] as const;
export type StockMoveKind = (typeof STOCK_MOVE_KINDS)[number];
export const ORDER_STATUSES = ['open', 'part-received', 'received', 'cancelled'] as const;
export type OrderStatus = (typeof ORDER_STATUSES)[number];
export const RUN_STATUSES = ['planned', 'built'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];
/** How stock on hand is valued in a run's costing: at the last price paid for it, or at today's best quote. */
export const STOCK_VALUATIONS = ['lastPaid', 'quote'] as const;
export type StockValuation = (typeof STOCK_VALUATIONS)[number];
export const DECIMAL_MARKS = ['.', ','] as const;
export const PRICE_UNITS = ['unit', 'per100', 'per1000', 'pack'] as const;

/** Delivery terms of Incoterms 2020 (ICC), in the rules' own order: any mode of transport, then sea and inland waterway. */
export const INCOTERMS = ['EXW', 'FCA', 'CPT', 'CIP', 'DAP', 'DPU', 'DDP', 'FAS', 'FOB', 'CFR', 'CIF'] as const;
export type Incoterm = (typeof INCOTERMS)[number];

/** How a price list turns a unit cost into a price: a gross margin on price, or a markup on cost. */
export const PRICE_BASES = ['margin', 'markup'] as const;
export type PriceBasis = (typeof PRICE_BASES)[number];
/** Which way a price list's rounding step goes. */
export const ROUNDING_MODES = ['nearest', 'up'] as const;

/**
 * Names every JavaScript object carries built in (constructor, toString, __proto__, valueOf…). A map keyed by the
 * user's names (parameters, ratings, rates, columns) must not use one: a lookup would find the object's own
 * machinery instead of a value, and assigning `__proto__` would silently drop the entry.
 */
export const RESERVED_NAMES: ReadonlySet<string> = new Set([
  '__proto__',
  'prototype',
  ...Object.getOwnPropertyNames(Object.prototype),
]);

/** Why `name` cannot key a user's map, or undefined when it can. */
export function reservedNameProblem(name: string): string | undefined {
  return RESERVED_NAMES.has(name) ? `“${name}” is a name every object has built in; choose another` : undefined;
}

// ---------------------------------------------------------------------------------------------------------------
// Messages

/** A value's kind in words, for "must be text, not a number". */
export function kindOf(x: unknown): string {
  if (x === null) return 'null';
  if (Array.isArray(x)) return 'a list';
  switch (typeof x) {
    case 'string':
      return 'text';
    case 'number':
      return 'a number';
    case 'boolean':
      return 'true/false';
    case 'object':
      return 'an object';
    default:
      return typeof x;
  }
}

/** A value quoted for a message, cut short so a huge value cannot flood the report. */
export function short(x: unknown): string {
  let s: string;
  try {
    s = JSON.stringify(x) ?? String(x);
  } catch {
    s = String(x);
  }
  return s.length > 40 ? `${s.slice(0, 37)}…` : s;
}

type Issue = v.BaseIssue<unknown>;
const want =
  (what: string) =>
  (issue: Issue): string =>
    `must be ${what}, not ${kindOf(issue.input)}`;
/** An object's message: its missing keys are "missing"; a value that is not an object says what it is. */
const objectMessage =
  (what: string) =>
  (issue: Issue): string =>
    issue.path?.[0]?.origin === 'key' && issue.input === undefined ? 'is missing' : `must be ${what}, not ${kindOf(issue.input)}`;

/** ISO 4217 shape: three capital letters. Whether the Book can convert it is checked against its rates. */
export function isCurrencyCode(s: string): boolean {
  return /^[A-Z]{3}$/.test(s);
}

/** A JSON object: not null, not a list. */
export function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

// ---------------------------------------------------------------------------------------------------------------
// Field builders

function obj<E extends v.ObjectEntries>(entries: E, what = 'an object') {
  return v.pipe(v.custom<Record<string, unknown>>(isObject, objectMessage(what)), v.object(entries, objectMessage(what)));
}

function text(max: number = LIMITS.shortText) {
  return v.pipe(
    v.string(want('text')),
    v.maxLength(max, (i) => `is ${(i.input as string).length.toLocaleString('en-GB')} characters long; at most ${max.toLocaleString('en-GB')} are allowed`),
  );
}

function filled(max: number = LIMITS.shortText) {
  return v.pipe(
    text(max),
    v.check((s) => s.trim() !== '', 'must not be empty'),
  );
}

const id = () => filled(LIMITS.id);

interface NumRule {
  min?: number;
  /** The value must be above `min`, not equal to it. */
  above?: boolean;
  max?: number;
  /** The value must be below this. */
  below?: number;
  integer?: boolean;
}

function numProblem(x: number, rule: NumRule): string | undefined {
  if (!Number.isFinite(x)) return 'must be a finite number, not a number';
  if (rule.integer && !Number.isInteger(x)) return `must be a whole number, not ${x}`;
  if (rule.min !== undefined && (rule.above ? x <= rule.min : x < rule.min)) {
    return rule.above ? `must be more than ${rule.min}, not ${x}` : `must be ${rule.min} or more, not ${x}`;
  }
  if (rule.below !== undefined && x >= rule.below) return `must be less than ${rule.below}, not ${x}`;
  if (rule.max !== undefined && x > rule.max) return `must be at most ${rule.max.toLocaleString('en-GB')}, not ${x}`;
  return undefined;
}

function num(rule: NumRule) {
  return v.pipe(
    v.number(want('a finite number')),
    v.rawCheck<number>(({ dataset, addIssue }) => {
      if (!dataset.typed) return;
      const p = numProblem(dataset.value, rule);
      if (p) addIssue({ message: p });
    }),
  );
}

const siValue = () => num({ min: -LIMITS.siValue, max: LIMITS.siValue });
const count = (max: number = LIMITS.quantity) => num({ min: 0, integer: true, max });
const rev = () => v.optional(count(Number.MAX_SAFE_INTEGER), 1);

function oneOf<const T extends readonly string[]>(options: T) {
  return v.picklist(options, (i) =>
    typeof i.input === 'string' ? `must be one of ${options.join(', ')}; ${short(i.input)} is not known` : `must be text, not ${kindOf(i.input)}`,
  );
}

const currency = () =>
  v.pipe(
    v.string(want('text')),
    v.check(isCurrencyCode, (i) => `must be a currency code of three capital letters (ISO 4217), not ${short(i.input)}`),
  );

const date = () =>
  v.pipe(
    v.string(want('text')),
    v.check(isIsoDate, (i) => `must be a date written YYYY-MM-DD, not ${short(i.input)}`),
  );

const time = () =>
  v.pipe(
    v.string(want('text')),
    v.check(isIsoTime, (i) => `must be an ISO date and time (YYYY-MM-DDTHH:MM:SSZ), not ${short(i.input)}`),
  );

const bool = () => v.boolean(want('true or false'));

function list<T extends v.GenericSchema>(item: T, max: number) {
  return v.pipe(
    v.array(item, want('a list')),
    v.maxLength(max, (i) => `holds ${(i.input as unknown[]).length.toLocaleString('en-GB')} entries; at most ${max.toLocaleString('en-GB')} are allowed`),
  );
}

/**
 * A map keyed by the user's names (parameters, ratings, rates…). Keys are checked (reserved names are refused) and
 * every value through `value`; the result is a fresh object holding only own, checked entries.
 */
function keyed<T>(value: v.GenericSchema<unknown, T>, keyProblem?: (k: string) => string | undefined) {
  return v.pipe(
    v.custom<Record<string, unknown>>(isObject, objectMessage('an object')),
    v.rawTransform<Record<string, unknown>, Record<string, T>>(({ dataset, addIssue, NEVER }) => {
      const input = dataset.value;
      const out: Record<string, T> = {};
      const keys = Object.keys(input);
      let bad = false;
      if (keys.length > LIMITS.keys) {
        addIssue({ message: `holds ${keys.length} names; at most ${LIMITS.keys} are allowed` });
        return NEVER;
      }
      for (const k of keys) {
        const item = { type: 'object', origin: 'value', input, key: k, value: input[k] } as const;
        const kp = reservedNameProblem(k) ?? (k.length > LIMITS.name ? `a name may be at most ${LIMITS.name} characters long` : keyProblem?.(k));
        if (kp) {
          addIssue({ message: kp, path: [item] });
          bad = true;
          continue;
        }
        const r = v.safeParse(value, input[k], PARSE_CONFIG);
        if (r.success) out[k] = r.output;
        else {
          bad = true;
          for (const is of r.issues) addIssue({ message: is.message, input: is.input, path: [item, ...((is.path ?? []) as v.IssuePathItem[])] });
        }
      }
      return bad ? NEVER : out;
    }),
  );
}

const PARSE_CONFIG = {} as const;

// ---------------------------------------------------------------------------------------------------------------
// Records

/** Every stored record has a stable id and a revision that rises by one on each save. */
const recordBase = { id: id(), rev: rev() };

export const PartSchema = obj({
  ...recordBase,
  mpn: filled(LIMITS.name),
  maker: v.optional(text(LIMITS.name), ''),
  description: v.optional(text(LIMITS.description), ''),
  kind: v.optional(oneOf(PART_KINDS), 'other'),
  /** Principal value in SI base units (ohm, farad, volt…), when the part has one. */
  value: v.optional(siValue()),
  /** Unit symbol of `value`: 'Ω', 'F', 'V', 'H', 'A', 'W'. */
  unit: v.optional(oneOf(PART_VALUE_UNITS)),
  /** Ratings are SI numbers keyed by rating name (v_max, i_max, p_max, rds_on, rth_jc, tj_max, vgs_on…). */
  ratings: v.optional(keyed(siValue()), {}),
  package: v.optional(text(LIMITS.name), ''),
  /** Placements counted for labour (one placement per quantity). */
  placements: v.optional(count(10_000)),
  notes: v.optional(text(LIMITS.notes)),
});

/** How a supplier's price file columns map to quote fields; saved so the next file from them imports alone. */
export const ColumnMappingSchema = obj({
  /** Field name → column header as it appears in the file. */
  columns: keyed(text(LIMITS.name)),
  layout: v.optional(oneOf(MAPPING_LAYOUTS), 'long'),
  decimal: v.optional(oneOf(DECIMAL_MARKS)),
  priceUnit: v.optional(oneOf(PRICE_UNITS)),
});

/** An amount charged once per order, in a currency of its own (freight or a bank's fee is often not in the goods' currency). */
export const PerOrderSchema = obj(
  {
    amount: num({ min: 0, max: LIMITS.price }),
    currency: currency(),
  },
  'an object with amount and currency',
);

const landedPct = () => num({ min: 0, max: LIMITS.landedPct });

export const SupplierSchema = obj({
  ...recordBase,
  name: filled(LIMITS.name),
  currency: currency(),
  notes: v.optional(text(LIMITS.notes), ''),
  mapping: v.optional(ColumnMappingSchema),
  /** The supplier's order address, printed on our orders to it. */
  address: v.optional(text(LIMITS.shortText)),
  /** Payment terms agreed with the supplier ("30 days net"), printed on our orders to it. */
  paymentTerms: v.optional(text(LIMITS.name)),
  // Landed cost of buying from this supplier, on top of the goods (domain/landed.ts says who pays what under each
  // quote's delivery term). Percentages are of the goods' value in the base currency.
  /** Freight charged once per order. */
  freightPerOrder: v.optional(PerOrderSchema),
  /** Freight as a share of the goods' value, in percent. */
  freightPct: v.optional(landedPct()),
  /** Import duty as a share of the goods' value, in percent. */
  dutyPct: v.optional(landedPct()),
  /** Payment and bank charges once per order. */
  chargesPerOrder: v.optional(PerOrderSchema),
  /** Payment and bank charges as a share of the goods' value, in percent. */
  chargesPct: v.optional(landedPct()),
});

/** Quantity from which a unit price applies (all-units discount), and that unit price in the quote's currency. */
export const PriceBreakSchema = obj(
  {
    qty: num({ min: 0, above: true, max: LIMITS.quantity }),
    price: num({ min: 0, max: LIMITS.price }),
  },
  'an object with qty and price',
);

const breaks = () =>
  v.pipe(
    list(PriceBreakSchema, LIMITS.breaks),
    // Runs on breaks that are partly bad too, so a file's every problem is named at once.
    v.rawCheck<{ qty: number; price: number }[]>(({ dataset, addIssue }) => {
      const bs = dataset.value;
      if (!Array.isArray(bs)) return;
      if (bs.length === 0) addIssue({ message: 'must hold at least one price break' });
      const qtyAt = (i: number): number | undefined => {
        const q: unknown = isObject(bs[i]) ? bs[i]!.qty : undefined;
        return typeof q === 'number' && Number.isFinite(q) ? q : undefined;
      };
      for (let i = 1; i < bs.length; i++) {
        const q = qtyAt(i);
        const before = qtyAt(i - 1);
        if (q !== undefined && before !== undefined && q > 0 && q <= before) {
          addIssue({
            message: `price breaks must rise in quantity: ${q} comes after ${before}`,
            path: [
              { type: 'array', origin: 'value', input: bs, key: i, value: bs[i] },
              { type: 'object', origin: 'value', input: bs[i], key: 'qty', value: bs[i]!.qty },
            ],
          });
        }
      }
    }),
  );

export const QuoteSchema = obj({
  ...recordBase,
  partId: id(),
  supplierId: id(),
  /** The supplier's own order code for the part. */
  supplierCode: v.optional(text(LIMITS.name), ''),
  currency: currency(),
  /** Ascending by qty, first break is the smallest quantity sold. */
  breaks: breaks(),
  moq: v.optional(num({ min: 0, above: true, max: LIMITS.quantity }), 1),
  pack: v.optional(num({ min: 0, above: true, max: LIMITS.quantity }), 1),
  leadDays: v.optional(num({ min: 0, max: LIMITS.leadDays }), 0),
  /** ISO date (YYYY-MM-DD) the quote was given. */
  date: date(),
  /** ISO date after which the quote is no longer valid; absent = no expiry. */
  expires: v.optional(date()),
  /** File name or 'manual'. */
  source: v.optional(text(LIMITS.shortText), 'manual'),
  batchId: v.optional(id()),
  /** Set when a newer quote for the same part and supplier replaced this one. */
  supersededBy: v.optional(id()),
  /** Delivery term of the offer (Incoterms 2020); absent = the supplier's landed costs all fall to us. */
  incoterm: v.optional(oneOf(INCOTERMS)),
});

const paramValue = () =>
  v.union([v.pipe(v.string(), v.maxLength(LIMITS.shortText, `text may be at most ${LIMITS.shortText} characters long`)), siValue()], (i) =>
    typeof i.input === 'number' ? 'must be a finite number or text, not a number' : `must be a finite number or text, not ${kindOf(i.input)}`,
  );

export const VariantSchema = obj({
  ...recordBase,
  /** Short code of the variant, unique in the Book (for example "RB5-75-CD"). */
  code: filled(LIMITS.name),
  name: v.optional(text(LIMITS.name), ''),
  /** Named parameters: steps, load_w, mains_v, mains_hz, mains_tol, supply, stage, pf, component values… */
  params: v.optional(keyed(paramValue()), {}),
  notes: v.optional(text(LIMITS.notes)),
});

const formula = () => text(LIMITS.formula);

/** One line of the family BOM. Rules are formulas over the variant's parameters. */
export const BuildLineSchema = v.pipe(
  obj({
    ...recordBase,
    /** Order on screen and in exports. */
    position: num({ min: -LIMITS.quantity, max: LIMITS.quantity }),
    designators: v.optional(text(LIMITS.shortText), ''),
    /** Fixed part, used when `partRule` is empty. */
    partId: v.optional(id()),
    /** Formula evaluating to a maker part number, chosen per variant. */
    partRule: v.optional(formula()),
    /** Formula for quantity per unit (for example "1", "steps - 1"). */
    qtyRule: v.optional(v.pipe(formula(), v.check((s) => s.trim() !== '', 'must not be empty')), '1'),
    /** Formula that is true where the line applies; empty means always. */
    appliesWhen: v.optional(formula(), ''),
    category: v.optional(oneOf(COST_CATEGORIES), 'electronics'),
    /** Engineering role of the line's part; check formulas read its ratings as `<role>_<rating>`. */
    role: v.optional(text(LIMITS.name)),
    /** Attrition allowance as a fraction (0.02 = 2 %); absent = the Book's default for the part kind. */
    attrition: v.optional(num({ min: 0, below: 1 })),
    /** When set, run costing buys this line only from this supplier (other quotes are not considered). */
    pinnedSupplierId: v.optional(id()),
    /**
     * Approved second sources of a fixed-part line, best first after `partId`. Checks judge every approved part and
     * report the worst; costing buys the cheapest approved part that can be had in time unless one is pinned.
     */
    alternates: v.optional(list(id(), LIMITS.alternates)),
    /** When set, costing buys only this approved part (the line's part or one of its alternates). */
    pinnedPartId: v.optional(id()),
    notes: v.optional(text(LIMITS.notes)),
  }),
  v.forward(
    v.check((l) => l.partId !== undefined || l.partRule !== undefined, 'a build line needs a part (partId) or a rule choosing it (partRule)'),
    ['partId'],
  ),
  v.forward(
    v.check((l) => l.alternates === undefined || l.alternates.length === 0 || l.partId !== undefined, 'only a line with a fixed part (partId) has approved alternates'),
    ['alternates'],
  ),
  v.forward(
    v.check(
      (l) => l.alternates === undefined || new Set([l.partId, ...l.alternates]).size === l.alternates.length + 1,
      'an approved part is listed once: the alternates repeat a part or the line\'s own part',
    ),
    ['alternates'],
  ),
  v.forward(
    v.check(
      (l) => l.pinnedPartId === undefined || l.pinnedPartId === l.partId || (l.alternates ?? []).includes(l.pinnedPartId),
      'the pinned part must be the line\'s part or one of its approved alternates',
    ),
    ['pinnedPartId'],
  ),
);

/**
 * A pass / margin / fail rule. For `max`: value ≤ limit passes, within `margin` (a fraction of the limit) of it is
 * `margin`, above is `fail`. `min` mirrors it. `between` needs both. `true` passes on a true value.
 */
export const CheckRuleSchema = obj({
  kind: oneOf(CHECK_RULE_KINDS),
  limit: v.optional(formula()),
  low: v.optional(formula()),
  high: v.optional(formula()),
  /** Fraction of the limit that counts as margin (0.1 = within 10 %). */
  margin: v.optional(num({ min: 0, max: 1 })),
});

export const CheckSchema = v.pipe(
  obj({
    ...recordBase,
    name: filled(LIMITS.name),
    title: v.optional(text(LIMITS.shortText)),
    formula: v.pipe(formula(), v.check((s) => s.trim() !== '', 'must not be empty')),
    unit: v.optional(text(LIMITS.name), ''),
    rule: CheckRuleSchema,
    /** Formula true where the check applies; otherwise the check reports n/a. */
    appliesWhen: v.optional(formula(), ''),
    note: v.optional(text(LIMITS.notes), ''),
    /** True for checks loaded from sheets/; the user may still edit them. */
    builtIn: v.optional(bool(), false),
    group: v.optional(text(LIMITS.name), ''),
  }),
  v.transform((c) => ({ ...c, title: c.title ?? c.name })),
);

// A frozen run's costing, kept whole so later quote changes do not alter it.

const amount = () => num({ min: -LIMITS.money, max: LIMITS.money });

export const CostProblemSchema = obj({
  lineId: v.optional(text(LIMITS.id)),
  designators: v.optional(text(LIMITS.shortText)),
  partId: v.optional(text(LIMITS.id)),
  message: text(LIMITS.description),
});

export const CostedLineSchema = obj({
  lineId: text(LIMITS.id),
  lineIds: list(text(LIMITS.id), LIMITS.records),
  designators: text(LIMITS.shortText),
  partId: text(LIMITS.id),
  mpn: text(LIMITS.name),
  description: text(LIMITS.description),
  qtyPerUnit: amount(),
  need: amount(),
  buy: amount(),
  supplierId: text(LIMITS.id),
  supplier: text(LIMITS.name),
  supplierCode: text(LIMITS.name),
  quoteId: text(LIMITS.id),
  moq: amount(),
  pack: num({ min: 1, max: LIMITS.quantity }),
  leadDays: amount(),
  breakQty: amount(),
  unitPrice: amount(),
  /** Quote currency. */
  currency: text(LIMITS.name),
  /** buy × unitPrice rounded to cents, quote currency. */
  extended: amount(),
  /** extended × rate rounded to cents, base currency. */
  extendedBase: amount(),
  leftover: amount(),
  /** leftover × unit price × rate, rounded to cents, base currency (shown, not credited). */
  leftoverValue: amount(),
  // Landed cost of the line, base currency, cents (domain/landed.ts); absent in costings frozen before it existed.
  /** The quote's delivery term, when it has one. */
  incoterm: v.optional(text(LIMITS.name)),
  freight: v.optional(amount()),
  duty: v.optional(amount()),
  charges: v.optional(amount()),
  /**
   * Which of the line's approved parts was bought and why ("cheapest approved", "pinned"…), and how many parts the
   * line approves (1: a single source); absent in costings frozen before approved alternates existed.
   */
  partChoice: v.optional(obj({ reason: text(LIMITS.name), approved: num({ min: 1, integer: true, max: LIMITS.alternates + 1 }) })),
});

export const CostedBomSchema = obj({
  variantId: text(LIMITS.id),
  variant: text(LIMITS.name),
  run: num({ min: 1, integer: true, max: LIMITS.runQuantity }),
  /** Base currency of every total. */
  currency: text(LIMITS.name),
  date: text(LIMITS.name),
  lines: list(CostedLineSchema, LIMITS.records),
  placements: amount(),
  /** Per unit, 4 decimals. */
  material: amount(),
  labour: amount(),
  test: amount(),
  overhead: amount(),
  unitCost: amount(),
  price: amount(),
  /** Run amounts, cents. materialRun includes the landed cost, landedRun of it. */
  materialRun: amount(),
  landedRun: v.optional(amount()),
  runTotal: amount(),
  leftoverValue: amount(),
  /** False when some line could not be priced; totals then cover the priced lines only. */
  complete: bool(),
  problems: list(CostProblemSchema, LIMITS.records),
});

export const SNAPSHOT_FORMAT = 'rungbook-frozen-costing' as const;
export const SNAPSHOT_VERSION = 1 as const;

const rates = () =>
  keyed(num({ min: 0, above: true, max: LIMITS.rate }), (k) =>
    isCurrencyCode(k) ? undefined : `a rate must be keyed by a currency code of three capital letters (ISO 4217), not ${short(k)}`,
  );

/** The cost rates of the settings, bounded by what a workshop's rates can be. */
const costRates = {
  labourRatePerHour: num({ min: 0, max: 100_000 }),
  labourMinutesPerUnit: num({ min: 0, max: 10_000 }),
  labourMinutesPerPlacement: num({ min: 0, max: 1_000 }),
  testCostPerUnit: num({ min: 0, max: LIMITS.price }),
  overheadPct: num({ min: 0, max: 10_000 }),
  marginPct: num({ min: 0, below: 100 }),
};

/** The cost settings a frozen costing was made with. */
export const FrozenSettingsSchema = obj({
  baseCurrency: currency(),
  rates: rates(),
  ...costRates,
});

export const FrozenSnapshotSchema = obj({
  format: v.literal(SNAPSHOT_FORMAT, (i) => `must be ${JSON.stringify(SNAPSHOT_FORMAT)}, not ${short(i.input)}`),
  version: v.literal(SNAPSHOT_VERSION, (i) => `${short(i.input)} is not a version this Rungbook reads (${SNAPSHOT_VERSION})`),
  bom: CostedBomSchema,
  /** The quotes the costing chose, whole, as they stood when frozen. */
  quotes: list(QuoteSchema, LIMITS.records),
  /** The parts of the lines, as they stood (so the frozen BOM still reads after a part is edited or deleted). */
  parts: list(PartSchema, LIMITS.records),
  settings: FrozenSettingsSchema,
});

export const FrozenRunSchema = obj({
  at: time(),
  snapshot: FrozenSnapshotSchema,
});

export const RunSchema = obj({
  ...recordBase,
  name: v.optional(text(LIMITS.name), ''),
  variantId: id(),
  quantity: num({ min: 0, above: true, integer: true, max: LIMITS.runQuantity }),
  /** ISO date the finished units are wanted. */
  dateWanted: date(),
  notes: v.optional(text(LIMITS.notes), ''),
  /** When frozen, the costed BOM as computed then; later quote changes do not alter it. */
  frozen: v.optional(FrozenRunSchema),
  /** A planned run (also when absent) is in the plan; a built run has issued its parts from stock on `builtDate`. */
  status: v.optional(oneOf(RUN_STATUSES)),
  builtDate: v.optional(date()),
});

/**
 * One movement of stock: on hand of a part is the sum of its movements, never a number kept and overwritten.
 * In is positive, out negative. A receipt names its order line; an issue names its run.
 */
export const StockMoveSchema = obj({
  ...recordBase,
  partId: id(),
  date: date(),
  /** Whole parts, signed: + into stock, − out of it; never 0. */
  quantity: num({ min: -LIMITS.quantity, max: LIMITS.quantity, integer: true }),
  kind: oneOf(STOCK_MOVE_KINDS),
  /** Why, in the user's words (a count's name, a scrap reason). */
  reason: v.optional(text(LIMITS.shortText), ''),
  /** The order a receipt came on, and the index of its line there. */
  orderId: v.optional(id()),
  orderLine: v.optional(count(LIMITS.orderLines)),
  /** The run the parts were issued to. */
  runId: v.optional(id()),
  /** The import batch (a stock count) whose movement this one reverses: the count was undone. */
  undoes: v.optional(id()),
});

export const OrderLineSchema = obj({
  partId: id(),
  quantity: num({ min: 0, above: true, integer: true, max: LIMITS.quantity }),
  /** Unit price agreed, in `currency`. */
  price: num({ min: 0, max: LIMITS.price }),
  currency: currency(),
  /** The quote the price came from, as it was when ordered (it may since be superseded or removed). */
  quoteId: v.optional(id()),
  /** Parts received so far on this line: the sum of its receipts. */
  received: v.optional(count(), 0),
});

/** An order placed with one supplier. Cancelling keeps it, and what was received on it, as history. */
export const OrderSchema = obj({
  ...recordBase,
  /** The order number the supplier sees, unique in the Book. */
  number: filled(LIMITS.name),
  supplierId: id(),
  status: v.optional(oneOf(ORDER_STATUSES), 'open'),
  orderedDate: date(),
  /** Date the parts are due in. */
  dueDate: date(),
  lines: list(OrderLineSchema, LIMITS.orderLines),
  notes: v.optional(text(LIMITS.notes), ''),
});

const priceRounding = () =>
  obj(
    {
      /** The price is a whole number of steps (0.05, 0.5, 1…), in the list's currency. */
      step: num({ min: 0, above: true, max: LIMITS.price }),
      mode: v.optional(oneOf(ROUNDING_MODES), 'nearest'),
    },
    'an object with step and mode',
  );

/** A customer price list: a margin or markup and a currency of its own (wholesale, export…). */
export const PriceListSchema = v.pipe(
  obj({
    ...recordBase,
    name: filled(LIMITS.name),
    currency: currency(),
    basis: v.optional(oneOf(PRICE_BASES), 'margin'),
    /** Percent: a gross margin on price (below 100) or a markup on cost. */
    pct: num({ min: 0, max: LIMITS.markupPct }),
    /** Absent = to the cent, half away from zero. */
    rounding: v.optional(priceRounding()),
    notes: v.optional(text(LIMITS.notes), ''),
  }),
  v.forward(
    v.check(
      (l) => l.basis !== 'margin' || l.pct < 100,
      (i) => `a margin must be below 100 % (price = cost / (1 − margin)), not ${(i.input as { pct: number }).pct}`,
    ),
    ['pct'],
  ),
);

export const ImportBatchSchema = obj({
  ...recordBase,
  fileName: filled(LIMITS.shortText),
  /** SHA-256 of the file bytes, hex. */
  hash: v.optional(text(LIMITS.name), ''),
  /** Absent = a price file. */
  kind: v.optional(oneOf(IMPORT_KINDS)),
  /** The supplier of a price file; a stock count has none. */
  supplierId: v.optional(id()),
  rows: v.optional(count(), 0),
  at: time(),
  /** Ids of quotes this batch created. */
  created: v.optional(list(text(LIMITS.id), LIMITS.quotes), []),
  /** Ids of quotes this batch superseded (restored on undo). */
  superseded: v.optional(list(text(LIMITS.id), LIMITS.quotes), []),
  /** Ids of the stock movements a stock count wrote (each reversed by a movement naming the batch on undo). */
  moves: v.optional(list(text(LIMITS.id), LIMITS.parts)),
  undone: v.optional(bool()),
});

export const NotebookSectionSchema = obj({
  heading: v.optional(text(LIMITS.shortText), ''),
  text: v.optional(text(LIMITS.pageText), ''),
  /** Rows of cells; a cell is a value or a formula starting with "=". Empty for text-only sections. */
  grid: v.optional(
    list(
      v.pipe(
        v.array(v.string((i) => `a cell must be text, not ${kindOf(i.input)}`), (i) => `must be a list of cells, not ${kindOf(i.input)}`),
        v.maxLength(LIMITS.gridColumns, `a row may hold at most ${LIMITS.gridColumns} cells`),
        v.check((row) => row.every((c) => c.length <= LIMITS.cell), `a cell may be at most ${LIMITS.cell} characters long`),
      ),
      LIMITS.gridRows,
    ),
    [],
  ),
});

/** A user notebook page: headed sections, each text or a small formula grid. */
export const NotebookPageSchema = obj({
  ...recordBase,
  title: v.optional(text(LIMITS.name), ''),
  position: num({ min: -LIMITS.quantity, max: LIMITS.quantity }),
  sections: v.optional(list(NotebookSectionSchema, LIMITS.sections), []),
});

/** Cost rates and conversion used for every run. */
export const SettingsSchema = v.pipe(
  obj({
    id: v.optional(v.literal('settings', (i) => `must be "settings", not ${short(i.input)}`), 'settings'),
    rev: rev(),
    bookName: v.optional(text(LIMITS.name), 'New Book'),
    company: v.optional(text(LIMITS.name), ''),
    /** Where suppliers deliver: the address printed on supplier orders, one line per line of text. */
    shipTo: v.optional(text(LIMITS.shortText)),
    baseCurrency: v.optional(currency(), 'EUR'),
    /** Units of base currency for one unit of each currency (base itself is 1). */
    rates: v.optional(rates(), { EUR: 1 }),
    /** Run sizes costed together on the Family and Compare pages. */
    runSizes: v.optional(list(num({ min: 0, above: true, integer: true, max: LIMITS.runQuantity }), 50), [500, 2000, 10000]),
    labourRatePerHour: v.optional(costRates.labourRatePerHour, 0),
    labourMinutesPerUnit: v.optional(costRates.labourMinutesPerUnit, 0),
    labourMinutesPerPlacement: v.optional(costRates.labourMinutesPerPlacement, 0),
    testCostPerUnit: v.optional(costRates.testCostPerUnit, 0),
    overheadPct: v.optional(costRates.overheadPct, 0),
    marginPct: v.optional(costRates.marginPct, 0),
    /** Default attrition by part kind; 'default' for the rest. */
    attrition: v.optional(keyed(num({ min: 0, below: 1 })), { default: 0.01 }),
    /** Date used to decide quote expiry; absent = today. */
    costingDate: v.optional(date()),
    /** Order numbers: the prefix and the next number given. */
    orderPrefix: v.optional(text(LIMITS.name), 'ORD-'),
    nextOrderNumber: v.optional(num({ min: 1, integer: true, max: LIMITS.quantity }), 1),
    /** Days between the parts being in and the finished units being wanted (kitting and assembly). */
    kittingDays: v.optional(num({ min: 0, integer: true, max: LIMITS.planDays }), 5),
    /** Days of margin before that, for a late delivery. */
    safetyDays: v.optional(num({ min: 0, integer: true, max: LIMITS.planDays }), 2),
    /** Planned runs wanted within this many days of the plan date are planned together. */
    horizonDays: v.optional(num({ min: 1, integer: true, max: LIMITS.planDays }), 90),
    /** How a run's costing values parts taken from stock. */
    stockValuation: v.optional(oneOf(STOCK_VALUATIONS), 'lastPaid'),
    lastExportAt: v.optional(time()),
    editsSinceExport: v.optional(count(Number.MAX_SAFE_INTEGER)),
  }),
  // The base currency's rate is 1 by definition: filled in when absent, refused when it is anything else.
  v.rawTransform(({ dataset, addIssue, NEVER }) => {
    const s = dataset.value;
    const r = s.rates[s.baseCurrency];
    if (r === undefined) return { ...s, rates: { ...s.rates, [s.baseCurrency]: 1 } };
    if (r !== 1) {
      addIssue({
        message: `the base currency's rate must be 1, not ${r}`,
        path: [
          { type: 'object', origin: 'value', input: s, key: 'rates', value: s.rates },
          { type: 'object', origin: 'value', input: s.rates, key: s.baseCurrency, value: r },
        ],
      });
      return NEVER;
    }
    return s;
  }),
);

export const BookSchema = obj({
  format: v.literal(BOOK_FORMAT),
  version: v.literal(BOOK_VERSION),
  settings: v.optional(SettingsSchema, {}),
  parts: v.optional(list(PartSchema, LIMITS.parts), []),
  suppliers: v.optional(list(SupplierSchema, LIMITS.records), []),
  quotes: v.optional(list(QuoteSchema, LIMITS.quotes), []),
  variants: v.optional(list(VariantSchema, LIMITS.records), []),
  buildLines: v.optional(list(BuildLineSchema, LIMITS.records), []),
  checks: v.optional(list(CheckSchema, LIMITS.records), []),
  runs: v.optional(list(RunSchema, LIMITS.records), []),
  importBatches: v.optional(list(ImportBatchSchema, LIMITS.records), []),
  pages: v.optional(list(NotebookPageSchema, LIMITS.sections), []),
  orders: v.optional(list(OrderSchema, LIMITS.records), []),
  stockMoves: v.optional(list(StockMoveSchema, LIMITS.stockMoves), []),
  priceLists: v.optional(list(PriceListSchema, LIMITS.records), []),
});

/**
 * The schema of one record of each collection: the very schemas the Book's lists are checked with, to check records
 * read one at a time (an edit saved in another tab) without checking the whole Book.
 */
export const RECORD_SCHEMAS = {
  parts: PartSchema,
  suppliers: SupplierSchema,
  quotes: QuoteSchema,
  variants: VariantSchema,
  buildLines: BuildLineSchema,
  checks: CheckSchema,
  runs: RunSchema,
  importBatches: ImportBatchSchema,
  pages: NotebookPageSchema,
  orders: OrderSchema,
  stockMoves: StockMoveSchema,
  priceLists: PriceListSchema,
} as const satisfies Record<(typeof COLLECTION_KEYS)[number], v.GenericSchema>;

// ---------------------------------------------------------------------------------------------------------------
// Types, inferred

export type CurrencyCode = string;
export type Part = v.InferOutput<typeof PartSchema>;
export type ColumnMapping = v.InferOutput<typeof ColumnMappingSchema>;
export type PerOrder = v.InferOutput<typeof PerOrderSchema>;
export type Supplier = v.InferOutput<typeof SupplierSchema>;
export type PriceBreak = v.InferOutput<typeof PriceBreakSchema>;
export type Quote = v.InferOutput<typeof QuoteSchema>;
export type ParamValue = number | string;
export type Variant = v.InferOutput<typeof VariantSchema>;
export type BuildLine = v.InferOutput<typeof BuildLineSchema>;
export type CheckRule = v.InferOutput<typeof CheckRuleSchema>;
export type Check = v.InferOutput<typeof CheckSchema>;
export type CostProblem = v.InferOutput<typeof CostProblemSchema>;
export type CostedLine = v.InferOutput<typeof CostedLineSchema>;
export type CostedBom = v.InferOutput<typeof CostedBomSchema>;
export type FrozenSettings = v.InferOutput<typeof FrozenSettingsSchema>;
export type FrozenSnapshot = v.InferOutput<typeof FrozenSnapshotSchema>;
export type FrozenRun = v.InferOutput<typeof FrozenRunSchema>;
export type Run = v.InferOutput<typeof RunSchema>;
export type StockMove = v.InferOutput<typeof StockMoveSchema>;
export type OrderLine = v.InferOutput<typeof OrderLineSchema>;
export type Order = v.InferOutput<typeof OrderSchema>;
export type ImportBatch = v.InferOutput<typeof ImportBatchSchema>;
export type NotebookSection = v.InferOutput<typeof NotebookSectionSchema>;
export type NotebookPage = v.InferOutput<typeof NotebookPageSchema>;
export type PriceList = v.InferOutput<typeof PriceListSchema>;
export type Settings = v.InferOutput<typeof SettingsSchema>;
export type Book = v.InferOutput<typeof BookSchema>;

// ---------------------------------------------------------------------------------------------------------------
// Validation

export interface SchemaProblem {
  /** Where: `quotes[3].breaks[1].qty`; empty for the whole. */
  path: string;
  message: string;
}

const IDENT = /^[A-Za-z_$][A-Za-z0-9_$]*$/;

/** A place in a record written as code would name it: `quotes[3].breaks[1].qty`, `rates["US D"]`. */
export function joinPath(path: string, key: string | number): string {
  if (typeof key === 'number') return `${path}[${key}]`;
  if (!IDENT.test(key)) return `${path}[${JSON.stringify(key)}]`;
  return path ? `${path}.${key}` : key;
}

function issuePath(prefix: string, issue: Issue): string {
  let p = prefix;
  for (const item of issue.path ?? []) {
    const key = item.key;
    p = joinPath(p, typeof key === 'number' ? key : String(key));
  }
  return p;
}

export type Checked<T> = { ok: true; value: T } | { ok: false; problems: SchemaProblem[] };

/** Validates `input` against a schema; problems carry their place, starting at `at`. */
export function checkWith<S extends v.GenericSchema>(schema: S, input: unknown, at = ''): Checked<v.InferOutput<S>> {
  const r = v.safeParse(schema, input, PARSE_CONFIG);
  if (r.success) return { ok: true, value: r.output };
  return { ok: false, problems: r.issues.map((i) => ({ path: issuePath(at, i), message: i.message })) };
}

/** The Book from parsed data of the current file version: the schema first, then the rules between records. */
export function checkBook(input: unknown): Checked<Book> {
  const r = v.safeParse(BookSchema, input, PARSE_CONFIG);
  const problems: SchemaProblem[] = r.success ? [] : r.issues.map((i) => ({ path: issuePath('', i), message: i.message }));
  // The rules between records run on a Book with bad records too (where its lists are lists), so a file's
  // problems are all named at once.
  problems.push(...crossRecordProblemsOf(r.output));
  problems.sort(byPlace);
  return problems.length ? { ok: false, problems } : { ok: true, value: r.output as Book };
}

const PLACE = /^(\w+)(?:\[(\d+)\])?/;
/** Problems in file order: by collection, then record; within a record in the order they were found. */
function byPlace(a: SchemaProblem, b: SchemaProblem): number {
  const rank = (p: string): [number, number] => {
    const m = PLACE.exec(p);
    const c = m ? (COLLECTION_KEYS as readonly string[]).indexOf(m[1]!) : -1;
    return [m?.[1] === 'settings' || c < 0 ? -1 : c, m?.[2] === undefined ? -1 : Number(m[2])];
  };
  const [ca, ia] = rank(a.path);
  const [cb, ib] = rank(b.path);
  return ca - cb || ia - ib || NATURAL.compare(a.path, b.path);
}
const NATURAL = new Intl.Collator('en', { numeric: true });

function crossRecordProblemsOf(output: unknown): SchemaProblem[] {
  if (!isObject(output) || !isObject(output.settings) || !isObject(output.settings.rates)) return [];
  for (const c of COLLECTION_KEYS) if (!Array.isArray(output[c]) || !(output[c] as unknown[]).every(isObject)) return [];
  try {
    return crossRecordProblems(output as Book);
  } catch {
    return [];
  }
}

/** Collections of a Book, in file order (book.ts gives them as COLLECTIONS). */
export const COLLECTION_KEYS = [
  'parts',
  'suppliers',
  'quotes',
  'variants',
  'buildLines',
  'checks',
  'runs',
  'importBatches',
  'pages',
  'orders',
  'stockMoves',
  'priceLists',
] as const;

/** Rules between records: ids unique per collection, references that resolve, rated currencies, unique codes and names. */
export function crossRecordProblems(book: Book): SchemaProblem[] {
  const problems: SchemaProblem[] = [];
  const add = (path: string, message: string): void => void problems.push({ path, message });
  const ids = {} as Record<(typeof COLLECTION_KEYS)[number], Set<string>>;
  for (const c of COLLECTION_KEYS) {
    const first = new Map<string, number>();
    (book[c] as { id: string }[]).forEach((r, i) => {
      const at = first.get(r.id);
      if (at !== undefined) add(`${c}[${i}].id`, `the id ${short(r.id)} is used twice (also at ${c}[${at}])`);
      else first.set(r.id, i);
    });
    ids[c] = new Set(first.keys());
  }
  const ref = (path: string, target: string, c: (typeof COLLECTION_KEYS)[number], what: string): void => {
    if (!ids[c].has(target)) add(path, `refers to ${what} ${short(target)}, which is not in the file`);
  };
  const rated = (path: string, code: string): void => {
    // A malformed code is named by the schema already.
    if (isCurrencyCode(code) && !Object.hasOwn(book.settings.rates, code)) add(path, `currency ${code} has no exchange rate in settings.rates`);
  };
  book.suppliers.forEach((s, i) => {
    rated(`suppliers[${i}].currency`, s.currency);
    if (s.freightPerOrder) rated(`suppliers[${i}].freightPerOrder.currency`, s.freightPerOrder.currency);
    if (s.chargesPerOrder) rated(`suppliers[${i}].chargesPerOrder.currency`, s.chargesPerOrder.currency);
  });
  book.priceLists.forEach((l, i) => rated(`priceLists[${i}].currency`, l.currency));
  book.quotes.forEach((q, i) => {
    ref(`quotes[${i}].partId`, q.partId, 'parts', 'part');
    ref(`quotes[${i}].supplierId`, q.supplierId, 'suppliers', 'supplier');
    rated(`quotes[${i}].currency`, q.currency);
  });
  book.buildLines.forEach((l, i) => {
    if (l.partId !== undefined) ref(`buildLines[${i}].partId`, l.partId, 'parts', 'part');
    if (l.pinnedSupplierId !== undefined) ref(`buildLines[${i}].pinnedSupplierId`, l.pinnedSupplierId, 'suppliers', 'supplier');
    (l.alternates ?? []).forEach((a, k) => ref(`buildLines[${i}].alternates[${k}]`, a, 'parts', 'part'));
  });
  book.runs.forEach((r, i) => {
    ref(`runs[${i}].variantId`, r.variantId, 'variants', 'variant');
    if (r.status === 'built' && r.builtDate === undefined) add(`runs[${i}].builtDate`, 'a built run needs the date it was built');
    if (r.status !== 'built' && r.builtDate !== undefined) add(`runs[${i}].builtDate`, 'only a built run has a date it was built');
  });
  problems.push(...stockProblems(book, ids));
  book.importBatches.forEach((b, i) => {
    if (b.kind === 'stock count') {
      if (b.supplierId !== undefined) add(`importBatches[${i}].supplierId`, 'a stock count has no supplier');
    } else if (b.supplierId === undefined) add(`importBatches[${i}].supplierId`, 'a price file import names its supplier');
    else ref(`importBatches[${i}].supplierId`, b.supplierId, 'suppliers', 'supplier');
  });
  const unique = <T>(items: readonly T[], c: string, field: string, key: (x: T) => string, what: string): void => {
    const seen = new Map<string, number>();
    items.forEach((x, i) => {
      const k = key(x);
      const at = seen.get(k);
      if (at !== undefined) add(`${c}[${i}].${field}`, `the ${what} ${short(k)} is used twice (also at ${c}[${at}])`);
      else seen.set(k, i);
    });
  };
  unique(book.variants, 'variants', 'code', (x) => x.code, 'variant code');
  unique(book.checks, 'checks', 'name', (x) => x.name, 'check name');
  unique(book.priceLists, 'priceLists', 'name', (x) => x.name.trim().toLowerCase(), 'price list name');
  unique(book.orders, 'orders', 'number', (x) => x.number, 'order number');
  return problems;
}

/** The sign each kind of stock movement must have: in, out, or either (never 0). */
const MOVE_SIGN: Record<StockMoveKind, 1 | -1 | 0> = { counted: 0, received: 1, issued: -1, scrapped: -1, adjusted: 0 };

/**
 * Rules of orders and stock movements: references resolve, signs fit the kind, each order line's `received` is
 * the sum of its receipts and never more than was ordered, and an order's status says what was received.
 */
function stockProblems(book: Book, ids: Record<(typeof COLLECTION_KEYS)[number], Set<string>>): SchemaProblem[] {
  const problems: SchemaProblem[] = [];
  const add = (path: string, message: string): void => void problems.push({ path, message });
  const has = (c: (typeof COLLECTION_KEYS)[number], x: string, path: string, what: string): boolean => {
    if (ids[c].has(x)) return true;
    add(path, `refers to ${what} ${short(x)}, which is not in the file`);
    return false;
  };
  const orders = new Map(book.orders.map((o) => [o.id, o] as const));
  book.orders.forEach((o, i) => {
    const at = `orders[${i}]`;
    has('suppliers', o.supplierId, `${at}.supplierId`, 'supplier');
    if (o.dueDate < o.orderedDate) add(`${at}.dueDate`, `the due date ${o.dueDate} is before the order date ${o.orderedDate}`);
    if (o.lines.length === 0) add(`${at}.lines`, 'an order needs at least one line');
    let full = 0;
    let some = 0;
    o.lines.forEach((l, k) => {
      has('parts', l.partId, `${at}.lines[${k}].partId`, 'part');
      if (isCurrencyCode(l.currency) && !Object.hasOwn(book.settings.rates, l.currency)) {
        add(`${at}.lines[${k}].currency`, `currency ${l.currency} has no exchange rate in settings.rates`);
      }
      if (l.received > l.quantity) add(`${at}.lines[${k}].received`, `${l.received} received is more than the ${l.quantity} ordered`);
      if (l.received >= l.quantity) full++;
      if (l.received > 0) some++;
    });
    const status = o.status === 'cancelled' ? 'cancelled' : full === o.lines.length && o.lines.length > 0 ? 'received' : some > 0 ? 'part-received' : 'open';
    if (status !== o.status) add(`${at}.status`, `is ${o.status}, but what its lines received makes it ${status}`);
  });
  const receivedOn = new Map<string, number>();
  book.stockMoves.forEach((m, i) => {
    const at = `stockMoves[${i}]`;
    has('parts', m.partId, `${at}.partId`, 'part');
    const sign = MOVE_SIGN[m.kind];
    if (m.quantity === 0) add(`${at}.quantity`, 'a movement moves at least one part; 0 is not a movement');
    else if (sign !== 0 && Math.sign(m.quantity) !== sign) {
      add(`${at}.quantity`, `a ${m.kind} movement ${sign > 0 ? 'adds to' : 'takes from'} stock, so its quantity must be ${sign > 0 ? 'above' : 'below'} 0, not ${m.quantity}`);
    }
    if (m.runId !== undefined) has('runs', m.runId, `${at}.runId`, 'run');
    if (m.undoes !== undefined) has('importBatches', m.undoes, `${at}.undoes`, 'import batch');
    if (m.orderLine !== undefined && m.orderId === undefined) add(`${at}.orderLine`, 'an order line needs its order (orderId)');
    if (m.orderId === undefined || !has('orders', m.orderId, `${at}.orderId`, 'order')) return;
    if (m.kind !== 'received') add(`${at}.kind`, `only a receipt comes from an order, not a ${m.kind} movement`);
    const o = orders.get(m.orderId)!;
    const line = m.orderLine === undefined ? undefined : o.lines[m.orderLine];
    if (line === undefined) {
      add(`${at}.orderLine`, `order ${short(o.number)} has lines 0 to ${o.lines.length - 1}; a receipt must name one`);
      return;
    }
    if (line.partId !== m.partId) add(`${at}.partId`, `is ${short(m.partId)}, but line ${m.orderLine} of order ${short(o.number)} is for ${short(line.partId)}`);
    const key = `${m.orderId}\u0000${m.orderLine}`;
    receivedOn.set(key, (receivedOn.get(key) ?? 0) + m.quantity);
  });
  book.orders.forEach((o, i) =>
    o.lines.forEach((l, k) => {
      const moved = receivedOn.get(`${o.id}\u0000${k}`) ?? 0;
      if (moved !== l.received) add(`orders[${i}].lines[${k}].received`, `is ${l.received}, but the receipts on this line add up to ${moved}`);
    }),
  );
  return problems;
}
