// Matching, the all-or-nothing plan, superseding, batches with their content hash, re-import detection and undo.
import { describe, expect, it } from 'vitest';
import type { BookChange as StoreBookChange } from '../../src/store/types.ts';
import { applyChange } from '../../src/domain/book-ops.ts';
import type { Book } from '../../src/domain/book.ts';
import { undoBatch } from '../../src/domain/quotes.ts';
import { importPrices } from '../../src/io/price-import.ts';
import { planImport } from '../../src/io/price-plan.ts';
import { sha256Hex } from '../../src/io/price-validate.ts';
import { serializeBook } from '../../src/io/book-file.ts';
import { analyse, bytesOf, SUPPLIER_ID, SUPPLIER_NAME, testBook } from './import-helpers.ts';

const NOW = new Date('2026-11-30T10:00:00Z');
const FILE = 'MPN,Order code,Qty,Price\nQT-R10K-06,QS-1001,1,0.05\nQT-R10K-06,QS-1001,100,0.03\nQT-C100N-50,QS-2002,10,0.12\n';

async function run(book: Book, text: string, extra: Partial<Parameters<typeof importPrices>[2]> = {}) {
  return importPrices(book, bytesOf(text), { supplier: SUPPLIER_NAME, fileName: 'prices.csv', now: NOW, ...extra });
}

function applied(book: Book, change: StoreBookChange): Book {
  const r = applyChange(book, change);
  if (!r.ok) throw new Error(JSON.stringify(r.conflict));
  return r.book;
}

describe('content hash', () => {
  it('is SHA-256 of the file bytes', async () => {
    // FIPS 180-2, appendix B.1: SHA-256("abc").
    expect(await sha256Hex(bytesOf('abc'))).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    const a = await analyse(FILE);
    expect(a.hash).toBe(await sha256Hex(bytesOf(FILE)));
  });
});

describe('matching rows to parts', () => {
  it('matches by maker part number ignoring case, spaces and dashes', async () => {
    const r = await run(testBook(), 'MPN,Price\nqt r10k 06,0.05\nQTC100N50,0.1\n');
    expect(r.ok).toBe(true);
    expect(r.summary).toMatchObject({ matchedByMpn: 2, matchedByCode: 0, newQuotes: 2 });
  });

  it("matches by the supplier's own code from earlier quotes", async () => {
    const r = await run(testBook(), 'Order code,Price\nqs-3003,0.2\n');
    expect(r.summary).toMatchObject({ matchedByMpn: 0, matchedByCode: 1 });
    const q = r.book!.quotes.find((x) => x.batchId === r.summary.batchId)!;
    expect(q.partId).toBe('part_d1');
  });

  it('lists unmatched rows and skips them by default', async () => {
    const r = await run(testBook(), 'MPN,Description,Price\nQT-NEW-1,new thing,0.5\nQT-R10K-06,,0.05\n');
    expect(r.ok).toBe(true);
    expect(r.summary.unmatched).toEqual([{ line: 2, mpn: 'QT-NEW-1', supplierCode: '', decision: 'skip' }]);
    expect(r.book!.parts).toHaveLength(3);
  });

  it('creates a new part for an unmatched row when the decision says so', async () => {
    const book = testBook();
    const a = await analyse('MPN,Maker,Description,Price\nQT-NEW-1,Invented Maker,new thing,0.5\nQT-NEW-2,,other,0.6\n');
    const plan = planImport(book, a, {
      supplierId: SUPPLIER_ID,
      fileName: 'p.csv',
      at: NOW.toISOString(),
      decisions: { 'mpn:QTNEW1': 'create', 'mpn:QTNEW2': 'skip' },
    });
    expect(plan.ok).toBe(true);
    expect(plan.change!.put!.parts).toEqual([
      { id: expect.stringMatching(/^part_/), rev: 0, mpn: 'QT-NEW-1', maker: 'Invented Maker', description: 'new thing', kind: 'other', ratings: {}, package: '' },
    ]);
    expect(plan.unmatched.map((u) => [u.mpn, u.decision])).toEqual([
      ['QT-NEW-1', 'create'],
      ['QT-NEW-2', 'skip'],
    ]);
  });

  it('cannot create a part from a row with only a supplier code, and says why', async () => {
    const r = await run(testBook(), 'Order code,Price\nQS-NEW,0.2\nQS-1001,0.05\n', { createParts: true });
    expect(r.summary.unmatched[0]).toMatchObject({ decision: 'skip', note: expect.stringMatching(/needs a maker part number/) });
  });

  it('refuses two offers that land on the same part through different identifiers', async () => {
    const r = await run(testBook(), 'MPN,Order code,Price\nQT-D400-1A,,0.2\n,QS-3003,0.3\n');
    expect(r.ok).toBe(false);
    expect(r.problems).toEqual([{ row: 3, column: '', value: 'QS-3003', reason: expect.stringMatching(/line 2 already gives prices for part QT-D400-1A/) }]);
  });
});

