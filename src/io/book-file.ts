// The `.rungbook.json` Book file: our own versioned format. Writing is stable (fixed key order, one record per line,
// price breaks as [quantity, price] pairs); reading migrates older versions step by step, then validates through
// the Book schema and returns either the Book or the first problems, each with its place in the file.
import { runInSlices } from '../domain/slices.ts';
import type { Sliced } from '../domain/slices.ts';
import { COLLECTIONS } from '../domain/book.ts';
import { isIsoTime } from '../domain/dates.ts';
import type { Book, Quote } from '../domain/book.ts';
import { BOOK_FORMAT, BOOK_VERSION, checkBook, isObject, short } from '../domain/schema.ts';
import type { SchemaProblem } from '../domain/schema.ts';
import { FILE_MIGRATIONS, migrateFile } from './book-file-migrations.ts';
import { jsonProblemMessage } from './json-locate.ts';

export const BOOK_FILE_EXTENSION = '.rungbook.json';
/**
 * Largest Book file accepted: room for a million quotes (about 190 bytes each on file) and far below what a
 * browser tab can hold as one text.
 */
export const MAX_BOOK_FILE_BYTES = 256 * 1024 * 1024;
/** How many problems a rejected file reports (the rest are counted). */
export const MAX_REPORTED_PROBLEMS = 20;

const MB = 1024 * 1024;

export type BookFileProblem = SchemaProblem;

export type BookFileResult =
  | { ok: true; book: Book; savedAt?: string }
  | { ok: false; problems: BookFileProblem[]; /** All problems found, of which the first are listed. */ total: number };

// ---------------------------------------------------------------------------------------------------------------
// Writing

/**
 * The Book as file text: top-level keys in a fixed order, each record on its own line with `id`, `rev` first and
 * the rest sorted, so a file changes line by line as the Book does.
 */
export function serializeBook(book: Book, opts: { savedAt?: string } = {}): string {
  const out: string[] = [];
  for (const piece of bookFilePieces(book, opts)) out.push(piece);
  return out.join('');
}

/**
 * The Book file text in pieces (the header, then one piece per record, then the closing lines) that join to
 * exactly serializeBook's text: the app writes a large Book a slice at a time between frames (serializeBookSliced).
 */
export function* bookFilePieces(book: Book, opts: { savedAt?: string } = {}): Generator<string, void, undefined> {
  yield [
    '{',
    `  "format": ${JSON.stringify(BOOK_FORMAT)},`,
    `  "version": ${BOOK_VERSION},`,
    `  "savedAt": ${JSON.stringify(opts.savedAt ?? new Date().toISOString())},`,
    `  "settings": ${JSON.stringify(ordered(book.settings))},\n`,
  ].join('\n');
  for (const [ci, c] of COLLECTIONS.entries()) {
    const records = book[c] as object[];
    const end = ci < COLLECTIONS.length - 1 ? ',' : '';
    if (records.length === 0) {
      yield `  ${JSON.stringify(c)}: []${end}\n`;
      continue;
    }
    yield `  ${JSON.stringify(c)}: [\n`;
    for (let i = 0; i < records.length; i++) {
      const r = records[i]!;
      yield `    ${JSON.stringify(ordered(c === 'quotes' ? encodeQuote(r as Quote) : r))}${i < records.length - 1 ? ',' : ''}\n`;
    }
    yield `  ]${end}\n`;
  }
  yield '}\n';
}

/** Why a Book written as `bytes` bytes could not be opened again, or undefined when it can. */
export function bookFileWriteProblem(bytes: number): string | undefined {
  if (bytes <= MAX_BOOK_FILE_BYTES) return undefined;
  return `this Book would be a ${(bytes / MB).toFixed(1)} MB file (${bytes.toLocaleString('en-GB')} bytes); a Book file may be at most ${MAX_BOOK_FILE_BYTES / MB} MB, so it could not be opened again. Nothing was written.`;
}

/**
 * serializeBook's text as pieces, made a slice at a time: after each `sliceMs` of work it awaits `pause` (the app
 * lets the page draw and answer clicks there). The pieces join to exactly serializeBook's text.
 */
export async function serializeBookSliced(
  book: Book,
  opts: { savedAt?: string; sliceMs?: number; pause?: () => Promise<void> } = {},
): Promise<string[]> {
  const pieces = bookFilePieces(book, opts.savedAt === undefined ? {} : { savedAt: opts.savedAt });
  function* collect(): Sliced<string[]> {
    const out: string[] = [];
    let n = 0;
    for (const piece of pieces) {
      out.push(piece);
      // Looking at the clock every 64 records keeps its cost out of the figure.
      if ((++n & 63) === 0) yield;
    }
    return out;
  }
  const options: Parameters<typeof runInSlices>[1] = { budgetMs: opts.sliceMs ?? 12 };
  if (opts.pause) options.pause = opts.pause;
  return runInSlices(collect(), options);
}

function encodeQuote(q: Quote): unknown {
  return { ...q, breaks: q.breaks.map((b) => [b.qty, b.price]) };
}

const FIRST_KEYS = ['id', 'rev'];

