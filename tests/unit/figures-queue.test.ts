// The figures worker's queue: requests answered one after another, a Book change worked out in parts, and the pause
// between parts while the page holds the worker to draw a page of its own (src/engine/figures-worker.ts).
import { describe, expect, it } from 'vitest';
import { bookDelta } from '../../src/domain/book-ops.ts';
import type { BookDelta } from '../../src/domain/book-ops.ts';
import { COLLECTIONS } from '../../src/domain/book.ts';
import type { Book, BuildLine } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import type { Sliced } from '../../src/domain/slices.ts';
import { LiveFigures, SYNC_KINDS, VARIANTS_PER_RELINE } from '../../src/engine/figures.ts';
import { FIGURES_READ } from '../../src/engine/figures-kinds.ts';
import { ROWS_PER_STEP } from '../../src/engine/family-workbook.ts';
import { trialOutcomes, trialOutcomesInSteps } from '../../src/engine/line-trial.ts';
import { FiguresHost, FiguresQueue } from '../../src/engine/figures-worker.ts';
import type { FiguresMessage, FiguresRequest } from '../../src/engine/figures-worker.ts';
import { HOLD_MAX_MS, QUICK_RECORDS, takesLong } from '../../src/engine/figures-protocol.ts';
import { referenceFamily } from '../fixtures/reference-family.ts';

const later = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/** Waits (a few ms at a time, 5 s at most) until `done` is true. */
async function until(done: () => boolean): Promise<void> {
  for (let waited = 0; !done(); waited += 5) {
    if (waited > 5_000) throw new Error('waited 5 s in vain');
    await later(5);
  }
}

/** A host whose one request takes steps named in `steps`, calling `at[step]` as that step runs. */
function steppedHost(steps: string[], ran: string[], at: Record<string, () => void> = {}): Pick<FiguresHost, 'handleInSteps'> {
  return {
    *handleInSteps(request: FiguresRequest): Sliced<FiguresMessage[]> {
      for (const [i, step] of steps.entries()) {
        if (i > 0) yield;
        ran.push(step);
        at[step]?.();
      }
      return [{ type: 'failed', seq: request.type === 'delta' ? request.seq : -1, message: 'done' }];
    },
  };
}

/** The first line every variant buys: a constant quantity, no rule, a part. */
function boughtLine(book: Book): BuildLine {
  return book.buildLines.find((l) => /^\d+$/.test(l.qtyRule) && l.appliesWhen === '' && l.partId !== undefined)!;
}

/** A change for the stepped hosts above, which never read it. */
const DELTA: FiguresRequest = { type: 'delta', seq: 1, delta: bookDelta(demoBook(), demoBook()) };

describe('A build line edit in the figures worker', () => {
  it('is worked out in parts of a few dozen variants on the reference family, with every unit cost it moves', () => {
    const book = referenceFamily().book;
    const host = new FiguresHost();
    host.handle({ type: 'book', seq: 0, book });
    const line = boughtLine(book);
    const next = { ...book, buildLines: book.buildLines.map((l) => (l.id === line.id ? { ...l, rev: l.rev + 1, qtyRule: String(Number(l.qtyRule) + 1) } : l)) };
    const steps = host.handleInSteps({ type: 'delta', seq: 1, delta: bookDelta(book, next) });
    let parts = 1;
    let r = steps.next();
    for (; !r.done; r = steps.next()) parts++;
    // Every variant buys the line: 200 variants in parts of VARIANTS_PER_RELINE, after the family step.
    const fitting = book.variants.length;
    expect(parts).toBeGreaterThanOrEqual(Math.ceil(fitting / VARIANTS_PER_RELINE));
    const last = r.value.at(-1)!;
    expect(last.type).toBe('figures');
    if (last.type !== 'figures') return;
    expect(last.last).toBe(true);
    expect(last.update.kind).toBe('edited');
    expect(last.update.changed.length).toBe(fitting * book.settings.runSizes.length);
  });
});

