// A shared Book: the local Book (its store and BookService stay the one source while working) beside a replica kept
// by the sync engine (PouchDB), replicated with the team's server. Every save of the Book is written to the replica;
// every document that arrives is checked against the Book schema and saved into the Book through the same save path
// as a person's edit, so undo, other tabs and the figures follow. Versions two people made apart are merged field by
// field (domain/share-merge.ts); a field both changed waits for a person, with both values. The engine is loaded
// only here, by dynamic import, so a Book that is not shared never loads it.
import type { Book, CollectionName } from '../domain/book.ts';
import { COLLECTIONS } from '../domain/book.ts';
import { bookDelta } from '../domain/book-ops.ts';
import { sameValue } from '../domain/merge.ts';
import type { BookChange } from '../domain/book-ops.ts';
import { chooseValue, mergeAllVersions, stillOpen } from '../domain/share-merge.ts';
import type { OpenField, SharedVersion } from '../domain/share-merge.ts';
import type { Database, Doc, PouchDBConstructor, Replication } from 'pouchdb-core';
import { MERGES_PREFIX, SETTINGS_DOC_ID, checkRecordDoc, changeForDocs, docsForChange, placeOfDoc, recordDocId } from './shared-docs.ts';
import type { CheckedDoc, DocProblem, MergeDoc, MergeNote, RecordDoc } from './shared-docs.ts';

/** The Book side of the bridge: what BookService offers (its Book, its save path, its change events). */
export interface BookSide extends EventTarget {
  readonly book: Book;
  save(change: BookChange): Promise<{ ok: true; merged?: string } | { ok: false; message: string; conflict: boolean }>;
  /** Moves when the whole Book is replaced (a Book file opened, an empty or demo Book). */
  readonly replacements: number;
  /** Set by the bridge while the person may not change the shared Book (a reader): why, for any save not its own. */
  refuseEdits: ((change: BookChange) => string | undefined) | undefined;
}

export type TeamRole = 'owner' | 'editor' | 'reader';

export interface ShareTarget {
  /** The team server's address, ending in `/`: `http://127.0.0.1:5990/`. */
  server: string;
  /** The shared Book's name on the server. */
  book: string;
  user: string;
  password: string;
}

export type ShareState = 'offline' | 'syncing' | 'synced' | 'stopped';

export interface ShareStatus {
  state: ShareState;
  role: TeamRole | undefined;
  /** Local changes written to the replica and not yet confirmed by the server. */
  waiting: number;
  /** Records with fields both people changed, waiting for a person. */
  conflicts: number;
  /** Shared documents not let into the Book, with their place and why. */
  problems: DocProblem[];
  /** The last refusal or failure from the server, in its words. */
  error?: string;
}

/** One version of a shared record as this copy holds it: who saved it, when, and what it changed. */
export interface RecordVersion {
  docId: string;
  rev: string;
  by: string;
  at: string;
  deleted: boolean;
  record: Record<string, unknown>;
  /** Top-level fields that differ from the version before it held here; undefined for the oldest held. */
  changed: string[] | undefined;
}

/** A field kept for a person to decide, with the record it belongs to. */
export interface OpenConflict {
  docId: string;
  field: OpenField;
  note: MergeNote;
}

export interface ShareBridgeOptions {
  side: BookSide;
  target: ShareTarget;
  /** Name of the replica's own database (one per Book). */
  replicaName: string;
  /** The sync engine with its adapters; loaded on first use when not given (tests pass one with a memory adapter). */
  engine?: PouchDBConstructor;
  /** The replica's adapter, when not the engine's default. */
  adapter?: string;
  /**
   * How the Book here stands to the replica: `new` when the Book is about to be shared or was just emptied to take the
   * shared one in (a replica kept from before is dropped first for `open`); `resume` when sharing picks up again in
   * this browser (after a reload or a restart): what the replica received but the Book did not is taken in, then
   * what changed in the Book while it was not shared is sent.
   */
  start?: 'share' | 'open' | 'resume';
  /** The person's role when already asked of the server (or, offline, as it last answered); else asked here. */
  role?: TeamRole;
  now?: () => Date;
}

/** The sync engine once loaded: its plugins change it for the whole page and refuse to be added twice. */
let shareEngine: Promise<PouchDBConstructor> | undefined;

