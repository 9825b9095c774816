// The app's Book service over fake-indexeddb: the demo Book with its built-in checks on first start only, saves
// that keep memory and storage in step, refused stale saves that change nothing, and edits seen by another tab.
import 'fake-indexeddb/auto';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { Book, Part } from '../../src/domain/book.ts';
import { IdbBookStore, openBookStore } from '../../src/store/idb-store.ts';
import { StorageFull } from '../../src/store/types.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { BookService, isFirstStart } from '../../src/ui/book-service.ts';
import { emptyBook } from '../../src/domain/book.ts';
import { checkSheetTexts } from '../../src/ui/check-sheets.ts';
import { nextChange } from '../fixtures/book-service-events.ts';

const opened: BookService[] = [];
let dbCount = 0;
async function open(name = `rungbook-ui-${++dbCount}`): Promise<BookService> {
  const s = await BookService.open(name);
  opened.push(s);
  return s;
}
afterEach(() => {
  for (const s of opened.splice(0)) s.close();
});

function part(id: string, mpn: string): Part {
  return { id, rev: 0, mpn, maker: 'Invented Test Works', description: 'test part', kind: 'resistor', ratings: {}, package: '0603' };
}

describe('Book service', () => {
  it('loads the demo Book with the built-in checks into a new database', async () => {
    const s = await open();
    const demo = demoBook();
    expect(s.book.variants.map((v) => v.code).sort()).toEqual(demo.variants.map((v) => v.code).sort());
    expect(s.book.settings.bookName).toBe(demo.settings.bookName);
    expect(Object.keys(checkSheetTexts()).length).toBeGreaterThan(0);
    expect(s.book.checks.length).toBeGreaterThan(0);
    expect(s.book.checks.every((c) => c.builtIn)).toBe(true);
  });

  it('holds on a first start the very Book a later start reads back from storage', async () => {
    // The first start takes the Book as written instead of reading it back: the two must not differ in any record.
    const name = `rungbook-ui-${++dbCount}`;
    const first = await open(name);
    expect(first.startedFresh).toBe(true);
    const again = await open(name);
    expect(again.startedFresh).toBe(false);
    expect(again.book).toStrictEqual(first.book);
  });

  it('keeps saved changes on the next start instead of loading the demo again', async () => {
    const name = `rungbook-ui-${++dbCount}`;
    const a = await open(name);
    const r = await a.save({ put: { parts: [part('part_new', 'ZZ-1')] } });
    expect(r).toEqual({ ok: true });
    expect(a.status.state).toBe('saved');
    // Memory follows the store's revision rule: a new record is stored at revision 1.
    expect(a.book.parts.find((p) => p.id === 'part_new')?.rev).toBe(1);
    a.close();
    const b = await open(name);
    expect(b.book.parts.find((p) => p.id === 'part_new')?.mpn).toBe('ZZ-1');
  });

  it('keeps an emptied Book empty on the next start', async () => {
    const name = `rungbook-ui-${++dbCount}`;
    const a = await open(name);
    expect((await a.replaceBook(a.empty())).ok).toBe(true);
    expect(a.book.variants).toEqual([]);
    a.close();
    const b = await open(name);
    expect(b.book.variants).toEqual([]);
    expect(b.book.parts).toEqual([]);
  });

  it('tells a just-created database from a Book emptied on purpose', () => {
    const fresh = emptyBook();
    expect(isFirstStart(fresh)).toBe(true);
    expect(isFirstStart({ ...fresh, settings: { ...fresh.settings, editsSinceExport: 0 } })).toBe(false);
    expect(isFirstStart(demoBook())).toBe(false);
  });

  it('refuses a save made from an older revision, says why, and changes neither memory nor storage', async () => {
    const name = `rungbook-ui-${++dbCount}`;
    const a = await open(name);
    const b = await open(name);
    const original = b.book.suppliers[0]!;
    expect((await a.save({ put: { suppliers: [{ ...original, notes: 'from tab A' }] } })).ok).toBe(true);
    const stale = await b.save({ put: { suppliers: [{ ...original, notes: 'from tab B' }] } });
    expect(stale.ok).toBe(false);
    if (stale.ok) return;
    expect(stale.conflict).toBe(true);
    expect(stale.message).toMatch(/changed in another tab or window/);
    expect(b.status).toMatchObject({ state: 'failed', conflict: true });
    await b.reload();
    expect(b.status.state).toBe('saved');
    expect(b.book.suppliers.find((s) => s.id === original.id)?.notes).toBe('from tab A');
  });

  it('merges a save from an older revision field by field when the other tab changed other fields, with a notice', async () => {
    const name = `rungbook-ui-${++dbCount}`;
    const a = await open(name);
    const b = await open(name);
    const original = b.book.suppliers[0]!;
    expect((await a.save({ put: { suppliers: [{ ...original, notes: 'from tab A' }] } })).ok).toBe(true);
    // Tab B refreshes (as after the other tab's broadcast) but saves the copy its user saw.
    await b.reload();
    const r = await b.save({ put: { suppliers: [{ ...original, name: 'Renamed in tab B' }] } });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.merged).toMatch(/also changed in another tab: kept its notes; your change to name was saved over it/);
    expect(b.status.merged).toBe(r.merged);
    const stored = b.book.suppliers.find((s) => s.id === original.id)!;
    expect(stored).toMatchObject({ notes: 'from tab A', name: 'Renamed in tab B', rev: original.rev + 2 });
    b.dismissMerged();
    expect(b.status.merged).toBeUndefined();
  });

  it('refuses a stale save that changed the same field, naming the field and the other value', async () => {
    const name = `rungbook-ui-${++dbCount}`;
    const a = await open(name);
    const b = await open(name);
    const v = b.book.variants[0]!;
    const key = Object.keys(v.params)[0]!;
    expect((await a.save({ put: { variants: [{ ...v, params: { ...v.params, [key]: 11 } }] } })).ok).toBe(true);
    await b.reload();
    const r = await b.save({ put: { variants: [{ ...v, params: { ...v.params, [key]: 22 } }] } });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.conflict).toBe(true);
    expect(r.message).toContain(`parameter ${key} is now 11 there (yours: 22)`);
    expect(b.book.variants.find((x) => x.id === v.id)?.params[key]).toBe(11);
  });

  it('merges over its own earlier save without a notice', async () => {
    const s = await open();
    const original = s.book.suppliers[0]!;
    expect((await s.save({ put: { suppliers: [{ ...original, notes: 'first' }] } })).ok).toBe(true);
    const r = await s.save({ put: { suppliers: [{ ...original, name: 'second' }] } });
    expect(r).toEqual({ ok: true });
    expect(s.book.suppliers.find((x) => x.id === original.id)).toMatchObject({ notes: 'first', name: 'second' });
  });

  it('proposes a small save’s Book while it is written, holds the same records once stored, and drops it when refused', async () => {
    const name = `rungbook-ui-${++dbCount}`;
    const a = await open(name);
    const b = await open(name);
    const seen: { proposed: unknown; book: unknown }[] = [];
    b.addEventListener('proposed', () => seen.push({ proposed: b.proposed, book: b.book }));
    const before = b.book;
    const v = before.variants[0]!;
    const key = Object.keys(v.params)[0]!;
    expect((await b.save({ put: { variants: [{ ...v, params: { ...v.params, [key]: 11 } }] } })).ok).toBe(true);
    expect(seen).toHaveLength(1);
    // Proposed ahead while the Book itself stayed; once stored, the Book holds the very same records.
    expect(seen[0]!.book).toBe(before);
    expect(seen[0]!.proposed).toStrictEqual(b.book);
    expect(b.proposed).toBeUndefined();
    // A save the store refuses (another tab saved the record first) was proposed too, and the Book stays as it was.
    const mine = b.book.suppliers[0]!;
    expect((await a.save({ put: { suppliers: [{ ...mine, notes: 'from tab A' }] } })).ok).toBe(true);
    expect((await b.save({ put: { suppliers: [{ ...mine, notes: 'from tab B' }] } })).ok).toBe(false);
    expect(seen).toHaveLength(2);
    expect((seen[1]!.proposed as typeof before).suppliers.find((x) => x.id === mine.id)?.notes).toBe('from tab B');
    expect(b.book.suppliers.find((x) => x.id === mine.id)?.notes).not.toBe('from tab B');
    expect(b.proposed).toBeUndefined();
  });

  it('turns a malformed change into a message and writes nothing', async () => {
    const s = await open();
    const before = s.book.parts.length;
    const r = await s.save({ put: { parts: [part('', 'NO-ID')] } });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(/no id/);
    expect(s.status.state).toBe('failed');
    await s.reload();
    expect(s.book.parts.length).toBe(before);
  });

  it('re-reads the Book when another tab on the same Book saves', async () => {
    const name = `rungbook-ui-${++dbCount}`;
    const a = await open(name);
    const b = await open(name);
    const seen = nextChange(b, 'book');
    await a.save({ put: { parts: [part('part_other_tab', 'ZZ-TAB')] } });
    await seen;
    expect(b.book.parts.some((p) => p.id === 'part_other_tab')).toBe(true);
    expect(b.lastRemoteChange).toBeInstanceOf(Date);
  });

  it('counts changes since the last Book file and restarts the count when one is downloaded', async () => {
    const s = await open();
    await s.save({ put: { parts: [part('part_c1', 'ZZ-C1')] } });
    await s.save({ put: { parts: [part('part_c2', 'ZZ-C2')] } });
    expect(s.editsSinceExport).toBe(2);
    const r = await s.markExported(new Date('2026-03-20T12:00:00Z'));
    expect(r.ok).toBe(true);
    expect(s.editsSinceExport).toBe(0);
    expect(s.book.settings.lastExportAt).toBe('2026-03-20T12:00:00.000Z');
  });
});

