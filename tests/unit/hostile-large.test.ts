// Large and extreme input, generated here (nothing large is committed): Book files opened through the worker's code
// and written a slice at a time; price files beyond the reading limits refused in the app's reader and in
// `rungbook import`; every form refusing text beyond the Book's limits; the schema's bounds on numbers, frozen
// snapshots, deep nesting and duplicate names; and `rungbook cost` printing only finite figures at the bounds.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { emptyBook } from '../../src/domain/book.ts';
import type { Book, Check, NotebookPage, Quote } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { runDraft, validateRun } from '../../src/domain/freeze.ts';
import { LIMITS } from '../../src/domain/schema.ts';
import { notebookCellProblem } from '../../src/engine/notebook.ts';
import {
  MAX_BOOK_FILE_BYTES,
  bookFileWriteProblem,
  parseBookFile,
  serializeBook,
  serializeBookSliced,
} from '../../src/io/book-file.ts';
import { RECORDS_PER_PART, handleBookWorkerRequest, readBookFileBlob } from '../../src/io/book-worker.ts';
import type { BookWorkerMessage, BookWorkerRequest } from '../../src/io/book-worker.ts';
import { openBookFileInWorker } from '../../src/io/book-worker-client.ts';
import type { BookWorkerLike } from '../../src/io/book-worker-client.ts';
import { PRICE_FILE_LIMITS } from '../../src/io/price-read.ts';
import { quoteDraft, validateQuote } from '../../src/ui/quote-text.ts';
import { checkDraft, validateCheckDraft } from '../../src/ui/rb-check-form.ts';
import {
  notebookPageProblem,
  partDraft,
  supplierDraft,
  validatePart,
  validateSupplier,
  validateVariant,
  variantDraft,
} from '../../src/ui/record-forms.ts';
import { readBookFile } from '../../src/cli/book-read.ts';
import { runCli } from './cli-helpers.ts';
import { analyse } from './import-helpers.ts';

