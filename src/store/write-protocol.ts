// The messages between the page and the Book writer worker (write-worker.ts, write-worker-client.ts), and a failed
// write carried across as the store's own error.
import type { CollectionName, Settings } from '../domain/book.ts';
import { RevisionConflict, StorageFull, StoreWriteFailed } from './types.ts';

/** From the page: the change, a part at a time, then the order to write it. */
export type WriteWorkerRequest =
  /** Records to put, in order. */
  | { type: 'put'; collection: CollectionName; records: unknown[] }
  /** Part of a long list held by the next record sent alone ('record'), in order. */
  | { type: 'list'; field: string; items: unknown[] }
  /** A record whose long lists came ahead in parts: `lists` names the fields to fill from them. */
  | { type: 'record'; collection: CollectionName; record: Record<string, unknown>; lists: string[] }
  /** Ids to delete, in order. */
  | { type: 'delete'; collection: CollectionName; ids: string[] }
  /** Everything is sent: write it into the database `dbName`. */
  | { type: 'apply'; dbName: string; settings?: Settings };

/** A failed write, with what the page needs to raise the same error the store raises. */
export type WriteFailure =
  | { kind: 'conflict'; collection: CollectionName | 'settings'; recordId: string; storedRev: number; givenRev: number; message: string }
  | { kind: 'full'; message: string }
  | { kind: 'failed'; message: string }
  | { kind: 'other'; name: string; message: string };

export type WriteWorkerMessage = { type: 'started' } | { type: 'done' } | { type: 'error'; failure: WriteFailure };

/** The failure as sent to the page; the page turns it back into the error (failureError). */
export function describeFailure(e: unknown): WriteFailure {
  if (e instanceof RevisionConflict) {
    return { kind: 'conflict', collection: e.collection, recordId: e.recordId, storedRev: e.storedRev, givenRev: e.givenRev, message: e.message };
  }
  if (e instanceof StorageFull) return { kind: 'full', message: e.message };
  if (e instanceof StoreWriteFailed) return { kind: 'failed', message: e.message };
  const name = e instanceof Error || e instanceof DOMException ? e.name : 'Error';
  return { kind: 'other', name, message: e instanceof Error || e instanceof DOMException ? e.message : String(e) };
}

/** The error the store would have raised on the page for a failure the worker reports. */
export function failureError(f: WriteFailure): Error {
  if (f.kind === 'conflict') {
    const e = new RevisionConflict(f.collection, f.recordId, f.storedRev, f.givenRev);
    e.message = f.message;
    return e;
  }
  const e = f.kind === 'full' ? new StorageFull() : f.kind === 'failed' ? new StoreWriteFailed('') : new Error(f.message);
  e.message = f.message;
  if (f.kind === 'other') e.name = f.name;
  return e;
}