/** Loads the sync engine for the browser (once): core, IndexedDB replica, the server over HTTP, replication. */
export function loadShareEngine(): Promise<PouchDBConstructor> {
  shareEngine ??= Promise.all([import('pouchdb-core'), import('pouchdb-adapter-idb'), import('pouchdb-adapter-http'), import('pouchdb-replication')]).then(
    ([core, idb, http, replication]) => core.default.plugin(idb.default).plugin(http.default).plugin(replication.default),
  );
  // A failed load (the page went offline before the engine's code was cached) may be tried again.
  shareEngine.catch(() => (shareEngine = undefined));
  return shareEngine;
}

/**
 * Documents taken into the Book in one save at most. Large, because each save of the Book rewrites the store's quote
 * buckets it touches: documents that arrive while a save runs wait and go in together.
 */
const TAKE_IN_BATCH = 10_000;
/** Documents per request to the server: fewer, larger requests replicate a large import about twice as fast. */
const REPLICATION_BATCH = 500;
/** The replica's own note (never replicated) of the last change taken into the Book. */
const TAKEN_DOC = '_local/rungbook-taken';

function basicAuth(t: ShareTarget): string {
  const bytes = new TextEncoder().encode(`${t.user}:${t.password}`);
  return `Basic ${btoa(String.fromCharCode(...bytes))}`;
}

async function serverReason(res: Response): Promise<string> {
  try {
    const body = (await res.json()) as { reason?: unknown };
    if (typeof body.reason === 'string') return body.reason;
  } catch {
    // not JSON: the status says enough
  }
  return `the server answered ${res.status} ${res.statusText}`;
}

/** Asks the team server who it takes the person for. Refuses with the server's reason. */
export async function askRole(t: ShareTarget): Promise<TeamRole> {
  const res = await fetch(`${t.server}_team/me`, { headers: { Authorization: basicAuth(t) } });
  if (!res.ok) throw new Error(`The team server did not accept ${t.user}: ${await serverReason(res)}`);
  const role = ((await res.json()) as { role?: unknown }).role;
  if (role !== 'owner' && role !== 'editor' && role !== 'reader') throw new Error('The team server gave no role for this person.');
  return role;
}

/** Creates the shared Book on the server (an owner's step). */
export async function createSharedBook(t: ShareTarget): Promise<void> {
  const res = await fetch(`${t.server}${encodeURIComponent(t.book)}`, { method: 'PUT', headers: { Authorization: basicAuth(t) } });
  if (!res.ok && res.status !== 412) throw new Error(`The shared Book was not created: ${await serverReason(res)}`);
}

function isMissing(e: unknown): boolean {
  return (e as { status?: number } | null)?.status === 404;
}

/** The revision ids of a revision's history, newest first. */
function history(doc: { _revisions: { start: number; ids: string[] } }): string[] {
  return doc._revisions.ids.map((h, i) => `${doc._revisions.start - i}-${h}`);
}

export class ShareBridge extends EventTarget {
  status: ShareStatus = { state: 'stopped', role: undefined, waiting: 0, conflicts: 0, problems: [] };
  private replica!: Database;
  private remote!: Database;
  private seen: Book;
  private live: Replication | undefined;
  private feed: { cancel(): void } | undefined;
  /** Local work in order: pushes of saves, incoming documents, merges. */
  private work: Promise<unknown> = Promise.resolve();
  private readonly own = new WeakSet<BookChange>();
  private readonly onBook = (ev: Event) => {
    if ((ev as CustomEvent<{ what: string }>).detail?.what === 'book') this.queue(() => this.pushLocal());
  };
  private readonly now: () => Date;
  private readonly replacements: number;
  private readonly onNetworkFailure = (e: PromiseRejectionEvent): void => {
    const r = e.reason as unknown;
    if (this.live && r instanceof TypeError && /fetch|network|load failed/i.test(r.message)) e.preventDefault();
  };
  /** Documents the replica received that wait to be taken into the Book, and the newest change among them. */
  private readonly arriving = new Set<string>();
  private arrivedSeq: number | string | undefined;
  private takeInQueued = false;
  private closed = false;

  private constructor(private readonly o: ShareBridgeOptions) {
    super();
    this.seen = o.side.book;
    this.replacements = o.side.replacements;
    this.now = o.now ?? (() => new Date());
  }