function ordered(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(ordered);
  if (typeof value !== 'object' || value === null) return value;
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj)
    .filter((k) => obj[k] !== undefined)
    .sort((a, b) => {
      const ia = FIRST_KEYS.indexOf(a);
      const ib = FIRST_KEYS.indexOf(b);
      if (ia >= 0 || ib >= 0) return (ia < 0 ? 99 : ia) - (ib < 0 ? 99 : ib);
      return a < b ? -1 : a > b ? 1 : 0;
    });
  const out: Record<string, unknown> = {};
  for (const k of keys) out[k] = ordered(obj[k]);
  return out;
}

/** Suggested file name for a Book: its name reduced to safe characters. */
export function bookFileName(book: Book): string {
  const base = book.settings.bookName.trim().toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '');
  return `${base || 'book'}${BOOK_FILE_EXTENSION}`;
}

// ---------------------------------------------------------------------------------------------------------------
// Reading

/** A size check to run before reading a file at all (the CLI and the app know the size up front). */
export function bookFileSizeProblem(bytes: number): BookFileProblem | undefined {
  if (bytes <= MAX_BOOK_FILE_BYTES) return undefined;
  return {
    path: '',
    message: `the file is ${(bytes / MB).toFixed(1)} MB (${bytes.toLocaleString('en-GB')} bytes); a Book file may be at most ${MAX_BOOK_FILE_BYTES / MB} MB, so this is not a Book file`,
  };
}

/** Reads Book file text. Never throws: any input gives a Book or a list of problems. */
export function parseBookFile(text: string): BookFileResult {
  if (typeof text !== 'string') return fail([{ path: '', message: 'the file could not be read as text' }]);
  // A UTF-16 code unit is at least one byte in the file, so more units than the byte limit means too many bytes.
  const tooBig = text.length > MAX_BOOK_FILE_BYTES ? bookFileSizeProblem(text.length) : undefined;
  if (tooBig) return fail([tooBig]);
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const start = body.search(/\S/);
  if (start < 0) return fail([{ path: '', message: 'the file is empty' }]);
  if (body[start] !== '{') {
    return fail([{ path: '', message: 'this is not a Rungbook Book file: a Book file is a JSON object, starting with "{"' }]);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(body);
  } catch {
    return fail([{ path: '', message: jsonProblemMessage(body) }]);
  }
  return restoreBook(raw);
}

function fail(problems: BookFileProblem[], total = problems.length): BookFileResult {
  return { ok: false, problems: problems.slice(0, MAX_REPORTED_PROBLEMS), total };
}


/** Validates parsed JSON of any released file version and restores it into a Book, filling defaults. */
export function restoreBook(raw: unknown): BookFileResult {
  if (!isObject(raw)) return fail([{ path: '', message: 'this is not a Rungbook Book file: it is not a JSON object' }]);
  if (raw.format !== BOOK_FORMAT) {
    const found = raw.format === undefined ? 'has no "format" marker' : `has "format": ${short(raw.format)}`;
    return fail([{ path: 'format', message: `this is not a Rungbook Book file: it ${found}, expected "${BOOK_FORMAT}"` }]);
  }
  const version = raw.version;
  if (typeof version !== 'number' || !Number.isInteger(version) || version < 1) {
    return fail([{ path: 'version', message: `the Book file version must be a whole number from 1, not ${short(version)}` }]);
  }
  if (version > BOOK_VERSION) {
    return fail([
      { path: 'version', message: `this Book file was written by a newer Rungbook (version ${version}); this one reads up to ${BOOK_VERSION}` },
    ]);
  }
  const { savedAt, ...data } = migrateFile(raw, version, FILE_MIGRATIONS);
  const problems: BookFileProblem[] = [];
  if (savedAt !== undefined && (typeof savedAt !== 'string' || !isIsoTime(savedAt))) {
    problems.push({ path: 'savedAt', message: `must be an ISO date and time (YYYY-MM-DDTHH:MM:SSZ), not ${short(savedAt)}` });
  }
  const checked = checkBook(decode(data));
  if (!checked.ok) problems.push(...checked.problems);
  if (problems.length || !checked.ok) return fail(problems, problems.length);
  return savedAt === undefined ? { ok: true, book: checked.value } : { ok: true, book: checked.value, savedAt: savedAt as string };
}

/**
 * The current file form as the Book's records: price-break pairs become { qty, price }, and the position of a build
 * line or page that has none is its place in the list.
 */
function decode(data: Record<string, unknown>): Record<string, unknown> {
  const out = { ...data };
  if (Array.isArray(data.quotes)) {
    out.quotes = data.quotes.map((q: unknown) =>
      isObject(q) && Array.isArray(q.breaks)
        ? { ...q, breaks: q.breaks.map((b: unknown) => (Array.isArray(b) && b.length === 2 ? { qty: b[0], price: b[1] } : b)) }
        : q,
    );
  }
  for (const c of ['buildLines', 'pages'] as const) {
    const list = data[c];
    if (Array.isArray(list)) out[c] = list.map((r: unknown, i) => (isObject(r) && r.position === undefined ? { ...r, position: i + 1 } : r));
  }
  return out;
}
