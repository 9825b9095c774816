// The IndexedDB Book store in fake-indexeddb: every record kind round-trips, changes are all-or-nothing with
// revision checks, whole-Book replacement is atomic, and an upgrade in another tab closes this connection.
import 'fake-indexeddb/auto';
import { IDBFactory } from 'fake-indexeddb';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { COLLECTIONS, defaultSettings, emptyBook } from '../../src/domain/book.ts';
import type { Book, Part, Quote, Variant } from '../../src/domain/book.ts';
import { QUOTE_BUCKETS, quoteBucketKey } from '../../src/store/schema.ts';
import { applyChange } from '../../src/domain/book-ops.ts';
import type { BookChange } from '../../src/domain/book-ops.ts';
import { deleteBook, listBooks, openBookStore } from '../../src/store/idb-store.ts';
import type { IdbBookStore } from '../../src/store/idb-store.ts';
import { MIGRATIONS } from '../../src/store/migrations.ts';
import type { Migration } from '../../src/store/migrations.ts';
import { RevisionConflict, StorageFull, StoreWriteFailed } from '../../src/store/types.ts';
import { sampleBook } from '../fixtures/sample-book.ts';

const open: IdbBookStore[] = [];
async function fresh(name = 'rungbook-test', factory = new IDBFactory()): Promise<{ store: IdbBookStore; factory: IDBFactory }> {
  const store = await openBookStore(name, { factory });
  open.push(store);
  return { store, factory };
}
afterEach(() => {
  for (const s of open.splice(0)) s.close();
  vi.restoreAllMocks();
});

function newPart(id: string, mpn: string): Part {
  return { id, rev: 0, mpn, maker: 'Kestrel Passives', description: 'test part', kind: 'resistor', ratings: {}, package: '0603' };
}

describe('opening a new Book database', () => {
  it('starts empty with default settings stored at revision 1 and the newest schema recorded', async () => {
    const { store } = await fresh();
    const book = await store.load();
    expect(book).toEqual({ ...emptyBook(), settings: defaultSettings() });
    expect(await store.schemaVersion()).toBe(MIGRATIONS.length);
  });
});

describe('round trip', () => {
  it('keeps every record kind exactly as written by replaceAll', async () => {
    const book = sampleBook();
    for (const c of COLLECTIONS) expect(book[c].length, `sample holds ${c}`).toBeGreaterThan(0);
    const { store } = await fresh();
    await store.replaceAll(book);
    expect(await store.load()).toEqual(book);
  });

  it('survives closing and reopening the database', async () => {
    const { store, factory } = await fresh('rungbook-reopen');
    await store.replaceAll(sampleBook());
    store.close();
    const again = await openBookStore('rungbook-reopen', { factory });
    open.push(again);
    expect(await again.load()).toEqual(sampleBook());
  });

  it('keeps two Books in two databases apart', async () => {
    const factory = new IDBFactory();
    const { store: a } = await fresh('rungbook-a', factory);
    const { store: b } = await fresh('rungbook-b', factory);
    await a.replaceAll(sampleBook());
    expect((await b.load()).parts).toEqual([]);
    expect(await listBooks(factory)).toEqual(['rungbook-a', 'rungbook-b']);
    b.close();
    await deleteBook('rungbook-b', factory);
    expect(await listBooks(factory)).toEqual(['rungbook-a']);
  });

  it('lists no Books, without failing, where the browser cannot list its databases or fails to', async () => {
    const failing = new IDBFactory();
    failing.databases = () => Promise.reject(new DOMException('listing refused', 'UnknownError'));
    await expect(listBooks(failing)).resolves.toBeUndefined();
    // A browser without databases() (older engines).
    const without = new IDBFactory();
    Object.defineProperty(without, 'databases', { value: undefined });
    await expect(listBooks(without)).resolves.toBeUndefined();
  });
});

