// Stock count files through the import machinery: other column names and delimiters are read, columns the person
// chooses win over the guesses, every bad row is named with its line and nothing is written, and an imported count
// is kept as an import batch whose undo reverses its movements in the ledger, keeping both.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { applyChange } from '../../src/domain/book-ops.ts';
import type { Book } from '../../src/domain/book.ts';
import { undoBatch } from '../../src/domain/quotes.ts';
import { checkBook } from '../../src/domain/schema.ts';
import { importCount, onHand } from '../../src/domain/stock.ts';
import { analyseCountFile } from '../../src/io/count-import.ts';
import { parseBookFile } from '../../src/io/book-file.ts';
import { sampleBook } from '../fixtures/sample-book.ts';
import { runCli, writeBook } from './cli-helpers.ts';

const bytes = (text: string): Uint8Array => new TextEncoder().encode(text);
const R47K = 'KT-R0603-473';
const XCAP = 'KT-X2-474/275';

function applied(book: Book, change: Parameters<typeof applyChange>[1]): Book {
  const r = applyChange(book, change);
  if (!r.ok) throw new Error(`conflict on ${r.conflict.recordId}`);
  return r.book;
}

describe('reading a stock count file', () => {
  it('reads a semicolon file with a title line and its own column names, decimal comma read from the delimiter', async () => {
    const book = sampleBook();
    const file = `Shelf count, store B\r\nBin;Stock item;Found on shelf\r\nA1;${R47K};1.200\r\nA2;${XCAP};37\r\n`;
    const a = await analyseCountFile(book, bytes(file));
    expect(a.problems).toEqual([]);
    expect(a.delimiterName).toBe('semicolon');
    expect(a.headerLine).toBe(2);
    expect(a.columns).toEqual({ mpn: 'Stock item', counted: 'Found on shelf' });
    expect(a.guessed).toEqual(['mpn', 'counted']);
    // Semicolon files write decimals with a comma, so "1.200" groups thousands: common practice in continental Europe.
    expect(a.lines).toEqual([
      { partId: 'part_r47k', counted: 1200, line: 3 },
      { partId: 'part_xcap', counted: 37, line: 4 },
    ]);
  });

  it('asks for a column it cannot guess, and reads the columns the person chose instead of the guesses', async () => {
    const book = sampleBook();
    const file = `Ref;Part;Pieces\r\n${R47K};old label;40\r\n${XCAP};old label;5\r\n`;
    const guessed = await analyseCountFile(book, bytes(file));
    expect(guessed.lines).toEqual([]);
    expect(guessed.problems.map((p) => p.reason)).toEqual(['no column of the count found: choose which column holds it']);
    const chosen = await analyseCountFile(book, bytes(file), { columns: { mpn: 'Ref', counted: 'Pieces' } });
    expect(chosen.problems).toEqual([]);
    expect(chosen.guessed).toEqual([]);
    expect(chosen.lines.map((l) => [l.partId, l.counted])).toEqual([
      ['part_r47k', 40],
      ['part_xcap', 5],
    ]);
    const missing = await analyseCountFile(book, bytes(file), { columns: { counted: 'Qty' } });
    expect(missing.problems.map((p) => p.reason)).toContain('the file has no column "Qty" for the count');
  });

  it('names every bad row with its line and counts nothing', async () => {
    const book = sampleBook();
    const file = `mpn,counted\n${R47K},10\nNOT-A-PART,3\n${XCAP},-2\n${R47K},4\n${XCAP},2.5\n`;
    const a = await analyseCountFile(book, bytes(file));
    expect(a.lines).toEqual([]);
    expect(a.problems.map((p) => [p.row, p.column, p.reason])).toEqual([
      [3, 'mpn', 'no part "NOT-A-PART" in the Book'],
      [4, 'counted', 'the count "-2" is not a whole number of parts, 0 or more'],
      [5, 'mpn', `the part "${R47K}" is counted twice (also on line 2)`],
      [6, 'mpn', `the part "${XCAP}" is counted twice (also on line 4)`],
      [6, 'counted', 'the count "2.5" is not a whole number of parts, 0 or more'],
    ]);
  });
});