describe('A build rule edit in the figures worker', () => {
  it('takes a rule edit in parts (the variants resolved a few dozen at a time), with the figures of the change at once', () => {
    const book = referenceFamily().book;
    const first = book.variants.map((v) => v.code).sort()[0]!;
    const steps = Number(book.variants.find((v) => v.code === first)!.params['steps']);
    const line = boughtLine(book);
    // A rule is a new memo of the table, evaluated in place: the variants are resolved again a part at a time.
    const next = { ...book, buildLines: book.buildLines.map((l) => (l.id === line.id ? { ...l, rev: l.rev + 1, appliesWhen: `steps <> ${steps}` } : l)) };
    const request: FiguresRequest = { type: 'delta', seq: 1, delta: bookDelta(book, next) };
    const atOnce = new FiguresHost();
    atOnce.handle({ type: 'book', seq: 0, book });
    const expected = atOnce.handle(structuredClone(request));
    const host = new FiguresHost();
    host.handle({ type: 'book', seq: 0, book });
    const work = host.handleInSteps(structuredClone(request));
    let parts = 1;
    let r = work.next();
    for (; !r.done; r = work.next()) parts++;
    // At least: the variants resolved again ROWS_PER_STEP at a time, and the variants whose line now applies or no
    // longer does costed VARIANTS_PER_RELINE at a time.
    const moved = book.variants.length;
    expect(parts).toBeGreaterThanOrEqual(Math.ceil(book.variants.length / ROWS_PER_STEP) + Math.ceil(moved / VARIANTS_PER_RELINE));
    expect(r.value).toEqual(expected);
    const last = r.value.at(-1)!;
    expect(last.type === 'figures' && last.update.kind).toBe('edited');
    // The unit costs the edit moved are those of a workbook built afresh on the edited Book.
    const costs = (messages: FiguresMessage[]): Map<string, number> =>
      new Map(messages.flatMap((m) => (m.type === 'figures' ? m.update.costs.map((c) => [`${c.variantId} ${c.run}`, c.value] as const) : [])));
    const edited = costs(r.value);
    const afresh = costs(new FiguresHost().handle({ type: 'book', seq: 0, book: next }));
    // The variants the rule now leaves the line out of, at every run size.
    const left = book.variants.filter((v) => Number(v.params['steps']) === steps).length;
    expect(left).toBeGreaterThan(0);
    expect(edited.size).toBe(left * book.settings.runSizes.length);
    for (const [key, value] of edited) expect(value).toBe(afresh.get(key));
  });

  it('tries a line being edited in parts, with the outcomes tried at once', () => {
    const book = referenceFamily().book;
    const line = boughtLine(book);
    const draft = { ...line, appliesWhen: 'steps > 4', qtyRule: 'steps' };
    const work = trialOutcomesInSteps(book, draft);
    let parts = 1;
    let r = work.next();
    for (; !r.done; r = work.next()) parts++;
    expect(parts).toBeGreaterThanOrEqual(2 + Math.ceil(book.variants.length / ROWS_PER_STEP));
    expect(r.value).toEqual(trialOutcomes(book, draft));
    // Worked out, not empty: every variant, the line applying where it has more than four steps.
    expect(r.value.map((o) => o.variantId)).toEqual(book.variants.map((v) => v.id));
    for (const o of r.value) {
      const n = Number(book.variants.find((v) => v.id === o.variantId)!.params['steps']);
      expect(o.applies).toBe(n > 4);
      if (o.applies) expect(o.qtyPerUnit).toBe(n);
    }
  });
});

