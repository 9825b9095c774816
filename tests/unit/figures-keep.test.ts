// Figures kept for the next start: shown at once only for the very Book they were worked out for (records, their
// order, costing date, engine build), and replaced by the worker's own answer, which agrees with them. The demo Book's
// figures shipped with the build for a first start are held to the same.
import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import type { Book } from '../../src/domain/book.ts';
import { applyChange } from '../../src/domain/book-ops.ts';
import type { BookChange } from '../../src/domain/book-ops.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { addBuiltInChecks } from '../../src/engine/check-sheets.ts';
import { loadBuiltInChecks } from '../../src/cli/check-sheets-fs.ts';
import { CostingService } from '../../src/ui/costing-service.ts';
import { BookService } from '../../src/ui/book-service.ts';
import { KEEP_MAX_RECORDS, KEEP_MAX_VARIANT_FIGURES, SHIPPED_FIGURES_FILE, canonicalJson, figuresKey, followFigures, fromKeptJson, keepFigures, keptFiguresOf, keptJson, readKeptFigures, startFigures } from '../../src/ui/figures-keep.ts';
import { firstStartBook, keptDemoFigures } from '../../scripts/kept-demo-figures.ts';
import { SHIPPED_FIGURES_FILE as BUILD_SHIPPED_FILE } from '../../vite.config.ts';
import { costingInWorker } from '../fixtures/fake-figures-worker.ts';
import type { FakeWorker } from '../fixtures/fake-figures-worker.ts';

const CHECKS = loadBuiltInChecks();
const ENGINE = 'assets/index-Ab12Cd34.js';

class Holder extends EventTarget {
  constructor(public book: Book) {
    super();
  }
  change(change: BookChange): void {
    const r = applyChange(this.book, change);
    if (!r.ok) throw new Error(`conflict on ${r.conflict.recordId}`);
    this.book = r.book;
    this.dispatchEvent(new Event('change'));
  }
}

function book(): Book {
  return addBuiltInChecks(demoBook(), CHECKS);
}

/** The costing service of a Book with a stand-in worker; the workers started are listed. */
function inWorker(b: Book = book()): { holder: Holder; costing: CostingService; workers: FakeWorker[] } {
  const holder = new Holder(b);
  return { holder, ...costingInWorker(holder) };
}

async function settle(costing: CostingService): Promise<void> {
  for (let i = 0; i < 400 && (costing.sync(), costing.settled() === undefined); i++) await new Promise((r) => setTimeout(r, 2));
  expect(costing.settled()).toBeDefined();
}

/** Every unit cost and worst status the service shows for a Book. */
function shown(costing: CostingService, b: Book): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const v of b.variants) {
    out[v.id] = { worst: costing.worstStatus(v.id), costs: costing.runSizes.map((run) => costing.unitCost(v.id, run)), lines: costing.resolution().variants.find((r) => r.variantId === v.id) };
  }
  return out;
}

let dbCount = 0;
const freshDb = (): string => `kept-test-${++dbCount}`;

