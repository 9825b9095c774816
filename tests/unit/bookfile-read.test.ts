// The `.rungbook.json` Book file: a written Book reads back equal, and malformed files are refused with messages
// that name the place and the reason.
import { describe, expect, it } from 'vitest';
import { BOOK_VERSION, COLLECTIONS } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { bookFileName, bookFileSizeProblem, MAX_BOOK_FILE_BYTES, MAX_REPORTED_PROBLEMS, parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import type { BookFileProblem, BookFileResult } from '../../src/io/book-file.ts';
import { sampleBook } from '../fixtures/sample-book.ts';

const SAVED = '2025-03-01T12:00:00.000Z';

/** The sample Book as a plain JSON object, to break one thing at a time. */
function sampleJson(): Record<string, any> {
  return JSON.parse(serializeBook(sampleBook(), { savedAt: SAVED }));
}

function problemsOf(result: BookFileResult): BookFileProblem[] {
  expect(result.ok, 'the file should be refused').toBe(false);
  return result.ok ? [] : result.problems;
}

function refused(text: string): BookFileProblem[] {
  return problemsOf(parseBookFile(text));
}

function refusedJson(json: unknown): BookFileProblem[] {
  return refused(JSON.stringify(json, null, 2));
}

describe('writing and reading back', () => {
  it('gives an equal Book for every record kind', () => {
    const book = sampleBook();
    for (const c of COLLECTIONS) expect(book[c].length, c).toBeGreaterThan(0);
    const result = parseBookFile(serializeBook(book, { savedAt: SAVED }));
    expect(result).toEqual({ ok: true, book, savedAt: SAVED });
  });

  it('gives an equal demo Book', () => {
    const book = demoBook();
    const result = parseBookFile(serializeBook(book));
    expect(result.ok && result.book).toEqual(book);
  });

  it('writes the marker, version and time first, keys in a stable order, with two-space indent', () => {
    const text = serializeBook(sampleBook(), { savedAt: SAVED });
    expect(text.startsWith(`{\n  "format": "rungbook-book",\n  "version": ${BOOK_VERSION},\n  "savedAt": "${SAVED}",\n  "settings": {"id":"settings","rev":3,`)).toBe(true);
    // one record per line, price breaks as [quantity, price] pairs
    expect(text).toContain('\n  "parts": [\n    {"id":"part_r47k","rev":2,');
    expect(text).toContain('"breaks":[[1,0.05],[100,0.012],[5000,0.004]]');
    // the same Book with its object keys inserted in another order writes the same text
    const shuffled = sampleBook();
    shuffled.parts = shuffled.parts.map((p) => Object.fromEntries(Object.entries(p).reverse()) as typeof p);
    expect(serializeBook(shuffled, { savedAt: SAVED })).toBe(text);
    expect(Object.keys(JSON.parse(text).parts[0]).slice(0, 4)).toEqual(['id', 'rev', 'description', 'kind']);
  });

  it('accepts a byte order mark and fills defaults for optional fields', () => {
    const json = sampleJson();
    delete json.suppliers[1].notes;
    delete json.parts[1].ratings;
    delete json.pages;
    delete json.quotes[0].moq;
    const result = parseBookFile('\uFEFF' + JSON.stringify(json));
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expect(result.book.suppliers[1]!.notes).toBe('');
    expect(result.book.parts[1]!.ratings).toEqual({});
    expect(result.book.pages).toEqual([]);
    expect(result.book.quotes[0]!.moq).toBe(1);
  });

  it('adds the base currency at rate 1 when the rates leave it out', () => {
    const json = sampleJson();
    delete json.settings.rates.EUR;
    const result = parseBookFile(JSON.stringify(json));
    expect(result.ok && result.book.settings.rates).toEqual({ EUR: 1, USD: 0.92 });
  });

  it('suggests a file name from the Book name', () => {
    expect(bookFileName(sampleBook())).toBe('sample-regulators.rungbook.json');
  });
});

describe('malformed files are refused with the expected message', () => {
  it('an empty file', () => {
    expect(refused('')).toEqual([{ path: '', message: 'the file is empty' }]);
    expect(refused(' \n\t ')).toEqual([{ path: '', message: 'the file is empty' }]);
  });

  it('a file that is not a JSON object', () => {
    expect(refused('[1, 2, 3]')[0]!.message).toBe('this is not a Rungbook Book file: a Book file is a JSON object, starting with "{"');
    expect(refused('PK\u0003\u0004 binary')[0]!.message).toMatch(/not a Rungbook Book file/);
  });

  it('a JSON object without the Book marker', () => {
    expect(refusedJson({ hello: 'world' })).toEqual([
      { path: 'format', message: 'this is not a Rungbook Book file: it has no "format" marker, expected "rungbook-book"' },
    ]);
    expect(refusedJson({ format: 'other-book', version: 1 })[0]!.message).toBe(
      'this is not a Rungbook Book file: it has "format": "other-book", expected "rungbook-book"',
    );
  });

  it('truncated JSON, naming where it stops', () => {
    const text = serializeBook(sampleBook(), { savedAt: SAVED });
    const cut = text.slice(0, 300);
    const lines = cut.split('\n');
    const [p] = refused(cut);
    expect(p!.message).toBe(
      `the file ends too early at line ${lines.length}, column ${lines[lines.length - 1]!.length + 1} (character 301): the JSON is cut off (truncated file?)`,
    );
  });

  it('broken JSON in the middle, naming line and column', () => {
    const [p] = refused('{\n  "format": "rungbook-book",\n  "version": 1,,\n}');
    expect(p).toEqual({
      path: '',
      message: 'the file is not valid JSON at line 3, column 16 (character 47): expected a property name in double quotes, found ","',
    });
  });

  it('a file from a newer Rungbook', () => {
    const json = sampleJson();
    json.version = BOOK_VERSION + 1;
    expect(refusedJson(json)).toEqual([
      {
        path: 'version',
        message: `this Book file was written by a newer Rungbook (version ${BOOK_VERSION + 1}); this one reads up to ${BOOK_VERSION}`,
      },
    ]);
  });

  it('a version that is not a whole number', () => {
    const json = sampleJson();
    json.version = '1';
    expect(refusedJson(json)[0]).toEqual({ path: 'version', message: 'the Book file version must be a whole number from 1, not "1"' });
  });

  it('fields of the wrong type, each with its path', () => {
    const json = sampleJson();
    json.parts[0].mpn = 4700;
    json.quotes[1].moq = '250';
    json.variants[0].params.steps = [3];
    json.checks[0].builtIn = 'yes';
    json.settings.labourRatePerHour = null;
    expect(refusedJson(json)).toEqual([
      { path: 'settings.labourRatePerHour', message: 'must be a finite number, not null' },
      { path: 'parts[0].mpn', message: 'must be text, not a number' },
      { path: 'quotes[1].moq', message: 'must be a finite number, not text' },
      { path: 'variants[0].params.steps', message: 'must be a finite number or text, not a list' },
      { path: 'checks[0].builtIn', message: 'must be true or false, not text' },
    ]);
  });

  it('a missing required field and an unknown part kind', () => {
    const json = sampleJson();
    delete json.quotes[0].date;
    json.parts[1].kind = 'valve';
    const problems = refusedJson(json);
    expect(problems).toContainEqual({ path: 'quotes[0].date', message: 'is missing' });
    expect(problems).toContainEqual({ path: 'parts[1].kind', message: expect.stringMatching(/^must be one of resistor, capacitor, .*; "valve" is not known$/) });
  });

  it('references to records that are not in the file', () => {
    const json = sampleJson();
    json.quotes[0].partId = 'part_gone';
    json.quotes[1].supplierId = 'sup_gone';
    json.buildLines[0].partId = 'part_gone';
    delete json.buildLines[0].pinnedPartId;
    json.runs[0].variantId = 'var_gone';
    json.importBatches[0].supplierId = 'sup_gone';
    expect(refusedJson(json)).toEqual([
      { path: 'quotes[0].partId', message: 'refers to part "part_gone", which is not in the file' },
      { path: 'quotes[1].supplierId', message: 'refers to supplier "sup_gone", which is not in the file' },
      { path: 'buildLines[0].partId', message: 'refers to part "part_gone", which is not in the file' },
      { path: 'runs[0].variantId', message: 'refers to variant "var_gone", which is not in the file' },
      { path: 'importBatches[0].supplierId', message: 'refers to supplier "sup_gone", which is not in the file' },
    ]);
  });

  it('ids used twice and variant codes used twice', () => {
    // The second part takes the first one's id, and everything that named the second part follows it, so the only
    // problems are the two duplicates.
    const json = JSON.parse(JSON.stringify(sampleJson()).replaceAll(`"${sampleJson().parts[1].id}"`, '"part_r47k"'));
    json.variants[1].code = 'KT3-60-CD';
    expect(refusedJson(json)).toEqual([
      { path: 'parts[1].id', message: 'the id "part_r47k" is used twice (also at parts[0])' },
      { path: 'variants[1].code', message: 'the variant code "KT3-60-CD" is used twice (also at variants[0])' },
    ]);
  });

  it('price breaks that do not rise, a zero quantity and a negative price', () => {
    const json = sampleJson();
    json.quotes[0].breaks = [
      { qty: 1, price: 0.05 },
      { qty: 100, price: 0.012 },
      { qty: 100, price: 0.01 },
      { qty: 0, price: 0.01 },
    ];
    json.quotes[1].breaks = [{ qty: 250, price: -0.21 }];
    expect(refusedJson(json)).toEqual([
      { path: 'quotes[0].breaks[2].qty', message: 'price breaks must rise in quantity: 100 comes after 100' },
      { path: 'quotes[0].breaks[3].qty', message: 'must be more than 0, not 0' },
      { path: 'quotes[1].breaks[0].price', message: 'must be 0 or more, not -0.21' },
    ]);
  });

  it('a quote with no price breaks', () => {
    const json = sampleJson();
    json.quotes[1].breaks = [];
    expect(refusedJson(json)).toEqual([{ path: 'quotes[1].breaks', message: 'must hold at least one price break' }]);
  });

  it('an unknown currency and a malformed currency code', () => {
    const json = sampleJson();
    json.quotes[1].currency = 'GBP';
    json.suppliers[0].currency = 'eur';
    expect(refusedJson(json)).toEqual([
      { path: 'suppliers[0].currency', message: 'must be a currency code of three capital letters (ISO 4217), not "eur"' },
      { path: 'quotes[1].currency', message: 'currency GBP has no exchange rate in settings.rates' },
    ]);
  });

  it('dates that do not exist and times that are not ISO', () => {
    const json = sampleJson();
    json.quotes[0].date = '2025-02-30';
    json.runs[0].dateWanted = '30/04/2025';
    json.importBatches[0].at = 'yesterday';
    json.savedAt = '2025-13-01T00:00:00Z';
    expect(refusedJson(json)).toEqual([
      { path: 'savedAt', message: 'must be an ISO date and time (YYYY-MM-DDTHH:MM:SSZ), not "2025-13-01T00:00:00Z"' },
      { path: 'quotes[0].date', message: 'must be a date written YYYY-MM-DD, not "2025-02-30"' },
      { path: 'runs[0].dateWanted', message: 'must be a date written YYYY-MM-DD, not "30/04/2025"' },
      { path: 'importBatches[0].at', message: 'must be an ISO date and time (YYYY-MM-DDTHH:MM:SSZ), not "yesterday"' },
    ]);
  });

  it('a number too large to hold', () => {
    const text = serializeBook(sampleBook(), { savedAt: SAVED }).replace('"quantity":500', '"quantity":1e400');
    expect(refused(text)).toEqual([{ path: 'runs[0].quantity', message: 'must be a finite number, not a number' }]);
  });

  it('a record that is not an object and a collection that is not a list', () => {
    const json = sampleJson();
    json.parts[1] = 'KT-X2-474/275';
    json.checks = { bleed: 1 };
    const problems = refusedJson(json);
    expect(problems).toContainEqual({ path: 'parts[1]', message: 'must be an object, not text' });
    expect(problems).toContainEqual({ path: 'checks', message: 'must be a list, not an object' });
  });

  it('300 MB of junk, by its size before any parsing', () => {
    const junk = 'x'.repeat(300 * 1024 * 1024);
    expect(refused(junk)).toEqual([
      { path: '', message: 'the file is 300.0 MB (314,572,800 bytes); a Book file may be at most 256 MB, so this is not a Book file' },
    ]);
    expect(bookFileSizeProblem(MAX_BOOK_FILE_BYTES + 1)?.message).toMatch(/at most 256 MB/);
    expect(bookFileSizeProblem(MAX_BOOK_FILE_BYTES)).toBeUndefined();
  });

  it('lists the first problems and counts the rest', () => {
    const json = sampleJson();
    // Every record that names a part (frozen costings keep their own copy of each line and are not checked).
    const naming = (JSON.stringify({ ...json, runs: [] }).match(/"partId":|"alternates":/g) ?? []).length;
    expect(naming).toBeGreaterThan(3);
    json.parts = Array.from({ length: 30 }, (_, i) => ({ id: `p${i}`, mpn: i }));
    const result = parseBookFile(JSON.stringify(json));
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.problems).toHaveLength(MAX_REPORTED_PROBLEMS);
    // 30 bad part numbers, and each record that referred to a part the file no longer holds
    expect(result.total).toBe(30 + naming);
    expect(result.problems[0]).toEqual({ path: 'parts[0].mpn', message: 'must be text, not a number' });
  });
});
