// Figures kept for the next start. The figures worker needs a second or more to load its formula engine and work a
// Book out; meanwhile a page would show its tables without unit costs. So the live figures of a Book, once worked out
// and settled, are kept in this browser beside it, and the next start that opens that very Book shows them at once
// while the worker works them out again (its answer replaces them, the same figures).
//
// "That very Book" is checked, never assumed: the key is a SHA-256 digest of the Book as held (every record, the
// records of each collection in order; only the order of a record's own fields is set aside, which storage may
// change and no figure depends on), with the date it is costed at (quotes expire) and the build of the app's engines. Any other Book, the next
// day or a new version of the app misses, and the page waits for the worker as before. The kept figures are a cache,
// not Book data: they live in a database of their own, never in a Book file, and losing them loses nothing.
import { openDB } from 'idb';
import type { DBSchema } from 'idb';
import type { Book } from '../domain/book.ts';
import { costingDateOf } from '../domain/costing.ts';
import type { FiguresUpdate } from '../engine/figures-kinds.ts';
import { databaseNames } from '../store/idb-store.ts';
import { onIdle } from '../domain/slices.ts';

/** Its own database, named so it is never listed as a Book (Book databases are `rungbook` and `rungbook-…`). */
export const KEPT_FIGURES_DB = 'kept-figures.rungbook';

/**
 * Books with more records than this keep no figures: writing the Book out to digest it would hold the page longer
 * than the wait it saves (a few milliseconds per thousand records on a slow machine).
 */
export const KEEP_MAX_RECORDS = 3_000;

/**
 * Nor do Books whose figures are many: each variant has a result per check and a resolution per build line, and
 * writing them out as text holds the page's thread about a millisecond per thousand; past this the writing would be a
 * long task in the middle of a person's work (the reference family's 29,600 took 20–70 ms, measured in the bench).
 */
export const KEEP_MAX_VARIANT_FIGURES = 8_000;

export interface KeptFigures {
  /** The Book's database name: one kept set of figures per Book in this browser. */
  book: string;
  key: string;
  /**
   * The figures as JSON text (keptJson): a megabyte of text is stored and read back in one copy, where the same
   * figures as objects take the page's thread a hundred milliseconds to copy into storage on a slow machine.
   */
  json: string;
  /** When they were kept (ISO time), for a person looking into the browser's storage. */
  at: string;
}

interface KeptSchema extends DBSchema {
  kept: { key: string; value: KeptFigures };
}

function recordCount(book: Book): number {
  let n = 1;
  for (const v of Object.values(book)) if (Array.isArray(v)) n += v.length;
  return n;
}

/** For JSON.stringify: an object whose fields are not in name order is written as a copy that has them so. */
function fieldsInOrder(_key: string, value: unknown): unknown {
  if (value === null || typeof value !== 'object' || Array.isArray(value)) return value;
  const keys = Object.keys(value);
  let inOrder = true;
  for (let i = 1; i < keys.length && inOrder; i++) inOrder = keys[i - 1]! < keys[i]!;
  if (inOrder) return value;
  const copy: Record<string, unknown> = {};
  for (const k of keys.sort()) copy[k] = (value as Record<string, unknown>)[k];
  return copy;
}

/** JSON text of a value with every object's fields in name order, so two copies of one record read alike. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(value, fieldsInOrder) ?? 'null';
}

/**
 * The key of a Book's figures: its records in order, its costing date and the engines' build (`engine`, which must
 * change whenever the code that works figures out does). Undefined for a Book too large to keep figures for, or where
 * the platform has no digest.
 */
export async function figuresKey(book: Book, engine: string): Promise<string | undefined> {
  if (recordCount(book) > KEEP_MAX_RECORDS || book.variants.length * (book.checks.length + book.buildLines.length) > KEEP_MAX_VARIANT_FIGURES) return undefined;
  if (typeof crypto === 'undefined' || !crypto.subtle) return undefined;
  const bytes = new TextEncoder().encode(canonicalJson(book));
  const digest = new Uint8Array(await crypto.subtle.digest('SHA-256', bytes));
  let hex = '';
  for (const b of digest) hex += b.toString(16).padStart(2, '0');
  return `${engine}|${costingDateOf(book.settings)}|${hex}`;
}