const dir = mkdtempSync(join(tmpdir(), 'rungbook-hostile-large-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const demo = demoBook();
const demoText = serializeBook(demo, { savedAt: '2025-01-01T00:00:00Z' });
/** The demo Book file as plain data, to damage one field at a time. */
const demoData = (): Record<string, any> => JSON.parse(demoText);
const open = (data: unknown) => parseBookFile(typeof data === 'string' ? data : JSON.stringify(data));
const over = (max: number): string => 'x'.repeat(max + 1);
let ids = 0;
const newId = (): string => `rec_${++ids}`;

// ---------------------------------------------------------------------------------------------------------------

describe('opening a Book file off the page thread', () => {
  /** Runs the worker's handler on the next turn, as a real worker would, with structured clones both ways. */
  class InProcessWorker implements BookWorkerLike {
    onmessage: ((e: MessageEvent<BookWorkerMessage>) => void) | null = null;
    onerror: ((e: ErrorEvent) => void) | null = null;
    terminated = false;
    postMessage(message: BookWorkerRequest): void {
      setTimeout(() => {
        void handleBookWorkerRequest(message, (m) => {
          if (!this.terminated) this.onmessage?.({ data: structuredClone(m) } as MessageEvent<BookWorkerMessage>);
        });
      }, 0);
    }
    terminate(): void {
      this.terminated = true;
    }
  }

  it('gives back the same Book as parseBookFile, reporting the reading and checking stages', async () => {
    const stages: string[] = [];
    const worker = new InProcessWorker();
    const r = await openBookFileInWorker(new Blob([demoText]), (s) => stages.push(s), () => worker);
    expect(r).toEqual(parseBookFile(demoText));
    expect(r.ok).toBe(true);
    expect(stages).toEqual(['reading', 'checking']);
    expect(worker.terminated).toBe(true);
  });

  it('sends the records of a large collection ahead in parts, and the Book it gives back is the file’s, record for record', async () => {
    const many: Book = { ...demo, quotes: Array.from({ length: 2 * RECORDS_PER_PART + 10 }, (_, i) => ({ ...demo.quotes[i % demo.quotes.length]!, id: `quote_many_${String(i).padStart(5, '0')}` })) };
    const text = serializeBook(many);
    const messages: BookWorkerMessage[] = [];
    await handleBookWorkerRequest({ type: 'open', file: new Blob([text]) }, (m) => messages.push(m));
    const parts = messages.filter((m) => m.type === 'records');
    expect(parts.map((m) => (m.type === 'records' ? [m.collection, m.records.length] : []))).toEqual([
      ['quotes', RECORDS_PER_PART],
      ['quotes', RECORDS_PER_PART],
      ['quotes', 10],
    ]);
    const last = messages.at(-1)!;
    expect(last.type === 'result' && last.parted).toEqual(['quotes']);
    const r = await openBookFileInWorker(new Blob([text]), undefined, () => new InProcessWorker());
    expect(r).toEqual(parseBookFile(text));
  });

  it('gives back the problems of a bad file, and refuses an oversized one by its size without reading it', async () => {
    const bad = demoData();
    bad.settings.labourRatePerHour = 1e308;
    const r = await openBookFileInWorker(new Blob([JSON.stringify(bad)]), undefined, () => new InProcessWorker());
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems[0]!.path).toBe('settings.labourRatePerHour');

    let read = false;
    const reading = <T>(x: T) => ((read = true), Promise.resolve(x));
    const huge = { size: MAX_BOOK_FILE_BYTES + 1, text: () => reading(''), arrayBuffer: () => reading(new ArrayBuffer(0)) } as unknown as Blob;
    const big = await readBookFileBlob(huge);
    expect(read).toBe(false);
    expect(big.ok).toBe(false);
    if (!big.ok) expect(big.problems[0]!.message).toMatch(/at most 256 MB/);
  });

  it('refuses a Windows-1252 Book in the command line’s words, naming the line, instead of replacing its letters', async () => {
    const book = emptyBook();
    book.settings.bookName = 'Régulateurs';
    book.settings.company = 'Société Quillmoor';
    const text = serializeBook(book);
    // Windows-1252 is Latin-1 for these letters: one byte each, which is not UTF-8.
    expect([...text].every((c) => c.charCodeAt(0) < 0x100)).toBe(true);
    const bytes = Uint8Array.from([...text].map((c) => c.charCodeAt(0)));
    const line = text.slice(0, text.indexOf('é')).split('\n').length;
    const message = `the file is not UTF-8 text (line ${line} is not), so it is not a Book file`;

    const stages: string[] = [];
    const r = await openBookFileInWorker(new Blob([bytes]), (s) => stages.push(s), () => new InProcessWorker());
    expect(r).toEqual({ ok: false, problems: [{ path: '', message }], total: 1 });
    expect(stages).toEqual(['reading', 'checking']);
    expect(await readBookFileBlob(new Blob([bytes]))).toEqual(r);
    // The command line reads the same bytes from disk through the same function, in the same words.
    const file = join(dir, 'cp1252.rungbook.json');
    writeFileSync(file, bytes);
    expect(await readBookFile(file)).toEqual(r);
    // The same Book in UTF-8, with a byte-order mark, opens.
    const utf8 = await readBookFileBlob(new Blob([new Uint8Array([0xef, 0xbb, 0xbf]), text]));
    expect(utf8.ok && utf8.book.settings.company).toBe('Société Quillmoor');
  });

  it('answers a request without a file with an error message, and the client rejects naming the reader', async () => {
    const messages: BookWorkerMessage[] = [];
    await handleBookWorkerRequest({ type: 'open', file: 'text' as unknown as Blob }, (m) => messages.push(m));
    expect(messages).toEqual([{ type: 'error', message: expect.stringMatching(/other than a file/) }]);
    await expect(
      openBookFileInWorker(new Blob(['{}']), undefined, () => {
        throw new Error('workers are not allowed');
      }),
    ).rejects.toThrow(/Book file reader could not start: workers are not allowed/);
  });

  it('writes a Book a slice at a time, yielding between slices, to exactly serializeBook’s text', async () => {
    const book: Book = structuredClone(demo);
    const q = book.quotes[0]!;
    for (let i = 0; i < 3000; i++) book.quotes.push({ ...q, id: `quote_many_${i}` });
    let pauses = 0;
    const pieces = await serializeBookSliced(book, {
      savedAt: '2025-01-01T00:00:00Z',
      sliceMs: 0,
      pause: () => ((pauses += 1), Promise.resolve()),
    });
    expect(pieces.join('')).toBe(serializeBook(book, { savedAt: '2025-01-01T00:00:00Z' }));
    expect(pauses).toBeGreaterThan(10);
  });

  it('refuses to offer a Book file larger than the reader accepts', () => {
    expect(bookFileWriteProblem(MAX_BOOK_FILE_BYTES)).toBeUndefined();
    expect(bookFileWriteProblem(MAX_BOOK_FILE_BYTES + 1)).toMatch(/at most 256 MB, so it could not be opened again\. Nothing was written\./);
  });
});

// ---------------------------------------------------------------------------------------------------------------

describe('price files beyond the reading limits', () => {
  const wide = (columns: number): string => {
    const header = ['MPN', 'Qty', 'Price', ...Array.from({ length: columns - 3 }, (_, i) => `${i + 1}+`)];
    const row = ['QT-R10K-06', '10', '0.05', ...Array.from({ length: columns - 3 }, () => '0.04')];
    return `${header.join(',')}\n${row.join(',')}\n`;
  };

  it('refuses a 10,000-column header quickly, naming the limit, where a 200-column one reads', async () => {
    const ok = await analyse(wide(PRICE_FILE_LIMITS.columns));
    expect(ok.readable).toBe(true);
    const started = performance.now();
    const a = await analyse(wide(10_000));
    const ms = performance.now() - started;
    expect(a.readable).toBe(false);
    expect(a.problems).toEqual([expect.objectContaining({ reason: 'the header row has 10,000 columns; a price file may have at most 200' })]);
    // The freeze this guards against took 18 s; a refusal reads the header and stops.
    expect(ms).toBeLessThan(5_000);
  });

  it('names a header line longer than a row may be, counting its columns', async () => {
    const names = Array.from({ length: 10_000 }, (_, i) => `column number ${i}`);
    const a = await analyse(`${names.join(',')}\nQT-R10K-06\n`);
    expect(a.problems[0]!.reason).toBe('line 1 has 10,000 columns; a price file may have at most 200');
  });

  it('refuses a header cell longer than a column header may be', async () => {
    const a = await analyse(`MPN,Qty,Price,${'Note '.repeat(60)}\nQT-R10K-06,10,0.05,x\n`);
    expect(a.problems[0]!.reason).toMatch(/^column 4 of the header row is 299 characters long; a column header may be at most 200$/);
  });

  it('names a row longer than a row may be as a problem of its line, and keeps its text out', async () => {
    const long = 'y'.repeat(PRICE_FILE_LIMITS.rowChars);
    const a = await analyse(`MPN,Description,Price\nQT-R10K-06,"${long}",0.05\nQT-C100N-50,short,0.10\n`);
    expect(a.problems).toEqual([expect.objectContaining({ row: 2, reason: expect.stringMatching(/at most 65,536$/) })]);
    expect(a.offers.map((o) => o.line)).toEqual([3]);
  });

  it('names an offer beyond the Book’s limits as a problem of its row (price, breaks)', async () => {
    const a = await analyse(`MPN,Qty,Price\nQT-R10K-06,10,170000000000000000000\n`);
    expect(a.problems[0]!.reason).toBe(`a unit price must be at most ${LIMITS.price.toLocaleString('en-GB')}, not 170000000000000000000`);
    const breaks = Array.from({ length: LIMITS.breaks + 1 }, (_, i) => `QT-R10K-06,${i + 1},0.05`);
    const b = await analyse(`MPN,Qty,Price\n${breaks.join('\n')}\n`);
    expect(b.problems.map((p) => p.reason)).toContain(`${LIMITS.breaks + 1} price breaks for one part; a quote may have at most ${LIMITS.breaks}`);
  });

  it('rungbook import refuses the 10,000-column file with the same message and leaves the Book file as it was', async () => {
    const book = emptyBook();
    book.suppliers.push({ id: 'sup_1', rev: 1, name: 'Wide Supply', currency: 'EUR', notes: '' });
    const bookFile = join(dir, 'wide.rungbook.json');
    const before = serializeBook(book, { savedAt: '2025-01-01T00:00:00Z' });
    writeFileSync(bookFile, before);
    const priceFile = join(dir, 'wide.csv');
    writeFileSync(priceFile, wide(10_000));
    const r = await runCli(['import', bookFile, priceFile, '--supplier', 'Wide Supply']);
    expect(r.code).not.toBe(0);
    expect(r.err + r.out).toContain('the header row has 10,000 columns; a price file may have at most 200');
    expect((await import('node:fs')).readFileSync(bookFile, 'utf8')).toBe(before);
  });
});

// ---------------------------------------------------------------------------------------------------------------

describe('every form refuses text beyond the Book’s limits: a message, and no record', () => {
  const book = demo;

  it('part: description, maker part number and notes', () => {
    const base = { ...partDraft(), mpn: 'QT-NEW-1', maker: 'Quenby', description: 'resistor', kind: 'resistor' };
    expect(validatePart(base, book, undefined, newId).ok).toBe(true);
    for (const [field, max] of [['description', LIMITS.description], ['mpn', LIMITS.name], ['notes', LIMITS.notes], ['package', LIMITS.name]] as const) {
      const r = validatePart({ ...base, [field]: over(max) }, book, undefined, newId);
      expect(r.ok, field).toBe(false);
      if (!r.ok) expect(r.problems[field]).toMatch(new RegExp(`at most ${max.toLocaleString('en-GB')} are allowed`));
    }
  });

  it('supplier: name and notes', () => {
    const base = { ...supplierDraft(book.settings), name: 'Long Notes Ltd' };
    expect(validateSupplier(base, book, undefined, newId).ok).toBe(true);
    for (const [field, max] of [['name', LIMITS.name], ['notes', LIMITS.notes]] as const) {
      const r = validateSupplier({ ...base, [field]: over(max) }, book, undefined, newId);
      expect(r.ok, field).toBe(false);
      if (!r.ok) expect(r.problems[field]).toMatch(/at most/);
    }
  });

  it('variant: name, notes and a text parameter', () => {
    const base = { ...variantDraft(book), code: 'LONG-1', name: 'Long one' };
    expect(validateVariant(base, book, undefined, newId).ok).toBe(true);
    for (const [field, max] of [['name', LIMITS.name], ['notes', LIMITS.notes]] as const) {
      const r = validateVariant({ ...base, [field]: over(max) }, book, undefined, newId);
      expect(r.ok, field).toBe(false);
      if (!r.ok) expect(r.problems[field]).toMatch(/at most/);
    }
    const r = validateVariant({ ...base, newParamName: 'finish', newParamValue: over(LIMITS.shortText) }, book, undefined, newId);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.newParamValue).toMatch(/at most 500/);
  });

  it('quote: supplier code and too many price breaks', () => {
    const part = book.parts[0]!;
    const supplier = book.suppliers[0]!;
    const base = { ...quoteDraft(undefined, '2025-01-01'), partId: part.id, supplierId: supplier.id, currency: supplier.currency, breaks: [{ qty: '1', price: '0.05' }] };
    expect(validateQuote(base, book, undefined, newId).ok).toBe(true);
    const code = validateQuote({ ...base, supplierCode: over(LIMITS.name) }, book, undefined, newId);
    expect(code.ok).toBe(false);
    if (!code.ok) expect(code.problems.supplierCode).toMatch(/at most 200 are allowed/);
    const many = validateQuote({ ...base, breaks: Array.from({ length: LIMITS.breaks + 1 }, (_, i) => ({ qty: String(i + 1), price: '0.05' })) }, book, undefined, newId);
    expect(many.ok).toBe(false);
    if (!many.ok) expect(many.problems.breaks).toBe(`At most ${LIMITS.breaks} price breaks`);
    const dear = validateQuote({ ...base, breaks: [{ qty: '1', price: '170000000000' }] }, book, undefined, newId);
    expect(dear.ok).toBe(false);
    if (!dear.ok) expect(dear.problems['break-price-0']).toMatch(/must be at most 10,000,000/);
  });

  it('check: title, note and unit', () => {
    const base = { ...checkDraft(), name: 'long_check', title: 'Long check', formula: '=1', kind: 'max' as const, limit: '=2' };
    expect(validateCheckDraft(base, book, undefined, newId).ok).toBe(true);
    for (const [field, max] of [['title', LIMITS.shortText], ['note', LIMITS.notes], ['unit', LIMITS.name], ['group', LIMITS.name]] as const) {
      const r = validateCheckDraft({ ...base, [field]: over(max) }, book, undefined, newId);
      expect(r.ok, field).toBe(false);
      if (!r.ok) expect(r.problems[field]).toMatch(/at most/);
    }
  });

  it('run: name and notes', () => {
    const base = { ...runDraft(), name: 'Spring', variantId: book.variants[0]!.id, quantity: '500', dateWanted: '2026-03-01' };
    expect(validateRun(base, book, undefined, newId).ok).toBe(true);
    for (const [field, max] of [['name', LIMITS.name], ['notes', LIMITS.notes]] as const) {
      const r = validateRun({ ...base, [field]: over(max) }, book, undefined, newId);
      expect(r.ok, field).toBe(false);
      if (!r.ok) expect(r.problems[field]).toMatch(new RegExp(`at most ${max.toLocaleString('en-GB')} are allowed`));
    }
  });

  it('notebook page: section text, heading and a typed cell', () => {
    const page: NotebookPage = { id: 'page_1', rev: 0, title: 'Notes', position: 1, sections: [{ heading: 'Calc', text: '', grid: [['', '']] }] };
    expect(notebookPageProblem(page)).toBeUndefined();
    const text = { ...page, sections: [{ ...page.sections[0]!, text: over(LIMITS.pageText) }] };
    expect(notebookPageProblem(text)).toBe('Section 1 text: is 100,001 characters long; at most 100,000 are allowed. Nothing was saved.');
    const heading = { ...page, sections: [{ ...page.sections[0]!, heading: over(LIMITS.shortText) }] };
    expect(notebookPageProblem(heading)).toMatch(/^Section 1 heading: .*at most 500 are allowed\. Nothing was saved\.$/);
    const cell = { ...page, sections: [{ ...page.sections[0]!, grid: [['', over(LIMITS.cell)]] }] };
    expect(notebookPageProblem(cell)).toMatch(/^Section 1, grid row 1: a cell may be at most 4000 characters long\. Nothing was saved\.$/);
    // The cell editor says so before the page is even built.
    expect(notebookCellProblem(page, 0, 0, 1, over(LIMITS.cell))).toMatch(/at most 4,000 characters/);
    expect(notebookCellProblem(page, 0, 0, 1, 'x'.repeat(LIMITS.cell))).toBeUndefined();
  });
});

