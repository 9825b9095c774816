// PouchDB side of the sharing measurement: a local copy in memory replicating with a CouchDB-compatible server.
// Each Book record is one document, `_id` = "collection/id"; PouchDB keeps its own `_rev` beside the Book's `rev`.
import PouchDB from 'pouchdb-core';
import httpAdapter from 'pouchdb-adapter-http';
import memoryAdapter from 'pouchdb-adapter-memory';
import replication from 'pouchdb-replication';
import type { Book } from '../../src/domain/book.ts';
import { bookRecords } from './engines.ts';
import type { EngineClient } from './engines.ts';

PouchDB.plugin(httpAdapter).plugin(memoryAdapter).plugin(replication);

/**
 * Documents per replication request: PouchDB's default is 100; 1,000 suits a Book of many small records. The
 * variable SHARING_BATCH_SIZE tries another.
 */
export const BATCH_SIZE = Number(process.env['SHARING_BATCH_SIZE'] ?? 1000);

interface Doc {
  _id: string;
  _rev?: string;
  _conflicts?: string[];
  [field: string]: unknown;
}

export function pouchClient(url: string, name: string): EngineClient {
  const local = new PouchDB(`book-${name}`, { adapter: 'memory' });
  const remote = new PouchDB(url);
  let live: ReturnType<typeof local.sync> | null = null;
  // Where each direction has got to (a sequence of the side it reads from). The app would keep these in the
  // replication checkpoints; the measurement passes them as `since` so each step starts where the last one ended.
  let pushedTo: number | string = 0;
  let pulledTo: number | string = 0;
  const push = async (): Promise<void> => {
    pushedTo = (await local.replicate.to(remote, { since: pushedTo, batch_size: BATCH_SIZE })).last_seq;
  };
  const pull = async (): Promise<void> => {
    pulledTo = (await local.replicate.from(remote, { since: pulledTo, batch_size: BATCH_SIZE })).last_seq;
  };
  return {
    async load(book: Book) {
      const docs = bookRecords(book).map((r) => ({ _id: r.key, ...r.fields }));
      for (let i = 0; i < docs.length; i += 5000) await local.bulkDocs(docs.slice(i, i + 5000));
    },
    async share() {
      await push();
      // The shared Book was new and empty: all it holds came from this copy, so there is nothing to pull back.
      pulledTo = (await remote.info()).update_seq;
    },
    async firstSync() {
      await pull();
      // Everything this copy holds came from the server: there is nothing to push back.
      pushedTo = (await local.info()).update_seq;
    },
    async syncOnce() {
      await push();
      await pull();
    },
    async goLive(onChange) {
      const sync = local.sync(remote, { live: true, retry: true, batch_size: BATCH_SIZE, push: { since: pushedTo }, pull: { since: pulledTo } });
      live = sync;
      sync.on('change', (info: { direction: string; change: { docs: Doc[]; last_seq: number | string } }) => {
        if (info.direction === 'pull') {
          pulledTo = info.change.last_seq;
          for (const d of info.change.docs) onChange(d._id);
        } else {
          pushedTo = info.change.last_seq;
        }
      });
      await new Promise<void>((resolve) => sync.once('paused', () => resolve()));
    },
    async goOffline() {
      if (!live) return;
      const done = new Promise<void>((resolve) => live!.once('complete', () => resolve()));
      live.cancel();
      await done;
      live = null;
    },
    async edit(key, field, value) {
      const doc = (await local.get(key)) as Doc;
      await local.put({ ...doc, [field]: value });
    },
    async read(key, field) {
      return ((await local.get(key)) as Doc)[field];
    },
    async conflicts(key, field) {
      const doc = (await local.get(key, { conflicts: true })) as Doc;
      const out: unknown[] = [];
      for (const rev of doc._conflicts ?? []) out.push({ rev, [field]: ((await local.get(key, { rev })) as Doc)[field] });
      return out;
    },
    async count() {
      return (await local.info()).doc_count;
    },
    async close() {
      await this.goOffline();
      await local.destroy();
    },
  };
}