  /** Opens the replica beside the Book and asks the server for the person's role; nothing replicates yet. */
  static async open(o: ShareBridgeOptions): Promise<ShareBridge> {
    const bridge = new ShareBridge(o);
    const Engine = o.engine ?? (await loadShareEngine());
    const local = o.adapter ? { adapter: o.adapter } : {};
    // Opening the shared Book afresh: a replica left from an earlier sharing here holds nothing the Book still has.
    if (o.start === 'open') await new Engine(o.replicaName, local).destroy();
    bridge.replica = new Engine(o.replicaName, local);
    bridge.remote = new Engine(`${o.target.server}${encodeURIComponent(o.target.book)}`, {
      auth: { username: o.target.user, password: o.target.password },
      skip_setup: true,
    });
    bridge.status.role = o.role ?? (await askRole(o.target));
    if (bridge.status.role === 'reader') {
      const message = `${o.target.user} is a reader of this shared Book: readers may read and export it but not change it. Nothing was saved.`;
      o.side.refuseEdits = (change) => (bridge.own.has(change) ? undefined : message);
    }
    o.side.addEventListener('change', bridge.onBook);
    bridge.feed = bridge.replica.changes({ since: 'now', live: true }).on('change', (c) => bridge.arrived(c.id, c.seq));
    return bridge;
  }

  get who(): string {
    return this.o.target.user;
  }

  /** Writes the whole Book into the replica (sharing a Book for the first time). */
  shareWholeBook(): Promise<void> {
    return this.queue(async () => {
      const empty = { ...this.seen };
      for (const c of COLLECTIONS) (empty as Record<CollectionName, unknown[]>)[c] = [];
      this.seen = { ...empty, settings: { ...this.seen.settings, rev: -1 } };
      await this.pushLocal();
    });
  }

  /** Replicates with the server, both ways (pull only for a reader), and keeps at it until `stop()`. */
  start(): void {
    if (this.live || this.closed) return;
    // Picking up an earlier sharing here: the replica and the Book are brought level before replicating.
    if (this.o.start === 'resume') void this.queue(() => this.catchUp());
    const opts = { live: true, retry: true, batch_size: REPLICATION_BATCH };
    const rep = this.status.role === 'reader' ? this.replica.replicate.from(this.remote, opts) : this.replica.sync(this.remote, opts);
    this.live = rep;
    this.setState('syncing');
    // Each direction says for itself when the server cannot be reached (replication both ways pauses without the
    // reason), and only a push that paused with nothing failing has sent what was waiting.
    const directions = rep.push && rep.pull ? { push: rep.push, pull: rep.pull } : { pull: rep };
    /** Each direction: at work, paused with everything done, or paused because a request failed (why). */
    const where = new Map<string, 'active' | 'paused' | { failed: string }>(Object.keys(directions).map((n) => [n, 'active']));
    const settle = (): void => {
      if (this.live !== rep) return;
      const states = [...where.values()];
      const failed = states.find((x): x is { failed: string } => typeof x === 'object');
      if (failed) this.setState('offline', failed.failed);
      else this.setState(states.every((x) => x === 'paused') ? 'synced' : 'syncing');
    };
    for (const [name, r] of Object.entries(directions)) {
      r.on('paused', (err: unknown) => {
        where.set(name, err ? { failed: describe(err) } : 'paused');
        if (!err && name === 'push') this.status.waiting = 0;
        settle();
        // Caught up: the conflicts are counted afresh (a merged record that arrived as the very revision this copy
        // wrote changes nothing here, so nothing else would count them again).
        if (!err) void this.queue(() => this.countConflicts());
      });
      r.on('active', () => {
        where.set(name, 'active');
        settle();
      });
    }
    // The sync engine's retries leave a request that failed for want of a network unhandled: that is the offline
    // state shown above, not a fault of the page.
    globalThis.addEventListener?.('unhandledrejection', this.onNetworkFailure);
    rep.on('denied', (err: unknown) => this.setState(this.status.state, describe(err)));
    rep.on('error', (err: unknown) => this.setState('offline', describe(err)));
  }

  /** Stops replicating (offline on purpose); local edits go on into the Book and the replica. */
  stop(): void {
    globalThis.removeEventListener?.('unhandledrejection', this.onNetworkFailure);
    this.live?.cancel();
    this.live = undefined;
    this.setState('offline');
  }

  /** Resolves when everything queued so far (pushes, incoming documents, merges) is done. */
  settled(): Promise<unknown> {
    return this.queue(async () => undefined);
  }

