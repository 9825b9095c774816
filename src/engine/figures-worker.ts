// Web Worker entry for the open Book's live figures: the family and costing workbooks live here, so building them
// (seconds for a large family) and recomputing after an edit never hold up the page. The page sends the Book once,
// then only what changed (a BookDelta); each answer is the FiguresUpdate of that step, posted in parts that each take
// the page a few milliseconds to receive. The page's side is src/ui/costing-service.ts.
import type { Book, Quote } from '../domain/book.ts';
import { applyBookDelta } from '../domain/book-ops.ts';
import type { BookDelta } from '../domain/book-ops.ts';
import { createEngine } from './create.ts';
import { LiveFigures, splitUpdate } from './figures.ts';
import { HOLD_MAX_MS } from './figures-protocol.ts';
import type { FiguresMessage, FiguresRequest, WhatIfRequest } from './figures-protocol.ts';
import type { FiguresUpdate } from './figures.ts';
import { CheckTrials } from './check-trial.ts';
import { trialOutcomesInSteps } from './line-trial.ts';
import { WhatIfCosts } from './what-if.ts';
import { nextTask, runAtOnce, runInSlices } from '../domain/slices.ts';
import type { Sliced } from '../domain/slices.ts';
import type { WhatIfAnswer } from './what-if.ts';

/** The worker's whole job, as an object so Node tests run exactly what the worker runs. */
export class FiguresHost {
  private readonly live = new LiveFigures();
  private readonly whatIfs = new WhatIfCosts();
  private readonly checkTrials = new CheckTrials();
  /** Quotes sent ahead of the Book or change that uses them. */
  private staged: Quote[] = [];
  /**
   * The Book last sent, or the one the last change sent gave: what a line or check is tried on. Kept when its figures
   * failed (the workbooks are closed then), so a trial queued behind that change still answers.
   */
  private book: Book | undefined;

  /** The Compare page's figures, from the Book as the worker holds it now. */
  whatIf(request: WhatIfRequest): WhatIfAnswer {
    const none = (problem: string): WhatIfAnswer => ({ refused: [], figures: request.wants.map((w) => ({ variantId: w.variantId, run: w.run, value: NaN, problem })) });
    const book = this.live.current;
    if (!book) return none('the figures are being worked out');
    try {
      return this.whatIfs.answer(book, this.live.linesOf(request.chosen), request.chosen, request.whatIf, request.wants);
    } catch (e) {
      this.whatIfs.close();
      return none(`the what-if figures could not be worked out: ${e instanceof Error ? e.message : String(e)}`);
    }
  }

  /** The answer to one request, in parts that are each quick for the page to take. */
  handle(request: FiguresRequest): FiguresMessage[] {
    return runAtOnce(this.handleInSteps(request));
  }

  /** As `handle`, yielding where a Book change or a line's trial may pause (LiveFigures.updateInSteps, trialOutcomesInSteps). */
  *handleInSteps(request: FiguresRequest): Sliced<FiguresMessage[]> {
    // The page's requests to pause are for the queue that runs these steps (FiguresQueue); here they change nothing.
    if (request?.type === 'hold' || request?.type === 'go') return [];
    if (request?.type === 'whatif') return [{ type: 'whatif', id: request.id, answer: this.whatIf(request) }];
    if (request?.type === 'trial') {
      const book = this.book;
      if (!book) return [{ type: 'refused', id: request.id, message: 'the figures worker holds no Book yet' }];
      try {
        return [{ type: 'trial', id: request.id, outcomes: yield* trialOutcomesInSteps(book, request.line) }];
      } catch (e) {
        return [{ type: 'refused', id: request.id, message: `the line could not be tried: ${e instanceof Error ? e.message : String(e)}` }];
      }
    }
    if (request?.type === 'checktrial') {
      const book = this.book;
      if (!book) return [{ type: 'refused', id: request.id, message: 'the figures worker holds no Book yet' }];
      try {
        return [{ type: 'checktrial', id: request.id, answer: this.checkTrials.answer(book, request) }];
      } catch (e) {
        this.checkTrials.close();
        return [{ type: 'refused', id: request.id, message: `the formula could not be tried: ${e instanceof Error ? e.message : String(e)}` }];
      }
    }
    if (request?.type === 'quotes') {
      for (const q of request.quotes) this.staged.push(q);
      return [];
    }
    const seq = request?.seq ?? -1;
    const answer = (update: FiguresUpdate): FiguresMessage[] => {
      const parts = splitUpdate(update);
      return parts.map((u, i) => ({ type: 'figures', seq, update: u, last: i === parts.length - 1 }));
    };
    try {
      const staged = this.staged;
      this.staged = [];
      if (request?.type === 'book') {
        this.book = request.staged ? { ...request.book, quotes: staged } : request.book;
        return answer(yield* this.live.updateInSteps(this.book));
      }
      if (request?.type === 'delta') {
        const held = this.book;
        if (!held) return [{ type: 'failed', seq, message: 'the figures worker was sent a change before any Book' }];
        this.book = applyBookDelta(held, request.staged ? withStagedQuotes(request.delta, staged) : request.delta);
        return answer(yield* this.live.updateInSteps(this.book));
      }
      return [{ type: 'failed', seq, message: 'the figures worker was sent something other than a Book or a change' }];
    } catch (e) {
      // The workbooks may be half-updated: start from the next Book sent.
      this.live.close();
      return [{ type: 'failed', seq, message: `the figures could not be worked out: ${e instanceof Error ? e.message : String(e)}` }];
    }
  }
}

