// What the page and the figures worker say to each other (engine/figures-worker.ts), and how a large Book or change
// is cut into parts. Kept apart from the worker's engines so the page loads none of them to talk to it.
import type { Book, BuildLine, Quote } from '../domain/book.ts';
import type { BookDelta } from '../domain/book-ops.ts';
import { FIGURES_READ } from './figures-kinds.ts';
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
  /** The page is drawing: pause between slices of work for at most `ms` (see FiguresQueue), or until its "go". */
  | { type: 'hold'; ms: number; id?: number }
  /** Ends the hold of the same id, or every hold when it names none. */
  | { type: 'go'; id?: number };

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

/** The collections the figures read, to look names up in. */
const READ: ReadonlySet<string> = new Set<string>(FIGURES_READ);

/** Variants or quotes edited in one change, at most, that the worker works out in a few ms (see takesLong). */
export const QUICK_RECORDS = 10;

/**
 * Whether the worker takes long over the change from `prev` to `next` (`delta`), so the page holds it until the change
 * is drawn. Quick: up to QUICK_RECORDS variants or quotes edited (none added or removed) and nothing else the figures
 * read, as a parameter or a quote's prices — worked out in a few ms and shown sooner without a hold (held, the
 * parameter edit's unit cost came 104–136 ms after the edit in the bench, 41–89 ms without). Anything else is long:
 * a build line edit costs every variant that fits it again, a check, part, supplier or setting, or a variant or quote
 * added or removed, compiles a workbook afresh. A quick edit the worker still rebuilds for (a variant's code renamed,
 * a quote's breaks changed) is worked out without a hold, as every change was before holds.
 */
export function takesLong(prev: Book, next: Book, delta: BookDelta): boolean {
  if (delta.settings !== undefined) return true;
  for (const [name, d] of Object.entries(delta.collections)) {
    if (!d || !READ.has(name)) continue;
    if (name !== 'variants' && name !== 'quotes') return true;
    const c = name as 'variants' | 'quotes';
    if ('all' in d || d.delete.length > 0 || d.put.length > QUICK_RECORDS || prev[c].length !== next[c].length) return true;
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
