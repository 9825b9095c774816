// The open Book for the app: opens the IndexedDB Book, keeps it in memory, writes every change through the store
// and reports save state, storage use, conflicts, schema upgrades in other tabs and edits made in other tabs.
import type { Book, CollectionName } from '../domain/book.ts';
import { COLLECTIONS, defaultSettings, emptyBook } from '../domain/book.ts';
import { applyChange, applyChangeSteps, recordIdsOf, recordIdsSteps, revisionMatches, withStoredRecordsSteps } from '../domain/book-ops.ts';
import type { RecordIds, StoredRecords } from '../domain/book-ops.ts';
import { ITEMS_PER_LOOK, nextTask, runInSlices } from '../domain/slices.ts';
import type { Sliced } from '../domain/slices.ts';
import { demoBook } from '../domain/demo-book.ts';
import { mergeRecord } from '../domain/merge.ts';
import { inVariantOrder } from '../domain/variant-order.ts';
import type { FieldConflict, FieldPath } from '../domain/merge.ts';
import { columnLetters } from '../engine/cells.ts';
import { parseBookFile } from '../io/book-file.ts';
import type { BookFileResult } from '../io/book-file.ts';
import { asStored, openBookStore } from '../store/idb-store.ts';
import { requestPersistence, storageEstimate } from '../store/storage.ts';
import type { BookChange, BookStore, StorageEstimate } from '../store/types.ts';
import { RevisionConflict, StorageFull, StoredRecordsInvalid, StoreWriteFailed } from '../store/types.ts';
import { withBuiltInChecks } from './check-sheets.ts';
import { forgetShare } from './share-session.ts';

export const SAVE_STATES = {
  saved: 'saved',
  saving: 'saving',
  failed: 'failed',
} as const;
export type SaveState = (typeof SAVE_STATES)[keyof typeof SAVE_STATES];

export interface SaveStatus {
  state: SaveState;
  /** Why the last write failed, in words a user can act on. */
  reason?: string;
  /** The last write was refused because a record was saved elsewhere first. */
  conflict?: boolean;
  /** When the Book was last written successfully. */
  at?: Date;
  /** A save was merged with a change made in another tab: what was kept from each side, until dismissed. */
  merged?: string;
}

/** `merged` says what a save kept from another tab's change to the same record, when it had to merge. */
export type SaveResult = { ok: true; merged?: string } | { ok: false; message: string; conflict: boolean };

/**
 * A save refused because the user and another tab changed the same field of a record; the message names each field
 * and both values.
 */
export class EditConflict extends RevisionConflict {
  constructor(collection: CollectionName | 'settings', recordId: string, storedRev: number, givenRev: number, message: string) {
    super(collection, recordId, storedRev, givenRev);
    this.message = message;
    this.name = 'EditConflict';
  }
}

/** How many earlier versions of records a tab remembers, to merge an edit made from one of them. */
const REMEMBERED_VERSIONS = 2000;
/** Tries of a merged save before it is refused (each try follows another tab's newer write). */
const MERGE_TRIES = 4;

/** Records a save may put or delete and still be applied ahead in memory while it is written (see `proposed`). */
const PROPOSE_MAX = 200;

/**
 * Records a change may name before the work that copies their ids (taking the saved change in, the message telling
 * other tabs) goes in a task of its own.
 */
const TELL_LATER = 10_000;

/** Whether a change names more records than TELL_LATER. */
function namesMany(records: RecordIds | undefined): boolean {
  return Object.values(records?.collections ?? {}).reduce((sum, ids) => sum + ids.length, 0) > TELL_LATER;
}

type AnyRecord = { id: string; rev: number } & Record<string, unknown>;

/** Why the service stopped accepting writes until the tab reloads. */
export const BLOCKED = {
  upgrade: 'upgrade',
} as const;
export type Blocked = (typeof BLOCKED)[keyof typeof BLOCKED];

export type ServiceEventDetail = { what: 'book' | 'status' | 'storage' | 'blocked' };

export const DEFAULT_DB_NAME = 'rungbook';

/**
 * Broadcast between tabs on one Book after a write. For `changed` the receiver reads back and checks only the records
 * named; `replaced` (the whole Book replaced: empty Book, demo Book, opened file) is the one message that makes it read
 * and check the whole Book.
 */
