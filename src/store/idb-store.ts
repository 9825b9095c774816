// The Book kept in IndexedDB: one database per Book, every change in one transaction with revision checks.
import { unwrap, wrap } from 'idb';
import type { IDBPDatabase, IDBPTransaction } from 'idb';
import { COLLECTIONS, defaultSettings, emptyBook } from '../domain/book.ts';
import type { Book, CollectionName, Part, Quote, Settings } from '../domain/book.ts';
import { bumped, revisionMatches, touchedCollections } from '../domain/book-ops.ts';
import type { BookChange, RecordIds, StoredRecords } from '../domain/book-ops.ts';
import { ITEMS_PER_LOOK, runInSlices } from '../domain/slices.ts';
import type { Sliced } from '../domain/slices.ts';
import { MIGRATIONS, runMigrations } from './migrations.ts';
import type { Migration, UpgradeDb, UpgradeTx } from './migrations.ts';
import { bucketQuotes, idbVersionOf, quoteBucketKey, schemaVersionOf, unbucketQuotes } from './schema.ts';
import type { QuoteBucket, RungbookDB, StoredPart } from './schema.ts';
import { RECORD_SCHEMAS, SettingsSchema, checkBook, checkWith, isObject, short } from '../domain/schema.ts';
import type { SchemaProblem } from '../domain/schema.ts';
import { RevisionConflict, StorageFull, StoredBookInvalid, StoredRecordsInvalid, StoreWriteFailed } from './types.ts';
import type { BookStore } from './types.ts';

export const DEFAULT_BOOK_DB = 'rungbook';

export interface OpenBookStoreOptions {
  /** IndexedDB factory; the browser's own by default (tests pass a fresh fake one for isolation). */
  factory?: IDBFactory;
  /**
   * Called after this connection was closed because another tab opened the Book with a newer schema.
   * The page should ask the user to reload; every later call on this store rejects.
   */
  onVersionChange?: () => void;
  /** Called while an older connection in another tab holds up an upgrade of this Book. */
  onBlocked?: () => void;
  /** Migration steps; the released ones by default. Tests pass a longer list to prove the next upgrade. */
  migrations?: readonly Migration[];
}

type Db = IDBPDatabase<RungbookDB>;
type StoreName = CollectionName | 'settings';

/** Opens (creating or upgrading as needed) the Book database `dbName`. */
export async function openBookStore(dbName: string = DEFAULT_BOOK_DB, opts: OpenBookStoreOptions = {}): Promise<IdbBookStore> {
  const factory = opts.factory ?? globalThis.indexedDB;
  if (!factory) throw new Error('this browser offers no IndexedDB, so the Book cannot be kept here');
  const migrations = opts.migrations ?? MIGRATIONS;
  const target = idbVersionOf(migrations[migrations.length - 1]?.version ?? 0);
  const db = await openWithMigrations(factory, dbName, target, migrations, opts.onBlocked);
  return new IdbBookStore(dbName, db, opts.onVersionChange);
}

function openWithMigrations(
  factory: IDBFactory,
  name: string,
  version: number,
  migrations: readonly Migration[],
  onBlocked: (() => void) | undefined,
): Promise<Db> {
  let upgradeError: unknown;
  const request = factory.open(name, version);
  request.addEventListener('upgradeneeded', (event) => {
    const db = wrap(request.result) as unknown as UpgradeDb;
    const tx = wrap(request.transaction!) as unknown as UpgradeTx;
    // A failed upgrade is reported by the open request; the transaction's own promise must not go unhandled.
    tx.done.catch(() => undefined);
    runMigrations(db, tx, schemaVersionOf(event.oldVersion), migrations).catch((e: unknown) => {
      upgradeError = e;
      try {
        request.transaction?.abort();
      } catch {
        // already finished or aborted: the open request reports the failure
      }
    });
  });
  if (onBlocked) request.addEventListener('blocked', () => onBlocked());
  return new Promise<Db>((resolve, reject) => {
    request.addEventListener('success', () => resolve(wrap(request.result) as unknown as Db));
    request.addEventListener('error', (event) => {
      event.preventDefault();
      const cause = upgradeError ?? request.error;
      if (request.error?.name === 'VersionError') {
        reject(new Error(`this Book was saved by a newer Rungbook; reload the page to use the newer version`, { cause }));
      } else {
        reject(new Error(`the Book database could not be opened: ${describe(cause)}`, { cause }));
      }
    });
  });
}

