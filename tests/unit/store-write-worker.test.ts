// Large changes written from the Book writer worker (src/store/write-worker.ts), its code run in-process with every
// message copied as a real worker's would be: the Book stored is the one the same change written on the page gives,
// a conflict or a lost part writes nothing and raises the store's own error, and a worker that cannot start leaves
// the write to the page.
import 'fake-indexeddb/auto';
import { IDBFactory } from 'fake-indexeddb';
import { afterEach, describe, expect, it } from 'vitest';
import type { ImportBatch, Quote } from '../../src/domain/book.ts';
import type { BookChange } from '../../src/domain/book-ops.ts';
import { openBookStore } from '../../src/store/idb-store.ts';
import type { IdbBookStore } from '../../src/store/idb-store.ts';
import { RevisionConflict, StoreWriteFailed } from '../../src/store/types.ts';
import { ITEMS_PER_PART, WORKER_WRITE_MIN } from '../../src/store/write-worker-client.ts';
import type { WriteWorkerLike } from '../../src/store/write-worker-client.ts';
import type { WriteWorkerMessage, WriteWorkerRequest } from '../../src/store/write-protocol.ts';
import { writeWorkerHandler } from '../../src/store/write-worker.ts';
import { sampleBook } from '../fixtures/sample-book.ts';

const open: IdbBookStore[] = [];
afterEach(() => {
  for (const s of open.splice(0)) s.close();
});

interface FakeWorkerOptions {
  /** Drop the message with this number (counted from 0) as a failed copy: the worker sees a message error instead. */
  lose?: number;
  /** Raise an error event after this many messages, as a worker that stopped. */
  crashAfter?: number;
}

/** A worker running write-worker.ts's handler in-process; every message is copied by structuredClone both ways. */
function fakeWorker(factory: IDBFactory, log: WriteWorkerRequest['type'][], options: FakeWorkerOptions = {}): () => WriteWorkerLike {
  return () => {
    let terminated = false;
    let count = 0;
    const worker: WriteWorkerLike = {
      onmessage: null,
      onerror: null,
      postMessage(m) {
        const n = count++;
        log.push(m.type);
        const copy = structuredClone(m);
        setTimeout(() => {
          if (terminated) return;
          if (options.crashAfter !== undefined && n >= options.crashAfter) {
            worker.onerror?.({ message: 'stopped', preventDefault: () => undefined } as unknown as ErrorEvent);
            return;
          }
          if (n === options.lose) writer.lost();
          else void writer.handle(copy);
        }, 0);
      },
      terminate() {
        terminated = true;
      },
    };
    const writer = writeWorkerHandler((m: WriteWorkerMessage) => {
      const copy = structuredClone(m);
      setTimeout(() => !terminated && worker.onmessage?.({ data: copy } as MessageEvent<WriteWorkerMessage>), 0);
    }, factory);
    return worker;
  };
}

function quote(id: string, rev = 0): Quote {
  return {
    id, rev, partId: 'part_r47k', supplierId: 'sup_a', supplierCode: `SC-${id}`, currency: 'EUR',
    breaks: [{ qty: 1, price: 0.05 }, { qty: 1000, price: 0.012 }], moq: 1, pack: 1, leadDays: 5, date: '2026-01-01', source: 'big.csv',
  };
}

/** A change like a large price import's: new quotes, edited ones, a batch naming them all, a deletion. */
function largeChange(edited: Quote[]): BookChange {
  const added = Array.from({ length: WORKER_WRITE_MIN + 700 }, (_, i) => ({ ...quote(`q_new_${String(i).padStart(5, '0')}`), batchId: 'batch_big' }));
  const batch: ImportBatch = {
    id: 'batch_big', rev: 0, fileName: 'big.csv', hash: 'ab'.repeat(32), supplierId: 'sup_a', rows: added.length, at: '2026-12-02T20:00:00.000Z',
    created: added.map((q) => q.id),
    superseded: edited.map((q) => q.id),
  };
  return { put: { quotes: [...edited.map((q) => ({ ...q, moq: 10 })), ...added], importBatches: [batch] }, delete: { quotes: ['q_gone'] } };
}

/** Two databases holding the same Book with some quotes, one written through the worker, one on the page. */
async function twoStores(factory: IDBFactory, worker: () => WriteWorkerLike): Promise<{ viaWorker: IdbBookStore; here: IdbBookStore; edited: Quote[] }> {
  const viaWorker = await openBookStore('rungbook-worker', { factory, largeWrites: 'worker', writeWorker: worker });
  const here = await openBookStore('rungbook-here', { factory });
  open.push(viaWorker, here);
  const base = sampleBook();
  base.quotes = [...base.quotes, ...Array.from({ length: 1200 }, (_, i) => quote(`q_old_${i}`, 3)), quote('q_gone')];
  for (const s of [viaWorker, here]) await s.replaceAll(base);
  const stored = await here.load();
  return { viaWorker, here, edited: stored.quotes.filter((q) => q.id.startsWith('q_old_')) };
}