interface TabMessage {
  kind: 'changed' | 'replaced';
  from: string;
  /** With `changed`: the records the change saved or deleted. */
  records?: RecordIds;
}

export interface OpenOptions {
  /** On a first start: show the demo Book at once and write it once this settles (the app passes its first view). */
  writeStarterAfter?: Promise<unknown>;
  /** A guess that this is a first start, for making the demo Book while the database opens (see startFigures). */
  starterLikely?: Promise<boolean> | undefined;
}

/** What one queued write did: a merge notice, and the records to name to other tabs. */
type WriteDone = { merged?: string; records?: RecordIds };

export class BookService extends EventTarget {
  private held!: Book;
  /** The open Book, its variants always in the one variant order, so every page lists them alike. */
  get book(): Book {
    return this.held;
  }
  private set book(next: Book) {
    this.held = inVariantOrder(next);
  }
  status: SaveStatus = { state: SAVE_STATES.saved };
  /** This opening found no Book and holds the demo Book (written, or to be written: see `storeStarter`): a first start. */
  startedFresh = false;
  /** Why this tab saves nothing: the demo Book of its first start could not be stored (see `storeStarter`). */
  unstored: string | undefined;
  storage: StorageEstimate | undefined;
  blocked: Blocked | undefined;
  /**
   * Changes saved from this tab since the last Book file was downloaded here (or since the tab opened). Kept in
   * memory only: writing a counter into the settings on every save would make every edit in two tabs collide.
   */
  editsSinceExport = 0;
  /**
   * How many times this tab replaced the whole Book (empty Book, demo Book, opened file). Pages keep undo steps and
   * open forms of records; when this moves, those belong to a Book that is gone.
   */
  replacements = 0;
  /**
   * The run last opened on the Runs page in this tab, so the Export page starts on the run just worked on. Kept in
   * memory for the session only; it names a run of the Book, which may be gone since (pages check).
   */
  openedRunId: string | undefined;
  /** Set when the last reload came from another tab's edit, so the shell can say so. */
  lastRemoteChange: Date | undefined;
  /**
   * Why an edit saved in another tab was not taken in (one of its records does not read as a Book record), with the
   * record's place; this tab kept the Book as it was. Cleared when the whole Book is read again.
   */
  remoteRefused: string | undefined;
  /**
   * Set while this person may not change the Book (a reader of a shared Book): why, for a save to refuse before
   * anything is written. Undefined for a Book that is not shared.
   */
  refuseEdits: ((change: BookChange) => string | undefined) | undefined;
  /**
   * While a small save is being written: the Book as it will read once the store has the change (applied ahead in
   * memory), announced by a `proposed` event, so the figures worker can start on it meanwhile. Pages read `book`, which
   * moves only when the store has accepted the change and stays as it was when it refused; undefined otherwise.
   */
  proposed: Book | undefined;

  private readonly tabId = Math.random().toString(36).slice(2);
  private channel: BroadcastChannel | undefined;
  private writes: Promise<unknown> = Promise.resolve();
  private inFlight = 0;
  /**
   * Records as this tab held them before they were replaced, by collection, id and revision: what a person may have
   * seen and edited. A save from one of them that finds the record stored at a newer revision is merged from it.
   */
  private readonly earlier = new Map<string, AnyRecord>();
  /** Record revisions this tab wrote itself, so merging over its own earlier saves needs no notice. */
  private readonly ownRevisions = new Set<string>();

  private constructor(
    private store: BookStore,
    book: Book,
  ) {
    super();
    this.book = book;
  }