/** Work between two looks at the page's requests to pause, in ms. */
const SLICE_MS = 8;

/**
 * Runs the worker's requests one after another, each a slice at a time, and pauses between slices while the page
 * holds it. The page asks for a hold when it is about to draw a page of its own (a switch of pages) or a change the
 * worker takes long over: on two cores the worker's engine work, and the compiler threads it keeps busy, took the
 * processor from the page's frames and stretched 12 ms of drawing to 50 ms and more. A hold ends at its own "go" (a
 * "go" without an id ends every hold) or after its time, at most HOLD_MAX_MS.
 */
export class FiguresQueue {
  private readonly waiting: FiguresRequest[] = [];
  private running = false;
  /** Each hold's end (performance.now() time), by its id; holds without an id share the key -1. */
  private readonly holds = new Map<number, number>();
  private wake: (() => void) | undefined;

  constructor(
    private readonly host: Pick<FiguresHost, 'handleInSteps'>,
    private readonly post: (m: FiguresMessage) => void,
    /** Work between two looks at the page's requests, in ms (tests look at every step). */
    private readonly sliceMs = SLICE_MS,
  ) {}

  /** Takes one message from the page: a hold or go at once, anything else in its turn. */
  receive(request: FiguresRequest): void {
    if (request?.type === 'hold') {
      const key = request.id ?? -1;
      const until = performance.now() + Math.min(Math.max(request.ms, 0), HOLD_MAX_MS);
      this.holds.set(key, Math.max(this.holds.get(key) ?? 0, until));
      return;
    }
    if (request?.type === 'go') {
      // A hold's own go ends it alone: the go of a change drawn must not end a switch of pages' hold asked for since.
      if (request.id === undefined) this.holds.clear();
      else this.holds.delete(request.id);
      this.wake?.();
      return;
    }
    this.waiting.push(request);
    if (!this.running) void this.drain();
  }

  /** True while a request is being worked on or waits its turn. */
  get busy(): boolean {
    return this.running;
  }

  private async drain(): Promise<void> {
    this.running = true;
    try {
      while (this.waiting.length > 0) {
        const r = this.waiting.shift()!;
        await this.pause();
        try {
          const messages = await runInSlices(this.host.handleInSteps(r), { budgetMs: this.sliceMs, pause: () => this.pause() });
          // Each part of an answer is copied for the page as it is posted (a build line edit's ten parts took 20–57 ms
          // together in Node): one part per turn, so a hold the page asks for meanwhile is kept.
          for (const [i, m] of messages.entries()) {
            if (i > 0) await this.pause();
            this.post(m);
          }
        } catch (e) {
          // As an error thrown while handling a message: the page's worker error handler hears of it. The next
          // request is still answered.
          setTimeout(() => {
            throw e;
          }, 0);
        }
      }
    } finally {
      this.running = false;
    }
  }

  /** How long the latest hold still lasts, in ms (0 or less: not held); ended holds are dropped. */
  private heldFor(): number {
    const now = performance.now();
    let until = 0;
    for (const [key, end] of this.holds) {
      if (end <= now) this.holds.delete(key);
      else until = Math.max(until, end);
    }
    return until - now;
  }

  /** A new task (the page's holds come in meanwhile), then a wait while held. */
  private async pause(): Promise<void> {
    await nextTask();
    for (let left = this.heldFor(); left > 0; left = this.heldFor()) {
      await new Promise<void>((resolve) => {
        const timer = setTimeout(resolve, left);
        this.wake = () => {
          clearTimeout(timer);
          resolve();
        };
      });
      this.wake = undefined;
    }
  }
}

/** Builds and drops one small workbook with a cost formula, so the first real one is built on warm code. */
export function warmEngine(): void {
  try {
    createEngine({ licenseKey: 'gpl-v3' }, { Warm: [[1, 2, '=SUM(A1:B1)', '=COST_ROUND_UNIT(C1/3)']] }).destroy();
  } catch {
    // Only a head start; the first Book builds it anyway.
  }
}

export { QUOTES_PER_PART, stageQuotes } from './figures-protocol.ts';
export type { FiguresMessage, FiguresRequest, WhatIfRequest } from './figures-protocol.ts';

/** The change with the quotes sent ahead put back in. */
function withStagedQuotes(delta: BookDelta, staged: Quote[]): BookDelta {
  const d = delta.collections.quotes;
  if (!d) return delta;
  const quotes = 'all' in d ? { all: staged } : { put: staged, delete: d.delete };
  return { ...delta, collections: { ...delta.collections, quotes } };
}

// Only inside a dedicated worker: a page or Node importing this module for its types must not grab onmessage.
const scope = globalThis as unknown as { WorkerGlobalScope?: unknown; onmessage: unknown; postMessage(m: unknown): void };
if (typeof scope.WorkerGlobalScope !== 'undefined') {
  const queue = new FiguresQueue(new FiguresHost(), (m) => scope.postMessage(m));
  scope.onmessage = (e: MessageEvent<FiguresRequest>) => queue.receive(e.data);
  // Warm the formula engine (function registration, parser, compiled code) while the page is still opening the Book.
  warmEngine();
}
