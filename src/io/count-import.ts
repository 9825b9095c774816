// A stock count file read by the price import's machinery: bytes decoded as UTF-8 or Windows-1252, the header row and
// delimiter found from header words, the part number and count columns guessed from their headers (the person may
// choose others), and every row checked before anything is written, each problem with its file line.
import type { Book } from '../domain/book.ts';
import { LIMITS } from '../domain/schema.ts';
import { partByMpn } from '../domain/stock.ts';
import type { CountLine } from '../domain/stock.ts';
import type { EncodingChoice } from './price-decode.ts';
import { headerWords, parseQty } from './price-map.ts';
import type { PriceProblem } from './price-map.ts';
import { DELIMITER_NAMES, readTableBytes } from './price-read.ts';
import type { DecodeNotes, Delimiter, TableKind } from './price-read.ts';
import { decideDecimal, sha256Hex } from './price-validate.ts';

export const COUNT_FIELDS = ['mpn', 'counted'] as const;
export type CountField = (typeof COUNT_FIELDS)[number];
/** The header read for each field. */
export type CountColumns = Partial<Record<CountField, string>>;

export const COUNT_FIELD_NAMES: Record<CountField, string> = { mpn: 'maker part number', counted: 'count' };

const COUNT_WORDS = headerWords(COUNT_FIELDS, {
  mpn: [
    'mpn', 'part', 'part number', 'part no', 'pn', 'p n', 'maker part number', 'maker part no', 'maker pn',
    'manufacturer part number', 'manufacturer part no', 'mfr part number', 'mfr part no', 'mfr pn', 'item', 'item code',
  ],
  counted: [
    'counted', 'count', 'quantity', 'qty', 'on hand', 'stock', 'in stock', 'found', 'qty counted', 'quantity counted',
    'stock count', 'balance',
  ],
});

/** A count has two columns that matter: one exact header word, or two that contain one, make the header row. */
export const COUNT_TABLE: TableKind = { name: 'stock count file', score: COUNT_WORDS.score, minScore: 2, examples: "'MPN' and 'Counted'" };

export interface CountReadOptions {
  /** Columns the person chose; a field not given is guessed from the headers. */
  columns?: CountColumns;
  /** How to read the bytes (default: find out). */
  encoding?: EncodingChoice;
  delimiter?: Delimiter;
}

export interface CountAnalysis extends DecodeNotes {
  /** False when the file could not be read as a table at all (empty, binary, no header row). */
  readable: boolean;
  delimiterName?: string;
  headerLine: number;
  headers: string[];
  /** The header read for each field: the one chosen, else the guess. */
  columns: CountColumns;
  /** Which of them were guessed from header words. */
  guessed: CountField[];
  decimalReason: string;
  dataRows: number;
  /** Counted parts, each with its file line; empty when there is any problem (all or nothing). */
  lines: (CountLine & { line: number })[];
  problems: PriceProblem[];
  notes: string[];
  hash: string;
}

