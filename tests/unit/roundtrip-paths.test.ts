// Nothing is lost on any round trip: the sample Book, which sets every optional field of every record, comes back
// strictly equal (a missing field and an undefined one count as different) through the Book file, the command line
// (import with --out and in place, demo, info), the IndexedDB store (whole-Book replace and record edits), after
// freezing and unfreezing a run, and from a version-1 file through the migration steps.
import 'fake-indexeddb/auto';
import { IDBFactory } from 'fake-indexeddb';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { demoBookWithChecks } from '../../src/cli/commands/demo.ts';
import { COLLECTIONS, defaultSettings } from '../../src/domain/book.ts';
import type { Book, CollectionName, Run } from '../../src/domain/book.ts';
import { freezeRun, unfreezeRun } from '../../src/domain/freeze.ts';
import { BOOK_VERSION, BookSchema, checkBook } from '../../src/domain/schema.ts';
import { parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import { FILE_MIGRATIONS, fileMigrationProblems, migrateFile } from '../../src/io/book-file-migrations.ts';
import type { FileMigration } from '../../src/io/book-file-migrations.ts';
import { openBookStore } from '../../src/store/idb-store.ts';
import type { IdbBookStore } from '../../src/store/idb-store.ts';
import { sampleBook } from '../fixtures/sample-book.ts';
import { runCli, writeBook } from './cli-helpers.ts';
import { optionalFieldsSet } from './schema-arbitrary.ts';
import type { Node } from './schema-arbitrary.ts';

const SAVED_AT = '2025-03-02T09:30:00.000Z';
const V1_FILE = resolve(__dirname, '../fixtures/book-files/v1.rungbook.json');

/** The Book a Book file holds, or the test fails with the file's problems. */
function read(text: string): { book: Book; savedAt?: string } {
  const r = parseBookFile(text);
  if (!r.ok) throw new Error(`the file does not read: ${JSON.stringify(r.problems)}`);
  return r;
}

function fileRoundTrip(book: Book): Book {
  return read(serializeBook(book, { savedAt: SAVED_AT })).book;
}

const open: IdbBookStore[] = [];
let dbCount = 0;
async function store(): Promise<IdbBookStore> {
  const s = await openBookStore(`rungbook-roundtrip-${++dbCount}`, { factory: new IDBFactory() });
  open.push(s);
  return s;
}
afterEach(() => {
  for (const s of open.splice(0)) s.close();
});

describe('the sample Book', () => {
  it('sets every optional field the Book schema declares, somewhere in the Book', () => {
    const fields = optionalFieldsSet(BookSchema as unknown as Node, sampleBook());
    expect(fields.size).toBeGreaterThan(100);
    expect([...fields].filter(([, set]) => !set).map(([path]) => path)).toEqual([]);
  });

  it('is a Book the schema accepts unchanged', () => {
    const checked = checkBook(sampleBook());
    expect(checked.ok && checked.value).toStrictEqual(sampleBook());
  });

  it('is compared strictly: an explicitly undefined field is not the same as a missing one', () => {
    const book = sampleBook();
    const withUndefined = structuredClone(book);
    withUndefined.parts[1] = { ...withUndefined.parts[1]!, notes: undefined };
    expect('notes' in book.parts[1]!).toBe(false);
    expect(withUndefined).toEqual(book);
    expect(withUndefined).not.toStrictEqual(book);
    // The file has no undefined: such a field is left out, so the Book reads back without it.
    expect('notes' in fileRoundTrip(withUndefined).parts[1]!).toBe(false);
  });
});

describe('Book file', () => {
  it('serializeBook → parseBookFile gives the very Book back, with its save time', () => {
    const text = serializeBook(sampleBook(), { savedAt: SAVED_AT });
    const back = read(text);
    expect(back.book).toStrictEqual(sampleBook());
    expect(back.savedAt).toBe(SAVED_AT);
    expect(back.book.buildLines[0]!.pinnedSupplierId).toBe('sup_a');
    // Writing what was read gives the same bytes: the file is stable.
    expect(serializeBook(back.book, { savedAt: SAVED_AT })).toBe(text);
  });
});

describe('command line', () => {
  let dir: string;
  let bookPath: string;
  let pricesPath: string;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'rungbook-roundtrip-'));
    bookPath = writeBook(dir, 'sample.rungbook.json', sampleBook());
    pricesPath = join(dir, 'lantern-2025-03.csv');
    // One new quote for a part the supplier did not quote yet, one that supersedes the supplier's quote_2.
    writeFileSync(pricesPath, 'MPN,Order code,Qty,Price\nKT-R0603-473,LP-R473,100,0.011\nKT-X2-474/275,LP-X474,250,0.19\n');
  });

  /** Every record the import did not change comes back strictly equal; the ones it did change only as it should. */
  function expectImported(after: Book): void {
    const before = sampleBook();
    expect(after.settings).toStrictEqual(before.settings);
    for (const c of COLLECTIONS) {
      const byId = new Map((after[c] as { id: string }[]).map((r) => [r.id, r]));
      for (const r of before[c] as { id: string; rev: number }[]) {
        const now = byId.get(r.id);
        if (c === 'suppliers' && r.id === 'sup_b') {
          // The import remembers the column mapping it used for the supplier.
          expect(now).toStrictEqual({ ...r, rev: r.rev + 1, mapping: { columns: { mpn: 'MPN', supplierCode: 'Order code', qty: 'Qty', price: 'Price' }, layout: 'long', decimal: '.' } });
        } else if (c === 'quotes' && r.id === 'quote_2') {
          const newer = after.quotes.find((q) => q.partId === 'part_xcap' && q.source === 'lantern-2025-03.csv');
          expect(now).toStrictEqual({ ...r, rev: r.rev + 1, supersededBy: newer!.id });
        } else {
          expect(now, `${c} ${r.id}`).toStrictEqual(r);
        }
      }
      const added = (after[c] as { id: string }[]).filter((r) => !(before[c] as { id: string }[]).some((b) => b.id === r.id));
      expect(added.length, `new ${c}`).toBe(c === 'quotes' ? 2 : c === 'importBatches' ? 1 : 0);
    }
    expect(after.buildLines.find((l) => l.id === 'line_1')!.pinnedSupplierId).toBe('sup_a');
  }

  it('rungbook import --out writes the Book with every untouched record as it was, and leaves the source alone', async () => {
    const source = readFileSync(bookPath);
    const out = join(dir, 'imported.rungbook.json');
    const r = await runCli(['import', bookPath, pricesPath, '--supplier', 'Lantern Parts Co', '--out', out]);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expectImported(read(readFileSync(out, 'utf8')).book);
    expect(readFileSync(bookPath).equals(source)).toBe(true);
  });

  it('rungbook import in place rewrites the Book with every untouched record as it was', async () => {
    const r = await runCli(['import', bookPath, pricesPath, '--supplier', 'Lantern Parts Co']);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expectImported(read(readFileSync(bookPath, 'utf8')).book);
  });

  it('rungbook info reads the whole Book and changes nothing in the file', async () => {
    const source = readFileSync(bookPath);
    const r = await runCli(['info', bookPath, '--json']);
    expect(r.code).toBe(0);
    const book = sampleBook();
    const summary = JSON.parse(r.out) as { counts: Record<CollectionName, number>; bookName: string; rates: Record<string, number> };
    expect(summary.counts).toStrictEqual(Object.fromEntries(COLLECTIONS.map((c) => [c, book[c].length])));
    expect(summary.bookName).toBe(book.settings.bookName);
    expect(summary.rates).toStrictEqual(book.settings.rates);
    expect(readFileSync(bookPath).equals(source)).toBe(true);
  });

  it('rungbook demo writes the demo Book so that it reads back strictly equal, and stable byte for byte', async () => {
    const out = join(dir, 'demo.rungbook.json');
    const r = await runCli(['demo', '--out', out]);
    expect(r.code).toBe(0);
    const text = readFileSync(out, 'utf8');
    const back = read(text);
    expect(back.book).toStrictEqual(demoBookWithChecks());
    expect(serializeBook(back.book, { savedAt: back.savedAt! })).toBe(text);
  });

  it('rungbook info reads a version-1 Book file', async () => {
    const r = await runCli(['info', V1_FILE, '--json']);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out)).toMatchObject({ bookName: 'Sample regulators', savedAt: SAVED_AT });
  });
});

