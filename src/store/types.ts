// The storage interface the rest of the app sees; IndexedDB details stay behind it.
import type { Book, CollectionName, CollectionRecord, Settings } from '../domain/book.ts';

/** Records to write and ids to delete, applied together in one transaction or not at all. */
export interface BookChange {
  put?: { [C in CollectionName]?: CollectionRecord<C>[] };
  delete?: { [C in CollectionName]?: string[] };
  settings?: Settings;
}

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
   * Writes a change in one transaction. Each put record must carry the revision it was read at; it is stored with
   * rev + 1. A stale revision rejects with RevisionConflict and nothing is written.
   */
  apply(change: BookChange): Promise<void>;
  /** Replaces the whole Book (file import, new empty Book, reload demo) in one transaction. */
  replaceAll(book: Book): Promise<void>;
  close(): void;
}
