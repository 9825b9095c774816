// The IndexedDB layout of one Book as a typed idb schema, and how schema versions map to IndexedDB versions.
import type { DBSchema } from 'idb';
import type { BuildLine, Check, ImportBatch, NotebookPage, Part, Quote, Run, Settings, Supplier, Variant } from '../domain/book.ts';

/** A part as stored: with its normalised maker part number, so look-ups by MPN use an index. */
export interface StoredPart extends Part {
  mpnKey: string;
}

/** The one record of the `meta` store: which schema the stored data follows. */
export interface MetaRecord {
  key: 'schema';
  version: number;
  /** ISO time of the last migration step that ran. */
  migratedAt: string;
}

export interface RungbookDB extends DBSchema {
  parts: { key: string; value: StoredPart; indexes: { byMpnKey: string; byKind: string } };
  suppliers: { key: string; value: Supplier; indexes: { byName: string } };
  quotes: { key: string; value: Quote };
  variants: { key: string; value: Variant; indexes: { byCode: string } };
  buildLines: { key: string; value: BuildLine; indexes: { byPart: string; byPosition: number } };
  checks: { key: string; value: Check; indexes: { byName: string } };
  runs: { key: string; value: Run; indexes: { byVariant: string } };
  importBatches: { key: string; value: ImportBatch; indexes: { bySupplier: string; byHash: string } };
  pages: { key: string; value: NotebookPage };
  settings: { key: 'settings'; value: Settings };
  meta: { key: 'schema'; value: MetaRecord };
}

/** Schema version of the stored Book data (the same number as the Book file version). */
export const SCHEMA_VERSION = 1 as const;

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
