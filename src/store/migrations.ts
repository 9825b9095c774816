// Numbered schema migrations of the Book database and the runner that applies them inside the upgrade transaction.
// A released step is never edited; a new schema is one more step at the end of MIGRATIONS.
import type { IDBPDatabase, IDBPTransaction } from 'idb';
import { defaultSettings, mpnKey, PART_KINDS } from '../domain/book.ts';
import type { Part, PartKind, PriceBreak, Quote, Settings, Supplier, Variant } from '../domain/book.ts';
import { isObject, isPartValueUnit } from '../domain/schema.ts';
import { bucketQuotes } from './schema.ts';
import type { MetaRecord, StoredPart } from './schema.ts';

export type UpgradeDb = IDBPDatabase<unknown>;
export type UpgradeTx = IDBPTransaction<unknown, string[], 'versionchange'>;

export interface Migration {
  /** Schema version this step produces; steps are 1, 2, 3… in order. */
  version: number;
  title: string;
  /**
   * Brings a database at schema `version - 1` (or a new, empty one when `from` is undefined) to `version`.
   * Runs inside the upgrade transaction: only IndexedDB requests may be awaited.
   */
  up(db: UpgradeDb, tx: UpgradeTx, from: number | undefined): Promise<void>;
}

/** Problems with a list of steps: it must start at 1 and rise by one. Empty when the list is sound. */
export function migrationProblems(steps: readonly Migration[]): string[] {
  const problems: string[] = [];
  if (steps.length === 0) problems.push('there are no migration steps; the first must be version 1');
  steps.forEach((s, i) => {
    if (!Number.isInteger(s.version) || s.version !== i + 1) {
      problems.push(
        i === 0
          ? `migrations must start at version 1, but the first step is version ${s.version}`
          : `migration step ${i + 1} has version ${s.version}; each step must be one above the step before (${i + 1})`,
      );
    }
  });
  return problems;
}

/** Steps a database at schema `from` still needs (all of them for a new database). */
export function stepsToRun(steps: readonly Migration[], from: number | undefined): Migration[] {
  return steps.filter((s) => from === undefined || s.version > from);
}

