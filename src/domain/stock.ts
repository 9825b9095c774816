// Stock as a ledger: on hand is the sum of a part's movements, never a stored number. Recording a movement, a
// stock count (its differences become 'counted' movements) and a run's issue are changes to the Book, checked
// first: bad input gives a message and no change.
import { mpnKey, newId } from './book.ts';
import type { Book, ImportBatch, Part, Run, StockMove, StockMoveKind } from './book.ts';
import type { BookChange } from './book-ops.ts';
import { isIsoDate } from './dates.ts';
import { LIMITS, STOCK_MOVE_KINDS } from './schema.ts';

export type Outcome<T> = { ok: true; value: T } | { ok: false; error: string };

const fail = <T>(error: string): Outcome<T> => ({ ok: false, error });

/** On hand per part id: the sum of every movement (parts with no movement are absent, meaning 0). */
export function onHandByPart(moves: readonly StockMove[]): Map<string, number> {
  const out = new Map<string, number>();
  for (const m of moves) out.set(m.partId, (out.get(m.partId) ?? 0) + m.quantity);
  return out;
}

/** On hand of one part, optionally counting only movements up to and including `asOf`. */
export function onHand(moves: readonly StockMove[], partId: string, asOf?: string): number {
  let n = 0;
  for (const m of moves) if (m.partId === partId && (asOf === undefined || m.date <= asOf)) n += m.quantity;
  return n;
}

/** One line of a part's history: the movement and the balance after it. */
export interface HistoryLine {
  move: StockMove;
  balance: number;
}

/** A part's movements in date order (ties in the order recorded), each with the running balance. */
export function partHistory(moves: readonly StockMove[], partId: string): HistoryLine[] {
  const own = moves.map((m, i) => ({ m, i })).filter(({ m }) => m.partId === partId);
  own.sort((a, b) => (a.m.date < b.m.date ? -1 : a.m.date > b.m.date ? 1 : a.i - b.i));
  let balance = 0;
  return own.map(({ m }) => ({ move: m, balance: (balance += m.quantity) }));
}

/** Signs each kind must have: in, out, or either. */
const SIGN: Record<StockMoveKind, 1 | -1 | 0> = { counted: 0, received: 1, issued: -1, scrapped: -1, adjusted: 0 };

export interface MoveInput {
  partId: string;
  date: string;
  quantity: number;
  kind: StockMoveKind;
  reason?: string;
  runId?: string;
}

/** Why a hand-made movement cannot be recorded, or undefined. Receipts come through orders (see orders.ts). */
export function moveProblem(book: Book, input: MoveInput): string | undefined {
  if (!book.parts.some((p) => p.id === input.partId)) return `no part with id ${input.partId} in the Book`;
  if (!isIsoDate(input.date)) return `the date must be written YYYY-MM-DD, not ${JSON.stringify(input.date)}`;
  if (!(STOCK_MOVE_KINDS as readonly string[]).includes(input.kind)) return `the kind must be one of ${STOCK_MOVE_KINDS.join(', ')}`;
  const q = input.quantity;
  if (!Number.isInteger(q) || q === 0 || Math.abs(q) > LIMITS.quantity) return `the quantity must be a whole number of parts other than 0, not ${q}`;
  const sign = SIGN[input.kind];
  if (sign !== 0 && Math.sign(q) !== sign) return `a ${input.kind} movement ${sign > 0 ? 'adds to' : 'takes from'} stock: its quantity must be ${sign > 0 ? 'above' : 'below'} 0`;
  if ((input.reason ?? '').length > LIMITS.shortText) return `the reason may be at most ${LIMITS.shortText} characters long`;
  if (input.runId !== undefined && !book.runs.some((r) => r.id === input.runId)) return `no run with id ${input.runId} in the Book`;
  return undefined;
}

/** A new movement (rev 0, ready to be put). */
export function newMove(input: MoveInput): StockMove {
  const m: StockMove = { id: newId('move'), rev: 0, partId: input.partId, date: input.date, quantity: input.quantity, kind: input.kind, reason: input.reason ?? '' };
  if (input.runId !== undefined) m.runId = input.runId;
  return m;
}

/** A hand-recorded movement (scrap, adjustment, count difference) as a Book change. */
export function recordMove(book: Book, input: MoveInput): Outcome<BookChange> {
  const bad = moveProblem(book, input);
  if (bad) return fail(bad);
  return { ok: true, value: { put: { stockMoves: [newMove(input)] } } };
}

// ---------------------------------------------------------------------------------------------------------------
// Stock counts

/** One counted part: the part and how many were found. */
export interface CountLine {
  partId: string;
  counted: number;
}

export interface CountResult {
  change: BookChange;
  /** Per counted part: what the ledger said, what was counted, the movement written (0 = none needed). */
  lines: { partId: string; before: number; counted: number; difference: number }[];
}

/**
 * A stock count as 'counted' movements: for each counted part, the difference between the count and the ledger
 * on that date. A part counted twice, an unknown part or a count that is not a whole number ≥ 0 refuses the whole
 * count (all or nothing).
 */
