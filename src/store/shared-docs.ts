// A Book's records as the documents of a shared Book (one document per record, `_id` = `collection/id`, the settings
// as one document), and back, each incoming document checked against the Book schema (domain/schema.ts) before it
// may reach the Book. Pure: no sync engine is loaded here, so a Book that is not shared never pays for one.
import { BOOK_FORMAT, BOOK_VERSION, COLLECTIONS } from '../domain/book.ts';
import type { Book, CollectionName, Settings } from '../domain/book.ts';
import type { BookChange } from '../domain/book-ops.ts';
import { sameValue } from '../domain/merge.ts';
import type { OpenField, TakenField } from '../domain/share-merge.ts';
import { BookSchema, checkWith } from '../domain/schema.ts';

export const SETTINGS_DOC_ID = 'settings';
/** Documents noting what a merge of two people's versions took from whom, and what it left for a person. */
export const MERGES_PREFIX = 'merges/';

/** One record of the Book as a document: its fields without the local revision, who saved it, when, in which format. */
export interface RecordDoc {
  _id: string;
  _rev?: string;
  _deleted?: boolean;
  _conflicts?: string[];
  record: Record<string, unknown>;
  by: string;
  at: string;
  bookVersion: number;
}

/** What merging two people's versions of one record did, kept beside the record (`merges/<record document id>`). */
export interface MergeNote {
  at: string;
  /** Who merged (the copy that found the conflicting versions). */
  by: string;
  taken: TakenField[];
  open: OpenField[];
  /** Set when a person has decided the open fields: who, when. */
  decided?: { by: string; at: string };
}

export interface MergeDoc {
  _id: string;
  _rev?: string;
  _conflicts?: string[];
  about: string;
  notes: MergeNote[];
}

/** A shared document that was not let into the Book: where it is and why. */
export interface DocProblem {
  /** The document's id and the field inside it: `quotes/q_1 breaks[0].qty`. */
  place: string;
  message: string;
}

export function recordDocId(collection: CollectionName | 'settings', id: string): string {
  return collection === 'settings' ? SETTINGS_DOC_ID : `${collection}/${id}`;
}

/** The collection and record id a document id names, or undefined for a document that is not a Book record. */
export function placeOfDoc(docId: string): { collection: CollectionName | 'settings'; id: string } | undefined {
  if (docId === SETTINGS_DOC_ID) return { collection: 'settings', id: SETTINGS_DOC_ID };
  const slash = docId.indexOf('/');
  if (slash < 1) return undefined;
  const c = docId.slice(0, slash);
  const id = docId.slice(slash + 1);
  return (COLLECTIONS as readonly string[]).includes(c) && id !== '' ? { collection: c as CollectionName, id } : undefined;
}

/** A record's fields as shared: everything but the local revision, which each copy keeps for itself. */
export function sharedFields(record: { rev: number }): Record<string, unknown> {
  const { rev: _local, ...fields } = record as { rev: number } & Record<string, unknown>;
  return fields;
}

export function recordDoc(collection: CollectionName | 'settings', record: { id?: string; rev: number }, by: string, at: string): RecordDoc {
  return { _id: recordDocId(collection, record.id ?? SETTINGS_DOC_ID), record: sharedFields(record), by, at, bookVersion: BOOK_VERSION };
}

export type CheckedDoc =
  | { ok: true; collection: CollectionName; record: { id: string; rev: number } & Record<string, unknown> }
  | { ok: true; collection: 'settings'; record: Settings }
  | { ok: false; problems: DocProblem[] };

/**
 * A shared document checked as a Book record: a known place, a format this copy reads, and fields the Book schema
 * accepts (with its defaults filled in, rev 0 until the local copy gives it one). Problems name the document and field.
 */
