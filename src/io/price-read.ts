// Reads decoded price-file text into a header and rows with papaparse: finds the header row among leading title,
// blank and comment lines by its words, picks the delimiter (comma, semicolon, tab, pipe), and keeps each row's
// 1-based file line so problems point at the line a user sees in a text editor.
import Papa from 'papaparse';
import type { ColumnMapping } from '../domain/book.ts';
import { LIMITS } from '../domain/schema.ts';
import { decodePriceBytes } from './price-decode.ts';
import type { EncodingChoice, EncodingName } from './price-decode.ts';
import { headerWordScore } from './price-map.ts';
import type { PriceProblem } from './price-map.ts';

export const DELIMITERS = [',', ';', '\t', '|'] as const;
export type Delimiter = (typeof DELIMITERS)[number];
export const DELIMITER_NAMES: Record<Delimiter, string> = { ',': 'comma', ';': 'semicolon', '\t': 'tab', '|': 'pipe' };

export interface TableRow {
  /** 1-based line in the file where the row starts. */
  line: number;
  cells: string[];
}

export interface PriceTable {
  delimiter: Delimiter;
  headerLine: number;
  headers: string[];
  rows: TableRow[];
  notes: string[];
  /** Row-level reading problems (unclosed quotes, more cells than headers). */
  problems: PriceProblem[];
}

export type ReadResult = { ok: true; table: PriceTable } | { ok: false; problems: PriceProblem[] };

export interface ReadOptions {
  /** Saved or confirmed mapping: its headers count as header words when looking for the header row. */
  mapping?: ColumnMapping;
  /** Forces the delimiter instead of detecting it. */
  delimiter?: Delimiter;
  /** Called every few thousand rows with the number of rows read so far. */
  onRows?: (rows: number) => void;
  /** What the file is, by its header words (default: a supplier's price file). */
  kind?: TableKind;
}

/** A kind of file read here: its name in messages, how strongly a cell reads as one of its headers, header examples. */
export interface TableKind {
  name: string;
  score: (cell: string) => number;
  /** The score a line needs to be taken for the header row. */
  minScore: number;
  examples: string;
}

export const PRICE_TABLE: TableKind = { name: 'price file', score: headerWordScore, minScore: 3, examples: "'MPN', 'Order code', 'Qty' and 'Price'" };

/**
 * Bounds real price files never reach, so a hostile file is refused quickly instead of freezing the page (the
 * mapping offers every header for every field: columns × fields grows fast). Each refusal names its limit.
 */
export const PRICE_FILE_LIMITS = {
  /** Columns in the header row. */
  columns: 200,
  /** Characters in one header cell: a remembered mapping stores headers as names. */
  headerCell: LIMITS.name,
  /** Characters in one row (a 10,000-character description still fits). */
  rowChars: 65_536,
  /** Data rows: every row is at most one quote. */
  rows: LIMITS.quotes,
} as const;

const n = (x: number): string => x.toLocaleString('en-GB');

/** How many leading lines may hold titles and comments before the header. */
const HEADER_SEARCH_LINES = 100;
const PROGRESS_EVERY = 2000;

/** Splits one physical line on a delimiter, honouring double quotes (enough to score a header candidate). */
function splitLine(line: string, d: string): string[] {
  const cells: string[] = [];
  let cur = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i]!;
    if (quoted) {
      if (c === '"') {
        if (line[i + 1] === '"') {
          cur += '"';
          i++;
        } else quoted = false;
      } else cur += c;
    } else if (c === '"' && cur.trim() === '') {
      quoted = true;
      cur = '';
    } else if (c === d) {
      cells.push(cur);
      cur = '';
    } else cur += c;
  }
  cells.push(cur);
  return cells;
}

/** Columns of text[from, to) under the delimiter that splits it most (quotes ignored: only for a message). */
function widestSplit(text: string, from: number, to: number, forced?: Delimiter): number {
  const counts = new Map<number, number>((forced ? [forced] : DELIMITERS).map((d) => [d.charCodeAt(0), 0]));
  for (let i = from; i < to; i++) {
    const c = text.charCodeAt(i);
    const k = counts.get(c);
    if (k !== undefined) counts.set(c, k + 1);
  }
  return Math.max(...counts.values()) + 1;
}

