// What the page and the figures worker say to each other (engine/figures-worker.ts), and how a large Book or change
// is cut into parts. Kept apart from the worker's engines so the page loads none of them to talk to it.
import type { Book, BuildLine, CollectionName, Quote } from '../domain/book.ts';
import type { BookDelta } from '../domain/book-ops.ts';
import type { FiguresUpdate } from './figures-kinds.ts';
import type { LineOutcome } from './line-trial.ts';
import type { WhatIf, WhatIfAnswer, WhatIfWant } from './what-if.ts';
import type { CheckTrialAnswer, CheckTrialRequest } from './check-trial.ts';

/** What the Compare page asks: the chosen variants' figures with what-if edits tried on them. */
export interface WhatIfRequest {
  chosen: string[];
  whatIf: WhatIf;
  wants: WhatIfWant[];
}

export type FiguresRequest =
  | { type: 'book'; seq: number; book: Book; staged?: boolean }
  | { type: 'delta'; seq: number; delta: BookDelta; staged?: boolean }
  /** Quotes of the next Book or change, sent ahead in parts (see stageQuotes); `staged` on it says to use them. */
  | { type: 'quotes'; seq: number; quotes: Quote[] }
  | ({ type: 'whatif'; id: number } & WhatIfRequest)
  | { type: 'trial'; id: number; line: BuildLine }
  | ({ type: 'checktrial'; id: number } & CheckTrialRequest)
  /** The page is drawing: pause between slices of work for at most `ms` (see FiguresQueue), or until "go". */
  | { type: 'hold'; ms: number }
  | { type: 'go' };

/** One part of an answer (see splitUpdate): `last` says the figures of the Book sent are complete. */
export type FiguresMessage =
  | { type: 'figures'; seq: number; update: FiguresUpdate; last: boolean }
  | { type: 'failed'; seq: number; message: string }
  | { type: 'whatif'; id: number; answer: WhatIfAnswer }
  | { type: 'trial'; id: number; outcomes: LineOutcome[] }
  | { type: 'checktrial'; id: number; answer: CheckTrialAnswer }
  | { type: 'refused'; id: number; message: string };

/** The longest the page may hold the worker with one request, in ms: a "go" that never comes costs no more. */
export const HOLD_MAX_MS = 300;

/** Collections whose change the worker takes long over: a line edit costs every variant that fits it again; the others compile a workbook afresh. */
const LONG_CHANGES: ReadonlySet<string> = new Set<CollectionName>(['buildLines', 'checks', 'parts', 'suppliers']);

/** Variants or quotes changed in one change, at most, that the worker works out in a few ms (see takesLong). */
export const QUICK_RECORDS = 10;

/**
 * Whether the worker takes long over a change, so the page holds it until the change is drawn: build lines, checks,
 * parts or suppliers changed, or variants or quotes removed or changed in bulk. A parameter, a quote's prices or a
 * setting takes it a few ms, and its figures are shown sooner without a hold (held, the parameter edit's unit cost
 * came 104–136 ms after the edit in the bench, 41–89 ms without).
 */
export function takesLong(delta: BookDelta): boolean {
  for (const [name, d] of Object.entries(delta.collections)) {
    if (!d) continue;
    if (LONG_CHANGES.has(name)) return true;
    if ((name === 'variants' || name === 'quotes') && ('all' in d || d.delete.length > 0 || d.put.length > QUICK_RECORDS)) return true;
  }
  return false;
}

/** Quotes per message when a Book or change is sent in parts: each part takes the page a few ms to copy. */
export const QUOTES_PER_PART = 4000;

/**
 * A request whose quotes are many, cut into messages the page can copy a few ms at a time: the quotes go ahead in
 * parts and the request itself follows without them (`staged`). Small requests go as they are.
 */
export function stageQuotes(request: Extract<FiguresRequest, { type: 'book' | 'delta' }>): FiguresRequest[] {
  const quotes =
    request.type === 'book'
      ? request.book.quotes
      : (() => {
          const d = request.delta.collections.quotes;
          return d ? ('all' in d ? d.all : d.put) : [];
        })();
  if (quotes.length <= QUOTES_PER_PART) return [request];
  const parts: FiguresRequest[] = [];
  for (let i = 0; i < quotes.length; i += QUOTES_PER_PART) parts.push({ type: 'quotes', seq: request.seq, quotes: quotes.slice(i, i + QUOTES_PER_PART) });
  if (request.type === 'book') parts.push({ ...request, book: { ...request.book, quotes: [] }, staged: true });
  else {
    const d = request.delta.collections.quotes!;
    const head = 'all' in d ? { all: [] } : { put: [], delete: d.delete };
    parts.push({ ...request, delta: { ...request.delta, collections: { ...request.delta.collections, quotes: head } }, staged: true });
  }
  return parts;
}