  /**
   * Opens (or creates) the Book database. On the very first start the demo Book is loaded, with the built-in
   * checks from sheets/ when they are available: written before the service is given, or, with `writeStarterAfter`,
   * shown at once and written once that promise settles (see `storeStarter`).
   */
  static async open(dbName: string = DEFAULT_DB_NAME, options: OpenOptions = {}): Promise<BookService> {
    let service: BookService | undefined;
    const opening = openBookStore(dbName, {
      onVersionChange: () => service?.onVersionChange(),
    });
    // On a likely first start the demo Book is made while the database is being opened, a wait with the page idle;
    // not once the Book has been read (then it is made at once where needed, and the guess no longer matters).
    let read = false;
    let made: Book | undefined;
    // A demo Book that fails to be made here is made again below, where its failure is reported.
    void options.starterLikely
      ?.then((likely) => {
        if (likely && !read) made = starterBook();
      })
      .catch(() => undefined);
    const store = await opening;
    let book = await store.load();
    read = true;
    const fresh = isFirstStart(book);
    const starter = fresh ? (made ?? starterBook()) : undefined;
    // The Book as the store holds it once written, without reading and checking it all back.
    if (starter) book = options.writeStarterAfter ? asStored(starter) : await store.replaceAll(starter);
    service = new BookService(store, book);
    service.startedFresh = fresh;
    if (starter && options.writeStarterAfter) service.storeStarter(starter, options.writeStarterAfter);
    service.listenToOtherTabs();
    void service.askForPersistence();
    return service;
  }

  /**
   * Writes the demo Book of a first start once `after` settles, ahead of every save (they queue behind it). The app
   * shows the demo Book first: writing it took the first view 80–180 ms on a 2-core machine. When the store holds a
   * Book by then (another tab's first start, or a Book opened there), that Book is taken in and nothing is written.
   * A failed write stops the tab saving: a save would store its records into a Book that is not there.
   */
  private storeStarter(starter: Book, after: Promise<unknown>): void {
    // Until it is stored the Book is not saved, and says so.
    void this.queueWrite(async () => {
      await after;
      const stored = await this.store.load();
      if (isFirstStart(stored)) {
        await this.store.replaceAll(starter);
        return;
      }
      this.adopt(stored);
      this.forgetReplaced();
      this.emit('book');
    }).then((r) => {
      if (!r.ok) {
        this.unstored = `Not saved: the demo Book could not be stored in this browser, so this tab keeps no change until it is reloaded. ${describeWriteError(r.error)}`;
        this.status = { state: SAVE_STATES.failed, reason: this.unstored, conflict: false };
      }
      this.emit('status');
    });
  }

  /**
   * Replaces the Book kept in this browser with a Book file, without opening the stored one: the way out when the
   * stored Book does not read (see StoredBookInvalid). The file is checked first; a bad file changes nothing.
   */
  static async replaceStored(text: string, dbName: string = DEFAULT_DB_NAME): Promise<BookFileResult> {
    const parsed = parseBookFile(text);
    if (!parsed.ok) return parsed;
    const store = await openBookStore(dbName);
    try {
      await store.replaceAll(parsed.book);
    } finally {
      store.close();
    }
    return parsed;
  }

  get name(): string {
    return this.store.name;
  }

  /**
   * Writes a change in one transaction and, once stored, applies it to the Book in memory. Each record carries the
   * revision it was read at (as the user saw it). When another tab saved the record since, the user's edit is merged
   * field by field into the stored record (domain/merge.ts): saved with a notice naming what came from the other
   * tab, or refused, naming each field both changed and the other tab's value.
   */
  save(change: BookChange): Promise<SaveResult> {
    const refused = this.refuseEdits?.(change);
    if (refused) return Promise.resolve({ ok: false, message: refused, conflict: false });
    return this.enqueue(async () => {
      this.propose(change);
      try {
        const { written, merged } = await this.writeMerging(change);
        // Applied in slices: a large import's copy in memory must not hold the page either.
        const next = await runInSlices(applyChangeSteps(this.book, written));
        // So is the bookkeeping: naming the change's records and noting the revisions this tab wrote.
        const records = await runInSlices(recordIdsSteps(written));
        // A large change's copy is taken in a task of its own, not on top of the slices before and after it.
        const large = namesMany(records);
        if (large) await nextTask();
        // The store accepted the change, so a mismatch here means memory fell behind (another tab, whose own message
        // is on its way): the change's records are read back as stored.
        if (next.ok) this.adopt(next.book, records);
        else await this.takeRecords(records);
        if (large) await nextTask();
        await runInSlices(this.noteOwn(written));
        return { merged, records };
      } finally {
        this.proposed = undefined;
      }
    });
  }