function isCommentLine(line: string): boolean {
  return /^\s*(#|\/\/|--|;;|rem\s)/i.test(line);
}

interface HeaderGuess {
  line: number;
  offset: number;
  delimiter: Delimiter;
  score: number;
  cells: number;
}

function scoreLine(line: string, d: Delimiter, saved: Set<string>, kind: TableKind): { score: number; cells: number } {
  const cells = splitLine(line, d);
  if (cells.length < 2) return { score: 0, cells: cells.length };
  let score = 0;
  // A line wider than any real header is scored on its first columns only; readPriceTable then refuses it.
  for (const c of cells.length > PRICE_FILE_LIMITS.columns ? cells.slice(0, PRICE_FILE_LIMITS.columns) : cells) {
    const t = c.trim();
    score += saved.has(t.toLowerCase()) ? 2 : kind.score(t);
  }
  return { score, cells: cells.length };
}

/** Finds the header: the leading line whose cells read most like header words, under the delimiter that splits it so. */
function findHeader(text: string, saved: Set<string>, kind: TableKind, forced?: Delimiter): { best?: HeaderGuess; overlong?: { line: number; columns: number } } {
  let best: HeaderGuess | undefined;
  let overlong: { line: number; columns: number } | undefined;
  let offset = 0;
  for (let lineNo = 1; lineNo <= HEADER_SEARCH_LINES && offset < text.length; lineNo++) {
    let end = text.indexOf('\n', offset);
    const cr = text.indexOf('\r', offset);
    let next: number;
    if (end < 0 && cr < 0) {
      end = text.length;
      next = text.length;
    } else if (end < 0 || (cr >= 0 && cr < end)) {
      end = cr;
      next = text[cr + 1] === '\n' ? cr + 2 : cr + 1;
    } else next = end + 1;
    if (end - offset > PRICE_FILE_LIMITS.rowChars) {
      overlong ??= { line: lineNo, columns: widestSplit(text, offset, end, forced) };
      offset = next;
      continue;
    }
    const line = text.slice(offset, end);
    if (line.trim() !== '' && !isCommentLine(line)) {
      for (const d of forced ? [forced] : DELIMITERS) {
        const { score, cells } = scoreLine(line, d, saved, kind);
        if (score < kind.minScore) continue; // a price file: at least one exact header word and one more
        if (!best || score > best.score || (score === best.score && lineNo === best.line && cells > best.cells)) {
          best = { line: lineNo, offset, delimiter: d, score, cells };
        }
      }
    }
    offset = next;
  }
  return best ? { best } : overlong === undefined ? {} : { overlong };
}

/** Counts line breaks in text[from, to): CRLF and LF count once each, a lone CR (old files) counts too. */
function countBreaks(text: string, from: number, to: number): number {
  let n = 0;
  for (let i = from; i < to; i++) {
    const c = text.charCodeAt(i);
    if (c === 10) n++;
    else if (c === 13 && text.charCodeAt(i + 1) !== 10) n++;
  }
  return n;
}

/** Why a header row is beyond the limits, or undefined. */
function headerLimitProblem(headers: readonly string[], kind: TableKind): string | undefined {
  if (headers.length > PRICE_FILE_LIMITS.columns) {
    return `the header row has ${n(headers.length)} columns; a ${kind.name} may have at most ${n(PRICE_FILE_LIMITS.columns)}`;
  }
  const long = headers.findIndex((h) => h.trim().length > PRICE_FILE_LIMITS.headerCell);
  if (long >= 0) {
    return `column ${long + 1} of the header row is ${n(headers[long]!.trim().length)} characters long; a column header may be at most ${n(PRICE_FILE_LIMITS.headerCell)}`;
  }
  return undefined;
}

export function readPriceTable(text: string, options: ReadOptions = {}): ReadResult {
  const saved = new Set(Object.values(options.mapping?.columns ?? {}).map((h) => h.trim().toLowerCase()));
  const kind = options.kind ?? PRICE_TABLE;
  const found = findHeader(text, saved, kind, options.delimiter);
  const header = found.best;
  if (!header && found.overlong !== undefined) {
    const { line, columns } = found.overlong;
    const reason =
      columns > PRICE_FILE_LIMITS.columns
        ? `line ${line} has ${n(columns)} columns; a ${kind.name} may have at most ${n(PRICE_FILE_LIMITS.columns)}`
        : `line ${line} is longer than ${n(PRICE_FILE_LIMITS.rowChars)} characters, the most a ${kind.name} row may hold, and no header row was found before it`;
    return { ok: false, problems: [{ row: line, column: '', value: '', reason }] };
  }
  if (!header) {
    return {
      ok: false,
      problems: [
        {
          row: 0,
          column: '',
          value: '',
          reason: `no header row found in the first ${HEADER_SEARCH_LINES} lines: expected column names such as ${kind.examples} separated by commas, semicolons, tabs or pipes`,
        },
      ],
    };
  }
  const notes: string[] = [];
  const body = text.slice(header.offset);
  let delimiter = header.delimiter;
  if (!options.delimiter) {
    // papaparse's own guess over the header and the first rows; kept when it splits the header at least as well.
    const guess = Papa.parse<string[]>(body.slice(0, 65536), { delimitersToGuess: [...DELIMITERS], preview: 20 }).meta.delimiter;
    if (guess !== delimiter && (DELIMITERS as readonly string[]).includes(guess)) {
      const firstLine = body.split(/\r\n|\n|\r/, 1)[0] ?? '';
      const theirs = scoreLine(firstLine, guess as Delimiter, saved, kind);
      if (theirs.score >= header.score && theirs.cells > header.cells) delimiter = guess as Delimiter;
      else notes.push(`delimiter ${DELIMITER_NAMES[delimiter]} chosen from the header words (the data alone suggested ${DELIMITER_NAMES[guess as Delimiter] ?? guess})`);
    }
  }
  if (header.line > 1) notes.push(`header found on line ${header.line}; ${header.line - 1} line(s) above it skipped`);

  const rows: TableRow[] = [];
  const problems: PriceProblem[] = [];
  let headers: string[] | undefined;
  let rowStart = 0;
  let lineAtStart = header.line;
  let lastNonEmpty = -1;
  let refused: PriceProblem | undefined;
  Papa.parse<string[]>(body, {
    delimiter,
    quoteChar: '"',
    skipEmptyLines: false,
    step: (result, parser) => {
      const cursor = result.meta.cursor;
      const rowChars = cursor - rowStart;
      const line = lineAtStart;
      lineAtStart += countBreaks(body, rowStart, cursor);
      rowStart = cursor;
      const cells = result.data;
      for (const e of result.errors) {
        if (e.type === 'Quotes') {
          problems.push({ row: line, column: '', value: cells.join(delimiter).slice(0, 80), reason: 'a quoted field is not closed: a " is missing' });
        }
      }
      if (!headers) {
        headers = cells.map((c) => c.trim());
        // Checked before any data row is read.
        const p = headerLimitProblem(headers, kind);
        if (p) {
          refused = { row: line, column: '', value: '', reason: p };
          parser.abort();
        }
        return;
      }
      if (rowChars > PRICE_FILE_LIMITS.rowChars) {
        // Kept out of the rows (it could hold anything); named as a problem, so the file is not imported whole.
        problems.push({
          row: line,
          column: '',
          value: cells.join(delimiter).slice(0, 80),
          reason: `the row is ${n(rowChars)} characters long; a ${kind.name} row may hold at most ${n(PRICE_FILE_LIMITS.rowChars)}`,
        });
        return;
      }
      let empty = true;
      let filled = 0;
      for (const c of cells) {
        if (c.trim() !== '') {
          empty = false;
          filled++;
        }
      }
      if (empty) return;
      if (filled === 1 && isCommentLine(cells.find((c) => c.trim() !== '')!)) return;
      if (cells.length > headers.length && cells.slice(headers.length).some((c) => c.trim() !== '')) {
        problems.push({
          row: line,
          column: '',
          value: cells.slice(headers.length).join(delimiter).slice(0, 80),
          reason: `the row has ${cells.length} cells but the header has ${headers.length}: a field holding the ${DELIMITER_NAMES[delimiter]} must be in double quotes`,
        });
      }
      if (rows.length >= PRICE_FILE_LIMITS.rows) {
        refused = {
          row: line,
          column: '',
          value: '',
          reason: `the file has more than ${n(PRICE_FILE_LIMITS.rows)} data rows, the most a ${kind.name} may hold; split it into smaller files`,
        };
        parser.abort();
        return;
      }
      // Cells beyond the header's are only named as a problem above; they are not kept.
      rows.push({ line, cells: cells.length > headers.length + 1 ? cells.slice(0, headers.length + 1) : cells });
      lastNonEmpty = rows.length;
      if (options.onRows && rows.length % PROGRESS_EVERY === 0) options.onRows(rows.length);
    },
  });
  if (refused) return { ok: false, problems: [refused] };
  if (!headers) return { ok: false, problems: [{ row: header.line, column: '', value: '', reason: 'the header row could not be read' }] };
  if (lastNonEmpty < 0) {
    return {
      ok: false,
      problems: [{ row: header.line, column: '', value: headers.join(' | ').slice(0, 200), reason: `the file has a header row (line ${header.line}) but no data rows` }],
    };
  }
  options.onRows?.(rows.length);
  return { ok: true, table: { delimiter, headerLine: header.line, headers, rows, notes, problems } };
}

/** What reading a file's bytes found out about its letters, for the person to check. */
export interface DecodeNotes {
  encoding?: EncodingName;
  /** Set when some letters may be wrong: which lines are not in the file's encoding (also in nonUtf8Lines). */
  encodingWarning?: string;
  nonUtf8Lines?: number[];
}

/** Bytes to a table: decoded as UTF-8 or Windows-1252 (found out, or as chosen), then read as readPriceTable does. */
export function readTableBytes(bytes: Uint8Array, encoding: EncodingChoice | undefined, options: ReadOptions = {}): { read: ReadResult; notes: DecodeNotes } {
  const decoded = decodePriceBytes(bytes, encoding);
  if (!decoded.ok) return { read: { ok: false, problems: [{ row: 0, column: '', value: '', reason: decoded.reason }] }, notes: {} };
  const notes: DecodeNotes = { encoding: decoded.encoding };
  if (decoded.warning) notes.encodingWarning = decoded.warning;
  if (decoded.nonUtf8Lines) notes.nonUtf8Lines = decoded.nonUtf8Lines;
  return { read: readPriceTable(decoded.text, options), notes };
}