/** Runs the pending steps in order and records the schema reached in the `meta` store. */
export async function runMigrations(
  db: UpgradeDb,
  tx: UpgradeTx,
  from: number | undefined,
  steps: readonly Migration[],
  now: () => string = () => new Date().toISOString(),
): Promise<void> {
  const problems = migrationProblems(steps);
  if (problems.length) throw new Error(`the Book database migrations are broken: ${problems.join('; ')}`);
  const last = steps[steps.length - 1]!.version;
  if (from !== undefined && from > last) {
    throw new Error(`this Book was saved by a newer Rungbook (schema ${from}); this one knows up to schema ${last}`);
  }
  const pending = stepsToRun(steps, from);
  for (const step of pending) await step.up(db, tx, from);
  if (pending.length) {
    const meta: MetaRecord = { key: 'schema', version: last, migratedAt: now() };
    await tx.objectStore('meta').put(meta);
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Step 1: the Book stores of schema 1. A new database gets them empty, with default settings. A prototype database
// (schema 0: parts, suppliers, quotes and variants without revisions, quotes with `prices: [{ qty, unitPrice }]`,
// settings as key 'settings' of a `kv` store with `currency` for the base currency) is converted and its stores
// replaced.

interface PrototypeData {
  parts: Record<string, unknown>[];
  suppliers: Record<string, unknown>[];
  quotes: Record<string, unknown>[];
  variants: Record<string, unknown>[];
  settings: Record<string, unknown> | undefined;
}

const PROTOTYPE_STORES = ['parts', 'suppliers', 'quotes', 'variants', 'kv'] as const;

async function readPrototype(tx: UpgradeTx, present: Set<string>): Promise<PrototypeData> {
  const all = async (name: string): Promise<Record<string, unknown>[]> =>
    present.has(name) ? ((await tx.objectStore(name).getAll()) as unknown[]).filter(isObject) : [];
  const [parts, suppliers, quotes, variants] = await Promise.all([all('parts'), all('suppliers'), all('quotes'), all('variants')]);
  const kv = present.has('kv') ? ((await tx.objectStore('kv').get('settings')) as unknown) : undefined;
  return { parts, suppliers, quotes, variants, settings: isObject(kv) ? kv : undefined };
}

const str = (v: unknown, fallback = ''): string => (typeof v === 'string' ? v : fallback);
const num = (v: unknown, fallback: number): number => (typeof v === 'number' && Number.isFinite(v) ? v : fallback);

function numberRecord(v: unknown): Record<string, number> {
  const out: Record<string, number> = {};
  if (isObject(v)) for (const [k, x] of Object.entries(v)) if (typeof x === 'number' && Number.isFinite(x)) out[k] = x;
  return out;
}

function convertPart(p: Record<string, unknown>): StoredPart {
  const kind = (PART_KINDS as readonly string[]).includes(str(p.kind)) ? (p.kind as PartKind) : 'other';
  const part: Part = {
    id: str(p.id),
    rev: 1,
    mpn: str(p.mpn),
    maker: str(p.maker),
    description: str(p.description),
    kind,
    ratings: numberRecord(p.ratings),
    package: str(p.package),
  };
  if (typeof p.value === 'number' && Number.isFinite(p.value)) part.value = p.value;
  if (typeof p.unit === 'string' && isPartValueUnit(p.unit)) part.unit = p.unit;
  if (typeof p.notes === 'string') part.notes = p.notes;
  return { ...part, mpnKey: mpnKey(part.mpn) };
}

function convertSupplier(s: Record<string, unknown>, base: string): Supplier {
  return { id: str(s.id), rev: 1, name: str(s.name), currency: str(s.currency, base), notes: str(s.notes) };
}

function convertQuote(q: Record<string, unknown>, base: string): Quote {
  const prices = Array.isArray(q.prices) ? q.prices.filter(isObject) : [];
  const breaks: PriceBreak[] = prices
    .map((b) => ({ qty: num(b.qty, NaN), price: num(b.unitPrice, NaN) }))
    .filter((b) => Number.isFinite(b.qty) && Number.isFinite(b.price))
    .sort((a, b) => a.qty - b.qty);
  return {
    id: str(q.id),
    rev: 1,
    partId: str(q.partId),
    supplierId: str(q.supplierId),
    supplierCode: str(q.supplierCode),
    currency: str(q.currency, base),
    breaks,
    moq: num(q.moq, 1),
    pack: num(q.pack, 1),
    leadDays: num(q.leadDays, 0),
    date: str(q.date),
    source: str(q.source, 'manual'),
  };
}

function convertVariant(v: Record<string, unknown>): Variant {
  const params: Record<string, number | string> = {};
  if (isObject(v.params)) {
    for (const [k, x] of Object.entries(v.params)) {
      if (typeof x === 'string' || (typeof x === 'number' && Number.isFinite(x))) params[k] = x;
    }
  }
  return { id: str(v.id), rev: 1, code: str(v.code, str(v.id)), name: str(v.name), params };
}

function convertSettings(s: Record<string, unknown> | undefined): Settings {
  const d = defaultSettings();
  if (!s) return d;
  const base = str(s.currency, d.baseCurrency);
  const rates = numberRecord(s.rates);
  rates[base] = 1;
  return { ...d, bookName: str(s.bookName, d.bookName), company: str(s.company), baseCurrency: base, rates };
}

/** The indexes schemas 1–3 made and step 4 drops, by store (variants keep their unique code: a rule, not a look-up). */
const UNREAD_INDEXES: readonly (readonly [string, readonly string[]])[] = [
  ['parts', ['byMpnKey', 'byKind']],
  ['suppliers', ['byName']],
  ['buildLines', ['byPart', 'byPosition']],
  ['checks', ['byName']],
  ['runs', ['byVariant']],
  ['importBatches', ['bySupplier', 'byHash']],
  ['orders', ['bySupplier', 'byNumber']],
  ['stockMoves', ['byPart']],
  ['priceLists', ['byName']],
];

export const MIGRATIONS: readonly Migration[] = [
  {
    version: 1,
    title: 'Book stores with indexes, settings and meta; adopts the prototype layout',
    async up(db, tx) {
      const present = new Set<string>(Array.from(db.objectStoreNames));
      const isPrototype = PROTOTYPE_STORES.some((n) => present.has(n));
      const proto = isPrototype ? await readPrototype(tx, present) : undefined;
      for (const n of present) db.deleteObjectStore(n);

      const parts = db.createObjectStore('parts', { keyPath: 'id' });
      parts.createIndex('byMpnKey', 'mpnKey');
      parts.createIndex('byKind', 'kind');
      db.createObjectStore('suppliers', { keyPath: 'id' }).createIndex('byName', 'name');
      // Quotes are kept in buckets (see QuoteBucket), with no indexes: the app reads whole stores.
      db.createObjectStore('quotes', { keyPath: 'id' });
      db.createObjectStore('variants', { keyPath: 'id' }).createIndex('byCode', 'code', { unique: true });
      const lines = db.createObjectStore('buildLines', { keyPath: 'id' });
      lines.createIndex('byPart', 'partId');
      lines.createIndex('byPosition', 'position');
      db.createObjectStore('checks', { keyPath: 'id' }).createIndex('byName', 'name');
      db.createObjectStore('runs', { keyPath: 'id' }).createIndex('byVariant', 'variantId');
      const batches = db.createObjectStore('importBatches', { keyPath: 'id' });
      batches.createIndex('bySupplier', 'supplierId');
      batches.createIndex('byHash', 'hash');
      db.createObjectStore('pages', { keyPath: 'id' });
      db.createObjectStore('settings', { keyPath: 'id' });
      db.createObjectStore('meta', { keyPath: 'key' });

      const settings = convertSettings(proto?.settings);
      const writes: Promise<unknown>[] = [tx.objectStore('settings').put(settings)];
      if (proto) {
        const base = settings.baseCurrency;
        const withId = (r: Record<string, unknown>): boolean => typeof r.id === 'string' && r.id !== '';
        for (const p of proto.parts.filter(withId)) writes.push(tx.objectStore('parts').put(convertPart(p)));
        for (const s of proto.suppliers.filter(withId)) writes.push(tx.objectStore('suppliers').put(convertSupplier(s, base)));
        for (const b of bucketQuotes(proto.quotes.filter(withId).map((q) => convertQuote(q, base)))) writes.push(tx.objectStore('quotes').put(b));
        // The prototype did not enforce unique codes; a repeated code keeps its first variant's code and gets the id.
        const codes = new Set<string>();
        for (const v of proto.variants.filter(withId)) {
          const variant = convertVariant(v);
          if (codes.has(variant.code)) variant.code = `${variant.code}-${variant.id}`;
          codes.add(variant.code);
          writes.push(tx.objectStore('variants').put(variant));
        }
      }
      await Promise.all(writes);
    },
  },
  {
    version: 2,
    title: 'stores for supplier orders and stock movements',
    async up(db) {
      const orders = db.createObjectStore('orders', { keyPath: 'id' });
      orders.createIndex('bySupplier', 'supplierId');
      orders.createIndex('byNumber', 'number');
      db.createObjectStore('stockMoves', { keyPath: 'id' }).createIndex('byPart', 'partId');
    },
  },
  {
    version: 3,
    title: 'a store for customer price lists',
    async up(db) {
      db.createObjectStore('priceLists', { keyPath: 'id' }).createIndex('byName', 'name');
    },
  },
  {
    version: 4,
    title: 'drops the indexes nothing reads; keeps the unique variant code',
    async up(_db, tx) {
      // The app reads whole stores, never through these. Each one cost every write of its store: opening a Book file of
      // 50,000 parts took about 2 s longer with the two part indexes in Chromium. Parts written from now on no longer
      // carry the normalised maker part number the index was built on; reading drops it from parts written before.
      for (const [store, names] of UNREAD_INDEXES) for (const name of names) tx.objectStore(store).deleteIndex(name);
    },
  },
];