  /** Sets `proposed` for a small change that applies to the Book as held, and says so; a large one waits for the store. */
  private propose(change: BookChange): void {
    let n = 0;
    for (const c of COLLECTIONS) n += (change.put?.[c]?.length ?? 0) + (change.delete?.[c]?.length ?? 0);
    if (n > PROPOSE_MAX) return;
    try {
      const r = applyChange(this.held, change);
      if (!r.ok) return;
      this.proposed = inVariantOrder(r.book);
    } catch {
      // A change memory cannot take ahead is left to the store, which says why.
      return;
    }
    this.dispatchEvent(new Event('proposed'));
  }

  /** Drops the notice of the last merged save. */
  dismissMerged(): void {
    if (this.status.merged === undefined) return;
    const { merged: _gone, ...rest } = this.status;
    this.status = rest;
    this.emit('status');
  }

  /** Stores a change; on a stale revision, merges each stale record from the version the tab held and tries again. */
  private async writeMerging(change: BookChange): Promise<{ written: BookChange; merged: string | undefined }> {
    let written = change;
    let notes: string[] = [];
    for (let attempt = 1; ; attempt++) {
      try {
        await this.store.apply(written);
        return { written, merged: notes.length ? notes.join(' ') : undefined };
      } catch (e) {
        if (!(e instanceof RevisionConflict) || e instanceof EditConflict || attempt >= MERGE_TRIES) throw e;
        // Only the change's own records as stored now: the rest of the Book plays no part in the merge.
        const stored = await this.store.loadRecords(recordIdsOf(change));
        const rebased = this.rebase(change, stored);
        written = rebased.change;
        notes = rebased.notes;
      }
    }
  }

  /**
   * The change with every record whose stored revision moved on merged into the stored record, from the version this
   * tab held at the revision the record carries. Throws the conflict when a record cannot be merged.
   */
  private rebase(change: BookChange, stored: StoredRecords): { change: BookChange; notes: string[] } {
    const notes: string[] = [];
    const one = <R extends AnyRecord>(c: CollectionName | 'settings', mine: R, held: R | undefined): R => {
      if (revisionMatches(held?.rev, mine.rev)) return mine;
      const base = mine.rev === 0 ? undefined : this.heldVersion(c, mine.id, mine.rev);
      if (!held || !base) throw refusedFor(c, mine, held);
      const m = mergeRecord<R>(base as R, mine, held);
      if (!m.ok) throw new EditConflict(c, mine.id, held.rev, mine.rev, conflictMessage(c, held, m.conflicts));
      if (m.theirs.length > 0 && !this.allOwn(c, mine.id, base.rev, held.rev)) notes.push(mergedMessage(c, held, m.theirs, m.mine));
      return { ...m.merged, rev: held.rev };
    };
    const out: BookChange = { ...change };
    if (change.put) {
      const put: Record<string, AnyRecord[]> = {};
      for (const [c, list] of Object.entries(change.put) as [CollectionName, AnyRecord[] | undefined][]) {
        if (!list) continue;
        const held = new Map(((stored.collections[c]?.found ?? []) as unknown as AnyRecord[]).map((r) => [r.id, r] as const));
        put[c] = list.map((r) => one(c, r, held.get(r.id)));
      }
      out.put = put as BookChange['put'];
    }
    if (change.settings) out.settings = one('settings', change.settings as unknown as AnyRecord, stored.settings as unknown as AnyRecord | undefined) as never;
    return { change: out, notes };
  }

  /** The record as this tab held it at revision `rev`: in its copy of the Book now, or remembered from before. */
  private heldVersion(c: CollectionName | 'settings', id: string, rev: number): AnyRecord | undefined {
    const now = (c === 'settings' ? [this.book.settings] : this.book[c]) as readonly AnyRecord[];
    return now.find((r) => r.id === id && r.rev === rev) ?? this.earlier.get(versionKey(c, id, rev));
  }

  /** True when every revision after `fromRev` up to `toRev` of the record was written by this tab. */
  private allOwn(c: string, id: string, fromRev: number, toRev: number): boolean {
    for (let rev = fromRev + 1; rev <= toRev; rev++) if (!this.ownRevisions.has(versionKey(c, id, rev))) return false;
    return true;
  }