describe('the key of kept figures', () => {
  it('is the same for a copy whose records list their fields in another order, as storage may give them back', async () => {
    const b = book();
    const reordered: Book = { ...b, parts: b.parts.map((p) => Object.fromEntries(Object.entries(p).reverse()) as typeof p) };
    expect(JSON.stringify(reordered)).not.toBe(JSON.stringify(b));
    expect(canonicalJson(reordered)).toBe(canonicalJson(b));
    expect(await figuresKey(reordered, ENGINE)).toBe(await figuresKey(b, ENGINE));
  });

  it('changes with any field of any record, the order of a collection, the costing date and the engine build', async () => {
    const b = book();
    const key = await figuresKey(b, ENGINE);
    expect(key).toMatch(/^assets\/index-Ab12Cd34\.js\|\d{4}-\d{2}-\d{2}\|[0-9a-f]{64}$/);
    const q = b.quotes[0]!;
    const others: Book[] = [
      { ...b, quotes: [{ ...q, breaks: q.breaks.map((x, i) => (i === 0 ? { ...x, price: x.price + 0.0001 } : x)) }, ...b.quotes.slice(1)] },
      { ...b, checks: [...b.checks].reverse() },
      { ...b, settings: { ...b.settings, costingDate: '2031-01-02' } },
    ];
    for (const other of others) expect(await figuresKey(other, ENGINE)).not.toBe(key);
    expect(await figuresKey(b, 'assets/index-Zz99Yy88.js')).not.toBe(key);
  });

  it('is not made for a Book too large to write out quickly', async () => {
    const b = book();
    const part = b.parts[0]!;
    const many = Array.from({ length: KEEP_MAX_RECORDS }, (_, i) => ({ ...part, id: `p_many_${i}`, mpn: `MANY-${i}` }));
    expect(await figuresKey({ ...b, parts: [...b.parts, ...many] }, ENGINE)).toBeUndefined();
    const variant = b.variants[0]!;
    const perVariant = b.checks.length + b.buildLines.length;
    const variants = Array.from({ length: Math.floor(KEEP_MAX_VARIANT_FIGURES / perVariant) + 1 }, (_, i) => ({ ...variant, id: `v_many_${i}`, code: `MANY-${i}` }));
    expect(await figuresKey({ ...b, variants }, ENGINE)).toBeUndefined();
    expect(await figuresKey({ ...b, variants: variants.slice(0, -1) }, ENGINE)).toBeDefined();
  });
});