/**
 * Version 2: version 1 made the store only when it made the database, so a database made without it (opened by
 * anything else first) could never keep figures; any upgrade now makes the store if it is missing.
 */
const KEPT_DB_VERSION = 2;

function open(dbName: string) {
  return openDB<KeptSchema>(dbName, KEPT_DB_VERSION, {
    upgrade(db) {
      if (!db.objectStoreNames.contains('kept')) db.createObjectStore('kept', { keyPath: 'book' });
    },
  });
}

/** Figures shipped with the app, for the demo Book a first start writes (scripts/kept-demo-figures.ts). */
export interface ShippedFigures {
  key: string;
  update: FiguresUpdate;
}

/** The file the build ships them in, beside index.html. */
export const SHIPPED_FIGURES_FILE = 'kept-demo-figures.json';

/** Numbers JSON has no words for (a figure that cannot be computed is NaN), written as tagged text and read back. */
const NOT_FINITE = '\u0000number:';

export function keptJson(value: ShippedFigures): string {
  return JSON.stringify(value, (_k, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? `${NOT_FINITE}${String(v)}` : v));
}

/** NOT_FINITE as JSON writes it inside a string: text without it holds no tagged number. */
const NOT_FINITE_IN_JSON = JSON.stringify(NOT_FINITE).slice(1, -1);

export function fromKeptJson(text: string): ShippedFigures {
  // Reading back through a reviver takes several times as long, on the way to a first view: only where it is needed.
  if (!text.includes(NOT_FINITE_IN_JSON)) return JSON.parse(text) as ShippedFigures;
  return JSON.parse(text, (_k, v: unknown) => (typeof v === 'string' && v.startsWith(NOT_FINITE) ? Number(v.slice(NOT_FINITE.length)) : v)) as ShippedFigures;
}

/**
 * Asks for the figures shipped with this build for the demo Book. They are shown only for a Book whose key they carry
 * (keptFiguresOf): the demo Book as a first start writes it, on that start or a later one before the Book changed
 * (a reload before the first start's own figures were kept). Undefined when none are shipped, or offline and not
 * stored.
 */
export async function fetchShippedFigures(url: string): Promise<ShippedFigures | undefined> {
  try {
    const response = await fetch(url);
    if (!response.ok) {
      void response.body?.cancel().catch(() => undefined);
      return undefined;
    }
    // Read as soon as they come, while the Book is still being opened: they are asked for only when nothing is kept.
    return fromKeptJson(await response.text());
  } catch {
    return undefined;
  }
}

/** What is kept for the Book in database `bookDb`, whatever Book it was of; undefined when nothing or on any failure. */
export async function readKeptFigures(bookDb: string, dbName: string = KEPT_FIGURES_DB): Promise<KeptFigures | undefined> {
  try {
    const db = await open(dbName);
    try {
      return await db.get('kept', bookDb);
    } finally {
      db.close();
    }
  } catch {
    // A cache that cannot be read is a cache missed: the worker works the figures out as it would anyway.
    return undefined;
  }
}

/** The kept figures when they are of `book` exactly, at its costing date, by this build of the engines. */
export async function keptFiguresOf(kept: ShippedFigures | KeptFigures | undefined, book: Book, engine: string): Promise<FiguresUpdate | undefined> {
  if (!kept) return undefined;
  // Figures of another build never match: known without digesting the Book.
  if (typeof kept.key !== 'string' || !kept.key.startsWith(`${engine}|`)) return undefined;
  const key = await figuresKey(book, engine).catch(() => undefined);
  if (key === undefined || kept.key !== key) return undefined;
  if ('update' in kept) return kept.update;
  try {
    return fromKeptJson(kept.json).update;
  } catch {
    return undefined;
  }
}

/** The figures a start may show before the worker has worked them out, asked for beside the Book. */
export interface StartFigures {
  /** What is kept for the Book (read only if its database exists). */
  kept: Promise<KeptFigures | undefined>;
  /** What the build ships for the demo Book: asked for when nothing is kept (shown only for the Book it is keyed by). */
  shipped: Promise<ShippedFigures | undefined>;
  /**
   * Whether one of them will likely be shown (figures kept, or a first start), for starting the worker later. A later
   * start whose Book turns out to be the one the shipped figures are of is not foreseen: its worker warms up early.
   */
  likely: Promise<boolean>;
}