  private *noteOwn(change: BookChange): Sliced<void> {
    let n = 0;
    for (const [c, list] of Object.entries(change.put ?? {}) as [string, AnyRecord[] | undefined][]) {
      // A new record's first revision is never asked about: allOwn starts after the revision the tab held, at least 1.
      for (const r of list ?? []) {
        if (r.rev !== 0) this.ownRevisions.add(versionKey(c, r.id, r.rev + 1));
        if (++n % ITEMS_PER_LOOK === 0) yield;
      }
    }
    if (change.settings) this.ownRevisions.add(versionKey('settings', 'settings', change.settings.rev + 1));
  }

  /**
   * Takes a newer Book as the tab's copy, remembering each record it replaces as the tab held it. When the newer Book
   * differs from this one only in the records `touched` names (a change applied, records read back), only those are
   * looked for (a 50,000-quote import replaces none: its quotes are new).
   */
  private adopt(next: Book, touched?: RecordIds): void {
    const prev = this.book;
    const replaced: [CollectionName, AnyRecord][] = [];
    for (const c of COLLECTIONS) {
      if (prev[c] === next[c]) continue;
      if (touched) {
        const ids = new Set<string>(touched.collections[c] ?? []);
        if (ids.size > 0) for (const r of prev[c] as readonly AnyRecord[]) if (ids.has(r.id)) replaced.push([c, r]);
        continue;
      }
      const now = new Map<string, number>();
      for (const r of next[c]) now.set(r.id, r.rev);
      for (const r of prev[c] as readonly AnyRecord[]) if (now.get(r.id) !== r.rev) replaced.push([c, r]);
    }
    // Only the last REMEMBERED_VERSIONS stay remembered: an import superseding 25,000 quotes need not remember each.
    for (const [c, r] of replaced.slice(-REMEMBERED_VERSIONS)) this.remember(c, r);
    if (prev.settings.rev !== next.settings.rev) this.remember('settings', prev.settings as unknown as AnyRecord);
    this.book = next;
  }

  private remember(c: string, r: AnyRecord): void {
    const key = versionKey(c, r.id, r.rev);
    this.earlier.delete(key);
    this.earlier.set(key, r);
    if (this.earlier.size > REMEMBERED_VERSIONS) this.earlier.delete(this.earlier.keys().next().value!);
  }

  /** Records that a Book file was just downloaded: the date goes into the settings, the edit count restarts. */
  async markExported(at: Date = new Date()): Promise<SaveResult> {
    const settings = { ...this.book.settings, lastExportAt: at.toISOString() };
    const result = await this.save({ settings });
    if (result.ok) {
      this.editsSinceExport = 0;
      this.emit('status');
    }
    return result;
  }

  /**
   * Replaces the whole Book (empty Book, demo Book, opened file) in one transaction. `openedFileAt` is given when the
   * Book comes from a Book file: that file is a copy of it, so the reminder to download one counts from then.
   */
  async replaceBook(book: Book, openedFileAt?: Date): Promise<SaveResult> {
    const written = openedFileAt ? { ...book, settings: { ...book.settings, lastExportAt: openedFileAt.toISOString() } } : book;
    const result = await this.enqueue(async () => {
      // The written Book as the store keeps it: it was checked before it came here, so it is not read back.
      this.book = await this.store.replaceAll(written);
      this.forgetReplaced();
      // Another Book is not the one this browser shared: it is never picked up as that sharing (a tab sharing it
      // stops by itself when it sees the replacement).
      forgetShare(this.name);
    }, 'replaced');
    if (result.ok && openedFileAt) {
      this.editsSinceExport = 0;
      this.emit('status');
    }
    return result;
  }

  /** Lets go of what the tab held of a Book that was replaced, here or in another tab. */
  private forgetReplaced(): void {
    // A replaced Book may reuse ids and revisions with other content: nothing earlier is merged from.
    this.earlier.clear();
    this.ownRevisions.clear();
    // Pages drop what they hold of the old Book (undo steps, open forms) when they see the count move.
    this.replacements += 1;
    // The run last opened was one of the old Book's, even where the new one has a run of the same id.
    this.openedRunId = undefined;
  }