  /**
   * The versions of one shared record this copy holds, newest first (older versions are held from when this copy
   * saw them; a version it never saw is left out): who saved each, when, and which fields it changed.
   */
  async recordHistory(docId: string, limit = 20): Promise<RecordVersion[]> {
    const rev = (await this.replica.allDocs({ keys: [docId] })).rows[0]?.value?.rev;
    if (!rev) return [];
    const leaf = await this.replica.get<RecordDoc>(docId, { rev, revs: true });
    const held: RecordDoc[] = [];
    for (const r of history(leaf as unknown as { _revisions: { start: number; ids: string[] } }).slice(0, limit + 1)) {
      const doc = r === rev ? leaf : await this.replica.get<RecordDoc>(docId, { rev: r }).catch((e: unknown) => (isMissing(e) ? undefined : Promise.reject(e)));
      if (doc) held.push(doc);
    }
    return held.slice(0, limit).map((d, i) => {
      const before = held[i + 1];
      const record = d._deleted ? (before?.record ?? {}) : d.record;
      const changed = d._deleted ? ['deleted'] : before ? changedFields(before._deleted ? {} : before.record, d.record) : undefined;
      return { docId, rev: d._rev!, by: d.by, at: d.at, deleted: d._deleted === true, record, changed };
    });
  }

  /** The records changed last in the shared Book, newest first, each as its newest version. */
  async recentChanges(limit = 25): Promise<RecordVersion[]> {
    const feed = await this.replica.changes({ descending: true, limit: limit * 2 });
    const out: RecordVersion[] = [];
    for (const c of feed.results) {
      if (out.length >= limit) break;
      if (!placeOfDoc(c.id)) continue;
      const [newest] = await this.recordHistory(c.id, 1);
      if (newest) out.push(newest);
    }
    return out.sort((a, b) => (a.at < b.at ? 1 : a.at > b.at ? -1 : 0));
  }

  /** Fields kept for a person to decide, across the shared Book. */
  async openConflicts(): Promise<OpenConflict[]> {
    // The merge notes only: their ids share a prefix, so they are read as one range of ids.
    const all = await this.replica.allDocs({ include_docs: true, startkey: MERGES_PREFIX, endkey: `${MERGES_PREFIX}\uffff` });
    const out: OpenConflict[] = [];
    const listed = new Set<string>();
    for (const row of all.rows) {
      if (!row.id.startsWith(MERGES_PREFIX) || !row.doc) continue;
      const m = row.doc as unknown as MergeDoc;
      const record = await this.replica.get<RecordDoc>(m.about).catch(() => undefined);
      if (!record) continue;
      for (const note of m.notes) {
        if (note.decided) continue;
        for (const field of note.open) {
          const key = `${m.about}\u0000${JSON.stringify(field.path)}`;
          if (!stillOpen(record.record, field) || listed.has(key)) continue;
          listed.add(key);
          out.push({ docId: m.about, field, note });
        }
      }
    }
    return out;
  }

  /** A person's choice for an open field: saved into the Book (and so shared), the note marked decided. */
  async choose(conflict: OpenConflict, value: unknown): Promise<{ ok: true } | { ok: false; message: string }> {
    const place = placeOfDoc(conflict.docId);
    const doc = await this.replica.get<RecordDoc>(conflict.docId);
    const checked = checkRecordDoc({ ...doc, record: chooseValue(doc.record, conflict.field, value) });
    if (!checked.ok || !place) return { ok: false, message: `That value does not fit the record: ${checked.ok ? 'unknown place' : checked.problems.map((p) => `${p.place}: ${p.message}`).join('; ')}` };
    const change = changeForDocs(this.o.side.book, [{ deleted: false, checked }]);
    if (change) {
      const saved = await this.o.side.save(change);
      if (!saved.ok) return { ok: false, message: saved.message };
    }
    await this.queue(async () => {
      const m = await this.replica.get<MergeDoc>(`${MERGES_PREFIX}${conflict.docId}`);
      const at = this.now().toISOString();
      // Two copies may have noted the same field: the choice decides it in every note.
      const same = JSON.stringify(conflict.field.path);
      const notes = m.notes.map((n) => (!n.decided && n.open.some((f) => JSON.stringify(f.path) === same) ? { ...n, decided: { by: this.who, at } } : n));
      await this.replica.bulkDocs([{ ...m, notes } as unknown as Doc]);
    });
    await this.countConflicts();
    return { ok: true };
  }

