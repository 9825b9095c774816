// Book changes applied in memory, with the same revision rules as the IndexedDB store, so the app's copy of the
// Book stays exactly in step with what was written.
import { ITEMS_PER_LOOK, runAtOnce } from './slices.ts';
import type { Sliced } from './slices.ts';
import { COLLECTIONS } from './book.ts';
import type { Book, CollectionName, CollectionRecord, Settings } from './book.ts';

/** Records to write and ids to delete, applied together in one transaction or not at all. */
export interface BookChange {
  put?: { [C in CollectionName]?: CollectionRecord<C>[] };
  delete?: { [C in CollectionName]?: string[] };
  settings?: Settings;
}

/** A record whose stored revision is not the one the change was made from. */
export interface RevisionMismatch {
  collection: CollectionName | 'settings';
  recordId: string;
  /** Revision held now; 0 when no record with that id is held (never saved, or deleted elsewhere). */
  storedRev: number;
  givenRev: number;
}

export type ApplyResult = { ok: true; book: Book } | { ok: false; conflict: RevisionMismatch };

/**
 * The revision rule shared by the store and the in-memory Book: a record is written from the revision it was read
 * at. A new record carries rev 0 and its id must not be held yet; an existing one carries the held rev.
 */
export function revisionMatches(storedRev: number | undefined, givenRev: number): boolean {
  return (storedRev ?? 0) === givenRev;
}

/** Collections a change touches, in the fixed order of COLLECTIONS. */
export function touchedCollections(change: BookChange): CollectionName[] {
  return COLLECTIONS.filter((c) => (change.put?.[c]?.length ?? 0) > 0 || (change.delete?.[c]?.length ?? 0) > 0);
}

/** The record as it is stored: one revision above the one it was read at. */
export function bumped<R extends { rev: number }>(record: R): R {
  return { ...record, rev: record.rev + 1 };
}

/**
 * Applies a change to a Book without touching the original. Every revision is checked before anything is changed;
 * the first mismatch is returned and the Book is left as it was. Revisions are checked against the Book as it was
 * before the change; then deletes run, then puts (exactly as in the store).
 */
export function applyChange(book: Book, change: BookChange): ApplyResult {
  return runAtOnce(applyChangeSteps(book, change));
}

/** applyChange as sliced work (domain/slices.ts): a 50,000-quote import is applied without holding the page. */
export function* applyChangeSteps(book: Book, change: BookChange): Sliced<ApplyResult> {
  let n = 0;
  for (const c of COLLECTIONS) {
    const puts = change.put?.[c];
    if (!puts?.length) continue;
    const held = new Map<string, number>();
    for (const r of book[c]) {
      held.set(r.id, r.rev);
      if (++n % ITEMS_PER_LOOK === 0) yield;
    }
    for (const r of puts) {
      if (!revisionMatches(held.get(r.id), r.rev)) {
        return { ok: false, conflict: { collection: c, recordId: r.id, storedRev: held.get(r.id) ?? 0, givenRev: r.rev } };
      }
    }
  }
  if (change.settings && !revisionMatches(book.settings.rev, change.settings.rev)) {
    return {
      ok: false,
      conflict: { collection: 'settings', recordId: 'settings', storedRev: book.settings.rev, givenRev: change.settings.rev },
    };
  }

  const next: Book = { ...book };
  for (const c of COLLECTIONS) {
    const dels = change.delete?.[c];
    const puts = change.put?.[c];
    if (!dels?.length && !puts?.length) continue;
    const list: readonly { id: string; rev: number }[] = book[c];
    const given: readonly { id: string; rev: number }[] = puts ?? [];
    next[c] = (yield* replaceRecords(list, dels ?? [], given)) as never;
  }
  if (change.settings) next.settings = bumped(change.settings);
  return { ok: true, book: next };
}

/**
 * Records named by collection and id, and whether the settings are among them: what a change saved or deleted, told
 * to another tab so it reads back only those.
 */
export interface RecordIds {
  collections: { [C in CollectionName]?: string[] };
  settings?: boolean;
}

/** The ids of the records a change saves or deletes, by collection. */
export function recordIdsOf(change: BookChange): RecordIds {
  return runAtOnce(recordIdsSteps(change));
}

/** recordIdsOf as sliced work: a 50,000-quote import names its records without holding the page. */
export function* recordIdsSteps(change: BookChange): Sliced<RecordIds> {
  const ids: RecordIds = { collections: {} };
  let n = 0;
  for (const c of COLLECTIONS) {
    const named = new Set<string>(change.delete?.[c] ?? []);
    for (const r of change.put?.[c] ?? []) {
      named.add(r.id);
      if (++n % ITEMS_PER_LOOK === 0) yield;
    }
    if (named.size > 0) ids.collections[c] = [...named];
  }
  if (change.settings) ids.settings = true;
  return ids;
}