export function checkRecordDoc(doc: unknown): CheckedDoc {
  const id = typeof (doc as { _id?: unknown } | null)?._id === 'string' ? (doc as { _id: string })._id : '';
  const fail = (path: string, message: string): CheckedDoc => ({ ok: false, problems: [{ place: path ? `${id} ${path}` : id || '(no id)', message }] });
  const place = placeOfDoc(id);
  if (!place) return fail('', 'is not a record of a Book (its id names no collection of the Book)');
  const d = doc as Partial<RecordDoc>;
  if (typeof d.bookVersion !== 'number' || !Number.isInteger(d.bookVersion)) return fail('bookVersion', 'is missing');
  if (d.bookVersion > BOOK_VERSION) {
    return fail('', `was written by a newer Rungbook (Book format ${d.bookVersion}; this one reads up to ${BOOK_VERSION}): update Rungbook to take it`);
  }
  if (d.record === null || typeof d.record !== 'object' || Array.isArray(d.record)) return fail('record', 'must be an object');
  const fields: Record<string, unknown> = { ...d.record, rev: 0 };
  if (place.collection !== 'settings' && fields['id'] !== place.id) return fail('record.id', `must be ${JSON.stringify(place.id)}, the id the document is kept under`);
  const prefix = place.collection === 'settings' ? 'settings' : `${place.collection}[0]`;
  const checked = checkWith(BookSchema, { format: BOOK_FORMAT, version: BOOK_VERSION, [place.collection]: place.collection === 'settings' ? fields : [fields] });
  if (!checked.ok) {
    return {
      ok: false,
      problems: checked.problems.map((p) => ({ place: `${id} ${p.path.startsWith(prefix) ? p.path.slice(prefix.length).replace(/^\./, '') || 'record' : p.path}`, message: p.message })),
    };
  }
  if (place.collection === 'settings') return { ok: true, collection: 'settings', record: checked.value.settings };
  return { ok: true, collection: place.collection, record: checked.value[place.collection][0] as { id: string; rev: number } & Record<string, unknown> };
}

/** The documents to write for a change to the Book: each record put or deleted, given the documents held now. */
export function docsForChange(
  puts: readonly { collection: CollectionName | 'settings'; record: { id?: string; rev: number } }[],
  deletes: readonly { collection: CollectionName; id: string }[],
  held: ReadonlyMap<string, RecordDoc>,
  by: string,
  at: string,
): RecordDoc[] {
  const out: RecordDoc[] = [];
  for (const { collection, record } of puts) {
    const doc = recordDoc(collection, record, by, at);
    const before = held.get(doc._id);
    // Unchanged (a change that came from the shared copy itself, applied here): nothing to share back.
    if (before && !before._deleted && sameValue(before.record, doc.record)) continue;
    out.push(before?._rev ? { ...doc, _rev: before._rev } : doc);
  }
  for (const { collection, id } of deletes) {
    const before = held.get(recordDocId(collection, id));
    if (!before || before._deleted || !before._rev) continue;
    out.push({ _id: before._id, _rev: before._rev, _deleted: true, record: {}, by, at, bookVersion: BOOK_VERSION });
  }
  return out;
}

/**
 * The change that brings the Book to the documents given (checked records, or ids deleted in the shared copy): only
 * records that differ, each carrying the revision the Book holds, so the store's revision rule applies as to any save.
 */
export function changeForDocs(
  book: Book,
  incoming: readonly ({ deleted: false; checked: Extract<CheckedDoc, { ok: true }> } | { deleted: true; docId: string })[],
): BookChange | undefined {
  const put: Record<string, Record<string, unknown>[]> = {};
  const del: Record<string, string[]> = {};
  let settings: Settings | undefined;
  const heldBy = new Map<CollectionName, Map<string, { rev: number }>>();
  const held = (c: CollectionName) => {
    let m = heldBy.get(c);
    if (!m) heldBy.set(c, (m = new Map((book[c] as readonly { id: string; rev: number }[]).map((r) => [r.id, r] as const))));
    return m;
  };
  for (const item of incoming) {
    if (item.deleted) {
      const place = placeOfDoc(item.docId);
      if (!place || place.collection === 'settings' || !held(place.collection).has(place.id)) continue;
      (del[place.collection] ??= []).push(place.id);
      continue;
    }
    const { checked } = item;
    if (checked.collection === 'settings') {
      if (!sameValue(sharedFields(book.settings), sharedFields(checked.record))) settings = { ...checked.record, rev: book.settings.rev };
      continue;
    }
    const local = held(checked.collection).get(checked.record.id);
    if (local && sameValue(sharedFields(local), sharedFields(checked.record))) continue;
    (put[checked.collection] ??= []).push({ ...checked.record, rev: local?.rev ?? 0 });
  }
  const change: BookChange = {};
  if (Object.keys(put).length) change.put = put as BookChange['put'];
  if (Object.keys(del).length) change.delete = del as BookChange['delete'];
  if (settings) change.settings = settings;
  return change.put || change.delete || change.settings ? change : undefined;
}