describe('a large change written from the worker', () => {
  it('stores exactly what the same change written on the page stores, its long lists sent a part at a time', async () => {
    const factory = new IDBFactory();
    const log: WriteWorkerRequest['type'][] = [];
    const { viaWorker, here, edited } = await twoStores(factory, fakeWorker(factory, log));
    const change = largeChange(edited);
    await here.apply(change);
    await viaWorker.apply(change);
    const written = await viaWorker.load();
    expect(written).toEqual(await here.load());
    expect(written.importBatches.find((b) => b.id === 'batch_big')?.created).toHaveLength(WORKER_WRITE_MIN + 700);
    expect(written.quotes.some((q) => q.id === 'q_gone')).toBe(false);
    // It went through the worker, the batch's list of quotes in parts of its own.
    expect(log.at(-1)).toBe('apply');
    expect(log.filter((t) => t === 'list').length).toBeGreaterThanOrEqual(Math.ceil((WORKER_WRITE_MIN + 700) / ITEMS_PER_PART));
    expect(log.filter((t) => t === 'record')).toHaveLength(1);
  });

  it('writes a small change on the page', async () => {
    const factory = new IDBFactory();
    const log: WriteWorkerRequest['type'][] = [];
    const { viaWorker } = await twoStores(factory, fakeWorker(factory, log));
    await viaWorker.apply({ put: { quotes: [quote('q_small')] } });
    expect((await viaWorker.load()).quotes.some((q) => q.id === 'q_small')).toBe(true);
    expect(log).toEqual([]);
  });

  it('refuses the whole change on one stale quote, with the conflict the page would raise, and writes nothing', async () => {
    const factory = new IDBFactory();
    const { viaWorker, edited } = await twoStores(factory, fakeWorker(factory, []));
    const before = await viaWorker.load();
    const change = largeChange([...edited.slice(0, -1), { ...edited.at(-1)!, rev: edited.at(-1)!.rev - 1 }]);
    const refused = await viaWorker.apply(change).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(RevisionConflict);
    expect(refused).toMatchObject({ collection: 'quotes', recordId: edited.at(-1)!.id, storedRev: edited.at(-1)!.rev, givenRev: edited.at(-1)!.rev - 1 });
    expect(await viaWorker.load()).toEqual(before);
  });

  it('refuses records without an id before any worker starts', async () => {
    const factory = new IDBFactory();
    const log: WriteWorkerRequest['type'][] = [];
    const { viaWorker, edited } = await twoStores(factory, fakeWorker(factory, log));
    const change = largeChange(edited);
    change.put!.quotes![3] = { ...change.put!.quotes![3]!, id: '' };
    await expect(viaWorker.apply(change)).rejects.toBeInstanceOf(StoreWriteFailed);
    expect(log).toEqual([]);
  });

  it('writes nothing when a part of the change does not reach the worker', async () => {
    const factory = new IDBFactory();
    const { viaWorker, edited } = await twoStores(factory, fakeWorker(factory, [], { lose: 3 }));
    const before = await viaWorker.load();
    const refused = await viaWorker.apply(largeChange(edited)).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(StoreWriteFailed);
    expect((refused as Error).message).toMatch(/nothing of it was written: a part of the change did not reach the writer/);
    expect(await viaWorker.load()).toEqual(before);
  });

  it('writes the change on the page when the worker cannot start or stops before writing', async () => {
    const factory = new IDBFactory();
    const noWorker = (): WriteWorkerLike => {
      throw new Error('workers are not allowed here');
    };
    const { viaWorker, here, edited } = await twoStores(factory, noWorker);
    const change = largeChange(edited);
    await viaWorker.apply(change);
    await here.apply(change);
    expect(await viaWorker.load()).toEqual(await here.load());

    const again = await openBookStore('rungbook-stops', { factory, largeWrites: 'worker', writeWorker: fakeWorker(factory, [], { crashAfter: 2 }) });
    open.push(again);
    await again.replaceAll(await here.load());
    const stored = (await again.load()).quotes.filter((q) => q.id.startsWith('q_new_'));
    await again.apply({ put: { quotes: stored.map((q) => ({ ...q, moq: 20 })) } });
    expect((await again.load()).quotes.filter((q) => q.id.startsWith('q_new_')).every((q) => q.moq === 20 && q.rev === 2)).toBe(true);
  });
});
