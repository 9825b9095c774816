// Web Worker entry that writes a large change into the Book's database off the page's thread. Copying records into
// IndexedDB happens on the thread that makes each request, and for a 50,000-row price import (75,000 quotes in 64
// buckets, and an import batch naming every one of them) that copying held the page for tens of ms at a time, over a
// second in all. The page sends the change here a part at a time (write-worker-client.ts); this worker opens its own
// connection to the same database and writes the change exactly as the page would (IdbBookStore.apply: revision
// checks, one transaction, nothing written on failure), then says how it went.
import type { Settings } from '../domain/book.ts';
import type { BookChange } from '../domain/book-ops.ts';
import { openBookStore } from './idb-store.ts';
import { describeFailure } from './write-protocol.ts';
import type { WriteWorkerMessage, WriteWorkerRequest } from './write-protocol.ts';
import { StoreWriteFailed } from './types.ts';

/** The change as it arrives, part by part. */
export class ChangeAssembler {
  private readonly put: Record<string, unknown[]> = {};
  private readonly del: Record<string, string[]> = {};
  private lists = new Map<string, unknown[]>();

  /** Takes one part; false when the message is not a part of a change. */
  take(m: WriteWorkerRequest): boolean {
    if (m.type === 'put') {
      const list = (this.put[m.collection] ??= []);
      for (const r of m.records) list.push(r);
    } else if (m.type === 'list') {
      const list = this.lists.get(m.field) ?? [];
      for (const x of m.items) list.push(x);
      this.lists.set(m.field, list);
    } else if (m.type === 'record') {
      const record = { ...m.record };
      for (const f of m.lists) record[f] = this.lists.get(f) ?? [];
      this.lists = new Map();
      (this.put[m.collection] ??= []).push(record);
    } else if (m.type === 'delete') {
      const list = (this.del[m.collection] ??= []);
      for (const id of m.ids) list.push(id);
    } else return false;
    return true;
  }

  change(settings: Settings | undefined): BookChange {
    const change: BookChange = {};
    if (Object.keys(this.put).length > 0) change.put = this.put as BookChange['put'];
    if (Object.keys(this.del).length > 0) change.delete = this.del as BookChange['delete'];
    if (settings) change.settings = settings;
    return change;
  }
}

/**
 * The worker's whole job, as a plain function so Node tests run exactly what the worker runs: `factory` is the
 * IndexedDB to write into (the worker's own by default).
 */
export function writeWorkerHandler(
  post: (m: WriteWorkerMessage) => void,
  factory?: IDBFactory,
): { handle(m: WriteWorkerRequest): Promise<void>; lost(): void } {
  const parts = new ChangeAssembler();
  // Once a part is lost or the change is being written, nothing more is taken: a change is written whole or not at all.
  let stopped = false;
  const refuse = (detail: string): void => {
    stopped = true;
    post({ type: 'error', failure: { kind: 'failed', message: new StoreWriteFailed(detail).message } });
  };
  const handle = async (m: WriteWorkerRequest): Promise<void> => {
    if (stopped) return;
    if (m?.type !== 'apply') {
      if (!parts.take(m)) refuse('the writer was sent something other than a part of a change');
      return;
    }
    stopped = true;
    post({ type: 'started' });
    try {
      // This connection writes and closes: the page's own stays open for the Book.
      const store = await openBookStore(m.dbName, factory ? { factory, largeWrites: 'here' } : { largeWrites: 'here' });
      try {
        await store.apply(parts.change(m.settings));
      } finally {
        store.close();
      }
      post({ type: 'done' });
    } catch (e) {
      post({ type: 'error', failure: describeFailure(e) });
    }
  };
  return { handle, lost: () => (stopped ? undefined : refuse('a part of the change did not reach the writer')) };
}

// Only inside a dedicated worker: a page or Node importing this module for its functions must not grab onmessage.
const scope = globalThis as unknown as { WorkerGlobalScope?: unknown; onmessage: unknown; onmessageerror: unknown; postMessage(m: unknown): void };
if (typeof scope.WorkerGlobalScope !== 'undefined') {
  const writer = writeWorkerHandler((m) => scope.postMessage(m));
  scope.onmessage = (e: MessageEvent<WriteWorkerRequest>) => void writer.handle(e.data);
  scope.onmessageerror = () => writer.lost();
}