// ---------------------------------------------------------------------------------------------------------------

describe('the Book file reader’s bounds', () => {
  it('refuses a labour rate of 1e308, naming settings.labourRatePerHour', () => {
    const d = demoData();
    d.settings.labourRatePerHour = 1e308;
    const r = open(d);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems).toEqual([{ path: 'settings.labourRatePerHour', message: 'must be at most 100,000, not 1e+308' }]);
  });

  it('refuses a garbage frozen snapshot, naming places inside runs[i].frozen.snapshot', () => {
    const d = demoData();
    expect(d.runs.length).toBeGreaterThan(0);
    d.runs[0].frozen = { at: '2025-01-01T00:00:00Z', snapshot: { format: 7, bom: 'lots', quotes: [1, 2], parts: null, settings: [] } };
    const r = open(d);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      for (const p of r.problems) expect(p.path).toMatch(/^runs\[0\]\.frozen\.snapshot\./);
      expect(r.problems.map((p) => p.path)).toEqual(expect.arrayContaining(['runs[0].frozen.snapshot.format', 'runs[0].frozen.snapshot.bom']));
    }
  });

  it('refuses a snapshot nested 100,000 deep with a place named, without crashing', () => {
    const deep = '{"a":'.repeat(100_000) + '1' + '}'.repeat(100_000);
    for (const [where, holder] of [
      ['runs[0].frozen.snapshot', (d: Record<string, any>) => (d.runs[0].frozen = { at: '2025-01-01T00:00:00Z', snapshot: '__DEEP__' })],
      ['runs[0].frozen.snapshot.bom', (d: Record<string, any>) => (d.runs[0].frozen = { at: '2025-01-01T00:00:00Z', snapshot: { format: 'rungbook-frozen-costing', version: 1, bom: '__DEEP__' } })],
      ['runs[0].frozen.snapshot.format', (d: Record<string, any>) => (d.runs[0].frozen = { at: '2025-01-01T00:00:00Z', snapshot: { format: '__DEEP__' } })],
    ] as const) {
      const d = demoData();
      holder(d);
      const text = JSON.stringify(d).replace('"__DEEP__"', deep);
      const r = parseBookFile(text);
      expect(r.ok, where).toBe(false);
      if (!r.ok) expect(r.problems.some((p) => p.path.startsWith(where)), where).toBe(true);
    }
  });

  it('refuses two checks of the same name, naming the second', () => {
    const d = demoData();
    const check: Check = { id: 'check_a', rev: 1, name: 'ripple_ok', title: 'Ripple', formula: '1', unit: '', rule: { kind: 'true' }, appliesWhen: '', note: '', builtIn: false, group: '' };
    d.checks = [check, { ...check, id: 'check_b' }];
    const r = open(d);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems).toEqual([{ path: 'checks[1].name', message: 'the check name "ripple_ok" is used twice (also at checks[0])' }]);
  });

  it('says the bound for a price of 1.7e308, not something misleading', () => {
    const d = demoData();
    d.quotes[0].breaks[0][1] = 1.7e308;
    const r = open(d);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems).toEqual([{ path: 'quotes[0].breaks[0].price', message: 'must be at most 10,000,000, not 1.7e+308' }]);
  });
});

