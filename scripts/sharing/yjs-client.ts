// Yjs side of the sharing measurement: one Y.Doc per Book, a Y.Map per collection holding a Y.Map per record, so
// two people's changes to different fields of one record both survive; synced through a Hocuspocus provider.
import { HocuspocusProvider } from '@hocuspocus/provider';
import WebSocket from 'ws';
import * as Y from 'yjs';
import { COLLECTIONS } from '../../src/domain/book.ts';
import type { Book } from '../../src/domain/book.ts';
import { bookRecords } from './engines.ts';
import type { EngineClient } from './engines.ts';

/** The Book's top-level maps: the settings record and one per collection. */
const MAPS = ['settings', ...COLLECTIONS];

function split(key: string): [string, string] {
  const i = key.indexOf('/');
  return [key.slice(0, i), key.slice(i + 1)];
}

export function yjsClient(url: string, _name: string): EngineClient {
  const doc = new Y.Doc();
  let provider: HocuspocusProvider | null = null;
  const observers: (() => void)[] = [];

  const connect = async (): Promise<HocuspocusProvider> => {
    const p = new HocuspocusProvider({ url, name: 'book', document: doc, WebSocketPolyfill: WebSocket });
    await new Promise<void>((resolve) => p.on('synced', () => resolve()));
    // Synced means the server's state arrived; wait too until the server has acknowledged every local change.
    while (p.unsyncedChanges > 0) await new Promise((r) => setTimeout(r, 5));
    return p;
  };
  const disconnect = (): void => {
    provider?.destroy();
    provider = null;
  };

  return {
    async load(book: Book) {
      doc.transact(() => {
        for (const r of bookRecords(book)) {
          const [c, id] = split(r.key);
          doc.getMap<Y.Map<unknown>>(c).set(id, new Y.Map(Object.entries(r.fields)));
        }
      });
    },
    // The first sync keeps its connection open for live work: a new connection costs the server a full
    // comparison of the document (its state vector against the whole Book) again.
    async share() {
      provider = await connect();
    },
    async firstSync() {
      provider = await connect();
    },
    async syncOnce() {
      const p = provider ?? (await connect());
      if (p !== provider) p.destroy();
    },
    async goLive(onChange) {
      provider ??= await connect();
      for (const c of MAPS) {
        const type = doc.getMap(c);
        // A change inside a record's map reaches the collection's deep observer with the record id as its path.
        const observe = (events: Y.YEvent<Y.AbstractType<unknown>>[], tx: Y.Transaction): void => {
          if (tx.local) return;
          for (const e of events) if (e.path.length === 1) onChange(`${c}/${String(e.path[0])}`);
        };
        type.observeDeep(observe);
        observers.push(() => type.unobserveDeep(observe));
      }
    },
    async goOffline() {
      for (const stop of observers.splice(0)) stop();
      disconnect();
    },
    async edit(key, field, value) {
      const [c, id] = split(key);
      doc.getMap<Y.Map<unknown>>(c).get(id)!.set(field, value);
    },
    async read(key, field) {
      const [c, id] = split(key);
      return doc.getMap<Y.Map<unknown>>(c).get(id)?.get(field);
    },
    async conflicts() {
      // Concurrent sets of one map key keep one value (the higher client id wins); the other is deleted and
      // garbage-collected, with no API to read it back.
      return [];
    },
    async count() {
      let n = 0;
      for (const c of MAPS) n += doc.getMap(c).size;
      return n;
    },
    async close() {
      await this.goOffline();
      doc.destroy();
    },
  };
}