describe('Which changes the page holds the worker for', () => {
  it('holds it for build lines, checks, parts, suppliers, settings and variants or quotes added, removed or in bulk; not for a parameter or a price', () => {
    const book = demoBook();
    const v = book.variants[0]!;
    const q = book.quotes[0]!;
    const l = book.buildLines[0]!;
    const after = (change: Partial<Book>): [Book, Book, BookDelta] => [book, { ...book, ...change }, bookDelta(book, { ...book, ...change })];
    const quick = [
      after({ variants: book.variants.map((x) => (x.id === v.id ? { ...x, rev: x.rev + 1, params: { ...x.params, steps: 7 } } : x)) }),
      after({ quotes: book.quotes.map((x) => (x.id === q.id ? { ...x, rev: x.rev + 1, breaks: x.breaks.map((b) => ({ ...b, price: b.price * 2 })) } : x)) }),
      after({ runs: [] }),
    ];
    for (const [a, b, d] of quick) expect(takesLong(a, b, d)).toBe(false);
    const long = [
      after({ buildLines: book.buildLines.map((x) => (x.id === l.id ? { ...x, rev: x.rev + 1, qtyRule: '9' } : x)) }),
      [book, book, { collections: { checks: { put: [], delete: ['check_gone'] } } }] as [Book, Book, BookDelta],
      after({ settings: { ...book.settings, runSizes: [...book.settings.runSizes, 5000] } }),
      after({ variants: [...book.variants, { ...book.variants[0]!, id: 'variant_new', code: 'NEW-1' }] }),
      after({ quotes: [...book.quotes, { ...book.quotes[0]!, id: 'quote_new' }] }),
      after({ parts: book.parts.map((x, i) => (i === 0 ? { ...x, rev: x.rev + 1, description: 'other' } : x)) }),
      after({ suppliers: book.suppliers.slice(1) }),
      after({ variants: book.variants.slice(1) }),
      after({ quotes: book.quotes.map((x) => ({ ...x, rev: x.rev + 1 })) }),
    ];
    expect(book.quotes.length).toBeGreaterThan(QUICK_RECORDS);
    for (const [a, b, d] of long) expect(takesLong(a, b, d)).toBe(true);
  });

  it('reads one list of the collections the figures come from: a record added to one is held for, to any other answered as the same figures', () => {
    const book = demoBook();
    const live = new LiveFigures();
    live.update(book);
    for (const c of COLLECTIONS) {
      const next = { ...book, [c]: [...book[c], { id: `${c}_added`, rev: 1 }] } as Book;
      const read = (FIGURES_READ as readonly string[]).includes(c);
      expect(takesLong(book, next, bookDelta(book, next)), c).toBe(read);
      if (!read) expect(live.update(next).kind, c).toBe(SYNC_KINDS.same);
    }
    live.close();
  });
});

