// Public face of the Book store: open a Book database, write changes, ask the browser about storage.
export { openBookStore, listBooks, deleteBook, IdbBookStore, DEFAULT_BOOK_DB } from './idb-store.ts';
export type { OpenBookStoreOptions } from './idb-store.ts';
export { requestPersistence, storageEstimate } from './storage.ts';
export { RevisionConflict, StorageFull, StoredBookInvalid, StoreWriteFailed } from './types.ts';
export type { BookChange, BookStore, StorageEstimate } from './types.ts';
export { MIGRATIONS, migrationProblems, stepsToRun } from './migrations.ts';
export type { Migration } from './migrations.ts';
export { SCHEMA_VERSION } from './schema.ts';
export type { RungbookDB } from './schema.ts';