/** Reads and checks a stock count file against the Book's parts. Nothing is written: see importCount. */
export async function analyseCountFile(book: Book, bytes: Uint8Array, options: CountReadOptions = {}): Promise<CountAnalysis> {
  const hash = await sha256Hex(bytes);
  const chosen = options.columns ?? {};
  const saved = Object.values(chosen).filter((h): h is string => h !== undefined);
  const { read, notes: decodeNotes } = readTableBytes(bytes, options.encoding, {
    kind: COUNT_TABLE,
    // Chosen headers count as header words when looking for the header row, as a supplier's saved mapping does.
    mapping: { columns: Object.fromEntries(saved.map((h, i) => [`c${i}`, h])), layout: 'long' },
    ...(options.delimiter ? { delimiter: options.delimiter } : {}),
  });
  const out: CountAnalysis = { ...decodeNotes, readable: false, headerLine: 0, headers: [], columns: {}, guessed: [], decimalReason: '', dataRows: 0, lines: [], problems: [], notes: [], hash };
  if (!read.ok) return { ...out, problems: read.problems };
  const t = read.table;
  const at = t.headerLine;
  Object.assign(out, { readable: true, delimiterName: DELIMITER_NAMES[t.delimiter], headerLine: at, headers: t.headers, dataRows: t.rows.length, notes: [...t.notes] });
  const lower = t.headers.map((h) => h.trim().toLowerCase());
  const cols: Partial<Record<CountField, number>> = {};
  for (const f of COUNT_FIELDS) {
    const want = chosen[f];
    if (want !== undefined) {
      const col = lower.indexOf(want.trim().toLowerCase());
      if (col < 0) out.problems.push({ row: at, column: want, value: want, reason: `the file has no column "${want}" for the ${COUNT_FIELD_NAMES[f]}` });
      else cols[f] = col;
      continue;
    }
    const col = t.headers.findIndex((h, i) => COUNT_WORDS.guess(h) === f && !Object.values(cols).includes(i));
    if (col >= 0) {
      cols[f] = col;
      out.guessed.push(f);
    } else {
      out.problems.push({ row: at, column: '', value: t.headers.join(' | ').slice(0, 200), reason: `no column of the ${COUNT_FIELD_NAMES[f]} found: choose which column holds it` });
    }
  }
  if (cols.mpn !== undefined && cols.mpn === cols.counted) {
    out.problems.push({ row: at, column: t.headers[cols.mpn]!, value: t.headers[cols.mpn]!, reason: 'the part number and the count must be two different columns' });
  }
  for (const f of COUNT_FIELDS) if (cols[f] !== undefined) out.columns[f] = t.headers[cols[f]!]!;
  if (out.problems.length) return { ...out, problems: [...t.problems, ...out.problems] };
  if (t.rows.length > LIMITS.parts) {
    return { ...out, problems: [{ row: at, column: '', value: '', reason: `a stock count may list at most ${LIMITS.parts.toLocaleString('en-GB')} parts, not ${t.rows.length.toLocaleString('en-GB')}` }] };
  }
  const mpnCol = cols.mpn!;
  const countCol = cols.counted!;
  const decimal = decideDecimal(t.rows, [countCol], {}, t.delimiter);
  out.decimalReason = decimal.reason;
  const problems: PriceProblem[] = [...t.problems];
  const lines: CountAnalysis['lines'] = [];
  const seen = new Map<string, number>();
  const mpnHeader = t.headers[mpnCol]!;
  const countHeader = t.headers[countCol]!;
  for (const row of t.rows) {
    const mpn = (row.cells[mpnCol] ?? '').trim();
    const text = (row.cells[countCol] ?? '').trim();
    if (mpn === '' && text === '') continue;
    const part = mpn === '' ? undefined : partByMpn(book.parts, mpn);
    const counted = parseQty(text, decimal.decimal);
    if (!part) problems.push({ row: row.line, column: mpnHeader, value: mpn, reason: mpn === '' ? 'no part number' : `no part ${JSON.stringify(mpn)} in the Book` });
    else if (seen.has(part.id)) problems.push({ row: row.line, column: mpnHeader, value: mpn, reason: `the part ${JSON.stringify(mpn)} is counted twice (also on line ${seen.get(part.id)})` });
    if (counted === undefined || !Number.isInteger(counted) || counted < 0 || counted > LIMITS.quantity) {
      problems.push({ row: row.line, column: countHeader, value: text, reason: `the count ${JSON.stringify(text)} is not a whole number of parts, 0 or more` });
    } else if (part && !seen.has(part.id)) lines.push({ partId: part.id, counted, line: row.line });
    if (part && !seen.has(part.id)) seen.set(part.id, row.line);
  }
  if (problems.length) return { ...out, problems: problems.sort((a, b) => a.row - b.row) };
  if (lines.length === 0) return { ...out, problems: [{ row: at, column: '', value: '', reason: 'the file counts no parts' }] };
  return { ...out, lines };
}

/** A count file's problems in one sentence, the first few with their lines (each reason names its cell). */
export function countProblemsText(problems: readonly PriceProblem[]): string {
  const shown = problems.slice(0, 5).map((p) => `${p.row ? `line ${p.row}: ` : ''}${p.reason}`);
  return `${shown.join('; ')}${problems.length > 5 ? `; and ${problems.length - 5} more` : ''}`;
}