describe('an imported count is an import batch', () => {
  it('writes the differences from the ledger with a batch naming them, and undo reverses them, keeping both', async () => {
    const book = sampleBook();
    const before = [onHand(book.stockMoves, 'part_r47k'), onHand(book.stockMoves, 'part_xcap')];
    const a = await analyseCountFile(book, bytes(`Part number\tQty\n${R47K}\t${before[0]! + 3}\n${XCAP}\t${before[1]}\n`));
    expect(a.delimiterName).toBe('tab');
    const r = importCount(book, '2025-03-01', a.lines, { fileName: 'count-march.csv', hash: a.hash, rows: a.dataRows, at: '2025-03-01T17:00:00.000Z' });
    if (!r.ok) throw new Error(r.error);
    const { batch } = r.value;
    expect(batch).toMatchObject({ kind: 'stock count', fileName: 'count-march.csv', rows: 2, created: [], superseded: [] });
    expect(batch.supplierId).toBeUndefined();
    // Only the part that differs gets a movement (+3); the other agrees with its ledger.
    expect(r.value.change.put?.stockMoves?.map((m) => [m.partId, m.quantity, m.kind])).toEqual([['part_r47k', 3, 'counted']]);
    expect(batch.moves).toEqual(r.value.change.put?.stockMoves?.map((m) => m.id));
    const counted = applied(book, r.value.change);
    expect(checkBook(counted).ok).toBe(true);
    expect(onHand(counted.stockMoves, 'part_r47k')).toBe(before[0]! + 3);

    const undo = undoBatch(counted, batch.id);
    if (!undo.ok) throw new Error(undo.reason);
    // Stock is a ledger: nothing is deleted; the count's movement is reversed on its own date, naming the batch.
    expect(undo.change.delete).toBeUndefined();
    const undone = applied(counted, undo.change);
    expect(checkBook(undone).ok).toBe(true);
    expect(onHand(undone.stockMoves, 'part_r47k')).toBe(before[0]);
    expect(onHand(undone.stockMoves, 'part_r47k', '2025-03-01')).toBe(onHand(book.stockMoves, 'part_r47k', '2025-03-01'));
    const countMove = counted.stockMoves.find((m) => m.id === batch.moves![0])!;
    expect(undone.stockMoves.slice(0, counted.stockMoves.length)).toEqual(counted.stockMoves);
    expect(undone.stockMoves.slice(counted.stockMoves.length).map((m) => [m.partId, m.date, m.quantity, m.kind, m.reason, m.undoes])).toEqual([
      ['part_r47k', '2025-03-01', -3, 'adjusted', 'undo of stock count count-march.csv', batch.id],
    ]);
    expect(countMove).toMatchObject({ quantity: 3, kind: 'counted' });
    expect(undone.importBatches.find((b) => b.id === batch.id)?.undone).toBe(true);
    expect(undoBatch(undone, batch.id)).toMatchObject({ ok: false });
    expect(undone.stockMoves).toHaveLength(counted.stockMoves.length + 1);
  });

  it('a reversing movement must name an import batch the Book holds', () => {
    const book = sampleBook();
    const bad = { ...book, stockMoves: book.stockMoves.map((m) => (m.undoes ? { ...m, undoes: 'batch_gone' } : m)) };
    const r = checkBook(bad);
    expect(!r.ok && r.problems).toEqual([{ path: 'stockMoves[5].undoes', message: 'refers to import batch "batch_gone", which is not in the file' }]);
  });

  it('is refused by the Book check with a supplier, as a price batch is without one', () => {
    const book = sampleBook();
    const count = book.importBatches.find((b) => b.kind === 'stock count')!;
    const price = book.importBatches.find((b) => b.kind !== 'stock count')!;
    const { supplierId: _s, ...noSupplier } = price;
    const others = book.importBatches.filter((b) => b !== count && b !== price);
    const bad = { ...book, importBatches: [{ ...count, supplierId: 'sup_b' }, noSupplier, ...others] };
    const r = checkBook(bad);
    expect(!r.ok && r.problems).toEqual([
      { path: 'importBatches[0].supplierId', message: 'a stock count has no supplier' },
      { path: 'importBatches[1].supplierId', message: 'a price file import names its supplier' },
    ]);
  });
});

describe('rungbook count reads through the same machinery', () => {
  let dir = '';
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'rungbook-count-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('takes chosen columns, records a batch, and leaves the file as it was when a row is bad', async () => {
    const file = writeBook(dir, 'book.json', sampleBook());
    const csv = join(dir, 'count.csv');
    writeFileSync(csv, `Ref;Part;Pieces\r\n${R47K};x;500\r\n`);
    const guessedOnly = await runCli(['count', file, csv, '--date', '2025-03-01']);
    expect(guessedOnly).toMatchObject({ code: 1, err: expect.stringMatching(/no column of the count found/) });
    const ok = await runCli(['count', file, csv, '--date', '2025-03-01', '--part-column', 'Ref', '--count-column', 'Pieces']);
    expect(ok.err).toBe('');
    expect(ok.code).toBe(0);
    const r = parseBookFile(readFileSync(file, 'utf8'));
    if (!r.ok) throw new Error(JSON.stringify(r.problems));
    expect(onHand(r.book.stockMoves, 'part_r47k')).toBe(500);
    expect(r.book.importBatches.filter((b) => b.kind === 'stock count').map((b) => b.fileName)).toEqual(['count-february.csv', 'recount-february.csv', 'count.csv']);

    const written = readFileSync(file, 'utf8');
    writeFileSync(csv, `Ref;Part;Pieces\r\n${R47K};x;7\r\nNOT-A-PART;x;3\r\n`);
    const bad = await runCli(['count', file, csv, '--part-column', 'Ref', '--count-column', 'Pieces']);
    expect(bad).toMatchObject({ code: 1, err: expect.stringMatching(/nothing written: line 3: no part "NOT-A-PART" in the Book/) });
    expect(readFileSync(file, 'utf8')).toBe(written);
  });
});