describe('IndexedDB store', () => {
  it('replaceAll → load gives the very Book back, also after closing and reopening', async () => {
    const factory = new IDBFactory();
    const s = await openBookStore('rungbook-roundtrip-reopen', { factory });
    open.push(s);
    await s.replaceAll(sampleBook());
    expect(await s.load()).toStrictEqual(sampleBook());
    s.close();
    const again = await openBookStore('rungbook-roundtrip-reopen', { factory });
    open.push(again);
    expect(await again.load()).toStrictEqual(sampleBook());
  });

  it('apply of every record as new (rev 0) stores each whole at revision 1, and the settings as an edit', async () => {
    const s = await store();
    const book = sampleBook();
    const asNew = <T extends { rev: number }>(list: readonly T[]): T[] => list.map((r) => ({ ...r, rev: 0 }));
    await s.apply({
      put: Object.fromEntries(COLLECTIONS.map((c) => [c, asNew(book[c] as { rev: number }[])])),
      // A new database holds the default settings at revision 1, so the settings are an edit of those.
      settings: { ...book.settings, rev: 1 },
    });
    const expected = structuredClone(book);
    for (const c of COLLECTIONS) for (const r of expected[c] as { rev: number }[]) r.rev = 1;
    expected.settings.rev = 2;
    expect(await s.load()).toStrictEqual(expected);
  });

  it('apply of every record as an edit keeps each whole, one revision up', async () => {
    const s = await store();
    await s.replaceAll(sampleBook());
    const loaded = await s.load();
    await s.apply({ put: Object.fromEntries(COLLECTIONS.map((c) => [c, loaded[c]])), settings: loaded.settings });
    const expected = sampleBook();
    for (const c of COLLECTIONS) for (const r of expected[c] as { rev: number }[]) r.rev += 1;
    expected.settings.rev += 1;
    expect(await s.load()).toStrictEqual(expected);
  });
});