/**
 * Asks for the figures a start may show, and opens the Book (`openBook`, told whether the list of databases lacks the
 * Book's, a likely first start) at the same time. The kept figures' database is read only if the list names it, so it
 * is not created just to be read; the shipped figures are fetched when nothing is kept. The list is taken beside the
 * opening, which creates the Book's database on a first start, so a first start is told by the opening, never by the
 * list.
 */
export async function startFigures<T extends { startedFresh: boolean }>(
  bookDb: string,
  shippedUrl: string,
  openBook: (firstStartLikely: Promise<boolean>) => Promise<T>,
  factory: IDBFactory | undefined = globalThis.indexedDB,
  dbName: string = KEPT_FIGURES_DB,
): Promise<{ figures: StartFigures; opening: Promise<T> }> {
  const names = databaseNames(factory);
  // Only a guess for the opening to prepare by: the list may be taken after the opening made the Book's database.
  const opening = openBook(names.then((n) => n !== undefined && !n.has(bookDb)));
  const fresh = opening.then((b) => b.startedFresh, () => false);
  const kept = names.then((n) => (n !== undefined && !n.has(dbName) ? undefined : readKeptFigures(bookDb, dbName)));
  const shipped = kept.then((k) => (k ? undefined : fetchShippedFigures(shippedUrl)));
  const likely = kept.then((k) => k !== undefined || fresh);
  return { figures: { kept, shipped, likely }, opening };
}

/** Keeps a Book's settled figures for the next start; a Book too large to key drops what was kept for it. */
export async function keepFigures(bookDb: string, book: Book, engine: string, update: FiguresUpdate, dbName: string = KEPT_FIGURES_DB): Promise<boolean> {
  try {
    const key = await figuresKey(book, engine);
    const db = await open(dbName);
    try {
      if (key === undefined) await db.delete('kept', bookDb);
      else await db.put('kept', { book: bookDb, key, json: keptJson({ key, update }), at: new Date().toISOString() });
    } finally {
      db.close();
    }
    return key !== undefined;
  } catch {
    // Out of space, storage turned off: the next start waits for the worker, nothing else is lost.
    return false;
  }
}

/** The slice of the costing service that keeping needs. */
export interface FiguresSource extends EventTarget {
  settled(): { book: Book; update: FiguresUpdate } | undefined;
}

/** How long the figures must stay settled before they are kept: edits come in bursts, keeping each would be waste. */
export const KEEP_AFTER_MS = 1_500;

/**
 * Keeps the figures of `costing` each time they settle and stay so for `after` ms (the first settled figures at
 * once), when the page is idle where the browser says so. `alreadyKept` names a Book whose figures are kept already
 * (they were read from the kept store at start). Gives the function that stops it.
 */
export function followFigures(
  costing: FiguresSource,
  bookDb: string,
  engine: string,
  options: { dbName?: string; after?: number; alreadyKept?: Book } = {},
): () => void {
  const { dbName = KEPT_FIGURES_DB, after = KEEP_AFTER_MS } = options;
  let timer: ReturnType<typeof setTimeout> | undefined;
  // A Book whose figures were read from what was kept need not be written again when the worker agrees.
  let keptBook: Book | undefined = options.alreadyKept;
  let stopped = false;
  const idle = (run: () => void): void => onIdle(run, 5_000, 'at once');
  const onChange = (): void => {
    if (timer !== undefined) clearTimeout(timer);
    // The first figures of a start are kept at the first idle moment (the page may be closed soon after); later
    // ones once edits pause.
    timer = setTimeout(
      () => {
        timer = undefined;
        idle(() => {
          const now = costing.settled();
          if (stopped || !now || now.book === keptBook) return;
          keptBook = now.book;
          void keepFigures(bookDb, now.book, engine, now.update, dbName);
        });
      },
      keptBook === undefined ? 0 : after,
    );
  };
  costing.addEventListener('change', onChange);
  return () => {
    stopped = true;
    if (timer !== undefined) clearTimeout(timer);
    costing.removeEventListener('change', onChange);
  };
}