describe('figures kept and shown at the next start', () => {
  it('keeps the settled figures, and a later start of the same Book shows them before the worker answers, which then agrees', async () => {
    const db = freshDb();
    const first = inWorker();
    await settle(first.costing);
    const settled = first.costing.settled()!;
    expect(settled.book).toBe(first.holder.book);
    expect(await keepFigures('rungbook', settled.book, ENGINE, settled.update, db)).toBe(true);
    const want = shown(first.costing, first.holder.book);

    // The next start: the same Book, read back from storage (a copy), not yet worked out by its worker.
    const again = inWorker(structuredClone(first.holder.book));
    const kept = await keptFiguresOf(await readKeptFigures('rungbook', db), again.holder.book, ENGINE);
    expect(kept).toBeDefined();
    expect(again.costing.seed(kept!)).toBe(true);
    expect(again.costing.pending).toBe(false);
    expect(shown(again.costing, again.holder.book)).toEqual(want);
    // The worker is not started (it would compete with the first view) until the app catches up; a read does not.
    again.costing.sync();
    expect(again.workers).toHaveLength(0);
    again.costing.catchUp();
    // Then it is sent the Book, and its answer replaces the kept figures with the same figures.
    expect(again.workers[0]!.sent.map((m) => m.type)).toEqual(['book']);
    again.costing.catchUp();
    expect(again.workers[0]!.sent).toHaveLength(1);
    let events = 0;
    again.costing.addEventListener('change', () => (events += 1));
    await settle(again.costing);
    expect(events).toBe(1);
    expect(shown(again.costing, again.holder.book)).toEqual(want);
    expect(again.costing.settled()!.update).toEqual(settled.update);
  });

  it('sends the worker the Book of seeded figures at the first edit or question, before anything else', async () => {
    const first = inWorker();
    await settle(first.costing);
    const update = first.costing.settled()!.update;

    const edited = inWorker(structuredClone(first.holder.book));
    expect(edited.costing.seed(update)).toBe(true);
    const q = edited.holder.book.quotes[0]!;
    edited.holder.change({ put: { quotes: [{ ...q, breaks: q.breaks.map((x) => ({ ...x, price: x.price * 2 })) }] } });
    expect(edited.costing.pending).toBe(true);
    edited.costing.sync();
    expect(edited.workers[0]!.sent.map((m) => m.type)).toEqual(['book']);
    await settle(edited.costing);
    expect(edited.costing.settled()!.book).toBe(edited.holder.book);

    const asked = inWorker(structuredClone(first.holder.book));
    expect(asked.costing.seed(update)).toBe(true);
    const line = asked.holder.book.buildLines[0]!;
    const outcomes = await asked.costing.trialLine(line);
    expect(outcomes.length).toBe(asked.holder.book.variants.length);
    expect(asked.workers[0]!.sent.map((m) => m.type)).toEqual(['book', 'trial']);
  });

  it('shows nothing kept for another Book, another day or another build', async () => {
    const db = freshDb();
    const first = inWorker();
    await settle(first.costing);
    const s = first.costing.settled()!;
    await keepFigures('rungbook', s.book, ENGINE, s.update, db);
    const kept = await readKeptFigures('rungbook', db);
    const q = s.book.quotes[0]!;
    const edited: Book = { ...s.book, quotes: [{ ...q, breaks: q.breaks.map((x) => ({ ...x, price: x.price * 2 })) }, ...s.book.quotes.slice(1)] };
    expect(await keptFiguresOf(kept, edited, ENGINE)).toBeUndefined();
    expect(await keptFiguresOf(kept, { ...s.book, settings: { ...s.book.settings, costingDate: '2031-01-02' } }, ENGINE)).toBeUndefined();
    expect(await keptFiguresOf(kept, s.book, 'assets/index-Other.js')).toBeUndefined();
    expect(await readKeptFigures('another-book', db)).toBeUndefined();
  });

  it('seeds only before any figures are held, and never in-process', async () => {
    const first = inWorker();
    await settle(first.costing);
    const s = first.costing.settled()!;
    expect(first.costing.seed(s.update)).toBe(false);
    const holder = new Holder(book());
    const inProcess = CostingService.for(holder);
    expect(inProcess.seed(s.update)).toBe(false);
    expect(inProcess.settled()).toBeUndefined();
  });

  it('is not settled while an edit is being worked out, and keeps the figures of the Book after the edit once settled', async () => {
    const db = freshDb();
    const { holder, costing } = inWorker();
    const stop = followFigures(costing, 'rungbook', ENGINE, { dbName: db, after: 0 });
    try {
      await settle(costing);
      const q = holder.book.quotes[0]!;
      holder.change({ put: { quotes: [{ ...q, breaks: q.breaks.map((x) => ({ ...x, price: x.price * 3 })) }] } });
      expect(costing.settled()).toBeUndefined();
      await settle(costing);
      const after = holder.book;
      for (let i = 0; i < 200 && (await keptFiguresOf(await readKeptFigures('rungbook', db), after, ENGINE)) === undefined; i++) await new Promise((r) => setTimeout(r, 5));
      const kept = await keptFiguresOf(await readKeptFigures('rungbook', db), after, ENGINE);
      expect(kept).toEqual(costing.settled()!.update);
    } finally {
      stop();
    }
  });
});

