// The page's side of the Book writer worker (write-worker.ts): sends a large change a part at a time, a few parts per
// task so the page draws and answers in between, and resolves once the worker has written it (or rejects with the
// error the store would have raised on the page).
import { COLLECTIONS } from '../domain/book.ts';
import type { BookChange } from '../domain/book-ops.ts';
import { runInSlices } from '../domain/slices.ts';
import type { Sliced } from '../domain/slices.ts';
import { failureError } from './write-protocol.ts';
import type { WriteWorkerMessage, WriteWorkerRequest } from './write-protocol.ts';

/** Records and ids a change names from which it is written from the worker (an edit or two stays on the page). */
export const WORKER_WRITE_MIN = 5000;

/** Items per message: records, ids, or items of one record's long list. */
export const ITEMS_PER_PART = 500;

/** The slice of the Worker interface the client uses, so tests can run the worker's code in-process. */
export interface WriteWorkerLike {
  onmessage: ((e: MessageEvent<WriteWorkerMessage>) => void) | null;
  onerror: ((e: ErrorEvent) => void) | null;
  postMessage(message: WriteWorkerRequest): void;
  terminate(): void;
}

export function startWriteWorker(): WriteWorkerLike {
  return new Worker(new URL('./write-worker.ts', import.meta.url), { type: 'module' }) as unknown as WriteWorkerLike;
}

/** Records and ids a change names. */
export function changeSize(change: BookChange): number {
  let n = change.settings ? 1 : 0;
  for (const c of COLLECTIONS) n += (change.put?.[c]?.length ?? 0) + (change.delete?.[c]?.length ?? 0);
  return n;
}

/** The change as the messages that carry it, one yield after each. */
function* parts(change: BookChange, post: (m: WriteWorkerRequest) => void): Sliced<void> {
  for (const c of COLLECTIONS) {
    const ids = change.delete?.[c] ?? [];
    for (let i = 0; i < ids.length; i += ITEMS_PER_PART) {
      post({ type: 'delete', collection: c, ids: ids.slice(i, i + ITEMS_PER_PART) });
      yield;
    }
    const records = (change.put?.[c] ?? []) as unknown as Record<string, unknown>[];
    let batch: unknown[] = [];
    let weight = 0;
    const flush = (): void => {
      if (batch.length === 0) return;
      post({ type: 'put', collection: c, records: batch });
      batch = [];
      weight = 0;
    };
    for (const r of records) {
      // A record holding a long list (an import batch names every quote it made): its lists go ahead in parts.
      const long = Object.keys(r).filter((k) => Array.isArray(r[k]) && (r[k] as unknown[]).length > ITEMS_PER_PART);
      if (long.length === 0) {
        batch.push(r);
        weight += 1;
        if (weight >= ITEMS_PER_PART) {
          flush();
          yield;
        }
        continue;
      }
      flush();
      const rest: Record<string, unknown> = { ...r };
      for (const k of long) {
        const list = r[k] as unknown[];
        for (let i = 0; i < list.length; i += ITEMS_PER_PART) {
          post({ type: 'list', field: k, items: list.slice(i, i + ITEMS_PER_PART) });
          yield;
        }
        rest[k] = [];
      }
      post({ type: 'record', collection: c, record: rest, lists: long });
      yield;
    }
    flush();
    yield;
  }
}

/**
 * Writes `change` into the database `dbName` from a worker. Resolves when it is stored; rejects with the store's own
 * errors (RevisionConflict, StorageFull, StoreWriteFailed), and nothing is written then. When the worker cannot start
 * at all, `fallback` writes the change here instead.
 */
export function writeInWorker(dbName: string, change: BookChange, fallback: () => Promise<void>, makeWorker: () => WriteWorkerLike = startWriteWorker): Promise<void> {
  return new Promise<void>((resolve, reject) => {
    let worker: WriteWorkerLike;
    try {
      worker = makeWorker();
    } catch {
      fallback().then(resolve, reject);
      return;
    }
    let started = false;
    let settled = false;
    const end = (then: () => void): void => {
      if (settled) return;
      settled = true;
      worker.terminate();
      then();
    };
    worker.onmessage = (e) => {
      const m = e.data;
      if (m.type === 'started') started = true;
      else if (m.type === 'done') end(resolve);
      else end(() => reject(failureError(m.failure)));
    };
    worker.onerror = (e) => {
      e.preventDefault?.();
      // Before it began writing, the worker wrote nothing: the change is written here. After, nobody knows.
      if (!started) end(() => void fallback().then(resolve, reject));
      else end(() => reject(failureError({ kind: 'failed', message: `The change could not be saved: the writer stopped (${e.message || 'unknown error'}); reload the page to see what is stored` })));
    };
    const post = (m: WriteWorkerRequest): void => {
      if (!settled) worker.postMessage(m);
    };
    runInSlices(parts(change, post), { budgetMs: 8 }).then(
      () => post({ type: 'apply', dbName, ...(change.settings ? { settings: change.settings } : {}) }),
      (e: unknown) => end(() => reject(e)),
    );
  });
}
