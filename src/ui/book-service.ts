// The open Book for the app: opens the IndexedDB Book, keeps it in memory, writes every change through the store
// and reports save state, storage use, conflicts, schema upgrades in other tabs and edits made in other tabs.
import type { Book } from '../domain/book.ts';
import { COLLECTIONS, defaultSettings, emptyBook } from '../domain/book.ts';
import { applyChange } from '../domain/book-ops.ts';
import { demoBook } from '../domain/demo-book.ts';
import { openBookStore } from '../store/idb-store.ts';
import { requestPersistence, storageEstimate } from '../store/storage.ts';
import type { BookChange, BookStore, StorageEstimate } from '../store/types.ts';
import { RevisionConflict, StorageFull, StoreWriteFailed } from '../store/types.ts';
import { withBuiltInChecks } from './sheets.ts';

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
}

export type SaveResult = { ok: true } | { ok: false; message: string; conflict: boolean };

/** Why the service stopped accepting writes until the tab reloads. */
export const BLOCKED = {
  upgrade: 'upgrade',
} as const;
export type Blocked = (typeof BLOCKED)[keyof typeof BLOCKED];

export type ServiceEventDetail = { what: 'book' | 'status' | 'storage' | 'blocked' };

export const DEFAULT_DB_NAME = 'rungbook';

/** Broadcast between tabs on one Book after a write; the receiver re-reads the Book from storage. */
interface TabMessage {
  kind: 'changed';
  from: string;
}

export class BookService extends EventTarget {
  book: Book;
  status: SaveStatus = { state: SAVE_STATES.saved };
  storage: StorageEstimate | undefined;
  blocked: Blocked | undefined;
  /**
   * Changes saved from this tab since the last Book file was downloaded here (or since the tab opened). Kept in
   * memory only: writing a counter into the settings on every save would make every edit in two tabs collide.
   */
  editsSinceExport = 0;
  /** Set when the last reload came from another tab's edit, so the shell can say so. */
  lastRemoteChange: Date | undefined;

  private readonly tabId = Math.random().toString(36).slice(2);
  private channel: BroadcastChannel | undefined;
  private writes: Promise<unknown> = Promise.resolve();
  private inFlight = 0;

  private constructor(
    private store: BookStore,
    book: Book,
  ) {
    super();
    this.book = book;
  }

  /**
   * Opens (or creates) the Book database. On the very first start the demo Book is loaded, with the built-in
   * checks from sheets/ when they are available.
   */
  static async open(dbName: string = DEFAULT_DB_NAME): Promise<BookService> {
    let service: BookService | undefined;
    const store = await openBookStore(dbName, {
      onVersionChange: () => service?.onVersionChange(),
    });
    let book = await store.load();
    if (isFirstStart(book)) {
      book = starterBook();
      await store.replaceAll(book);
      book = await store.load();
    }
    service = new BookService(store, book);
    service.listenToOtherTabs();
    void service.askForPersistence();
    return service;
  }

  get name(): string {
    return this.store.name;
  }

  /** Writes a change in one transaction and, once stored, applies it to the Book in memory. */
  save(change: BookChange): Promise<SaveResult> {
    return this.enqueue(async () => {
      await this.store.apply(change);
      const next = applyChange(this.book, change);
      // The store accepted the change, so a mismatch here means memory fell behind (another tab): re-read it.
      this.book = next.ok ? next.book : await this.store.load();
    });
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

  /** Replaces the whole Book (empty Book, demo Book, opened file) in one transaction. */
  replaceBook(book: Book): Promise<SaveResult> {
    return this.enqueue(async () => {
      await this.store.replaceAll(book);
      this.book = await this.store.load();
    });
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
    return { ...book, settings: { ...this.book.settings, editsSinceExport: 0 } };
  }

  /** Re-reads the Book from storage, dropping the memory copy (after a conflict or another tab's edit). */
  async reload(): Promise<void> {
    this.book = await this.store.load();
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

  private enqueue(write: () => Promise<void>): Promise<SaveResult> {
    if (this.blocked) {
      const message = 'Rungbook was updated in another tab; reload this tab before making changes.';
      return Promise.resolve({ ok: false, message, conflict: false });
    }
    this.inFlight += 1;
    this.status = { ...this.status, state: SAVE_STATES.saving };
    this.emit('status');
    const run = this.writes.then(async (): Promise<SaveResult> => {
      try {
        await write();
        this.inFlight -= 1;
        this.editsSinceExport += 1;
        if (this.inFlight === 0) this.status = { state: SAVE_STATES.saved, at: new Date() };
        this.emit('book');
        this.emit('status');
        this.tellOtherTabs();
        void this.refreshStorage();
        return { ok: true };
      } catch (e) {
        this.inFlight -= 1;
        const conflict = e instanceof RevisionConflict;
        const message = describeWriteError(e);
        this.status = { state: SAVE_STATES.failed, reason: message, conflict };
        this.emit('status');
        return { ok: false, message, conflict };
      }
    });
    this.writes = run;
    return run;
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
      if (ev.data?.kind !== 'changed' || ev.data.from === this.tabId) return;
      // Wait for our own writes so a reload does not race them.
      this.writes = this.writes.then(async () => {
        try {
          this.book = await this.store.load();
          this.lastRemoteChange = new Date();
          this.emit('book');
        } catch {
          // The store reports its own failures on the next write; a missed refresh is not data loss.
        }
      });
    };
  }

  private tellOtherTabs(): void {
    const message: TabMessage = { kind: 'changed', from: this.tabId };
    this.channel?.postMessage(message);
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

function sameJson(a: unknown, b: unknown): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}

function starterBook(): Book {
  return withBuiltInChecks(demoBook());
}

/** Turns a storage failure into a sentence a user can act on. */
export function describeWriteError(e: unknown): string {
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