/** Records copied into the database per step of a large write (a few ms of the page's time each). */
const WRITE_STEP = 2000;
/** The page's time one step of a large write may take: large records (a variant's many parameters) reach it first. */
const WRITE_STEP_MS = 12;

/**
 * Collects request promises of one transaction. Each gets a no-op rejection handler at once: when the transaction
 * aborts, every pending request rejects, and only the first failure is reported.
 *
 * A large write goes in steps in the one transaction: each request copies its record when it is made, so copying a
 * large Book or import at once held the page for a second. `step` waits for the requests made since the last step
 * once they weigh WRITE_STEP records or took WRITE_STEP_MS; the next ones are made from their ends, which keeps the
 * transaction alive, and the page draws and answers in between.
 *
 * `addPlain` takes a bare request with no promise of its own: for a Book of 50,000 parts, a promise and two listeners
 * per record cost the page more than the writes. A transaction's requests end in the order they were made, so the
 * step waits for the last one alone; a failed request aborts the transaction, which fails every request after it, so
 * the wait fails too. `all` does not wait for bare requests: the caller waits for the transaction's end, which does.
 */
function requests(): {
  add(p: Promise<unknown>, weight?: number): void;
  addPlain(r: IDBRequest): void;
  step(): Promise<void>;
  all(): Promise<unknown[]>;
} {
  const list: Promise<unknown>[] = [];
  let since = 0;
  let weight = 0;
  let began = performance.now();
  let lastPlain: IDBRequest | undefined;
  return {
    add(p, w = 1) {
      p.catch(() => undefined);
      list.push(p);
      weight += w;
    },
    addPlain(r) {
      lastPlain = r;
      weight += 1;
    },
    async step() {
      if (weight < WRITE_STEP && performance.now() - began < WRITE_STEP_MS) return;
      const pending = list.slice(since);
      since = list.length;
      weight = 0;
      if (lastPlain) pending.push(ended(lastPlain));
      lastPlain = undefined;
      await Promise.all(pending);
      began = performance.now();
    },
    all: () => Promise.all(list),
  };
}

/** A bare request's end: at once when it has ended already, else at its success or error event. */
function ended(r: IDBRequest): Promise<void> {
  if (r.readyState === 'done') return r.error ? Promise.reject(r.error) : Promise.resolve();
  return new Promise((resolve, reject) => {
    r.onsuccess = () => resolve();
    r.onerror = () => reject(r.error ?? new Error('a write failed'));
  });
}