describe('freezing and unfreezing a run', () => {
  function withRun(book: Book, run: Run): Book {
    return { ...book, runs: book.runs.map((r) => (r.id === run.id ? run : r)) };
  }

  it('a run frozen again and then unfrozen round-trips through the file and the store, the frozen field gone for good', async () => {
    const sample = sampleBook();
    const bom = sample.runs[0]!.frozen!.snapshot.bom;
    const thawed = unfreezeRun(sample.runs[0]!);
    expect('frozen' in thawed).toBe(false);
    const unfrozen = withRun(sample, thawed);
    const refrozen = freezeRun(thawed, bom, unfrozen, new Date('2025-03-05T12:00:00Z'));
    expect(refrozen.ok).toBe(true);
    if (!refrozen.ok) return;
    const frozen = withRun(sample, refrozen.value);
    expect(frozen.runs[0]!.frozen!.at).toBe('2025-03-05T12:00:00.000Z');

    for (const book of [frozen, unfrozen]) {
      expect(fileRoundTrip(book)).toStrictEqual(book);
      const s = await store();
      await s.replaceAll(book);
      expect(await s.load()).toStrictEqual(book);
    }
    expect('frozen' in fileRoundTrip(unfrozen).runs[0]!).toBe(false);

    // As the app saves it: the run edited frozen, then unfrozen, in one stored Book.
    const s = await store();
    await s.replaceAll(unfrozen);
    await s.apply({ put: { runs: [refrozen.value] } });
    const afterFreeze = await s.load();
    expect(afterFreeze.runs[0]).toStrictEqual({ ...refrozen.value, rev: 2 });
    await s.apply({ put: { runs: [unfreezeRun(afterFreeze.runs[0]!)] } });
    const afterThaw = await s.load();
    expect(afterThaw.runs[0]).toStrictEqual({ ...thawed, rev: 3 });
    expect(fileRoundTrip(afterThaw)).toStrictEqual(afterThaw);
  });
});