  /** A fresh copy of the demo Book, with built-in checks. */
  demo(): Book {
    return starterBook();
  }

  /**
   * An empty Book that keeps the current settings (company, currency, rates, labour) and the built-in checks.
   * `editsSinceExport: 0` also marks it as emptied on purpose rather than never written (see isFirstStart).
   */
  empty(): Book {
    const book = withBuiltInChecks(emptyBook());
    // A new Book: the old one's name and the date of its last file do not belong to it.
    const { lastExportAt: _old, ...kept } = this.book.settings;
    return { ...book, settings: { ...kept, bookName: defaultSettings().bookName, editsSinceExport: 0 } };
  }

  /** Re-reads the whole Book from storage, dropping the memory copy (asked for by a person after a conflict). */
  async reload(): Promise<void> {
    await this.takeWholeBook();
    this.status = { state: SAVE_STATES.saved, at: new Date() };
    this.emit('book');
    this.emit('status');
  }

  async refreshStorage(): Promise<void> {
    try {
      // undefined where the browser gives no estimate; the shell then shows nothing.
      this.storage = await storageEstimate();
      this.emit('storage');
    } catch {
      // An estimate is only information; failing to get one must not disturb editing.
    }
  }

  close(): void {
    this.channel?.close();
    this.store.close();
  }

  private async askForPersistence(): Promise<void> {
    try {
      await requestPersistence();
    } finally {
      await this.refreshStorage();
    }
  }

  /**
   * Reads back the named records as stored now and takes them into the tab's copy: each in place of the one held, a
   * record no longer stored removed. One record that does not read rejects (StoredRecordsInvalid) and nothing changes.
   */
  private async takeRecords(records: RecordIds): Promise<void> {
    const stored = await this.store.loadRecords(records);
    this.adopt(await runInSlices(withStoredRecordsSteps(this.book, stored)), records);
  }

  /** Reads and checks the whole Book: at the start, after the whole Book was replaced, or when a person asks. */
  private async takeWholeBook(): Promise<void> {
    this.adopt(await this.store.load());
    this.remoteRefused = undefined;
  }

  /**
   * Runs `write` after every write queued before it, keeping the save state: "saving" while any is queued, "saved"
   * once the last one is stored (with the notice of a merge it made, or one not yet dismissed). A failed write is
   * given back for the caller to say why.
   */
  private queueWrite<T extends WriteDone | void>(write: () => Promise<T>): Promise<{ ok: true; done: T } | { ok: false; error: unknown }> {
    this.inFlight += 1;
    this.status = { ...this.status, state: SAVE_STATES.saving };
    const run = this.writes.then(async () => {
      try {
        const done = await write();
        this.inFlight -= 1;
        const merged = done ? done.merged : undefined;
        // A merge notice stays until dismissed, so a quick next save does not hide it.
        const note = merged || this.status.merged;
        if (this.inFlight === 0) this.status = { state: SAVE_STATES.saved, at: new Date(), ...(note ? { merged: note } : {}) };
        else if (merged) this.status = { ...this.status, merged };
        return { ok: true as const, done };
      } catch (error) {
        this.inFlight -= 1;
        return { ok: false as const, error };
      }
    });
    this.writes = run;
    return run;
  }

  private enqueue(write: () => Promise<WriteDone | void>, kind: TabMessage['kind'] = 'changed'): Promise<SaveResult> {
    if (this.blocked) {
      const message = 'Rungbook was updated in another tab; reload this tab before making changes.';
      return Promise.resolve({ ok: false, message, conflict: false });
    }
    const run = this.queueWrite(async () => {
      // The demo Book of a failed first start is not stored: no record may be written into it.
      if (this.unstored) throw new Error(this.unstored);
      return write();
    });
    this.emit('status');
    return run.then((r): SaveResult => {
      if (!r.ok) {
        const conflict = !this.unstored && r.error instanceof RevisionConflict;
        const message = this.unstored ?? describeWriteError(r.error);
        this.status = { state: SAVE_STATES.failed, reason: message, conflict };
        this.emit('status');
        return { ok: false, message, conflict };
      }
      const { merged, records } = r.done ?? {};
      this.editsSinceExport += 1;
      this.emit('book');
      this.emit('status');
      this.tellOtherTabs(kind, records);
      void this.refreshStorage();
      return merged ? { ok: true, merged } : { ok: true };
    });
  }