describe('a first start that shows the demo Book before writing it', () => {
  /** A first start in a new database whose demo Book is written when `write()` is called. */
  async function openDeferred(name = `rungbook-ui-${++dbCount}`): Promise<{ s: BookService; write: () => void; name: string }> {
    let write!: () => void;
    const s = await BookService.open(name, { writeStarterAfter: new Promise<void>((r) => (write = r)) });
    opened.push(s);
    return { s, write, name };
  }
  async function storedBook(name: string): Promise<Book> {
    const store = await openBookStore(name);
    try {
      return await store.load();
    } finally {
      store.close();
    }
  }

  it('holds the demo Book at once, writes it only when told, and then stores the very Book it held', async () => {
    const { s, write, name } = await openDeferred();
    expect(s.startedFresh).toBe(true);
    expect(s.book.variants.map((v) => v.code).sort()).toEqual(demoBook().variants.map((v) => v.code).sort());
    expect(isFirstStart(await storedBook(name))).toBe(true);
    expect(s.status.state).toBe('saving');
    const stored = nextChange(s, 'status');
    write();
    await stored;
    expect(s.status.state).toBe('saved');
    expect(s.editsSinceExport).toBe(0);
    // A save queues behind the demo Book's write, so once it is done both are stored.
    expect(await s.save({ settings: { ...s.book.settings, bookName: 'Renamed' } })).toEqual({ ok: true });
    const again = await open(name);
    expect(again.startedFresh).toBe(false);
    expect(again.book).toStrictEqual(s.book);
    expect(again.book.settings.bookName).toBe('Renamed');
    expect(s.editsSinceExport).toBe(1);
  });

  it('takes the guess of a first start for a guess: a wrong one neither loads the demo Book nor keeps it out', async () => {
    const name = `rungbook-ui-${++dbCount}`;
    const missed = await BookService.open(name, { starterLikely: Promise.resolve(false) });
    opened.push(missed);
    expect(missed.startedFresh).toBe(true);
    expect(missed.book.variants.length).toBe(demoBook().variants.length);
    expect((await missed.replaceBook(missed.empty())).ok).toBe(true);
    const wrong = await BookService.open(name, { starterLikely: Promise.resolve(true), writeStarterAfter: Promise.resolve() });
    opened.push(wrong);
    expect(wrong.startedFresh).toBe(false);
    expect(wrong.book.variants).toEqual([]);
  });

  it('takes in a Book another tab stored meanwhile instead of writing the demo over it', async () => {
    const { s, write, name } = await openDeferred();
    const other = await open(name);
    expect(other.startedFresh).toBe(true);
    expect((await other.save({ put: { parts: [part('part_other', 'ZZ-2')] } })).ok).toBe(true);
    const taken = nextChange(s, 'book');
    write();
    await taken;
    expect(s.book.parts.find((p) => p.id === 'part_other')?.mpn).toBe('ZZ-2');
    expect((await storedBook(name)).parts.find((p) => p.id === 'part_other')?.mpn).toBe('ZZ-2');
  });

  it('says so when the demo Book cannot be stored, and then refuses every save, storing nothing', async () => {
    const full = vi.spyOn(IdbBookStore.prototype, 'replaceAll').mockRejectedValueOnce(new StorageFull());
    try {
      const { s, write, name } = await openDeferred();
      const edit = s.save({ put: { parts: [part('part_new', 'ZZ-1')] } });
      write();
      const r = await edit;
      expect(r.ok).toBe(false);
      if (r.ok) return;
      expect(r.message).toMatch(/^Not saved: the demo Book could not be stored in this browser, so this tab keeps no change until it is reloaded\. The browser has no more storage/);
      expect(s.status.state).toBe('failed');
      expect(s.status.reason).toBe(r.message);
      expect((await s.save({ put: { parts: [part('part_two', 'ZZ-3')] } })).ok).toBe(false);
      expect(isFirstStart(await storedBook(name))).toBe(true);
    } finally {
      full.mockRestore();
    }
  });
});
