// An edit saved in one tab reaches another tab on the same Book as the records it touched: the other tab reads back
// and checks only those (never the whole Book), takes them in, and refuses a change whose record does not read, with
// its place named, keeping its Book as it was. The whole Book is read only when it was replaced.
import 'fake-indexeddb/auto';
import { IDBFactory } from 'fake-indexeddb';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { Part, Quote } from '../../src/domain/book.ts';
import { checkBook } from '../../src/domain/schema.ts';
import type * as SchemaModule from '../../src/domain/schema.ts';
import { IdbBookStore, openBookStore } from '../../src/store/idb-store.ts';
import { quoteBucketKey } from '../../src/store/schema.ts';
import { StoredRecordsInvalid } from '../../src/store/types.ts';
import { BookService } from '../../src/ui/book-service.ts';
import { sampleBook } from '../fixtures/sample-book.ts';
import { nextChange } from '../fixtures/book-service-events.ts';

// The whole-Book check, counted: every call still runs the real one.
vi.mock('../../src/domain/schema.ts', async (importOriginal) => {
  const real = await importOriginal<typeof SchemaModule>();
  return { ...real, checkBook: vi.fn(real.checkBook) };
});
const wholeChecks = vi.mocked(checkBook);

const opened: { close(): void }[] = [];
let dbCount = 0;
async function twoTabs(): Promise<[BookService, BookService]> {
  const name = `rungbook-tabs-${++dbCount}`;
  const a = await BookService.open(name);
  const b = await BookService.open(name);
  opened.push(a, b);
  return [a, b];
}
afterEach(() => {
  for (const s of opened.splice(0)) s.close();
  vi.restoreAllMocks();
});

function part(id: string, mpn: string): Part {
  return { id, rev: 0, mpn, maker: 'Invented Test Works', description: 'test part', kind: 'resistor', ratings: {}, package: '0603' };
}

describe('an edit made in another tab', () => {
  it('is taken in from its own records, without reading or checking the whole Book', async () => {
    const [a, b] = await twoTabs();
    const loads = vi.spyOn(IdbBookStore.prototype, 'load');
    const checksBefore = wholeChecks.mock.calls.length;
    const quote = a.book.quotes[0]!;
    const supplier = a.book.suppliers[0]!;
    const gone = a.book.parts.find((p) => !a.book.quotes.some((q) => q.partId === p.id) && !a.book.buildLines.some((l) => l.partId === p.id || l.alternates?.includes(p.id)));
    const newQuote: Quote = { ...quote, id: 'quote_from_tab_a', rev: 0, breaks: [{ qty: 1, price: 0.0123 }] };
    let seen = nextChange(b, 'book');
    const r = await a.save({
      put: {
        parts: [part('part_from_tab_a', 'ZZ-TAB-A')],
        quotes: [{ ...quote, breaks: [{ qty: 1, price: 0.0456 }] }, newQuote],
        suppliers: [{ ...supplier, notes: 'edited in tab A' }],
      },
      delete: gone ? { parts: [gone.id] } : {},
      settings: { ...a.book.settings, company: 'Tab A Works' },
    });
    expect(r.ok).toBe(true);
    await seen;

    expect(b.book.parts.find((p) => p.id === 'part_from_tab_a')).toMatchObject({ mpn: 'ZZ-TAB-A', rev: 1 });
    expect(b.book.quotes.find((q) => q.id === quote.id)).toMatchObject({ breaks: [{ qty: 1, price: 0.0456 }], rev: quote.rev + 1 });
    expect(b.book.quotes.find((q) => q.id === 'quote_from_tab_a')).toMatchObject({ breaks: [{ qty: 1, price: 0.0123 }], rev: 1 });
    expect(b.book.suppliers.find((s) => s.id === supplier.id)).toMatchObject({ notes: 'edited in tab A', rev: supplier.rev + 1 });
    expect(b.book.settings).toMatchObject({ company: 'Tab A Works', rev: a.book.settings.rev });
    if (gone) expect(b.book.parts.some((p) => p.id === gone.id)).toBe(false);
    expect(b.lastRemoteChange).toBeInstanceOf(Date);
    expect(loads).not.toHaveBeenCalled();
    expect(wholeChecks.mock.calls.length).toBe(checksBefore);

    // A second edit of the same records, then the tab's copy against a fresh whole read of the store.
    seen = nextChange(b, 'book');
    const q2 = a.book.quotes.find((q) => q.id === 'quote_from_tab_a')!;
    expect((await a.save({ put: { quotes: [{ ...q2, moq: 10 }] }, delete: { parts: ['part_from_tab_a'] } })).ok).toBe(true);
    await seen;
    expect(loads).not.toHaveBeenCalled();
    expect(wholeChecks.mock.calls.length).toBe(checksBefore);
    const byId = <T extends { id: string }>(list: readonly T[]) => [...list].sort((x, y) => (x.id < y.id ? -1 : x.id > y.id ? 1 : 0));
    const truth = await BookService.open(b.name);
    opened.push(truth);
    for (const c of ['parts', 'quotes', 'suppliers'] as const) {
      expect(byId<{ id: string }>(b.book[c]), c).toStrictEqual(byId<{ id: string }>(truth.book[c]));
    }
    expect(b.book.settings).toStrictEqual(truth.book.settings);
    expect(b.book.quotes.find((q) => q.id === 'quote_from_tab_a')?.moq).toBe(10);
  });

  it('when it is a large import, still reaches the other tab as the records it saved', async () => {
    const [a, b] = await twoTabs();
    const loads = vi.spyOn(IdbBookStore.prototype, 'load');
    const quote = a.book.quotes[0]!;
    // More records than one message names at once from the saving tab's task: the message follows in a task of its own.
    const many: Quote[] = Array.from({ length: 10_050 }, (_, i) => ({ ...quote, id: `quote_large_${String(i).padStart(5, '0')}`, rev: 0 }));
    const seen = nextChange(b, 'book');
    expect((await a.save({ put: { quotes: many } })).ok).toBe(true);
    await seen;
    expect(b.book.quotes.length).toBe(a.book.quotes.length);
    expect(b.book.quotes.filter((q) => q.id.startsWith('quote_large_')).map((q) => q.rev)).toEqual(many.map(() => 1));
    expect(loads).not.toHaveBeenCalled();
  });

  it('merges a stale save from the records it touches alone, without reading the whole Book', async () => {
    const [a, b] = await twoTabs();
    const original = b.book.suppliers[0]!;
    const seen = nextChange(b, 'book');
    expect((await a.save({ put: { suppliers: [{ ...original, notes: 'from tab A' }] } })).ok).toBe(true);
    await seen;
    const loads = vi.spyOn(IdbBookStore.prototype, 'load');
    const checksBefore = wholeChecks.mock.calls.length;
    // The form in tab B still holds the supplier as it was before tab A's save.
    const r = await b.save({ put: { suppliers: [{ ...original, name: 'Renamed in tab B' }] } });
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.merged).toMatch(/kept its notes; your change to name was saved over it/);
    expect(b.book.suppliers.find((s) => s.id === original.id)).toMatchObject({ notes: 'from tab A', name: 'Renamed in tab B', rev: original.rev + 2 });
    expect(loads).not.toHaveBeenCalled();
    expect(wholeChecks.mock.calls.length).toBe(checksBefore);
  });

  it('is refused when one of its records does not read, with the place named, and changes nothing', async () => {
    const [a, b] = await twoTabs();
    const before = b.book;
    const supplier = a.book.suppliers[0]!;
    const refused = nextChange(b, 'status');
    // A writer that skips the checks (an older build, a damaged profile): a good record beside a bad one.
    const bad = { ...part('part_bad', 'ZZ-BAD'), kind: 'banana' } as unknown as Part;
    const r = await a.save({ put: { parts: [bad], suppliers: [{ ...supplier, notes: 'good edit' }] } });
    expect(r.ok).toBe(true);
    await refused;
    expect(b.remoteRefused).toMatch(/^A change saved in another tab was not taken in here; this tab keeps the Book as it was\./);
    expect(b.remoteRefused).toContain('parts record "part_bad".kind: must be one of resistor, capacitor');
    expect(b.remoteRefused).toContain('"banana" is not known');
    // Neither record came in: the tab's copy is the very same Book.
    expect(b.book).toBe(before);
    expect(b.book.suppliers.find((s) => s.id === supplier.id)?.notes).toBe(supplier.notes);
    expect(b.lastRemoteChange).toBeUndefined();
    // A whole read names the same place; the notice stays while the Book does not read.
    await expect(b.reload()).rejects.toThrow(/parts\[\d+\]\.kind: must be one of/);
    expect(b.remoteRefused).toContain('parts record "part_bad".kind');
  });

  it('reads the whole Book when the other tab replaced it, and only then', async () => {
    const [a, b] = await twoTabs();
    const loads = vi.spyOn(IdbBookStore.prototype, 'load');
    const seen = nextChange(b, 'book');
    const replacements = b.replacements;
    expect((await a.replaceBook(a.empty())).ok).toBe(true);
    await seen;
    expect(loads).toHaveBeenCalledTimes(1);
    expect(b.book.variants).toEqual([]);
    expect(b.replacements).toBe(replacements + 1);
  });
});

