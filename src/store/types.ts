// The storage interface the rest of the app sees; IndexedDB details stay behind it.
import type { Book, CollectionName } from '../domain/book.ts';
import type { BookChange, RecordIds, StoredRecords } from '../domain/book-ops.ts';
import type { SchemaProblem } from '../domain/schema.ts';

/** Records to write and ids to delete (defined beside its in-memory twin `applyChange` in domain/book-ops.ts). */
export type { BookChange } from '../domain/book-ops.ts';
export type { RecordIds, StoredRecords } from '../domain/book-ops.ts';

/** Thrown (as a rejection) when a record was saved elsewhere since it was read. */
export class RevisionConflict extends Error {
  constructor(
    readonly collection: CollectionName | 'settings',
    readonly recordId: string,
    readonly storedRev: number,
    readonly givenRev: number,
  ) {
    super(
      `${collection} record ${recordId} was changed elsewhere (stored revision ${storedRev}, yours ${givenRev}); reload to see the newer data`,
    );
    this.name = 'RevisionConflict';
  }
}

/** Rejection when the browser refuses to store more (quota reached); nothing of the change was written. */
export class StorageFull extends Error {
  constructor(cause?: unknown) {
    super(
      'The browser has no more storage space for this Book, so nothing of this change was saved. ' +
        'Export the Book file to keep a copy, free some space (or delete Books you no longer need), then try again.',
      { cause },
    );
    this.name = 'StorageFull';
  }
}

/** Rejection for any other failed write; nothing of the change was written. */
export class StoreWriteFailed extends Error {
  constructor(detail: string, cause?: unknown) {
    super(`The change could not be saved and nothing of it was written: ${detail}`, { cause });
    this.name = 'StoreWriteFailed';
  }
}

/** Rejection of a load whose stored records do not fit the Book schema; each problem names its place. */
export class StoredBookInvalid extends Error {
  constructor(
    readonly problems: readonly SchemaProblem[],
    /** The records as stored, unchecked, so a person can save them and repair them by hand. */
    readonly stored: unknown,
  ) {
    const shown = problems.slice(0, 5).map((p) => (p.path ? `${p.path}: ${p.message}` : p.message));
    const more = problems.length > 5 ? ` (and ${problems.length - 5} more)` : '';
    super(`The Book kept in this browser does not read as a Book, so it was not opened: ${shown.join('; ')}${more}`);
    this.name = 'StoredBookInvalid';
  }
}

/**
 * Rejection of a read of some records (another tab's edit) when one of them does not fit the Book schema: nothing
 * read is taken in; each problem names the record by collection and id, and the field.
 */
export class StoredRecordsInvalid extends Error {
  constructor(readonly problems: readonly SchemaProblem[]) {
    const shown = problems.slice(0, 5).map((p) => (p.path ? `${p.path}: ${p.message}` : p.message));
    const more = problems.length > 5 ? ` (and ${problems.length - 5} more)` : '';
    super(`Records kept in this browser do not read as Book records, so none of them was taken in: ${shown.join('; ')}${more}`);
    this.name = 'StoredRecordsInvalid';
  }
}

export interface StorageEstimate {
  usage: number;
  quota: number;
  persisted: boolean;
}

export interface BookStore {
  /** Name of the underlying database (one per Book). */
  readonly name: string;
  load(): Promise<Book>;
  /**
   * Reads only the named records, each checked against its collection's schema (not the whole Book); an id with no
   * record stored is reported gone. One record that does not read rejects with StoredRecordsInvalid.
   */
  loadRecords(ids: RecordIds): Promise<StoredRecords>;
  /**
   * Writes a change in one transaction. Each put record must carry the revision it was read at; it is stored with
   * rev + 1. A stale revision rejects with RevisionConflict and nothing is written.
   */
  apply(change: BookChange): Promise<void>;
  /**
   * Replaces the whole Book (file import, new empty Book, reload demo) in one transaction. Resolves with the Book as
   * a later load gives it back (each collection in the store's order).
   */
  replaceAll(book: Book): Promise<Book>;
  close(): void;
}
