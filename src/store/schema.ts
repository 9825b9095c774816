// The IndexedDB layout of one Book as a typed idb schema, and how schema versions map to IndexedDB versions.
import type { DBSchema } from 'idb';
import type { BuildLine, Check, ImportBatch, NotebookPage, Order, Part, PriceList, Quote, Run, Settings, StockMove, Supplier, Variant } from '../domain/book.ts';

/**
 * A part as schemas 1–3 stored it: with its normalised maker part number, for an index step 4 dropped. Parts written
 * since carry nothing more than the Part; reading drops the field from older ones.
 */
export interface StoredPart extends Part {
  mpnKey?: string;
}

/**
 * A bucket of quotes. Chromium spends tens of microseconds on every IndexedDB record written, so a 50,000-row price
 * import kept one record per quote took seconds in writes alone; in buckets it writes at most QUOTE_BUCKETS records.
 */
export interface QuoteBucket {
  id: string;
  quotes: Quote[];
}

/** How many buckets hold the quotes: small enough for few writes, large enough that one edit rewrites little. */
export const QUOTE_BUCKETS = 64;

/** The bucket a quote lives in, from its id alone (FNV-1a 32-bit hash), so no index is needed to find it. */
export function quoteBucketKey(id: string): string {
  let h = 0x811c9dc5;
  for (let i = 0; i < id.length; i++) {
    h ^= id.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return `bucket_${String(h % QUOTE_BUCKETS).padStart(2, '0')}`;
}

/** Groups quotes into their buckets. */
export function bucketQuotes(quotes: readonly Quote[]): QuoteBucket[] {
  const buckets = new Map<string, Quote[]>();
  for (const q of quotes) {
    const key = quoteBucketKey(q.id);
    const list = buckets.get(key);
    if (list) list.push(q);
    else buckets.set(key, [q]);
  }
  return [...buckets].map(([id, list]) => ({ id, quotes: list }));
}

/** The quotes of every bucket in one list, in id order (the order IndexedDB gives records of a store). */
export function unbucketQuotes(buckets: readonly QuoteBucket[]): Quote[] {
  const all = buckets.flatMap((b) => b.quotes);
  return all.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
}

/** The one record of the `meta` store: which schema the stored data follows. */
export interface MetaRecord {
  key: 'schema';
  version: number;
  /** ISO time of the last migration step that ran. */
  migratedAt: string;
}

export interface RungbookDB extends DBSchema {
  parts: { key: string; value: StoredPart };
  suppliers: { key: string; value: Supplier };
  /** Quotes in QUOTE_BUCKETS records, each quote in the bucket its id hashes to (see quoteBucketKey). */
  quotes: { key: string; value: QuoteBucket };
  variants: { key: string; value: Variant; indexes: { byCode: string } };
  buildLines: { key: string; value: BuildLine };
  checks: { key: string; value: Check };
  runs: { key: string; value: Run };
  importBatches: { key: string; value: ImportBatch };
  pages: { key: string; value: NotebookPage };
  orders: { key: string; value: Order };
  stockMoves: { key: string; value: StockMove };
  priceLists: { key: string; value: PriceList };
  settings: { key: 'settings'; value: Settings };
  meta: { key: 'schema'; value: MetaRecord };
}

/** Schema version of the stored Book data (its own numbered steps; the Book file format has its own version). */
export const SCHEMA_VERSION = 4 as const;

/**
 * IndexedDB versions are integers from 1, and version 1 of the `rungbook` database was used by the unreleased
 * prototype (schema 0). So the IndexedDB version is always the schema version plus one.
 */
export const IDB_VERSION_OFFSET = 1 as const;

export function idbVersionOf(schemaVersion: number): number {
  return schemaVersion + IDB_VERSION_OFFSET;
}

/**
 * Schema version held by a database found at `idbVersion`; `undefined` for a database that did not exist yet
 * (IndexedDB reports old version 0 for it).
 */
export function schemaVersionOf(idbVersion: number): number | undefined {
  return idbVersion === 0 ? undefined : idbVersion - IDB_VERSION_OFFSET;
}