describe('reading named records from the store', () => {
  async function store() {
    const s = await openBookStore(`rungbook-records-${++dbCount}`, { factory: new IDBFactory() });
    opened.push(s);
    await s.replaceAll(sampleBook());
    return s;
  }

  it('gives the named records as stored, checked, and names the ones no longer stored', async () => {
    const s = await store();
    const book = sampleBook();
    const q = book.quotes[1]!;
    const p = book.parts[0]!;
    const got = await s.loadRecords({ collections: { quotes: [q.id, 'quote_never'], parts: [p.id] }, settings: true });
    expect(got.collections.quotes).toStrictEqual({ found: [q], gone: ['quote_never'] });
    expect(got.collections.parts).toStrictEqual({ found: [p], gone: [] });
    expect(got.settings).toStrictEqual(book.settings);
    expect(Object.keys(got.collections).sort()).toEqual(['parts', 'quotes']);
  });

  it('refuses a damaged quote bucket and a bad record, naming each place', async () => {
    const s = await store();
    const q = sampleBook().quotes[0]!;
    const raw = (s as unknown as { db: { put(store: string, value: unknown): Promise<unknown> } }).db;
    await raw.put('quotes', { id: quoteBucketKey(q.id), quotes: [{ ...q, currency: 'euro' }] });
    const e = await s.loadRecords({ collections: { quotes: [q.id] } }).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(StoredRecordsInvalid);
    expect((e as StoredRecordsInvalid).problems).toEqual([
      { path: `quotes record ${JSON.stringify(q.id)}.currency`, message: 'must be a currency code of three capital letters (ISO 4217), not "euro"' },
    ]);
    await raw.put('quotes', { id: quoteBucketKey(q.id), quotes: 'not a list' });
    await expect(s.loadRecords({ collections: { quotes: [q.id] } })).rejects.toThrow(
      `quotes bucket ${JSON.stringify(quoteBucketKey(q.id))}: does not hold a list of quotes`,
    );
  });
});