describe('the figures a start asks for beside the Book', () => {
  /** A stand-in for fetch that counts the requests for the shipped figures and answers with `body`. */
  function fetchCounting(body: string): { asked: () => number; restore: () => void } {
    const real = globalThis.fetch;
    let n = 0;
    globalThis.fetch = (async () => {
      n += 1;
      return new Response(body);
    }) as typeof fetch;
    return { asked: () => n, restore: () => (globalThis.fetch = real) };
  }

  it('on a first start fetches the shipped figures at once, takes them once the Book proves fresh, and creates no kept store to read', async () => {
    const db = freshDb();
    const shippedText = keptJson(await keptDemoFigures(ENGINE));
    const fetched = fetchCounting(shippedText);
    const bookDb = `start-first-${Date.now()}`;
    let opened = 0;
    try {
      const { figures, opening } = await startFigures(bookDb, '/kept.json', async () => ((opened += 1), { startedFresh: true }), indexedDB, db);
      expect(opened).toBe(1);
      expect(await figures.likely).toBe(true);
      await opening;
      expect(fetched.asked()).toBe(1);
      expect(await figures.kept).toBeUndefined();
      expect((await figures.shipped)?.key).toBe(fromKeptJson(shippedText).key);
      // Reading what is kept did not create the kept figures' database.
      expect((await indexedDB.databases()).some((d) => d.name === db)).toBe(false);
    } finally {
      fetched.restore();
    }
  });

  it('takes the shipped figures on a later start of the demo Book as first written, when nothing was kept yet', async () => {
    // A reload right after a first start, before that start's own figures were kept.
    const db = freshDb();
    const bookDb = `start-again-${Date.now()}`;
    const first = await BookService.open(bookDb);
    expect(first.startedFresh).toBe(true);
    first.close();
    const shippedText = keptJson(await keptDemoFigures(ENGINE));
    const fetched = fetchCounting(shippedText);
    try {
      const { figures, opening } = await startFigures(bookDb, '/kept.json', () => BookService.open(bookDb), indexedDB, db);
      const again = await opening;
      try {
        expect(again.startedFresh).toBe(false);
        expect(await figures.kept).toBeUndefined();
        expect(fetched.asked()).toBe(1);
        const shipped = await figures.shipped;
        expect(await keptFiguresOf(shipped, again.book, ENGINE)).toEqual(fromKeptJson(shippedText).update);
        // The demo Book changed since: they are not its figures.
        const changed = { ...again.book, variants: again.book.variants.slice(1) };
        expect(await keptFiguresOf(shipped, changed, ENGINE)).toBeUndefined();
      } finally {
        again.close();
      }
    } finally {
      fetched.restore();
    }
  });

  it('keeps figures in a kept-figures database that something else made without its store', async () => {
    const db = freshDb();
    await new Promise<void>((resolve, reject) => {
      const made = indexedDB.open(db, 1);
      made.onsuccess = () => (made.result.close(), resolve());
      made.onerror = () => reject(made.error);
    });
    const first = inWorker();
    await settle(first.costing);
    const s = first.costing.settled()!;
    expect(await keepFigures('rungbook', s.book, ENGINE, s.update, db)).toBe(true);
    expect(await keptFiguresOf(await readKeptFigures('rungbook', db), s.book, ENGINE)).toEqual(s.update);
  });

  it('with a Book and figures kept for it reads them, fetches nothing, and guesses they will be shown', async () => {
    const db = freshDb();
    const first = inWorker();
    await settle(first.costing);
    const s = first.costing.settled()!;
    const bookDb = `start-kept-${Date.now()}`;
    const service = await BookService.open(bookDb);
    const fetched = fetchCounting('{}');
    try {
      await keepFigures(bookDb, s.book, ENGINE, s.update, db);
      const { figures } = await startFigures(bookDb, '/kept.json', async () => ({ startedFresh: false }), indexedDB, db);
      expect(await figures.likely).toBe(true);
      expect((await figures.kept)?.key).toBe(await figuresKey(s.book, ENGINE));
      expect(await figures.shipped).toBeUndefined();
      expect(fetched.asked()).toBe(0);

      // Nothing kept for a Book that exists: no guess (the worker warms up at once); the shipped figures are asked
      // for, and are not this Book's (their key is the demo Book's).
      const other = await startFigures(bookDb, '/kept.json', async () => ({ startedFresh: false }), indexedDB, freshDb());
      expect(await other.figures.likely).toBe(false);
      expect(fetched.asked()).toBe(1);
      expect(await keptFiguresOf(await other.figures.shipped, s.book, ENGINE)).toBeUndefined();
    } finally {
      fetched.restore();
      service.close();
    }
  });
});

