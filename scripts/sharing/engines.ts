// The two sync engines measured for sharing a Book (SHARING.md), behind one small client interface so the
// measurement treats them alike: document replication with revision trees (PouchDB, to a CouchDB-compatible server)
// and a CRDT document (Yjs, to a Hocuspocus server). A Book record is one document (PouchDB) or one nested map (Yjs).
import { COLLECTIONS } from '../../src/domain/book.ts';
import type { Book } from '../../src/domain/book.ts';

export type EngineName = 'pouchdb' | 'yjs';

/** What one person's copy of a shared Book can do, as far as the measurement needs. */
export interface EngineClient {
  /** Writes every record of the Book into the local copy (before any sync). */
  load(book: Book): Promise<void>;
  /** The first person sends the whole Book to a new, empty shared Book on the server. */
  share(): Promise<void>;
  /** A second person's first sync: the whole shared Book from the server into an empty local copy. */
  firstSync(): Promise<void>;
  /** One exchange with the server both ways; resolves when both sides hold the same records. */
  syncOnce(): Promise<void>;
  /** Keeps syncing; `onChange(key)` is called for each record that arrives from the server. */
  goLive(onChange: (key: string) => void): Promise<void>;
  /** Stops live syncing (the person goes offline). */
  goOffline(): Promise<void>;
  /** Sets one field of one record in the local copy. */
  edit(key: string, field: string, value: unknown): Promise<void>;
  /** One field of one record as the local copy holds it now. */
  read(key: string, field: string): Promise<unknown>;
  /** What the engine keeps about a conflict on this record: the other values it holds, if any. */
  conflicts(key: string, field: string): Promise<unknown[]>;
  /** Records in the local copy. */
  count(): Promise<number>;
  close(): Promise<void>;
}

/** One record of a Book with its collection: the unit both engines share. */
export interface BookRecord {
  key: string;
  fields: Record<string, unknown>;
}

/** Every record of the Book, keyed `collection/id` (the settings record as `settings/settings`). */
export function bookRecords(book: Book): BookRecord[] {
  const out: BookRecord[] = [{ key: 'settings/settings', fields: { ...book.settings } }];
  for (const c of COLLECTIONS) {
    for (const r of book[c] as { id: string }[]) out.push({ key: `${c}/${r.id}`, fields: { ...r } });
  }
  return out;
}

export async function engineClient(engine: EngineName, url: string, name: string): Promise<EngineClient> {
  return engine === 'pouchdb' ? (await import('./pouchdb-client.ts')).pouchClient(url, name) : (await import('./yjs-client.ts')).yjsClient(url, name);
}