describe('apply', () => {
  it('stores new records (rev 0) at rev 1 and edited ones one revision up, like the in-memory applyChange', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    const before = await store.load();
    const part = { ...before.parts[0]!, description: 'Resistor 47 kΩ 0603, 1 %' };
    const change: BookChange = {
      put: { parts: [part, newPart('part_new', 'KT-NEW-1')] },
      delete: { quotes: ['quote_1'] },
      settings: { ...before.settings, marginPct: 35 },
    };
    await store.apply(change);
    const after = await store.load();
    expect(after.parts.find((p) => p.id === part.id)!.rev).toBe(part.rev + 1);
    expect(after.parts.find((p) => p.id === 'part_new')!.rev).toBe(1);
    expect(after.quotes.map((q) => q.id)).toEqual(['quote_2']);
    expect(after.settings).toEqual({ ...before.settings, marginPct: 35, rev: before.settings.rev + 1 });
    const twin = applyChange(before, change);
    expect(twin.ok).toBe(true);
    if (twin.ok) {
      // The store returns records in key order; the in-memory Book keeps insertion order.
      const byId = <T extends { id: string }>(l: T[]) => [...l].sort((x, y) => x.id.localeCompare(y.id));
      for (const c of COLLECTIONS) expect(byId(after[c] as { id: string }[]), c).toEqual(byId(twin.book[c] as { id: string }[]));
      expect(after.settings).toEqual(twin.book.settings);
    }
  });

  it('ignores an empty change', async () => {
    const { store } = await fresh();
    await expect(store.apply({})).resolves.toBeUndefined();
  });

  it('rejects a stale revision in the third record and writes none of the change', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    const before = await store.load();
    const stale: Variant = { ...before.variants[0]!, rev: before.variants[0]!.rev - 1, name: 'stale edit' };
    const change: BookChange = {
      put: {
        parts: [{ ...before.parts[0]!, notes: 'first' }, newPart('part_new', 'KT-NEW-2')],
        variants: [stale],
      },
      delete: { runs: ['run_1'] },
      settings: { ...before.settings, company: 'changed' },
    };
    const err = await store.apply(change).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(RevisionConflict);
    expect((err as RevisionConflict).recordId).toBe('var_3');
    expect((err as RevisionConflict).storedRev).toBe(4);
    expect((err as RevisionConflict).message).toMatch(/changed elsewhere.*reload/);
    expect(await store.load()).toEqual(before);
    // The in-memory twin refuses the same change for the same record.
    const twin = applyChange(before, change);
    expect(twin).toEqual({ ok: false, conflict: { collection: 'variants', recordId: 'var_3', storedRev: 4, givenRev: 3 } });
  });

  it('refuses a new record whose id is already held, and a save over a record deleted elsewhere', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    const before = await store.load();
    await expect(store.apply({ put: { parts: [newPart('part_r47k', 'KT-DUP')] } })).rejects.toBeInstanceOf(RevisionConflict);
    await store.apply({ delete: { runs: ['run_1'] } });
    const gone = await store.apply({ put: { runs: [before.runs[0]!] } }).catch((e: unknown) => e);
    expect(gone).toBeInstanceOf(RevisionConflict);
    expect((gone as RevisionConflict).storedRev).toBe(0);
  });

  it('refuses the second of two saves made from the same revision (two tabs)', async () => {
    const factory = new IDBFactory();
    const { store: tab1 } = await fresh('rungbook-tabs', factory);
    await tab1.replaceAll(sampleBook());
    const { store: tab2 } = await fresh('rungbook-tabs', factory);
    const seen = await tab2.load();
    await tab1.apply({ put: { parts: [{ ...seen.parts[0]!, notes: 'tab 1' }] } });
    await expect(tab2.apply({ put: { parts: [{ ...seen.parts[0]!, notes: 'tab 2' }] } })).rejects.toBeInstanceOf(RevisionConflict);
    expect((await tab2.load()).parts[0]!.notes).toBe('tab 1');
  });

  it('checks the revisions of a large batch of edits from one read, and refuses the whole batch on one stale record', async () => {
    const { store } = await fresh();
    const parts = Array.from({ length: 800 }, (_, i) => newPart(`part_${i}`, `KT-BULK-${i}`));
    await store.apply({ put: { parts } });
    const before = await store.load();
    expect(before.parts.every((p) => p.rev === 1)).toBe(true);
    // All 800 edited at the revision they were read at: each is stored one higher.
    await store.apply({ put: { parts: before.parts.map((p) => ({ ...p, notes: 'edited' })) } });
    const after = await store.load();
    expect(after.parts.every((p) => p.rev === 2 && p.notes === 'edited')).toBe(true);
    // One record in 800 carries an old revision: the whole batch is refused and nothing changes.
    const batch = after.parts.map((p, i) => ({ ...p, notes: 'again', rev: i === 613 ? 1 : p.rev }));
    const err = await store.apply({ put: { parts: batch } }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(RevisionConflict);
    expect((err as RevisionConflict).recordId).toBe(batch[613]!.id);
    expect((err as RevisionConflict).storedRev).toBe(2);
    expect(await store.load()).toEqual(after);
  });

  it('turns a quota failure in the middle of the writes into StorageFull and writes nothing', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    const before = await store.load();
    // New records are written with add(), edited ones with put(): the third write of either kind hits the quota.
    const realPut = IDBObjectStore.prototype.put;
    const realAdd = IDBObjectStore.prototype.add;
    let calls = 0;
    vi.spyOn(IDBObjectStore.prototype, 'put').mockImplementation(function (this: IDBObjectStore, ...args: Parameters<IDBObjectStore['put']>) {
      if (++calls === 3) throw new DOMException('quota reached', 'QuotaExceededError');
      return realPut.apply(this, args);
    });
    vi.spyOn(IDBObjectStore.prototype, 'add').mockImplementation(function (this: IDBObjectStore, ...args: Parameters<IDBObjectStore['add']>) {
      if (++calls === 3) throw new DOMException('quota reached', 'QuotaExceededError');
      return realAdd.apply(this, args);
    });
    const change: BookChange = {
      put: { parts: [newPart('part_a', 'KT-A'), newPart('part_b', 'KT-B'), newPart('part_c', 'KT-C')] },
      delete: { checks: ['check_bleed'] },
    };
    const err = await store.apply(change).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StorageFull);
    expect((err as Error).message).toMatch(/no more storage space.*nothing of this change was saved/);
    expect(calls).toBe(3);
    vi.restoreAllMocks();
    expect(await store.load()).toEqual(before);
  });

  it('rolls back every store when a request fails after others succeeded (duplicate variant code)', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    const before = await store.load();
    const dup: Variant = { id: 'var_dup', rev: 0, code: 'KT3-60-CD', name: 'same code', params: {} };
    const change: BookChange = { put: { parts: [newPart('part_a', 'KT-A')], variants: [dup] }, delete: { pages: ['page_1'] } };
    const err = await store.apply(change).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StoreWriteFailed);
    expect((err as Error).message).toMatch(/uniqueness rule.*same code/);
    expect(await store.load()).toEqual(before);
  });

  it('refuses records without an id or revision before starting to write', async () => {
    const { store } = await fresh();
    const bad = { ...newPart('x', 'KT-X'), rev: -1 };
    await expect(store.apply({ put: { parts: [bad] } })).rejects.toThrow(/no valid revision/);
    await expect(store.apply({ put: { parts: [{ ...newPart('', 'KT-X') }] } })).rejects.toThrow(/has no id/);
    expect((await store.load()).parts).toEqual([]);
  });
});