  private onVersionChange(): void {
    this.blocked = BLOCKED.upgrade;
    this.channel?.close();
    this.channel = undefined;
    this.emit('blocked');
  }

  private listenToOtherTabs(): void {
    if (typeof BroadcastChannel === 'undefined') return;
    this.channel = new BroadcastChannel(`rungbook-book:${this.store.name}`);
    this.channel.onmessage = (ev: MessageEvent<TabMessage>) => {
      const kind = ev.data?.kind;
      if ((kind !== 'changed' && kind !== 'replaced') || ev.data.from === this.tabId) return;
      const records = kind === 'changed' ? namedRecords(ev.data.records) : undefined;
      // Wait for our own writes so a reload does not race them.
      this.writes = this.writes.then(async () => {
        try {
          // A `changed` from a tab of an earlier Rungbook names no records: only then is the whole Book read for it.
          if (records) await this.takeRecords(records);
          else await this.takeWholeBook();
          if (kind === 'replaced') this.forgetReplaced();
          this.lastRemoteChange = new Date();
          this.emit('book');
        } catch (e) {
          if (e instanceof StoredRecordsInvalid) {
            this.remoteRefused = `A change saved in another tab was not taken in here; this tab keeps the Book as it was. ${e.message}`;
            this.emit('status');
          }
          // Otherwise the store reports its own failures on the next write; a missed refresh is not data loss.
        }
      });
    };
  }

  private tellOtherTabs(kind: TabMessage['kind'], records: RecordIds | undefined): void {
    const message: TabMessage = kind === 'changed' && records ? { kind, from: this.tabId, records } : { kind, from: this.tabId };
    // Copying the ids of a large import into the message takes tens of ms: in a task of its own, not on top of the
    // pages drawing the saved Book.
    if (!namesMany(records)) {
      this.channel?.postMessage(message);
      return;
    }
    void nextTask().then(() => {
      try {
        this.channel?.postMessage(message);
      } catch {
        // The Book was closed in between: there is no longer a channel to tell.
      }
    });
  }

  private emit(what: ServiceEventDetail['what']): void {
    this.dispatchEvent(new CustomEvent<ServiceEventDetail>('change', { detail: { what } }));
  }
}

/**
 * A database just created: the store's first migration writes default settings and nothing else. A Book emptied on
 * purpose is told apart by its settings (see `empty()`), so a reload does not bring the demo back.
 */
export function isFirstStart(book: Book): boolean {
  const { rev, ...settings } = book.settings;
  const { rev: _defaultRev, ...defaults } = defaultSettings();
  return rev <= 1 && COLLECTIONS.every((c) => book[c].length === 0) && sameJson(settings, defaults);
}

/** The records a `changed` message names, when it names them as lists of ids of known collections; else undefined. */
function namedRecords(x: unknown): RecordIds | undefined {
  if (typeof x !== 'object' || x === null) return undefined;
  const { collections, settings } = x as { collections?: unknown; settings?: unknown };
  if (typeof collections !== 'object' || collections === null || (settings !== undefined && typeof settings !== 'boolean')) return undefined;
  const out: RecordIds = { collections: {} };
  for (const [c, ids] of Object.entries(collections)) {
    if (!(COLLECTIONS as readonly string[]).includes(c) || !Array.isArray(ids) || !ids.every((id) => typeof id === 'string')) return undefined;
    out.collections[c as CollectionName] = ids as string[];
  }
  if (settings) out.settings = true;
  return out;
}

function sameJson(a: unknown, b: unknown): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}

function starterBook(): Book {
  return withBuiltInChecks(demoBook());
}

