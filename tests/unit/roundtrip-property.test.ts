// Every Book the schema accepts round-trips strictly equal: Books are generated from the Book schema itself (a walker
// turns its valibot objects into fast-check arbitraries), their references between records are then pointed at
// generated records, and each Book checkBook accepts must come back the same through the Book file and the IndexedDB
// store. Odd text (quotes, escapes, NUL, astral characters, lone surrogates) and numbers at their bounds included.
import 'fake-indexeddb/auto';
import { IDBFactory } from 'fake-indexeddb';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { COLLECTIONS } from '../../src/domain/book.ts';
import type { Book } from '../../src/domain/book.ts';
import { BookSchema, checkBook } from '../../src/domain/schema.ts';
import { parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import { openBookStore } from '../../src/store/idb-store.ts';
import { arbitraryOf } from './schema-arbitrary.ts';
import type { Node } from './schema-arbitrary.ts';

type Rec = Record<string, unknown>;

function isRec(x: unknown): x is Rec {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

function records(book: Rec, c: string): Rec[] {
  const list = book[c];
  return Array.isArray(list) ? (list as unknown[]).filter(isRec) : [];
}

/** First of each key: later records with a key already seen are dropped (ids, variant codes, check names are unique). */
function uniqueBy(list: Rec[], key: string): Rec[] {
  const seen = new Set<unknown>();
  return list.filter((r) => (seen.has(r[key]) ? false : (seen.add(r[key]), true)));
}

/** Breaks rise in quantity, one break at least. */
function risingBreaks(quote: Rec): void {
  const breaks = Array.isArray(quote.breaks) ? (quote.breaks as Rec[]) : [];
  const sorted = uniqueBy([...breaks].sort((a, b) => (a.qty as number) - (b.qty as number)), 'qty');
  quote.breaks = sorted.length ? sorted : [{ qty: 1, price: 0.5 }];
}

/**
 * Points the references between generated records at records that exist (a reference with nothing to point at is
 * dropped, with its record where the record needs it), makes ids, codes and names unique, breaks rise, and gives
 * every currency used a rate, the base currency's being 1.
 */
function linked(raw: unknown): unknown {
  const book = structuredClone(raw) as Rec;
  for (const c of COLLECTIONS) if (c in book) book[c] = uniqueBy(records(book, c), 'id');
  const ids = (c: string): string[] => records(book, c).map((r) => r.id as string);
  const pick = (list: string[], i: number): string | undefined => (list.length ? list[i % list.length] : undefined);
  const parts = ids('parts');
  const suppliers = ids('suppliers');
  const variants = ids('variants');

  if ('quotes' in book) {
    book.quotes = records(book, 'quotes')
      .filter(() => parts.length > 0 && suppliers.length > 0)
      .map((q, i) => ({ ...q, partId: pick(parts, i), supplierId: pick(suppliers, i + 1) }));
  }
  for (const q of records(book, 'quotes')) risingBreaks(q);
  for (const r of records(book, 'runs')) {
    const snapshot = isRec(r.frozen) && isRec(r.frozen.snapshot) ? r.frozen.snapshot : undefined;
    for (const q of snapshot ? records(snapshot, 'quotes') : []) risingBreaks(q);
  }
  records(book, 'buildLines').forEach((l, i) => {
    if (l.partId === undefined && l.partRule === undefined) l.partId = pick(parts, i) ?? '';
    if (l.partId !== undefined) {
      const p = pick(parts, i);
      if (p === undefined) {
        delete l.partId;
        l.partRule ??= '';
      } else l.partId = p;
    }
    if (l.pinnedSupplierId !== undefined) {
      const s = pick(suppliers, i);
      if (s === undefined) delete l.pinnedSupplierId;
      else l.pinnedSupplierId = s;
    }
    // Approved alternates are other parts of the Book, each once, on a fixed-part line; a pinned part is approved.
    if (Array.isArray(l.alternates)) {
      const others = parts.filter((p) => p !== l.partId);
      const picked = l.partId === undefined ? [] : (l.alternates as unknown[]).map((_, k) => pick(others, i + k)).filter((p) => p !== undefined);
      l.alternates = [...new Set(picked)];
    }
    if (l.pinnedPartId !== undefined) {
      if (l.partId === undefined) delete l.pinnedPartId;
      else l.pinnedPartId = l.partId;
    }
  });
  if ('runs' in book) book.runs = records(book, 'runs').filter(() => variants.length > 0).map((r, i) => ({ ...r, variantId: pick(variants, i) }));
  if ('importBatches' in book) {
    // A price file names its supplier; a stock count has none.
    book.importBatches = records(book, 'importBatches')
      .filter((b) => b['kind'] === 'stock count' || suppliers.length > 0)
      .map((b, i) => {
        if (b['kind'] !== 'stock count') return { ...b, supplierId: pick(suppliers, i) };
        const { supplierId: _s, ...count } = b;
        return count;
      });
  }
  for (const r of records(book, 'runs')) {
    if (r.status === 'built') r.builtDate ??= '2025-01-01';
    else delete r.builtDate;
  }
  linkStock(book, parts, suppliers, ids('runs'), ids('importBatches'));
  if ('variants' in book) book.variants = uniqueBy(records(book, 'variants'), 'code');
  if ('checks' in book) book.checks = uniqueBy(records(book, 'checks'), 'name');

  if ('priceLists' in book) {
    const seen = new Set<string>();
    book.priceLists = records(book, 'priceLists').filter((l) => {
      const key = String(l.name).trim().toLowerCase();
      return seen.has(key) ? false : (seen.add(key), true);
    });
    // A margin on price stays below 100 %.
    for (const l of records(book, 'priceLists')) if (l.basis !== 'markup' && typeof l.pct === 'number') l.pct %= 100;
  }

  const settings = isRec(book.settings) ? book.settings : {};
  const base = typeof settings.baseCurrency === 'string' ? settings.baseCurrency : 'EUR';
  const rates: Rec = isRec(settings.rates) ? { ...settings.rates } : { EUR: 1 };
  for (const c of ['suppliers', 'quotes', 'priceLists']) for (const r of records(book, c)) if (typeof r.currency === 'string') rates[r.currency] ??= 0.5;
  for (const s of records(book, 'suppliers')) {
    for (const m of [s.freightPerOrder, s.chargesPerOrder]) if (isRec(m) && typeof m.currency === 'string') rates[m.currency] ??= 0.5;
  }
  for (const o of records(book, 'orders')) for (const l of records(o, 'lines')) if (typeof l.currency === 'string') rates[l.currency] ??= 0.5;
  rates[base] = 1;
  book.settings = { ...settings, rates };
  return book;
}

const MOVE_SIGN: Record<string, number> = { received: 1, issued: -1, scrapped: -1 };

/**
 * Orders and stock movements that hold together: orders name a supplier and parts, unique numbers, lines; a
 * movement naming an order becomes a receipt on one of its lines; each line's `received` is the sum of its
 * receipts (the ordered quantity raised to it where needed); signs fit the kind; statuses follow what came in; an
 * undoing movement names a batch of the Book.
 */
function linkStock(book: Rec, parts: string[], suppliers: string[], runs: string[], batches: string[]): void {
  const pick = (list: string[], i: number): string | undefined => (list.length ? list[i % list.length] : undefined);
  const orders = uniqueBy(records(book, 'orders'), 'number')
    .filter((o) => suppliers.length > 0 && parts.length > 0 && records(o, 'lines').length > 0)
    .map((o, i): Rec & { lines: (Rec & { received: number })[] } => {
      const lines = records(o, 'lines').map((l, k) => ({ ...l, partId: pick(parts, i + k), received: 0 }));
      const dates = [o.orderedDate as string, o.dueDate as string].sort();
      return { ...o, supplierId: pick(suppliers, i), lines, orderedDate: dates[0], dueDate: dates[1] };
    });
  if ('orders' in book) book.orders = orders;
  const moves = records(book, 'stockMoves')
    .filter(() => parts.length > 0)
    .map((m, i) => {
      const out: Rec = { ...m, partId: pick(parts, i) };
      delete out.orderId;
      delete out.orderLine;
      const order = m.orderId !== undefined ? orders[i % Math.max(1, orders.length)] : undefined;
      if (order) {
        const k = i % order.lines.length;
        const line = order.lines[k]!;
        Object.assign(out, { kind: 'received', orderId: order.id, orderLine: k, partId: line.partId });
      }
      const size = Math.max(1, Math.abs(Math.trunc(Number(m.quantity) || 1)));
      const sign = MOVE_SIGN[out.kind as string] ?? (Number(m.quantity) < 0 ? -1 : 1);
      out.quantity = sign * size;
      if (order) order.lines[out.orderLine as number]!.received += size;
      if (out.runId !== undefined) {
        const r = pick(runs, i);
        if (r === undefined) delete out.runId;
        else out.runId = r;
      }
      if (out.undoes !== undefined) {
        const b = pick(batches, i);
        if (b === undefined) delete out.undoes;
        else out.undoes = b;
      }
      return out;
    });
  if ('stockMoves' in book) book.stockMoves = moves;
  for (const o of orders) {
    for (const l of o.lines) l.quantity = Math.max(Number(l.quantity) || 1, l.received);
    const full = o.lines.every((l) => l.received >= (l.quantity as number));
    const some = o.lines.some((l) => l.received > 0);
    if (o.status !== 'cancelled') o.status = full ? 'received' : some ? 'part-received' : 'open';
  }
}

const generated = arbitraryOf(BookSchema as unknown as Node).map(linked);

/** Books checkBook accepts, as it gives them (defaults filled in). */
const books: fc.Arbitrary<Book> = generated
  .map((raw) => checkBook(raw))
  .filter((r) => r.ok)
  .map((r) => (r.ok ? r.value : (undefined as never)));

/** The Book as the store gives it back: each collection in id order (the order IndexedDB keeps records in). */
function inIdOrder(book: Book): Book {
  const out = { ...book } as Record<string, unknown>;
  for (const c of COLLECTIONS) out[c] = [...(book[c] as { id: string }[])].sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
  return out as unknown as Book;
}

describe('generated Books', () => {
  it('are mostly accepted by checkBook, and hold every record kind', () => {
    const sample = fc.sample(generated, { numRuns: 200, seed: 42 });
    const accepted = sample.map((raw) => checkBook(raw)).filter((r) => r.ok);
    expect(accepted.length).toBeGreaterThan(150);
    for (const c of COLLECTIONS) {
      expect(accepted.some((r) => r.ok && r.value[c].length > 0), `some Book holds ${c}`).toBe(true);
    }
    expect(accepted.some((r) => r.ok && r.value.runs.some((run) => run.frozen !== undefined))).toBe(true);
    expect(accepted.some((r) => r.ok && r.value.buildLines.some((l) => l.pinnedSupplierId !== undefined))).toBe(true);
  });
});

describe('round trip of every accepted Book', () => {
  it('through the Book file is strictly equal, and stable', () => {
    fc.assert(
      fc.property(books, (book) => {
        const text = serializeBook(book, { savedAt: '2025-01-01T00:00:00.000Z' });
        const back = parseBookFile(text);
        if (!back.ok) throw new Error(`the written Book does not read back: ${JSON.stringify(back.problems)}`);
        expect(back.book).toStrictEqual(book);
        expect(serializeBook(back.book, { savedAt: '2025-01-01T00:00:00.000Z' })).toBe(text);
      }),
      { numRuns: 200 },
    );
  });

  it('through the IndexedDB store is strictly equal (records in id order)', async () => {
    let n = 0;
    await fc.assert(
      fc.asyncProperty(books, async (book) => {
        const store = await openBookStore(`rungbook-property-${++n}`, { factory: new IDBFactory() });
        try {
          await store.replaceAll(book);
          expect(await store.load()).toStrictEqual(inIdOrder(book));
        } finally {
          store.close();
        }
      }),
      { numRuns: 25 },
    );
  });

  it('through the IndexedDB store as new records of one change is strictly equal, each at revision 1', async () => {
    let n = 0;
    await fc.assert(
      fc.asyncProperty(books, async (book) => {
        const store = await openBookStore(`rungbook-property-apply-${++n}`, { factory: new IDBFactory() });
        try {
          const asNew = (list: readonly { rev: number }[]): { rev: number }[] => list.map((r) => ({ ...r, rev: 0 }));
          // A new database holds default settings at revision 1: the Book's settings are an edit of those.
          await store.apply({ put: Object.fromEntries(COLLECTIONS.map((c) => [c, asNew(book[c])])), settings: { ...book.settings, rev: 1 } });
          const expected = inIdOrder(structuredClone(book));
          for (const c of COLLECTIONS) for (const r of expected[c] as { rev: number }[]) r.rev = 1;
          expected.settings.rev = 2;
          expect(await store.load()).toStrictEqual(expected);
        } finally {
          store.close();
        }
      }),
      { numRuns: 25 },
    );
  });
});