export function stockCount(book: Book, date: string, lines: readonly CountLine[], reason = 'stock count'): Outcome<CountResult> {
  if (!isIsoDate(date)) return fail(`the count date must be written YYYY-MM-DD, not ${JSON.stringify(date)}`);
  if (lines.length === 0) return fail('the count lists no parts');
  const parts = new Set(book.parts.map((p) => p.id));
  const seen = new Set<string>();
  const problems: string[] = [];
  lines.forEach((l, i) => {
    if (!parts.has(l.partId)) problems.push(`line ${i + 1}: no part with id ${l.partId} in the Book`);
    else if (seen.has(l.partId)) problems.push(`line ${i + 1}: the part ${l.partId} is counted twice`);
    if (!Number.isInteger(l.counted) || l.counted < 0 || l.counted > LIMITS.quantity) {
      problems.push(`line ${i + 1}: a count must be a whole number of parts, 0 or more, not ${l.counted}`);
    }
    seen.add(l.partId);
  });
  if (problems.length) return fail(`the count was not recorded: ${problems.slice(0, 5).join('; ')}${problems.length > 5 ? `; and ${problems.length - 5} more` : ''}`);
  const out: CountResult['lines'] = [];
  const moves: StockMove[] = [];
  for (const l of lines) {
    const before = onHand(book.stockMoves, l.partId, date);
    const difference = l.counted - before;
    out.push({ partId: l.partId, before, counted: l.counted, difference });
    if (difference !== 0) moves.push(newMove({ partId: l.partId, date, quantity: difference, kind: 'counted', reason }));
  }
  return { ok: true, value: { change: { put: { stockMoves: moves } }, lines: out } };
}

/** The count file a stock count came from, kept as an import batch so the count can be undone later. */
export interface CountFile {
  fileName: string;
  /** SHA-256 of the file's bytes, hex. */
  hash: string;
  /** Data rows read. */
  rows: number;
  /** Time of the import (ISO). */
  at: string;
}

/** A stock count read from a file: the count's movements and an import batch naming them (undone as one). */
export function importCount(book: Book, date: string, lines: readonly CountLine[], file: CountFile): Outcome<CountResult & { batch: ImportBatch }> {
  const fileName = file.fileName.trim().slice(0, LIMITS.shortText) || 'stock count';
  const counted = stockCount(book, date, lines, `stock count ${fileName}`.slice(0, LIMITS.shortText));
  if (!counted.ok) return counted;
  const moves = counted.value.change.put?.stockMoves ?? [];
  const batch: ImportBatch = {
    id: newId('batch'),
    rev: 0,
    kind: 'stock count',
    fileName,
    hash: file.hash,
    rows: file.rows,
    at: file.at,
    created: [],
    superseded: [],
    moves: moves.map((m) => m.id),
  };
  return { ok: true, value: { lines: counted.value.lines, batch, change: { put: { stockMoves: moves, importBatches: [batch] } } } };
}

/**
 * Undoing an imported count: each of its movements still in the ledger is reversed by an 'adjusted' movement of the
 * opposite quantity on the same date, naming the batch (`undoes`), so on hand on every date is what it was before
 * the count and the count stays in the history. A movement deleted by hand since has nothing left to reverse.
 */
export function reverseCount(book: Book, batch: ImportBatch): StockMove[] {
  const mine = new Set(batch.moves ?? []);
  const reason = `undo of stock count ${batch.fileName}`.slice(0, LIMITS.shortText);
  return book.stockMoves
    .filter((m) => mine.has(m.id))
    .map((m) => ({ ...newMove({ partId: m.partId, date: m.date, quantity: -m.quantity, kind: 'adjusted', reason }), undoes: batch.id }));
}

/** Finds a part by its maker part number as written on a count sheet (case, spaces and dashes ignored). */
export function partByMpn(parts: readonly Part[], mpn: string): Part | undefined {
  const k = mpnKey(mpn);
  return parts.find((p) => mpnKey(p.mpn) === k);
}

// ---------------------------------------------------------------------------------------------------------------
// Building a run

/**
 * Marks a planned run built on `date` and issues its parts: one 'issued' movement per part for the need the
 * costing gives (`needs`, per part id). Refused when a part is short (naming each), or the run is built already.
 */
export function buildRun(book: Book, run: Run, date: string, needs: ReadonlyMap<string, number>): Outcome<BookChange> {
  if (run.status === 'built') return fail(`the run ${run.name || run.id} is built already (${run.builtDate})`);
  if (!isIsoDate(date)) return fail(`the date built must be written YYYY-MM-DD, not ${JSON.stringify(date)}`);
  if (needs.size === 0) return fail('the run needs no parts that could be costed; nothing to issue');
  const have = onHandByPart(book.stockMoves);
  const mpn = new Map(book.parts.map((p) => [p.id, p.mpn] as const));
  const short: string[] = [];
  for (const [partId, n] of needs) {
    const h = have.get(partId) ?? 0;
    if (h < n) short.push(`${mpn.get(partId) ?? partId}: ${n} needed, ${h} on hand`);
  }
  if (short.length) return fail(`not enough stock to build this run: ${short.join('; ')}`);
  const moves = [...needs].filter(([, n]) => n > 0).map(([partId, n]) => newMove({ partId, date, quantity: -n, kind: 'issued', reason: run.name, runId: run.id }));
  return { ok: true, value: { put: { runs: [{ ...run, status: 'built', builtDate: date }], stockMoves: moves } } };
}