describe('The figures worker queue', () => {
  it('posts an answer’s parts one per turn, so a hold asked for after the first part keeps the rest back', async () => {
    const posted: FiguresMessage[] = [];
    const host: Pick<FiguresHost, 'handleInSteps'> = {
      *handleInSteps() {
        return [1, 2, 3].map((seq): FiguresMessage => ({ type: 'failed', seq, message: 'part' }));
      },
    };
    const queue: FiguresQueue = new FiguresQueue(
      host,
      (m) => {
        posted.push(m);
        if (posted.length === 1) queue.receive({ type: 'hold', ms: HOLD_MAX_MS });
      },
      0,
    );
    queue.receive(DELTA);
    await until(() => posted.length > 0);
    await later(60);
    expect(posted.map((m) => (m.type === 'failed' ? m.seq : -1))).toEqual([1]);
    queue.receive({ type: 'go' });
    await until(() => !queue.busy);
    expect(posted.map((m) => (m.type === 'failed' ? m.seq : -1))).toEqual([1, 2, 3]);
  });

  it('answers requests in the order sent, as the host answers them one by one', async () => {
    const book = referenceFamily().book;
    const line = boughtLine(book);
    const next = { ...book, buildLines: book.buildLines.map((l) => (l.id === line.id ? { ...l, rev: l.rev + 1, qtyRule: '7' } : l)) };
    const requests: FiguresRequest[] = [
      { type: 'book', seq: 0, book },
      { type: 'delta', seq: 1, delta: bookDelta(book, next) },
      { type: 'trial', id: 3, line: { ...line, qtyRule: '9' } },
    ];
    const expected = (() => {
      const host = new FiguresHost();
      return requests.flatMap((r) => host.handle(structuredClone(r)));
    })();
    const posted: FiguresMessage[] = [];
    const queue = new FiguresQueue(new FiguresHost(), (m) => posted.push(m));
    for (const r of requests) queue.receive(structuredClone(r));
    await until(() => !queue.busy);
    expect(posted).toEqual(expected);
  });

  it('answers a message it cannot read and goes on with the next', async () => {
    const posted: FiguresMessage[] = [];
    const queue = new FiguresQueue(new FiguresHost(), (m) => posted.push(m));
    queue.receive(undefined as unknown as FiguresRequest);
    queue.receive({ type: 'trial', id: 7, line: demoBook().buildLines[0]! });
    await until(() => posted.length === 2 && !queue.busy);
    expect(posted.map((m) => m.type)).toEqual(['failed', 'refused']);
  });

  it('pauses between steps from a hold until "go", then finishes', async () => {
    const ran: string[] = [];
    const posted: FiguresMessage[] = [];
    let queue: FiguresQueue | undefined;
    const host = steppedHost(['a', 'b', 'c'], ran, { a: () => queue!.receive({ type: 'hold', ms: HOLD_MAX_MS }) });
    queue = new FiguresQueue(host, (m) => posted.push(m), 0);
    queue.receive(DELTA);
    await until(() => ran.length > 0);
    await later(60);
    // Held after step a: nothing more ran, nothing was answered.
    expect(ran).toEqual(['a']);
    expect(posted).toEqual([]);
    queue.receive({ type: 'go' });
    await until(() => posted.length > 0);
    expect(ran).toEqual(['a', 'b', 'c']);
    expect(posted).toEqual([{ type: 'failed', seq: 1, message: 'done' }]);
  });

  it('goes on by itself when a hold runs out, and never holds longer than HOLD_MAX_MS', async () => {
    const ran: string[] = [];
    const posted: FiguresMessage[] = [];
    let heldAt = 0;
    let queue: FiguresQueue | undefined;
    const host = steppedHost(['a', 'b'], ran, {
      a: () => {
        heldAt = performance.now();
        // Asked for far longer than allowed: the queue keeps to its own bound.
        queue!.receive({ type: 'hold', ms: 60_000 });
      },
    });
    queue = new FiguresQueue(host, (m) => posted.push(m), 0);
    queue.receive(DELTA);
    await until(() => posted.length > 0);
    const waited = performance.now() - heldAt;
    expect(ran).toEqual(['a', 'b']);
    // Not before the bound (a timer never fires early), and not held for the minute asked.
    expect(waited).toBeGreaterThanOrEqual(HOLD_MAX_MS - 1);
    expect(waited).toBeLessThan(30_000);
  });

  it('ends a hold at its own go only: a later hold, asked for meanwhile, still holds', async () => {
    const ran: string[] = [];
    const posted: FiguresMessage[] = [];
    let queue: FiguresQueue | undefined;
    const host = steppedHost(['a', 'b'], ran, {
      a: () => {
        queue!.receive({ type: 'hold', ms: HOLD_MAX_MS, id: 1 });
        queue!.receive({ type: 'hold', ms: HOLD_MAX_MS, id: 2 });
      },
    });
    queue = new FiguresQueue(host, (m) => posted.push(m), 0);
    queue.receive(DELTA);
    await until(() => ran.length > 0);
    queue.receive({ type: 'go', id: 1 });
    await later(60);
    expect(ran).toEqual(['a']);
    queue.receive({ type: 'go', id: 2 });
    await until(() => posted.length > 0);
    expect(ran).toEqual(['a', 'b']);
  });

  it('waits for a hold sent before a request arrives, and takes requests that come meanwhile in order', async () => {
    const ran: string[] = [];
    const posted: FiguresMessage[] = [];
    const queue = new FiguresQueue(steppedHost(['a', 'b'], ran), (m) => posted.push(m), 0);
    queue.receive({ type: 'hold', ms: HOLD_MAX_MS });
    queue.receive(DELTA);
    queue.receive({ ...DELTA, seq: 2 });
    await later(60);
    expect(ran).toEqual([]);
    queue.receive({ type: 'go' });
    await until(() => posted.length === 2);
    expect(posted.map((m) => (m.type === 'failed' ? m.seq : -1))).toEqual([1, 2]);
    expect(ran).toEqual(['a', 'b', 'a', 'b']);
  });
});