  close(): void {
    this.closed = true;
    this.stop();
    this.feed?.cancel();
    this.o.side.removeEventListener('change', this.onBook);
    this.o.side.refuseEdits = undefined;
    this.setState('stopped');
  }

  private queue<T>(step: () => Promise<T>): Promise<T> {
    const run = this.work.then(step);
    this.work = run.catch((e: unknown) => this.setState(this.status.state, describe(e)));
    return run;
  }

  private setState(state: ShareState, error?: string): void {
    const { error: _old, ...rest } = this.status;
    this.status = { ...rest, state, ...(error ? { error } : {}) };
    this.dispatchEvent(new CustomEvent('change'));
  }

  /** Writes to the replica what changed in the Book since last seen (saves here, in another tab, or taken in). */
  private async pushLocal(): Promise<void> {
    if (this.closed) return;
    if (this.o.side.replacements !== this.replacements) {
      // A whole other Book here is not an edit of the shared one: it is not sent, and sharing stops in this tab.
      this.close();
      this.setState('stopped', 'This browser\'s Book was replaced (a Book file opened, or an empty or demo Book), so sharing stopped here and nothing of it was sent. The shared Book on the server is as it was; open it again from the Team page.');
      return;
    }
    const next = this.o.side.book;
    const delta = bookDelta(this.seen, next);
    this.seen = next;
    if (this.status.role === 'reader') return;
    const puts: { collection: CollectionName | 'settings'; record: { id?: string; rev: number } }[] = [];
    const deletes: { collection: CollectionName; id: string }[] = [];
    for (const c of COLLECTIONS) {
      const d = delta.collections[c];
      if (!d) continue;
      const list = ('all' in d ? d.all : d.put) as { id: string; rev: number }[];
      for (const record of list) puts.push({ collection: c, record });
      if (!('all' in d)) for (const id of d.delete) deletes.push({ collection: c, id });
    }
    if (delta.settings) puts.push({ collection: 'settings', record: delta.settings });
    if (puts.length === 0 && deletes.length === 0) return;
    const ids = [...puts.map((p) => (p.collection === 'settings' ? 'settings' : `${p.collection}/${(p.record as { id: string }).id}`)), ...deletes.map((d) => `${d.collection}/${d.id}`)];
    const held = new Map<string, RecordDoc>();
    const rows = await this.replica.allDocs({ keys: ids, include_docs: true });
    for (const row of rows.rows) if (row.doc) held.set(row.id, row.doc as unknown as RecordDoc);
    const docs = docsForChange(puts, deletes, held, this.who, this.now().toISOString());
    if (docs.length === 0) return;
    const results = await this.replica.bulkDocs(docs as unknown as Doc[]);
    this.status.waiting += results.filter((r) => 'ok' in r).length;
    this.dispatchEvent(new CustomEvent('change'));
  }

  /**
   * Brings the Book and a replica kept from an earlier sharing level: documents the replica received after the last
   * one taken in reach the Book first (the page closed in between); then every record the Book holds otherwise than
   * the replica (changed while not shared: offline, or before the password was given again) is sent, and a record
   * the Book no longer holds is deleted in the shared copy.
   */
  private async catchUp(): Promise<void> {
    const since = (await this.replica.get<{ seq: number | string }>(TAKEN_DOC).catch((e: unknown) => (isMissing(e) ? undefined : Promise.reject(e))))?.seq ?? 0;
    const missed = await this.replica.changes({ since });
    const ids = [...new Set(missed.results.map((r) => r.id))];
    for (let i = 0; i < ids.length; i += TAKE_IN_BATCH) await this.takeIn(ids.slice(i, i + TAKE_IN_BATCH));
    await this.noteTaken(missed.last_seq);
    if (this.status.role === 'reader' || this.closed) return;
    const book = this.o.side.book;
    this.seen = book;
    const puts: { collection: CollectionName | 'settings'; record: { id?: string; rev: number } }[] = [{ collection: 'settings', record: book.settings }];
    const inBook = new Set<string>([SETTINGS_DOC_ID]);
    for (const c of COLLECTIONS) {
      for (const record of book[c] as readonly { id: string; rev: number }[]) {
        puts.push({ collection: c, record });
        inBook.add(recordDocId(c, record.id));
      }
    }
    const held = new Map<string, RecordDoc>();
    const deletes: { collection: CollectionName; id: string }[] = [];
    for (const row of (await this.replica.allDocs({ include_docs: true })).rows) {
      const place = placeOfDoc(row.id);
      if (!place || !row.doc) continue;
      held.set(row.id, row.doc as unknown as RecordDoc);
      if (!inBook.has(row.id) && place.collection !== 'settings') deletes.push({ collection: place.collection, id: place.id });
    }
    const docs = docsForChange(puts, deletes, held, this.who, this.now().toISOString());
    if (docs.length === 0) return;
    const results = await this.replica.bulkDocs(docs as unknown as Doc[]);
    this.status.waiting += results.filter((r) => 'ok' in r).length;
    this.dispatchEvent(new CustomEvent('change'));
  }