describe('quotes kept in buckets', () => {
  function quote(id: string, rev = 0): Quote {
    return {
      id, rev, partId: 'part_r47k', supplierId: 'sup_a', supplierCode: `SC-${id}`, currency: 'EUR',
      breaks: [{ qty: 1, price: 0.05 }, { qty: 1000, price: 0.012 }], moq: 1, pack: 1, leadDays: 5, date: '2026-01-01', source: 'test.csv',
    };
  }

  it('spreads 3,000 quotes over at most QUOTE_BUCKETS records and reads them back in id order', async () => {
    const { store, factory } = await fresh('rungbook-buckets');
    await store.replaceAll(sampleBook());
    const added = Array.from({ length: 3000 }, (_, i) => quote(`q_${String(i).padStart(5, '0')}`));
    await store.apply({ put: { quotes: [...added].reverse() } });
    const book = await store.load();
    const ids = book.quotes.map((q) => q.id);
    expect(ids).toEqual([...ids].sort());
    expect(book.quotes.filter((q) => q.id.startsWith('q_'))).toEqual(added.map((q) => ({ ...q, rev: 1 })));
    // Raw look at the store: buckets, not one record per quote.
    const raw = await new Promise<IDBDatabase>((res, rej) => {
      const r = factory.open('rungbook-buckets');
      r.onsuccess = () => res(r.result);
      r.onerror = () => rej(r.error);
    });
    const count = await new Promise<number>((res) => {
      const r = raw.transaction('quotes').objectStore('quotes').count();
      r.onsuccess = () => res(r.result);
    });
    raw.close();
    expect(count).toBeGreaterThan(1);
    expect(count).toBeLessThanOrEqual(QUOTE_BUCKETS);
  });

  it('edits, deletes and refuses stale or already-held quotes exactly as for any record', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    await store.apply({ put: { quotes: [quote('q_a'), quote('q_b'), quote('q_c')] } });
    const before = await store.load();
    const a = before.quotes.find((q) => q.id === 'q_a')!;
    await store.apply({ put: { quotes: [{ ...a, moq: 50 }] }, delete: { quotes: ['q_b'] } });
    const after = await store.load();
    expect(after.quotes.find((q) => q.id === 'q_a')).toEqual({ ...a, moq: 50, rev: 2 });
    expect(after.quotes.some((q) => q.id === 'q_b')).toBe(false);

    const stale = await store.apply({ put: { quotes: [{ ...a, moq: 70 }] } }).catch((e: unknown) => e);
    expect(stale).toBeInstanceOf(RevisionConflict);
    expect((stale as RevisionConflict).storedRev).toBe(2);
    const held = await store.apply({ put: { quotes: [quote('q_c')], parts: [newPart('part_z', 'KT-Z')] } }).catch((e: unknown) => e);
    expect(held).toBeInstanceOf(RevisionConflict);
    expect((held as RevisionConflict).recordId).toBe('q_c');
    const gone = await store.apply({ put: { quotes: [{ ...before.quotes.find((q) => q.id === 'q_b')!, moq: 9 }] } }).catch((e: unknown) => e);
    expect(gone).toBeInstanceOf(RevisionConflict);
    expect((gone as RevisionConflict).storedRev).toBe(0);
    expect(await store.load()).toEqual(after);
  });

  it('refuses a large change whose one stale quote sits in a bucket written after others, and writes none of it', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    await store.apply({ put: { quotes: [quote('q_old')] } });
    const before = await store.load();
    const old = before.quotes.find((q) => q.id === 'q_old')!;
    // Each bucket is read, checked and written on its own: buckets before the stale one are already written when the
    // conflict shows, and the transaction's abort must take them back.
    const added = Array.from({ length: 3000 }, (_, i) => quote(`q_new_${i}`));
    const stale = { ...old, rev: old.rev - 1, moq: 5 };
    const refused = await store.apply({ put: { quotes: [...added, stale], parts: [newPart('part_y', 'KT-Y')] } }).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(RevisionConflict);
    expect((refused as RevisionConflict).recordId).toBe('q_old');
    expect(await store.load()).toEqual(before);
  });

  it('finds a quote\'s bucket from its id alone, the same every time', () => {
    expect(quoteBucketKey('q_a')).toBe(quoteBucketKey('q_a'));
    const keys = new Set(Array.from({ length: 2000 }, (_, i) => quoteBucketKey(`quote_${i}`)));
    expect(keys.size).toBe(QUOTE_BUCKETS);
  });
});