/** Turns a storage failure into a sentence a user can act on. */
export function describeWriteError(e: unknown): string {
  if (e instanceof EditConflict) return e.message;
  if (e instanceof RevisionConflict) {
    return 'Not saved: this record was changed in another tab or window since you opened it. Reload to see the newer version, then make your change again.';
  }
  if (e instanceof StorageFull || e instanceof StoreWriteFailed) return e.message;
  const name = e instanceof Error || e instanceof DOMException ? e.name : '';
  if (name === 'QuotaExceededError') {
    return 'Not saved: the browser has no more storage for this site. Nothing was changed. Save a Book file, then free space (for example delete old import batches).';
  }
  if (name === 'InvalidStateError' || name === 'TransactionInactiveError') {
    return 'Not saved: the connection to the stored Book was closed. Reload the page.';
  }
  const detail = e instanceof Error ? e.message : String(e);
  return `Not saved: ${detail}`;
}

function versionKey(c: string, id: string, rev: number): string {
  return `${c}\u0000${id}\u0000${rev}`;
}

/** The conflict for a record that cannot be merged: deleted elsewhere, a new record whose id is taken, no base held. */
function refusedFor(c: CollectionName | 'settings', mine: AnyRecord, held: AnyRecord | undefined): RevisionConflict {
  if (!held && mine.rev > 0) {
    const message = `Not saved: ${recordName(c, mine)} was deleted in another tab or window since you opened it. Reload to see the Book as it is now.`;
    return new EditConflict(c, mine.id, 0, mine.rev, message);
  }
  return new RevisionConflict(c, mine.id, held?.rev ?? 0, mine.rev);
}

/** How a person names a record in a notice: its code, part number, title or name. */
export function recordName(c: CollectionName | 'settings', r: Readonly<Record<string, unknown>>): string {
  if (c === 'settings') return 'the costing settings';
  for (const k of ['code', 'mpn', 'title', 'name']) {
    const v = r[k];
    if (typeof v === 'string' && v.trim() !== '') return v;
  }
  return `${c} record ${String(r['id'])}`;
}

/** A field's path in words: ["sections", 0, "grid", 1, 2] → "cell C2 of section 1"; ["params", "vf"] → "parameter vf". */
export function fieldName(path: FieldPath): string {
  const parts: string[] = [];
  for (let i = 0; i < path.length; i++) {
    const p = path[i]!;
    const next = path[i + 1];
    if (p === 'sections' && typeof next === 'number') {
      parts.push(`section ${next + 1}`);
      i += 1;
    } else if (p === 'grid' && typeof next === 'number' && typeof path[i + 2] === 'number') {
      parts.push(`cell ${columnLetters(path[i + 2] as number)}${next + 1}`);
      i += 2;
    } else if (p === 'params' && typeof next === 'string') {
      parts.push(`parameter ${next}`);
      i += 1;
    } else if (typeof p === 'number') {
      parts.push(`${parts.pop() ?? 'entry'} #${p + 1}`);
    } else {
      parts.push(p);
    }
  }
  return parts.length ? parts.reverse().join(' of ') : 'the whole record';
}

function shownValue(v: unknown): string {
  if (v === undefined) return 'nothing (removed)';
  const text = typeof v === 'string' ? `“${v}”` : typeof v === 'number' || typeof v === 'boolean' ? String(v) : JSON.stringify(v);
  return text.length > 80 ? `${text.slice(0, 77)}…` : text;
}

function conflictMessage(c: CollectionName | 'settings', theirs: AnyRecord, conflicts: readonly FieldConflict[]): string {
  const fields = conflicts.map((f) => `${fieldName(f.path)} is now ${shownValue(f.theirs)} there (yours: ${shownValue(f.mine)})`);
  return (
    `Not saved: ${recordName(c, theirs)} was changed in another tab or window since you opened it, in the same ` +
    `${conflicts.length === 1 ? 'field' : 'fields'} as your edit: ${fields.join('; ')}. ` +
    'Reload to see the newer version, then make your change again if it is still needed.'
  );
}

function mergedMessage(c: CollectionName | 'settings', theirs: AnyRecord, fromThem: readonly FieldPath[], fromMe: readonly FieldPath[]): string {
  const list = (paths: readonly FieldPath[]) => [...new Set(paths.map(fieldName))].join(', ');
  const mine = fromMe.length ? `; your change to ${list(fromMe)} was saved over it` : '';
  return `${recordName(c, theirs)} was also changed in another tab: kept its ${list(fromThem)}${mine}.`;
}