  /** Notes in the replica (locally only) the last change taken into the Book. */
  private async noteTaken(seq: number | string): Promise<void> {
    const before = await this.replica.get<{ seq: number | string }>(TAKEN_DOC).catch((e: unknown) => (isMissing(e) ? undefined : Promise.reject(e)));
    if (before?.seq === seq) return;
    await this.replica.put({ _id: TAKEN_DOC, ...(before?._rev ? { _rev: before._rev } : {}), seq });
  }

  /** A document changed in the replica: taken in with every other that arrives before the Book is free for it. */
  private arrived(id: string, seq: number | string): void {
    this.arriving.add(id);
    this.arrivedSeq = seq;
    if (this.takeInQueued) return;
    this.takeInQueued = true;
    void this.queue(async () => {
      this.takeInQueued = false;
      const ids = [...this.arriving];
      const seqTaken = this.arrivedSeq;
      this.arriving.clear();
      for (let i = 0; i < ids.length; i += TAKE_IN_BATCH) await this.takeIn(ids.slice(i, i + TAKE_IN_BATCH));
      // Noted only once the Book holds them: a page closed before this takes them in again when sharing resumes.
      if (seqTaken !== undefined && !this.closed) await this.noteTaken(seqTaken);
    });
  }

  /** Takes documents that changed in the replica into the Book: merged first when they hold conflicting versions. */
  private async takeIn(ids: readonly string[]): Promise<void> {
    if (this.closed) return;
    const rows = await this.replica.allDocs({ keys: [...ids], include_docs: true, conflicts: true });
    const incoming: ({ deleted: false; checked: Extract<CheckedDoc, { ok: true }> } | { deleted: true; docId: string })[] = [];
    let merges = false;
    for (const row of rows.rows) {
      if (row.id.startsWith(MERGES_PREFIX)) {
        merges = true;
        if (row.doc?._conflicts?.length) await this.mergeNotes(row.id);
        continue;
      }
      if (!placeOfDoc(row.id)) continue;
      if (row.value?.deleted) {
        incoming.push({ deleted: true, docId: row.id });
        continue;
      }
      if (!row.doc) continue;
      if (row.doc._conflicts?.length) {
        await this.mergeVersions(row.id);
        continue; // the merged version arrives as a change of its own
      }
      const checked = checkRecordDoc(row.doc);
      this.status.problems = this.status.problems.filter((p) => !p.place.startsWith(`${row.id} `) && p.place !== row.id);
      if (!checked.ok) {
        this.status.problems.push(...checked.problems);
        this.dispatchEvent(new CustomEvent('change'));
        continue;
      }
      incoming.push({ deleted: false, checked });
    }
    if (merges) await this.countConflicts();
    const change = changeForDocs(this.o.side.book, incoming);
    if (!change) return;
    this.own.add(change);
    const saved = await this.o.side.save(change);
    if (!saved.ok) {
      // A person's save landed in between: take the documents in again from the Book as it is now.
      const retry = changeForDocs(this.o.side.book, incoming);
      if (retry) {
        this.own.add(retry);
        const again = await this.o.side.save(retry);
        if (!again.ok) this.setState(this.status.state, again.message);
      }
    }
  }