describe('replaceAll', () => {
  it('leaves the old Book whole when a record cannot be stored', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    const before = await store.load();
    const next: Book = emptyBook();
    next.parts = [newPart('p1', 'KT-1'), { ...newPart('p2', 'KT-2'), notes: (() => 1) as unknown as string }];
    const err = await store.replaceAll(next).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StoreWriteFailed);
    expect((err as Error).message).toMatch(/cannot be stored/);
    expect(await store.load()).toEqual(before);
  });

  it('leaves the old Book whole when the quota runs out part way', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    const before = await store.load();
    const realPut = IDBObjectStore.prototype.put;
    let calls = 0;
    vi.spyOn(IDBObjectStore.prototype, 'put').mockImplementation(function (this: IDBObjectStore, ...args: Parameters<IDBObjectStore['put']>) {
      if (++calls === 5) throw new DOMException('quota reached', 'QuotaExceededError');
      return realPut.apply(this, args);
    });
    const next = sampleBook();
    next.settings.bookName = 'Replacement';
    next.parts = [newPart('p1', 'KT-1'), newPart('p2', 'KT-2'), newPart('p3', 'KT-3'), newPart('p4', 'KT-4')];
    await expect(store.replaceAll(next)).rejects.toBeInstanceOf(StorageFull);
    expect(calls).toBe(5);
    vi.restoreAllMocks();
    expect(await store.load()).toEqual(before);
  });

  it('replaces everything, dropping records the new Book lacks', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    const next = emptyBook();
    next.parts = [{ ...newPart('only', 'KT-ONLY'), rev: 1 }];
    await store.replaceAll(next);
    expect(await store.load()).toEqual(next);
  });

  /** The sample Book with `n` more parts, ids in the order the store keeps them. */
  function withManyParts(n: number): Book {
    const book = sampleBook();
    const more = Array.from({ length: n }, (_, i) => ({ ...newPart(`part_many_${String(i).padStart(5, '0')}`, `KT-MANY-${i}`), rev: 1 }));
    book.parts = [...book.parts, ...more].sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
    return book;
  }

  it('writes a Book of many parts whole, through several steps of writes', async () => {
    const { store } = await fresh();
    // 4,500 parts: the writes wait for their ends at least twice on the way (a step is 2,000 records or 12 ms).
    const book = withManyParts(4500);
    await store.replaceAll(book);
    expect(await store.load()).toEqual(book);
  });

  it('leaves the old Book whole when a write fails in the store, after steps of writes have ended', async () => {
    const { store } = await fresh();
    await store.replaceAll(sampleBook());
    const before = await store.load();
    // The variants are written after the 4,500 parts: the second variant's code is already taken, which the store's
    // uniqueness rule refuses when the request runs, not when it is made.
    const next = withManyParts(4500);
    const code = next.variants[0]!.code;
    next.variants = [...next.variants, { id: 'var_zz_same_code', rev: 1, code, name: 'same code', params: {} }];
    const err = await store.replaceAll(next).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(StoreWriteFailed);
    expect((err as Error).message).toMatch(/uniqueness rule/);
    // The request that failed is named as the cause, not the abort that ended the requests after it.
    expect((err as Error).cause).toMatchObject({ name: 'ConstraintError' });
    expect(await store.load()).toEqual(before);
  });
});

describe('another tab upgrading the schema', () => {
  it('closes this connection, calls onVersionChange, and refuses later calls with a reload message', async () => {
    const factory = new IDBFactory();
    const onVersionChange = vi.fn();
    const old = await openBookStore('rungbook-upgrade', { factory, onVersionChange });
    await old.replaceAll(sampleBook());
    const next: Migration = { version: MIGRATIONS.length + 1, title: 'test step', up: async () => {} };
    const newer = await openBookStore('rungbook-upgrade', { factory, migrations: [...MIGRATIONS, next] });
    open.push(newer);
    expect(onVersionChange).toHaveBeenCalledTimes(1);
    expect(old.closed).toBe(true);
    await expect(old.load()).rejects.toThrow(/upgraded in another tab; reload/);
    await expect(old.apply({ delete: { parts: ['part_r47k'] } })).rejects.toThrow(/reload/);
    expect(await newer.load()).toEqual(sampleBook());
  });
});