describe('the plan', () => {
  it('creates rev-0 quotes, supersedes the current quote of the same part and supplier, and records the batch', async () => {
    const book = testBook();
    const a = await analyse(FILE);
    const plan = planImport(book, a, { supplierId: SUPPLIER_ID, fileName: 'prices.csv', at: NOW.toISOString() });
    expect(plan.ok).toBe(true);
    const change = plan.change!;
    const fresh = change.put!.quotes!.filter((q) => q.rev === 0);
    expect(fresh.map((q) => [q.partId, q.supplierCode, q.breaks])).toEqual([
      ['part_r1', 'QS-1001', [{ qty: 1, price: 0.05 }, { qty: 100, price: 0.03 }]],
      ['part_c1', 'QS-2002', [{ qty: 10, price: 0.12 }]],
    ]);
    // The old quote from this supplier is kept with supersededBy, at the revision it was read (the store bumps it).
    const old = change.put!.quotes!.filter((q) => q.rev !== 0);
    expect(old).toEqual([{ ...book.quotes[0]!, supersededBy: fresh[0]!.id }]);
    // Another supplier's quote for the same part is not touched.
    expect(change.put!.quotes!.some((q) => q.id === 'quote_other_r1')).toBe(false);
    expect(change.put!.importBatches).toEqual([
      {
        id: plan.batchId,
        rev: 0,
        fileName: 'prices.csv',
        hash: a.hash,
        supplierId: SUPPLIER_ID,
        rows: 3,
        at: NOW.toISOString(),
        created: fresh.map((q) => q.id),
        superseded: ['quote_old_r1'],
      },
    ]);
    expect(fresh.every((q) => q.batchId === plan.batchId && q.source === 'prices.csv')).toBe(true);
  });

  it('remembers the resolved column mapping on the supplier', async () => {
    const r = await run(testBook(), FILE);
    const s = r.book!.suppliers.find((x) => x.id === SUPPLIER_ID)!;
    expect(s.mapping).toEqual({ columns: { mpn: 'MPN', supplierCode: 'Order code', qty: 'Qty', price: 'Price' }, layout: 'long', decimal: '.' });
    expect(s.rev).toBe(2);
  });

  it('is a change the store accepts as a BookChange', async () => {
    const plan = planImport(testBook(), await analyse(FILE), { supplierId: SUPPLIER_ID, fileName: 'p.csv', at: NOW.toISOString() });
    const forStore: StoreBookChange = plan.change!;
    expect(Object.keys(forStore.put!).sort()).toEqual(['importBatches', 'parts', 'quotes', 'suppliers']);
  });

  it('stores new records at rev 1 and superseded ones one revision up when applied', async () => {
    const r = await run(testBook(), FILE);
    const byId = new Map(r.book!.quotes.map((q) => [q.id, q]));
    expect(byId.get('quote_old_r1')).toMatchObject({ rev: 3, supersededBy: expect.stringMatching(/^quote_/) });
    expect(r.book!.quotes.filter((q) => q.batchId).every((q) => q.rev === 1)).toBe(true);
  });
});

describe('all or nothing', () => {
  it('a file whose last row is bad gives no plan and leaves the Book byte-for-byte unchanged', async () => {
    const book = testBook();
    const before = serializeBook(book, { savedAt: 'fixed' });
    const snapshot = structuredClone(book);
    const r = await run(book, `${FILE}QT-D400-1A,QS-3003,10,not-a-price\n`);
    expect(r.ok).toBe(false);
    expect(r.book).toBeUndefined();
    expect(r.plan?.change).toBeUndefined();
    expect(r.problems).toEqual([{ row: 5, column: 'Price', value: 'not-a-price', reason: 'price is not a number (read with decimal point)' }]);
    expect(book).toEqual(snapshot);
    expect(serializeBook(book, { savedAt: 'fixed' })).toBe(before);
  });

  it('imports only the valid rows when that is chosen explicitly, still reporting the bad ones', async () => {
    const r = await run(testBook(), `${FILE}QT-D400-1A,QS-3003,10,not-a-price\n`, { validRowsOnly: true });
    expect(r.ok).toBe(true);
    expect(r.summary.newQuotes).toBe(2);
    expect(r.summary.rejectedOffers).toBe(1);
    expect(r.problems).toHaveLength(1);
  });

  it('refuses a file with an unknown supplier and changes nothing', async () => {
    const book = testBook();
    const r = await importPrices(book, bytesOf(FILE), { supplier: 'Nobody', fileName: 'x.csv' });
    expect(r.ok).toBe(false);
    expect(r.reason).toMatch(/no supplier named 'Nobody'.*Quillmoor Test Supply/);
    expect(book).toEqual(testBook());
  });
});

