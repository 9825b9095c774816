// A large Book Rungbook writes opens again: 100,000 quotes written by the Book file writer (the app's download, a
// slice at a time; the command line's writer joins the very same pieces), read back by the command line's reader,
// give every collection's count and the records as written, field for field. Generated here; nothing large is
// committed.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readBookFile } from '../../src/cli/book-read.ts';
import { COLLECTIONS } from '../../src/domain/book.ts';
import type { Book, Quote } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { MAX_BOOK_FILE_BYTES, serializeBookSliced } from '../../src/io/book-file.ts';

const QUOTES = 100_000;
const dir = mkdtempSync(join(tmpdir(), 'rungbook-large-book-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The demo Book with its quotes repeated up to QUOTES, each one different (prices, codes, dates, terms). */
function largeBook(): Book {
  const book = demoBook();
  const base = book.quotes;
  const quotes: Quote[] = new Array(QUOTES);
  for (let i = 0; i < QUOTES; i++) {
    const q = base[i % base.length]!;
    const price = Math.round((0.0125 + (i % 997) * 0.0031) * 1e4) / 1e4;
    quotes[i] = {
      ...q,
      id: `quote_large_${String(i).padStart(6, '0')}`,
      rev: 1 + (i % 7),
      supplierCode: i % 5 === 0 ? `µ-${i} “Ω”` : `SC-${i}`,
      breaks: [
        { qty: 1, price },
        { qty: 100, price: Math.round(price * 0.8 * 1e4) / 1e4 },
        { qty: 1000 + (i % 3) * 500, price: Math.round(price * 0.6 * 1e4) / 1e4 },
      ],
      moq: 1 + (i % 10),
      pack: i % 4 === 0 ? 10 : 1,
      leadDays: i % 60,
      date: `2025-${String(1 + (i % 12)).padStart(2, '0')}-${String(1 + (i % 28)).padStart(2, '0')}`,
      source: i % 2 === 0 ? 'manual' : 'large-offer.csv',
    };
    if (i % 3 === 0) quotes[i]!.expires = '2027-06-30';
    if (i % 11 === 0) quotes[i]!.incoterm = 'FCA';
  }
  return { ...book, quotes };
}

/** The records to compare field for field: the first and last quotes, some between, a part and the settings. */
function sampled(book: Book): unknown[] {
  return [
    ...[0, 1, 5, 33, 49_999, 77_777, QUOTES - 1].map((i) => book.quotes[i]),
    book.parts[0],
    book.variants[0],
    book.settings,
  ];
}

describe('a Book of 100,000 quotes', () => {
  const book = largeBook();

  it('written by the app’s download writer, opens again with the command line’s reader', async () => {
    const pieces = await serializeBookSliced(book, { savedAt: '2026-01-01T00:00:00.000Z' });
    // Saved as the browser saves a download: the pieces as one file, UTF-8.
    const bytes = new Uint8Array(await new Blob(pieces).arrayBuffer());
    expect(bytes.length).toBeLessThan(MAX_BOOK_FILE_BYTES);
    const file = join(dir, 'app.rungbook.json');
    writeFileSync(file, bytes);
    const back = await readBookFile(file);
    expect(back.ok, back.ok ? '' : JSON.stringify(back.problems.slice(0, 3))).toBe(true);
    if (!back.ok) return;
    for (const c of COLLECTIONS) expect(back.book[c].length, c).toBe(book[c].length);
    expect(back.book.quotes.length).toBe(QUOTES);
    expect(back.savedAt).toBe('2026-01-01T00:00:00.000Z');
    expect(sampled(back.book)).toStrictEqual(sampled(book));
    expect(back.book.quotes.map((q) => q.id)).toStrictEqual(book.quotes.map((q) => q.id));
    // Text outside ASCII came back as written.
    expect(back.book.quotes[5]!.supplierCode).toBe('µ-5 “Ω”');
  }, 60_000);
});