/**
 * The sample Book as the version-1 file holds it, written before stock and orders: no orders, no stock movements,
 * no built run, and the planning settings at their defaults.
 */
function sampleBookBeforeStock(): Book {
  const book = sampleBook();
  const d = defaultSettings();
  const runs = book.runs.filter((r) => r.status !== 'built').map(({ status: _s, builtDate: _b, ...r }) => r);
  const { orderPrefix, nextOrderNumber, kittingDays, safetyDays, horizonDays, stockValuation } = d;
  const settings = { ...book.settings, orderPrefix, nextOrderNumber, kittingDays, safetyDays, horizonDays, stockValuation };
  return { ...book, settings, runs, orders: [], stockMoves: [], importBatches: book.importBatches.filter((b) => b.kind !== 'stock count') };
}

/** The sample Book as a file written before landed cost and price lists: no landed terms, no price lists. */
function beforeLanded(book: Book): Book {
  const suppliers = book.suppliers.map(({ freightPerOrder: _a, freightPct: _b, dutyPct: _c, chargesPerOrder: _d, chargesPct: _e, ...s }) => s);
  const quote = ({ incoterm: _t, ...q }: Book['quotes'][number]): Book['quotes'][number] => q;
  const runs = book.runs.map((r) => {
    if (!r.frozen) return r;
    const { landedRun: _l, ...bom } = r.frozen.snapshot.bom;
    const lines = bom.lines.map(({ incoterm: _t, freight: _f, duty: _d, charges: _c, ...l }) => l);
    const snapshot = { ...r.frozen.snapshot, bom: { ...bom, lines }, quotes: r.frozen.snapshot.quotes.map(quote) };
    return { ...r, frozen: { ...r.frozen, snapshot } };
  });
  return { ...book, suppliers, quotes: book.quotes.map(quote), runs, priceLists: [] };
}

/** The sample Book as a file written before approved alternates and supplier orders: no such fields. */
function beforeAlternates(book: Book): Book {
  const { shipTo: _s, ...settings } = book.settings;
  const suppliers = book.suppliers.map(({ address: _a, paymentTerms: _p, ...s }) => s);
  const buildLines = book.buildLines.map(({ alternates: _a, pinnedPartId: _p, ...l }) => l);
  const runs = book.runs.map((r) => {
    if (!r.frozen) return r;
    const lines = r.frozen.snapshot.bom.lines.map(({ partChoice: _c, ...l }) => l);
    return { ...r, frozen: { ...r.frozen, snapshot: { ...r.frozen.snapshot, bom: { ...r.frozen.snapshot.bom, lines } } } };
  });
  return { ...book, settings, suppliers, buildLines, runs, parts: book.parts.filter((p) => p.id !== 'part_zr47k') };
}