/** Records read back by id: those stored (at their stored revision, checked) and the ids no longer stored. */
export interface StoredRecords {
  collections: { [C in CollectionName]?: { found: CollectionRecord<C>[]; gone: string[] } };
  settings?: Settings;
}

/**
 * A Book with records read back from the store taken in: each found record in place of the one held under its id (or
 * added at the end), each gone one removed. Revisions are the stored ones; nothing is raised.
 */
export function* withStoredRecordsSteps(book: Book, stored: StoredRecords): Sliced<Book> {
  const next: Book = { ...book };
  for (const c of COLLECTIONS) {
    const got = stored.collections[c];
    if (!got || (got.found.length === 0 && got.gone.length === 0)) continue;
    const list: readonly { id: string; rev: number }[] = book[c];
    next[c] = (yield* replaceRecords(list, got.gone, got.found as readonly { id: string; rev: number }[], false)) as never;
  }
  if (stored.settings) next.settings = stored.settings;
  return next;
}

function* replaceRecords<R extends { id: string; rev: number }>(list: readonly R[], dels: readonly string[], puts: readonly R[], bump = true): Sliced<R[]> {
  const gone = new Set(dels);
  const out: R[] = [];
  const at = new Map<string, number>();
  let n = 0;
  for (const r of list) {
    if (gone.has(r.id)) continue;
    at.set(r.id, out.length);
    out.push(r);
    if (++n % ITEMS_PER_LOOK === 0) yield;
  }
  for (const r of puts) {
    const i = at.get(r.id);
    const put = bump ? bumped(r) : r;
    if (i === undefined) {
      at.set(r.id, out.length);
      out.push(put);
    } else {
      out[i] = put;
    }
    if (++n % ITEMS_PER_LOOK === 0) yield;
  }
  return out;
}

/**
 * What changed between two versions of a Book, to bring a copy held elsewhere (the figures worker) from `prev` to
 * `next` without copying the whole Book: per collection the records saved or added and the ids deleted, or the
 * whole list when the order of records moved; the settings when they changed. Records are compared by identity and
 * revision (every save raises the revision), so a diff costs one pass over the collections that changed.
 */
export interface BookDelta {
  collections: { [C in CollectionName]?: { put: CollectionRecord<C>[]; delete: string[] } | { all: CollectionRecord<C>[] } };
  settings?: Settings;
}

export function bookDelta(prev: Book, next: Book): BookDelta {
  const delta: BookDelta = { collections: {} };
  for (const c of COLLECTIONS) {
    const before: readonly { id: string; rev: number }[] = prev[c];
    const after: readonly { id: string; rev: number }[] = next[c];
    if (before === after) continue;
    const held = new Map(before.map((r) => [r.id, r] as const));
    const put: { id: string; rev: number }[] = [];
    const kept = new Set<string>();
    for (const r of after) {
      const o = held.get(r.id);
      if (o === undefined || o !== r) put.push(r);
      kept.add(r.id);
    }
    const dels = before.filter((r) => !kept.has(r.id)).map((r) => r.id);
    if (put.length === 0 && dels.length === 0 && before.length === after.length) continue;
    // The copy applies deletes then puts (in place, or appended): send the whole list when that would not give
    // the same order.
    const order = runAtOnce(replaceRecords(before, dels, [])).map((r) => r.id);
    for (const r of put) if (!held.has(r.id)) order.push(r.id);
    const same = order.length === after.length && order.every((id, i) => id === after[i]!.id);
    delta.collections[c] = (same ? { put, delete: dels } : { all: [...after] }) as never;
  }
  if (prev.settings !== next.settings) delta.settings = next.settings;
  return delta;
}

/** Applies a `bookDelta` to the copy it was made against: records as given (no revision rules; they were applied). */
export function applyBookDelta(book: Book, delta: BookDelta): Book {
  const next: Book = { ...book };
  for (const c of COLLECTIONS) {
    const d = delta.collections[c];
    if (!d) continue;
    if ('all' in d) {
      next[c] = d.all as never;
      continue;
    }
    const gone = new Set(d.delete);
    const out: { id: string; rev: number }[] = book[c].filter((r: { id: string }) => !gone.has(r.id));
    const at = new Map(out.map((r, i) => [r.id, i] as const));
    for (const r of d.put as { id: string; rev: number }[]) {
      const i = at.get(r.id);
      if (i === undefined) {
        at.set(r.id, out.length);
        out.push(r);
      } else out[i] = r;
    }
    next[c] = out as never;
  }
  if (delta.settings) next.settings = delta.settings;
  return next;
}