describe('the demo Book figures the build ships for a first start', () => {
  it('are keyed by the very Book a first start writes and holds, so the app takes them', async () => {
    const service = await BookService.open(`first-start-${Date.now()}`);
    try {
      expect(service.startedFresh).toBe(true);
      const shipped = await keptDemoFigures(ENGINE);
      expect(canonicalJson(firstStartBook())).toBe(canonicalJson(service.book));
      expect(await keptFiguresOf(fromKeptJson(keptJson(shipped)), service.book, ENGINE)).toBeDefined();
    } finally {
      service.close();
    }
  });

  it('are the figures the worker settles to for that Book, through the file and back', async () => {
    const shipped = fromKeptJson(keptJson(await keptDemoFigures(ENGINE)));
    const { costing } = inWorker(firstStartBook());
    await settle(costing);
    expect(shipped.update).toEqual(costing.settled()!.update);
  });

  it('keep a figure that cannot be computed as not a number through the file (JSON has no word for it)', () => {
    const update = { kind: 'rebuilt', changed: [], checks: false, runSizes: [500], costs: [{ variantId: 'v', run: 500, value: NaN, problem: 'no quote' }, { variantId: 'w', run: 500, value: Infinity }], costsFull: true, variants: [], checksFull: false } as const;
    const back = fromKeptJson(keptJson({ key: 'k', update: { ...update, changed: [], runSizes: [500], costs: [...update.costs], variants: [] } }));
    expect(Number.isNaN(back.update.costs[0]!.value)).toBe(true);
    expect(back.update.costs[0]!.problem).toBe('no quote');
    expect(back.update.costs[1]!.value).toBe(Infinity);
    // Read back without the reviver when no figure is tagged: text that only looks like a tag stays text.
    const plain = { ...update, changed: [], runSizes: [500], costs: [{ variantId: 'v', run: 500, value: 1.5, problem: 'number:NaN' }], variants: [] };
    expect(fromKeptJson(keptJson({ key: 'k', update: plain })).update).toEqual(plain);
  });

  it('are shipped under the file name the app asks for', () => {
    expect(BUILD_SHIPPED_FILE).toBe(SHIPPED_FIGURES_FILE);
  });
});

describe('keeping figures as they settle', () => {
  it('keeps the first settled figures of a start at once, and later ones only once edits pause', async () => {
    const db = freshDb();
    const { holder, costing } = inWorker();
    const stop = followFigures(costing, 'rungbook', ENGINE, { dbName: db, after: 60_000 });
    const keptOf = async (b: Book) => keptFiguresOf(await readKeptFigures('rungbook', db), b, ENGINE);
    try {
      await settle(costing);
      const first = holder.book;
      await expect.poll(() => keptOf(first), { timeout: 10_000 }).toBeDefined();
      const q = first.quotes[0]!;
      holder.change({ put: { quotes: [{ ...q, breaks: q.breaks.map((x) => ({ ...x, price: x.price * 2 })) }] } });
      await settle(costing);
      await new Promise((r) => setTimeout(r, 300));
      // The edit's figures wait for the pause (60 s here); what is kept is still the first start's, for that Book.
      expect(await keptOf(holder.book)).toBeUndefined();
      expect(await keptOf(first)).toBeDefined();
    } finally {
      stop();
    }
  });

  it('does not write again the figures of a Book read from the kept store, and keeps the figures of the next edit', async () => {
    const db = freshDb();
    const { holder, costing } = inWorker();
    const started = holder.book;
    const stop = followFigures(costing, 'rungbook', ENGINE, { dbName: db, after: 0, alreadyKept: started });
    const keptOf = async (b: Book) => keptFiguresOf(await readKeptFigures('rungbook', db), b, ENGINE);
    try {
      await settle(costing);
      await new Promise((r) => setTimeout(r, 300));
      // The store is empty here only because the test never wrote it: the worker's agreeing answer is not written.
      expect(await readKeptFigures('rungbook', db)).toBeUndefined();
      const q = started.quotes[0]!;
      holder.change({ put: { quotes: [{ ...q, breaks: q.breaks.map((x) => ({ ...x, price: x.price * 2 })) }] } });
      await settle(costing);
      await expect.poll(() => keptOf(holder.book), { timeout: 10_000 }).toBeDefined();
    } finally {
      stop();
    }
  });
});