function describe(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

/**
 * The Book as `load()` gives it back after `replaceAll`: each collection in id order, the order IndexedDB keeps
 * records in. The Book was checked before it was written, so reading it back to check it again is not needed.
 */
export function asStored(book: Book): Book {
  const out = { ...book };
  for (const c of COLLECTIONS) (out as Record<CollectionName, unknown>)[c] = [...book[c]].sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  return out;
}

/** A part as the Book holds it: without the field parts written before schema 4 carry (see StoredPart). */
function fromStoredPart(p: StoredPart): Part {
  if (!('mpnKey' in p)) return p;
  const { mpnKey: _derived, ...part } = p;
  return part;
}

/** Above this many edited records in one store, their revisions are checked from one read of the whole store. */
const BULK_REVISION_READ = 500;

/** Turns whatever a failed write produced into one of our clear errors. */
function writeError(e: unknown, tx: IDBTransaction | undefined): Error {
  if (e instanceof RevisionConflict || e instanceof StorageFull || e instanceof StoreWriteFailed) return e;
  const names = [e instanceof DOMException || e instanceof Error ? e.name : '', tx?.error?.name ?? ''];
  if (names.includes('QuotaExceededError')) return new StorageFull(e);
  if (names.includes('ConstraintError')) {
    return new StoreWriteFailed('a record breaks a uniqueness rule (for example two variants with the same code)', e);
  }
  if (names.includes('DataCloneError')) return new StoreWriteFailed('a record holds data that cannot be stored', e);
  return new StoreWriteFailed(describe(e), e);
}

export class IdbBookStore implements BookStore {
  private closedReason: string | undefined;

  constructor(
    readonly name: string,
    private readonly db: Db,
    onVersionChange: (() => void) | undefined,
  ) {
    db.addEventListener('versionchange', () => {
      // Another tab wants a newer schema: let it proceed; this tab must reload to use it.
      db.close();
      this.closedReason = 'this Book was upgraded in another tab; reload the page to keep working';
      onVersionChange?.();
    });
    db.addEventListener('close', () => {
      this.closedReason ??= 'the browser closed the Book database; reload the page to keep working';
    });
  }

  /** True once the connection is closed (by `close()`, another tab's upgrade, or the browser). */
  get closed(): boolean {
    return this.closedReason !== undefined;
  }

  private ensureOpen(): void {
    if (this.closedReason) throw new Error(this.closedReason);
  }

  async load(): Promise<Book> {
    this.ensureOpen();
    const tx = this.db.transaction([...COLLECTIONS, 'settings'], 'readonly');
    const [parts, rest, settings] = await Promise.all([
      tx.objectStore('parts').getAll(),
      Promise.all(COLLECTIONS.filter((c) => c !== 'parts').map(async (c) => [c, await tx.objectStore(c).getAll()] as const)),
      tx.objectStore('settings').get('settings'),
    ]);
    await tx.done;
    const book: Book = {
      ...emptyBook(),
      // rev 0: nothing stored yet, so the first save of settings is a new record.
      settings: settings ?? { ...defaultSettings(), rev: 0 },
      parts: parts.map(fromStoredPart),
    };
    for (const [c, list] of rest) (book as unknown as Record<string, unknown>)[c] = c === 'quotes' ? unbucketQuotes(list as QuoteBucket[]) : list;
    // What comes out of storage is checked like a file: another tab, an older build or a damaged profile may have
    // written it. A problem is reported with its place, never guessed around.
    const checked = checkBook(book);
    if (!checked.ok) throw new StoredBookInvalid(checked.problems, book);
    return checked.value;
  }

  /**
   * Reads the named records alone (another tab's edit, a record saved elsewhere before a merge) and checks each
   * against its collection's schema, so taking in an edit costs the records it touched, not the whole Book. Checks
   * between records (references, unique codes) are left to the whole-Book load. One record that does not read
   * rejects the lot with its place named (`quotes record "q_1".breaks[0].qty`).
   */
  async loadRecords(ids: RecordIds): Promise<StoredRecords> {
    this.ensureOpen();
    const collections = COLLECTIONS.filter((c) => (ids.collections[c]?.length ?? 0) > 0);
    const stores: StoreName[] = ids.settings ? [...collections, 'settings'] : collections;
    if (stores.length === 0) return { collections: {} };
    const problems: SchemaProblem[] = [];
    const raw = new Map<CollectionName, Map<string, unknown>>();
    const tx = this.db.transaction(stores, 'readonly');
    const reads = collections.map(async (c) => {
      const wanted = ids.collections[c]!;
      const held = new Map<string, unknown>();
      raw.set(c, held);
      if (c === 'quotes') {
        await readQuotes(tx.objectStore('quotes'), wanted, held, problems);
        return;
      }
      const store = tx.objectStore(c);
      if (wanted.length > BULK_REVISION_READ) {
        const want = new Set(wanted);
        for (const r of (await store.getAll()) as unknown[]) {
          const id = isObject(r) ? r.id : undefined;
          if (typeof id === 'string' && want.has(id)) held.set(id, r);
        }
        return;
      }
      await Promise.all(wanted.map(async (id) => {
        const r: unknown = await store.get(id);
        if (r !== undefined) held.set(id, r);
      }));
    });
    const settings = ids.settings ? tx.objectStore('settings').get('settings') : undefined;
    const [stored] = await Promise.all([settings, ...reads]);
    await tx.done;
    const out = await runInSlices(checkStoredRecords(ids, raw, problems));
    if (ids.settings) {
      const checked = checkWith(SettingsSchema, stored ?? { ...defaultSettings(), rev: 0 }, 'settings');
      if (checked.ok) out.settings = checked.value;
      else problems.push(...checked.problems);
    }
    if (problems.length > 0) throw new StoredRecordsInvalid(problems);
    return out;
  }

  async apply(change: BookChange): Promise<void> {
    this.ensureOpen();
    const collections = touchedCollections(change);
    const stores: StoreName[] = change.settings ? [...collections, 'settings'] : collections;
    if (stores.length === 0) return;
    const shape = changeShapeProblem(change);
    if (shape) throw new StoreWriteFailed(shape);

    // The quotes a change saves and deletes, by the bucket that holds them: worked out before the transaction, in
    // slices, so a 50,000-quote import does not hold the page (a transaction cannot wait for anything but its own
    // requests).
    const quoteGroups = collections.includes('quotes') ? await runInSlices(quotesByBucket(change)) : undefined;
    const tx = this.db.transaction(stores, 'readwrite');
    let failedAdd: { c: Exclude<CollectionName, 'quotes'>; id: string; e: unknown } | undefined;
    try {
      const reads: Promise<RevisionConflict | undefined>[] = [];
      const writes = requests();
      for (const c of collections) {
        if (c === 'quotes') {
          reads.push(rewriteQuoteBuckets(tx, quoteGroups!, writes));
          continue;
        }
        // New records (rev 0) are written with add(), which fails on an existing key: no read needed, which keeps
        // a 50,000-quote import to one request per record.
        const edited = (change.put?.[c] ?? []).filter((r) => r.rev !== 0);
        if (edited.length > BULK_REVISION_READ) {
          // Many edited records (an import superseding thousands of quotes): one getAll of the store, compared in
          // memory, costs far less than a request per record.
          reads.push(
            tx.objectStore(c).getAll().then((all) => {
              const revs = new Map<string, number>(all.map((x) => [x.id, x.rev]));
              for (const r of edited) {
                const stored = revs.get(r.id);
                if (!revisionMatches(stored, r.rev)) return new RevisionConflict(c, r.id, stored ?? 0, r.rev);
              }
              return undefined;
            }),
          );
          continue;
        }
        for (const r of edited) {
          reads.push(
            tx.objectStore(c).get(r.id).then((stored) =>
              revisionMatches(stored?.rev, r.rev) ? undefined : new RevisionConflict(c, r.id, stored?.rev ?? 0, r.rev),
            ),
          );
        }
      }
      const settings = change.settings;
      if (settings) {
        reads.push(
          tx.objectStore('settings').get('settings').then((stored) =>
            revisionMatches(stored?.rev, settings.rev) ? undefined : new RevisionConflict('settings', 'settings', stored?.rev ?? 0, settings.rev),
          ),
        );
      }
      for (const r of reads) r.catch(() => undefined);
      const conflict = (await Promise.all(reads)).find((x) => x !== undefined);
      if (conflict) throw conflict;

      for (const c of collections) {
        if (c === 'quotes') continue;
        const store = tx.objectStore(c);
        for (const id of change.delete?.[c] ?? []) writes.add(store.delete(id));
      }
      for (const c of collections) {
        if (c === 'quotes') continue;
        const store = tx.objectStore(c);
        for (const r of change.put?.[c] ?? []) {
          const stored = bumped(r) as never;
          if (r.rev !== 0) writes.add(store.put(stored));
          else writes.add(store.add(stored).catch((e: unknown) => Promise.reject((failedAdd ??= { c, id: r.id, e }).e)));
          await writes.step();
        }
      }
      if (settings) writes.add(tx.objectStore('settings').put(bumped(settings)));
      await writes.all();
      await tx.done;
    } catch (e) {
      const error = await failed(tx, e);
      throw failedAdd ? await this.addFailure(failedAdd.c, failedAdd.id, error) : error;
    }
  }

  /** An add() of a new record failed: a record with that id already exists (a conflict), or a unique index broke. */
  private async addFailure(c: Exclude<CollectionName, 'quotes'>, id: string, error: Error): Promise<Error> {
    if (!(error instanceof StoreWriteFailed)) return error;
    const existing = await this.db.get(c, id).catch(() => undefined);
    return existing ? new RevisionConflict(c, id, existing.rev, 0) : error;
  }

  async replaceAll(book: Book): Promise<Book> {
    this.ensureOpen();
    const shape = changeShapeProblem({ put: Object.fromEntries(COLLECTIONS.map((c) => [c, book[c]])), settings: book.settings });
    if (shape) throw new StoreWriteFailed(shape);
    const tx = this.db.transaction([...COLLECTIONS, 'settings'], 'readwrite');
    // A bare request that fails aborts the transaction before any promise here has failed: its end is read below.
    tx.done.catch(() => undefined);
    try {
      const writes = requests();
      for (const c of COLLECTIONS) writes.add(tx.objectStore(c).clear());
      writes.add(tx.objectStore('settings').clear());
      for (const c of COLLECTIONS) {
        if (c === 'quotes') continue;
        const store = unwrap(tx.objectStore(c));
        for (const r of book[c]) {
          writes.addPlain(store.put(r));
          await writes.step();
        }
      }
      const quotes = tx.objectStore('quotes');
      for (const b of bucketQuotes(book.quotes)) {
        writes.add(quotes.put(b), b.quotes.length);
        await writes.step();
      }
      writes.add(tx.objectStore('settings').put(book.settings));
      await writes.all();
      await tx.done;
    } catch (e) {
      throw await failed(tx, e);
    }
    return asStored(book);
  }

  /** Schema version recorded in the `meta` store. */
  async schemaVersion(): Promise<number | undefined> {
    this.ensureOpen();
    return (await this.db.get('meta', 'schema'))?.version;
  }

  close(): void {
    this.closedReason ??= 'this Book is closed';
    this.db.close();
  }
}

type WriteTx = IDBPTransaction<RungbookDB, StoreName[], 'readwrite'>;
/** The quotes store, as far as reading a bucket goes. */
interface QuoteStore {
  get(key: string): Promise<QuoteBucket | undefined>;
}

/** The named quotes as stored, read from the buckets that hold them; a damaged bucket or a quote kept twice is a problem. */
async function readQuotes(store: QuoteStore, wanted: readonly string[], held: Map<string, unknown>, problems: SchemaProblem[]): Promise<void> {
  const byBucket = new Map<string, Set<string>>();
  for (const id of wanted) {
    const k = quoteBucketKey(id);
    let ids = byBucket.get(k);
    if (!ids) byBucket.set(k, (ids = new Set()));
    ids.add(id);
  }
  await Promise.all([...byBucket].map(async ([key, ids]) => {
    const bucket: unknown = await store.get(key);
    if (bucket === undefined) return;
    const quotes = isObject(bucket) ? bucket.quotes : undefined;
    if (!Array.isArray(quotes)) {
      problems.push({ path: `quotes bucket ${short(key)}`, message: 'does not hold a list of quotes' });
      return;
    }
    for (const q of quotes as unknown[]) {
      const id = isObject(q) ? q.id : undefined;
      if (typeof id !== 'string' || !ids.has(id)) continue;
      if (held.has(id)) problems.push({ path: `quotes record ${short(id)}`, message: `is kept twice in ${short(key)}` });
      held.set(id, q);
    }
  }));
}

/** The named records read, each checked against its collection's schema; an id with nothing stored is gone. */
function* checkStoredRecords(ids: RecordIds, raw: Map<CollectionName, Map<string, unknown>>, problems: SchemaProblem[]): Sliced<StoredRecords> {
  const out: StoredRecords = { collections: {} };
  let n = 0;
  for (const [c, held] of raw) {
    const found: { id: string; rev: number }[] = [];
    const gone: string[] = [];
    for (const id of ids.collections[c] ?? []) {
      const r = held.get(id);
      if (r === undefined) {
        gone.push(id);
        continue;
      }
      const checked = checkWith(RECORD_SCHEMAS[c], c === 'parts' && isObject(r) ? fromStoredPart(r as unknown as StoredPart) : r, `${c} record ${short(id)}`);
      if (checked.ok) found.push(checked.value as { id: string; rev: number });
      else problems.push(...checked.problems);
      // A record's check costs far more than the cheap items ITEMS_PER_LOOK is set for.
      if (++n % 32 === 0) yield;
    }
    (out.collections as Record<string, unknown>)[c] = { found, gone };
  }
  return out;
}

/** A change's quote puts and deletes grouped by the bucket that holds each quote. */
interface QuoteGroup {
  put: Quote[];
  delete: string[];
}

function* quotesByBucket(change: BookChange): Sliced<Map<string, QuoteGroup>> {
  const groups = new Map<string, QuoteGroup>();
  const group = (id: string): QuoteGroup => {
    const k = quoteBucketKey(id);
    let g = groups.get(k);
    if (!g) groups.set(k, (g = { put: [], delete: [] }));
    return g;
  };
  let n = 0;
  for (const q of change.put?.quotes ?? []) {
    group(q.id).put.push(q);
    if (++n % ITEMS_PER_LOOK === 0) yield;
  }
  for (const id of change.delete?.quotes ?? []) {
    group(id).delete.push(id);
    if (++n % ITEMS_PER_LOOK === 0) yield;
  }
  return groups;
}

/**
 * Reads each bucket a change's quotes live in, checks their revisions as for any record (an edited quote must be
 * stored at the revision it carries, a new one (rev 0) must not exist yet) and writes the bucket back with the
 * change applied. One bucket at a time, each when its read arrives: the browser may hand over the answers of many
 * reads in one task, and rewriting every bucket of a large import there held the page for a second. A conflict stops
 * the rewriting and aborts the whole transaction, so nothing it wrote stays.
 */
async function rewriteQuoteBuckets(tx: WriteTx, groups: Map<string, QuoteGroup>, writes: ReturnType<typeof requests>): Promise<RevisionConflict | undefined> {
  const store = tx.objectStore('quotes');
  for (const [key, g] of groups) {
    const bucket = await store.get(key);
    const quotes = new Map((bucket?.quotes ?? []).map((q) => [q.id, q] as const));
    for (const q of g.put) {
      const stored = quotes.get(q.id);
      if (!revisionMatches(stored?.rev, q.rev)) return new RevisionConflict('quotes', q.id, stored?.rev ?? 0, q.rev);
    }
    for (const id of g.delete) quotes.delete(id);
    for (const q of g.put) quotes.set(q.id, bumped(q));
    writes.add(quotes.size === 0 ? store.delete(key) : store.put({ id: key, quotes: [...quotes.values()] }));
  }
  return undefined;
}

/** Aborts the transaction if it is still running, waits for it to end, and returns the error to report. */
async function failed(tx: WriteTx, e: unknown): Promise<Error> {
  const raw = unwrap(tx);
  try {
    raw.abort();
  } catch {
    // the transaction had already aborted on its own (a failed request or a quota error at commit)
  }
  await tx.done.catch(() => undefined);
  // A bare request made after the one that failed ends with an AbortError: the transaction's own error is the cause.
  const cause = e instanceof DOMException && e.name === 'AbortError' && raw.error ? raw.error : e;
  return writeError(cause, raw);
}

/** A put record without a string id or a whole-number revision is refused before any transaction starts. */
function changeShapeProblem(change: BookChange): string | undefined {
  for (const c of COLLECTIONS) {
    for (const [i, r] of (change.put?.[c] ?? []).entries()) {
      if (typeof r?.id !== 'string' || r.id === '') return `${c}[${i}] has no id`;
      if (!Number.isInteger(r.rev) || r.rev < 0) return `${c} record ${r.id} has no valid revision (${String(r.rev)})`;
    }
    for (const id of change.delete?.[c] ?? []) if (typeof id !== 'string') return `a ${c} id to delete is not text`;
  }
  const s: Settings | undefined = change.settings;
  if (s && (s.id !== 'settings' || !Number.isInteger(s.rev) || s.rev < 0)) return 'the settings record has no valid id or revision';
  return undefined;
}

/** Names of this origin's databases, or undefined where the browser cannot list them (or fails to). */
export async function databaseNames(factory: IDBFactory | undefined = globalThis.indexedDB): Promise<Set<string> | undefined> {
  if (!factory || typeof factory.databases !== 'function') return undefined;
  try {
    return new Set((await factory.databases()).map((d) => d.name).filter((n): n is string => typeof n === 'string'));
  } catch {
    return undefined;
  }
}

/** Names of Book databases in this browser, where the browser can list them (undefined where it cannot). */
export async function listBooks(factory: IDBFactory | undefined = globalThis.indexedDB): Promise<string[] | undefined> {
  const names = await databaseNames(factory);
  return names && [...names].filter((n) => n === DEFAULT_BOOK_DB || n.startsWith(`${DEFAULT_BOOK_DB}-`)).sort();
}

/** Deletes a Book database. Open connections in other tabs are asked to close (they see onVersionChange). */
export function deleteBook(name: string, factory: IDBFactory | undefined = globalThis.indexedDB): Promise<void> {
  if (!factory) return Promise.reject(new Error('this browser offers no IndexedDB'));
  return new Promise((resolve, reject) => {
    const request = factory.deleteDatabase(name);
    request.addEventListener('success', () => resolve());
    request.addEventListener('error', () => reject(new Error(`the Book ${name} could not be deleted: ${request.error?.message ?? 'unknown error'}`)));
  });
}