// ---------------------------------------------------------------------------------------------------------------

describe('rungbook cost at the bounds the reader accepts', () => {
  /** The demo Book with every cost input at the largest value the schema accepts. */
  function extremeBook(): Book {
    const b: Book = structuredClone(demo);
    Object.assign(b.settings, {
      labourRatePerHour: 100_000,
      labourMinutesPerUnit: 10_000,
      labourMinutesPerPlacement: 1_000,
      testCostPerUnit: LIMITS.price,
      overheadPct: 10_000,
      marginPct: 99.9999,
    });
    for (const k of Object.keys(b.settings.rates)) if (k !== b.settings.baseCurrency) b.settings.rates[k] = LIMITS.rate;
    b.quotes = b.quotes.map((q): Quote => ({ ...q, breaks: [{ qty: 1, price: LIMITS.price }], moq: 1, pack: LIMITS.quantity }));
    for (const p of b.parts) p.placements = 10_000;
    return b;
  }

  it('the extreme Book is one the reader accepts', () => {
    expect(parseBookFile(serializeBook(extremeBook())).ok).toBe(true);
  });

  it('prints only finite figures for every variant, at the smallest and largest run, as table and JSON', async () => {
    const book = extremeBook();
    const file = join(dir, 'extreme.rungbook.json');
    writeFileSync(file, serializeBook(book));
    for (const v of book.variants.slice(0, 3)) {
      for (const run of ['1', String(LIMITS.runQuantity)]) {
        for (const format of [['--json'], []]) {
          const r = await runCli(['cost', file, '--variant', v.code, '--run', run, ...format]);
          expect(r.code, `${v.code} × ${run}`).toBe(0);
          expect(r.out).not.toMatch(/Infinity|NaN/);
          if (format.length) {
            const j = JSON.parse(r.out) as Record<string, unknown>;
            for (const k of ['material', 'labour', 'overhead', 'unitCost', 'price', 'runTotal']) expect(Number.isFinite(j[k]), k).toBe(true);
          }
        }
      }
    }
  });
});
