// The Book schema's own rules, through the file reader and the IndexedDB store: names every object has built in are
// refused as keys, records that refer to nothing or repeat a name are refused, numbers are bounded by what the trade
// can mean, and a stored Book that does not read as one is refused with its place named and its records kept.
import 'fake-indexeddb/auto';
import { IDBFactory } from 'fake-indexeddb';
import { wrap } from 'idb';
import { describe, expect, it } from 'vitest';
import { checkBook, LIMITS, RESERVED_NAMES } from '../../src/domain/schema.ts';
import { parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import { openBookStore } from '../../src/store/idb-store.ts';
import { idbVersionOf, SCHEMA_VERSION } from '../../src/store/schema.ts';
import { StoredBookInvalid } from '../../src/store/types.ts';
import { sampleBook } from '../fixtures/sample-book.ts';

function sampleJson(): any {
  return JSON.parse(serializeBook(sampleBook(), { savedAt: '2025-03-01T12:00:00.000Z' }));
}

function problemsOf(text: string): { path: string; message: string }[] {
  const r = parseBookFile(text);
  expect(r.ok, 'the file should be refused').toBe(false);
  return r.ok ? [] : r.problems;
}

describe('names every object has built in', () => {
  it('are refused as parameter, rating, rate and column names, __proto__ written as an own key included', () => {
    // JSON.parse makes "__proto__" an own key; a careless copy into {} would drop it silently.
    const text = serializeBook(sampleBook(), { savedAt: '2025-03-01T12:00:00.000Z' })
      .replace('"params":{', '"params":{"__proto__":1,"constructor":2,')
      .replace('"ratings":{', '"ratings":{"toString":0.1,')
      .replace('"rates":{', '"rates":{"hasOwnProperty":1,')
      .replace('"columns":{', '"columns":{"valueOf":"Each",');
    const problems = problemsOf(text);
    expect(problems).toContainEqual({ path: 'settings.rates.hasOwnProperty', message: '“hasOwnProperty” is a name every object has built in; choose another' });
    expect(problems).toContainEqual({ path: 'parts[0].ratings.toString', message: '“toString” is a name every object has built in; choose another' });
    expect(problems).toContainEqual({ path: 'suppliers[0].mapping.columns.valueOf', message: '“valueOf” is a name every object has built in; choose another' });
    expect(problems).toContainEqual({ path: 'variants[0].params.__proto__', message: '“__proto__” is a name every object has built in; choose another' });
    expect(problems).toContainEqual({ path: 'variants[0].params.constructor', message: '“constructor” is a name every object has built in; choose another' });
  });

  it('cover every name Object.prototype carries (ECMAScript: the properties of the Object prototype object)', () => {
    for (const name of Object.getOwnPropertyNames(Object.prototype)) expect(RESERVED_NAMES.has(name), name).toBe(true);
    expect(RESERVED_NAMES.has('steps')).toBe(false);
  });
});

describe('rules between records', () => {
  it('refuse a check name used twice and a pin to a supplier that is not in the Book', () => {
    const json = sampleJson();
    json.checks[1].name = json.checks[0].name;
    json.buildLines[0].pinnedSupplierId = 'sup_gone';
    expect(problemsOf(JSON.stringify(json))).toEqual([
      { path: 'buildLines[0].pinnedSupplierId', message: 'refers to supplier "sup_gone", which is not in the file' },
      { path: 'checks[1].name', message: 'the check name "bleed_time" is used twice (also at checks[0])' },
    ]);
  });

  it('keep a pinned supplier through a file round trip', () => {
    const r = parseBookFile(serializeBook(sampleBook()));
    expect(r.ok && r.book.buildLines[0]!.pinnedSupplierId).toBe('sup_a');
  });
});

describe('bounds', () => {
  it('refuse a labour rate of 1e308 and a price of 1.7e308 by naming the bound', () => {
    const json = sampleJson();
    json.settings.labourRatePerHour = 1e308;
    json.quotes[0].breaks[0][1] = 1.7e308;
    expect(problemsOf(JSON.stringify(json))).toEqual([
      { path: 'settings.labourRatePerHour', message: 'must be at most 100,000, not 1e+308' },
      { path: 'quotes[0].breaks[0].price', message: `must be at most ${LIMITS.price.toLocaleString('en-GB')}, not 1.7e+308` },
    ]);
  });

  it('refuse a text longer than its field allows, naming its length', () => {
    const json = sampleJson();
    json.parts[0].description = 'x'.repeat(LIMITS.description + 1);
    expect(problemsOf(JSON.stringify(json))).toEqual([
      { path: 'parts[0].description', message: `is ${(LIMITS.description + 1).toLocaleString('en-GB')} characters long; at most ${LIMITS.description.toLocaleString('en-GB')} are allowed` },
    ]);
  });

  it('refuse a frozen costing that is not one, and one nested deep, naming the place', () => {
    const json = sampleJson();
    json.runs[0].frozen.snapshot = { lines: [{ id: 'line_1', total: 1.5 }] };
    const garbage = problemsOf(JSON.stringify(json));
    expect(garbage).toContainEqual({ path: 'runs[0].frozen.snapshot.format', message: 'is missing' });
    expect(garbage).toContainEqual({ path: 'runs[0].frozen.snapshot.bom', message: 'is missing' });
    // Written as text: the nesting is too deep for JSON.stringify itself.
    json.runs[0].frozen.snapshot = 'DEEP';
    const deep = '{"bom":'.repeat(100_000) + '1' + '}'.repeat(100_000);
    const problems = problemsOf(JSON.stringify(json).replace('"DEEP"', deep));
    expect(problems[0]!.path.startsWith('runs[0].frozen.snapshot')).toBe(true);
  });
});

describe('what comes out of storage', () => {
  it('is checked like a file: a damaged record is refused with its place, and the stored records are kept for repair', async () => {
    const factory = new IDBFactory();
    const store = await openBookStore('rungbook-damaged', { factory });
    await store.replaceAll(sampleBook());
    store.close();
    // Damage one part as another program (or an older build) might have written it.
    const db = (await wrap(factory.open('rungbook-damaged', idbVersionOf(SCHEMA_VERSION))))!;
    const part = await db.get('parts', 'part_r47k');
    await db.put('parts', { ...part, ratings: { p_max: 'a lot' } });
    db.close();
    const again = await openBookStore('rungbook-damaged', { factory });
    const failure = await again.load().then(
      () => undefined,
      (e: unknown) => e,
    );
    again.close();
    expect(failure).toBeInstanceOf(StoredBookInvalid);
    const invalid = failure as StoredBookInvalid;
    expect(invalid.problems).toEqual([{ path: 'parts[0].ratings.p_max', message: 'must be a finite number, not text' }]);
    expect(invalid.message).toMatch(/parts\[0\]\.ratings\.p_max: must be a finite number, not text/);
    expect((invalid.stored as { parts: { ratings: unknown }[] }).parts[0]!.ratings).toEqual({ p_max: 'a lot' });
  });

  it('accepts the Book the store itself wrote', async () => {
    const store = await openBookStore('rungbook-whole', { factory: new IDBFactory() });
    const written = await store.replaceAll(sampleBook());
    const book = await store.load();
    store.close();
    expect(checkBook(book).ok).toBe(true);
    // replaceAll gives back the Book exactly as a load reads it, so the app need not read it back
    expect(written).toStrictEqual(book);
  });
});