  /** Merges the conflicting versions of a record against the version each shares with the kept one. */
  private async mergeVersions(id: string): Promise<void> {
    const kept = await this.replica.get<RecordDoc>(id, { conflicts: true, revs: true });
    const others = kept._conflicts ?? [];
    if (others.length === 0) return;
    const leaves = await this.replica.get<RecordDoc>(id, { open_revs: others, revs: true });
    const keptHistory = new Set(history(kept as unknown as { _revisions: { start: number; ids: string[] } }));
    const versions: { version: SharedVersion; base: Record<string, unknown> | undefined; rev: string }[] = [];
    const bad: DocProblem[] = [];
    for (const leaf of leaves) {
      const doc = leaf.ok;
      if (!doc || doc._deleted) continue;
      const checked = checkRecordDoc(doc);
      if (!checked.ok) bad.push(...checked.problems);
      const common = history(doc).find((r) => keptHistory.has(r));
      const baseDoc = common ? await this.replica.get<RecordDoc>(id, { rev: common }).catch((e: unknown) => (isMissing(e) ? undefined : Promise.reject(e))) : undefined;
      versions.push({ version: { record: doc.record, by: doc.by, at: doc.at, rev: doc._rev! }, base: baseDoc?.record, rev: doc._rev! });
    }
    if (bad.length) {
      // A version that does not read as a record is not merged into the Book: it stays in the shared copy, named.
      this.status.problems.push(...bad);
      this.dispatchEvent(new CustomEvent('change'));
    }
    const merged = mergeAllVersions({ record: kept.record, by: kept.by, at: kept.at, rev: kept._rev! }, versions);
    const at = this.now().toISOString();
    const noteId = `${MERGES_PREFIX}${id}`;
    const note = await this.replica.get<MergeDoc>(noteId).catch((e: unknown) => (isMissing(e) ? undefined : Promise.reject(e)));
    // The merged version is written alike by every copy that merges these versions (signed with the newest of them,
    // not with who merged or when), so copies merging at once write the very same revision instead of a new conflict.
    const newest = [{ by: kept.by, at: kept.at }, ...versions.map((v) => v.version)].reduce((a, b) => (b.at > a.at || (b.at === a.at && b.by > a.by) ? b : a));
    const docs: Doc[] = [
      { _id: id, _rev: kept._rev!, record: merged.record, by: newest.by, at: newest.at, bookVersion: kept.bookVersion },
      ...leaves.filter((l) => l.ok && !l.ok._deleted).map((l) => ({ _id: id, _rev: l.ok!._rev!, _deleted: true })),
    ];
    if (merged.taken.length || merged.open.length) {
      const entry: MergeNote = { at, by: this.who, taken: merged.taken, open: merged.open };
      docs.push({ _id: noteId, ...(note ? { _rev: note._rev! } : {}), about: id, notes: [...(note?.notes ?? []), entry] });
    }
    await this.replica.bulkDocs(docs);
  }

  /** Two copies noted merges of one record at once: every note of each kept, once. */
  private async mergeNotes(id: string): Promise<void> {
    const { _conflicts: others, ...kept } = await this.replica.get<MergeDoc>(id, { conflicts: true });
    const leaves = await this.replica.get<MergeDoc>(id, { open_revs: others ?? [] });
    const notes = [...kept.notes];
    const key = (n: MergeNote) => JSON.stringify([n.at, n.by, n.taken, n.open]);
    const have = new Set(notes.map(key));
    for (const l of leaves) {
      for (const n of l.ok?.notes ?? []) {
        if (have.has(key(n))) continue;
        have.add(key(n));
        notes.push(n);
      }
    }
    await this.replica.bulkDocs([
      { ...kept, notes } as unknown as Doc,
      ...leaves.filter((l) => l.ok && !l.ok._deleted).map((l) => ({ _id: id, _rev: l.ok!._rev!, _deleted: true })),
    ]);
  }

  private async countConflicts(): Promise<void> {
    this.status.conflicts = new Set((await this.openConflicts()).map((c) => c.docId)).size;
    this.dispatchEvent(new CustomEvent('change'));
  }
}

/** Top-level fields two versions of a record hold differently, in the newer version's order. */
function changedFields(before: Record<string, unknown>, after: Record<string, unknown>): string[] {
  const keys = [...new Set([...Object.keys(after), ...Object.keys(before)])];
  return keys.filter((k) => !sameValue(before[k], after[k]));
}

function describe(e: unknown): string {
  const x = e as { reason?: unknown; message?: unknown; status?: unknown } | null;
  if (typeof x?.reason === 'string') return x.reason;
  if (typeof x?.message === 'string') return x.message;
  return String(e);
}