describe('re-import and undo', () => {
  it('detects the same file imported again for the same supplier and refuses unless asked', async () => {
    const first = await run(testBook(), FILE);
    const again = await run(first.book!, FILE);
    expect(again.ok).toBe(false);
    expect(again.reason).toMatch(/already imported for Quillmoor Test Supply/);
    expect(again.summary.reimportOf).toBe(first.summary.batchId);
    const forced = await run(first.book!, FILE, { allowReimport: true });
    expect(forced.ok).toBe(true);
  });

  it('does not call it a re-import for another supplier or after undo', async () => {
    const first = await run(testBook(), FILE);
    const other = await run(first.book!, FILE, { supplier: 'Other Invented Supply' });
    expect(other.summary.reimportOf).toBeUndefined();
    const undo = undoBatch(first.book!, first.summary.batchId!);
    const undone = applied(first.book!, undo.ok ? undo.change : {});
    const again = await run(undone, FILE);
    expect(again.ok).toBe(true);
  });

  it('undo deletes the batch quotes and restores the ones it superseded', async () => {
    const book = testBook();
    const first = await run(book, FILE);
    const undo = undoBatch(first.book!, first.summary.batchId!);
    expect(undo.ok).toBe(true);
    const after = applied(first.book!, undo.ok ? undo.change : {});
    // Same quotes as before the import, the restored one a revision further on and no longer superseded.
    expect(after.quotes.map((q) => q.id).sort()).toEqual(book.quotes.map((q) => q.id).sort());
    const restored = after.quotes.find((q) => q.id === 'quote_old_r1')!;
    expect(restored.supersededBy).toBeUndefined();
    expect(restored.breaks).toEqual(book.quotes[0]!.breaks);
    expect(after.importBatches[0]).toMatchObject({ id: first.summary.batchId, undone: true });
  });

  it('refuses to undo an older batch whose quotes a later batch replaced', async () => {
    const first = await run(testBook(), FILE);
    const second = await run(first.book!, 'MPN,Price\nQT-R10K-06,0.02\n');
    const undo = undoBatch(second.book!, first.summary.batchId!);
    expect(undo).toEqual({ ok: false, reason: expect.stringMatching(/later import batch .* undo that one first/) });
    const undoLater = undoBatch(second.book!, second.summary.batchId!);
    expect(undoLater.ok).toBe(true);
    const back = applied(second.book!, undoLater.ok ? undoLater.change : {});
    expect(undoBatch(back, first.summary.batchId!).ok).toBe(true);
  });

  it('refuses to undo twice or an unknown batch', async () => {
    const first = await run(testBook(), FILE);
    const undo = undoBatch(first.book!, first.summary.batchId!);
    const after = applied(first.book!, undo.ok ? undo.change : {});
    expect(undoBatch(after, first.summary.batchId!)).toEqual({ ok: false, reason: expect.stringMatching(/already undone/) });
    expect(undoBatch(after, 'batch_nope')).toEqual({ ok: false, reason: 'no import batch with id batch_nope' });
  });
});

describe('quote date and lost pack or MOQ', () => {
  it("dates rows without a date on the Book's costing date, not the day of the import", async () => {
    const book = testBook();
    book.settings.costingDate = '2026-06-15';
    const r = await run(book, 'MPN,Price\nQT-C100N-50,0.1\n');
    expect(r.ok).toBe(true);
    expect(r.book!.quotes.find((q) => q.batchId === r.summary.batchId)!.date).toBe('2026-06-15');
    const dated = await run(book, 'MPN,Price,Quote date\nQT-C100N-50,0.1,2026-03-01\n');
    expect(dated.book!.quotes.find((q) => q.batchId === dated.summary.batchId)!.date).toBe('2026-03-01');
    const noCostingDate = await run(testBook(), 'MPN,Price\nQT-C100N-50,0.1\n');
    expect(noCostingDate.book!.quotes.find((q) => q.batchId === noCostingDate.summary.batchId)!.date).toBe('2026-11-30');
  });

  it('counts the superseded quotes whose pack or MOQ a file without those columns would lose', async () => {
    const book = testBook();
    book.quotes = book.quotes.map((q) =>
      q.id === 'quote_old_r1' ? { ...q, pack: 50 } : q.id === 'quote_old_d1' ? { ...q, moq: 100, breaks: [{ qty: 100, price: 0.05 }] } : q,
    );
    const plain = await analyse('MPN,Price\nQT-R10K-06,0.05\nQT-D400-1A,0.2\nQT-C100N-50,0.1\n');
    const plan = planImport(book, plain, { supplierId: SUPPLIER_ID, fileName: 'p.csv', at: NOW.toISOString() });
    expect(plan.ok).toBe(true);
    expect(plan.supersededQuotes).toBe(2);
    expect(plan.lostPackOrMoq).toBe(2);
    // A file that gives pack and MOQ says what they are now: nothing is lost silently.
    const full = await analyse('MPN,Price,MOQ,Pack\nQT-R10K-06,0.05,1,1\nQT-D400-1A,0.2,1,1\n');
    expect(planImport(book, full, { supplierId: SUPPLIER_ID, fileName: 'p.csv', at: NOW.toISOString() }).lostPackOrMoq).toBe(0);
    // Quotes that had pack 1 and MOQ 1 lose nothing.
    expect(planImport(testBook(), plain, { supplierId: SUPPLIER_ID, fileName: 'p.csv', at: NOW.toISOString() }).lostPackOrMoq).toBe(0);
  });
});
