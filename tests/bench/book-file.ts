// Book file figures: the size and open time of a large Book file. In Node, the reference family plus the 50,000-row
// sample import (parseBookFile, as the CLI and the app's worker run it), and a Book of 500,000 quotes read in a
// child process of its own so its peak memory is the reader's alone. The Chromium open time is in browser.ts.
import { spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Book, Quote } from '../../src/domain/book.ts';
import { parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import { importPrices } from '../../src/io/price-import.ts';
import { samplePriceFile } from '../fixtures/price-sample.ts';
import { referenceFamily } from '../fixtures/reference-family.ts';
import { PROJECT_ROOT, scratchDir } from './bundle.ts';
import type { BenchOptions, BenchSection, Figures } from './harness.ts';
import { IMPORT_SAMPLE } from './import.ts';
import { median, round } from './stats.ts';

const MB = 1_048_576;
/** Quotes of the largest Book measured (half the schema's LIMITS.quotes). */
export const HUGE_BOOK_QUOTES = 500_000;

/** The reference family with the sample price file imported into it: the Book a busy maker might keep. */
export async function referenceImportBook(rows: number = IMPORT_SAMPLE.rows): Promise<Book> {
  const family = referenceFamily().book;
  const sample = samplePriceFile({ ...IMPORT_SAMPLE, rows });
  const book: Book = {
    ...family,
    settings: { ...family.settings, rates: { ...sample.book.settings.rates, ...family.settings.rates } },
    parts: [...family.parts, ...sample.book.parts],
    suppliers: [...family.suppliers, ...sample.book.suppliers],
    quotes: [...family.quotes, ...sample.book.quotes],
  };
  const r = await importPrices(book, sample.bytes, { supplier: sample.supplier, fileName: sample.fileName });
  if (!r.ok || !r.book) throw new Error(`the sample file did not import into the reference family: ${r.reason ?? 'no Book'}`);
  return r.book;
}

/** The reference family's Book with its quotes repeated (new ids) up to `quotes`. */
export function hugeBook(quotes: number): Book {
  const book = referenceFamily().book;
  const base = book.quotes;
  const out: Quote[] = new Array(quotes);
  for (let i = 0; i < quotes; i++) out[i] = i < base.length ? base[i]! : { ...base[i % base.length]!, id: `quote_bench_${i}` };
  return { ...book, quotes: out };
}

/** Writes a Book file into the bench's scratch folder; gives its path and size. */
export function writeBookFile(name: string, book: Book): { path: string; bytes: number } {
  const text = serializeBook(book, { savedAt: '2025-01-01T00:00:00Z' });
  const path = join(scratchDir(), name);
  writeFileSync(path, text);
  return { path, bytes: Buffer.byteLength(text) };
}

/** Reads a Book file in a fresh Node process (book-file-child.ts): its read and parse times and peak memory. */
function readInChild(path: string): { read_ms: number; parse_ms: number; peak_rss_mb: number; rss_before_mb: number; ok: boolean } {
  const r = spawnSync(process.execPath, ['--import', 'tsx', join(PROJECT_ROOT, 'tests/bench/book-file-child.ts'), path], {
    cwd: PROJECT_ROOT,
    encoding: 'utf8',
    maxBuffer: 1 << 20,
  });
  const last = r.stdout.trim().split('\n').at(-1) ?? '';
  if (r.status !== 0 || !last.startsWith('{')) throw new Error(`the Book file reader process failed (${r.status}): ${r.stderr.slice(0, 300)}`);
  return JSON.parse(last);
}

export const bookFileSection: BenchSection = {
  name: 'Book file (Node)',
  async run({ quick, log }: BenchOptions): Promise<Figures> {
    const f: Figures = {};
    log('Book file: reference family + 50,000-row import, written and read back');
    const book = await referenceImportBook(quick ? 10_000 : IMPORT_SAMPLE.rows);
    const prefix = quick ? 'book_file_small' : 'book_file';
    const file = writeBookFile('reference-import.rungbook.json', book);
    f[`${prefix}_quotes`] = book.quotes.length;
    f[`${prefix}_mb`] = round(file.bytes / MB, 1);
    const times: number[] = [];
    const text = (await import('node:fs')).readFileSync(file.path, 'utf8');
    for (let i = 0; i < (quick ? 1 : 3); i++) {
      const t = performance.now();
      const r = parseBookFile(text);
      times.push(performance.now() - t);
      if (!r.ok) throw new Error(`the written Book file does not read back: ${r.problems[0]?.path} ${r.problems[0]?.message}`);
    }
    f[`${prefix}_open_node_ms`] = round(median(times));
    if (quick) return f;

    log(`Book file: ${HUGE_BOOK_QUOTES.toLocaleString('en-GB')} quotes, read in a process of its own`);
    const huge = writeBookFile('huge.rungbook.json', hugeBook(HUGE_BOOK_QUOTES));
    f['book_file_huge_quotes'] = HUGE_BOOK_QUOTES;
    f['book_file_huge_mb'] = round(huge.bytes / MB, 1);
    const child = readInChild(huge.path);
    if (!child.ok) throw new Error('the 500,000-quote Book file does not read back');
    f['book_file_huge_read_ms'] = child.read_ms;
    f['book_file_huge_open_node_ms'] = child.parse_ms;
    f['book_file_huge_peak_rss_mb'] = child.peak_rss_mb;
    f['book_file_huge_rss_before_mb'] = child.rss_before_mb;
    return f;
  },
};