describe('version-1 Book file', () => {
  const v1 = readFileSync(V1_FILE, 'utf8');

  it('is written in the version-1 layout: pretty JSON, price breaks as objects', () => {
    const raw = JSON.parse(v1) as { version: number; quotes: { breaks: unknown[] }[] };
    expect(raw.version).toBe(1);
    expect(raw.quotes[0]!.breaks[0]).toStrictEqual({ price: 0.05, qty: 1 });
    expect(v1).toContain('\n  "settings": {\n');
  });

  it('opens and migrates to the very Book the version-2 file holds', () => {
    const back = read(v1);
    expect(back.savedAt).toBe(SAVED_AT);
    expect(back.book).toStrictEqual(beforeAlternates(beforeLanded(sampleBookBeforeStock())));
    expect(back.book).toStrictEqual(read(serializeBook(beforeAlternates(beforeLanded(sampleBookBeforeStock())), { savedAt: SAVED_AT })).book);
    // Saved again, it is a version-2 file that reads back the same.
    const v2 = serializeBook(back.book, { savedAt: SAVED_AT });
    expect(JSON.parse(v2)).toMatchObject({ version: BOOK_VERSION });
    expect(read(v2).book).toStrictEqual(back.book);
  });

  it('is refused when it claims a version newer than this Rungbook reads, or no whole version', () => {
    const raw = JSON.parse(v1) as Record<string, unknown>;
    for (const version of [BOOK_VERSION + 1, 99]) {
      const r = parseBookFile(JSON.stringify({ ...raw, version }));
      expect(r.ok).toBe(false);
      expect(!r.ok && r.problems).toStrictEqual([
        { path: 'version', message: `this Book file was written by a newer Rungbook (version ${version}); this one reads up to ${BOOK_VERSION}` },
      ]);
    }
    for (const version of [0, 1.5, '1', null]) {
      const r = parseBookFile(JSON.stringify({ ...raw, version }));
      expect(!r.ok && r.problems[0]!.path).toBe('version');
    }
  });
});

describe('file migration steps', () => {
  const step = (version: number, tag = String(version)): FileMigration => ({
    version,
    title: `step ${tag}`,
    up: (raw) => ({ ...raw, version, steps: [...((raw.steps as string[] | undefined) ?? []), tag] }),
  });

  it('the released steps start at 2 and rise by one, ending at the current file version', () => {
    expect(fileMigrationProblems(FILE_MIGRATIONS)).toEqual([]);
    expect(FILE_MIGRATIONS.at(-1)!.version).toBe(BOOK_VERSION);
  });

  it('a list that does not start at 2 or skips or repeats a version is named, step by step', () => {
    expect(fileMigrationProblems([step(3)])).toEqual(['file migration step 1 has version 3; it must be 2 (each step one above the last)']);
    expect(fileMigrationProblems([step(2), step(2)])).toEqual(['file migration step 2 has version 2; it must be 3 (each step one above the last)']);
    expect(fileMigrationProblems([step(2), step(4), step(4)])).toEqual(['file migration step 2 has version 4; it must be 3 (each step one above the last)']);
    expect(fileMigrationProblems([step(3), step(2)])).toHaveLength(2);
  });

  it('migrateFile runs only the steps above the file version, in order', () => {
    const steps = [step(2), step(3), step(4)];
    expect(fileMigrationProblems(steps)).toEqual([]);
    expect(migrateFile({ version: 1 }, 1, steps)).toStrictEqual({ version: 4, steps: ['2', '3', '4'] });
    expect(migrateFile({ version: 3 }, 3, steps)).toStrictEqual({ version: 4, steps: ['4'] });
    expect(migrateFile({ version: 4 }, 4, steps)).toStrictEqual({ version: 4 });
  });

  it('the step to version 2 turns price-break objects into pairs and leaves anything else for the schema to name', () => {
    const up = FILE_MIGRATIONS[0]!.up;
    expect(up({ version: 1, quotes: [{ breaks: [{ qty: 1, price: 2 }, 'odd', [3, 4]] }, 'not a quote'] })).toStrictEqual({
      version: 2,
      quotes: [{ breaks: [[1, 2], 'odd', [3, 4]] }, 'not a quote'],
    });
    expect(up({ version: 1 })).toStrictEqual({ version: 2 });
  });
});
