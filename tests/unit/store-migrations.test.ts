// Schema migrations: the runner's ordering rules, the upgrade of the prototype database (schema 0, built with raw
// IndexedDB), and that the next schema is one added step that keeps every record.
import 'fake-indexeddb/auto';
import { IDBFactory } from 'fake-indexeddb';
import { describe, expect, it } from 'vitest';
import { defaultSettings, mpnKey } from '../../src/domain/book.ts';
import type { Settings } from '../../src/domain/book.ts';
import { openBookStore } from '../../src/store/idb-store.ts';
import { MIGRATIONS, migrationProblems, stepsToRun } from '../../src/store/migrations.ts';
import type { Migration } from '../../src/store/migrations.ts';
import { idbVersionOf, SCHEMA_VERSION, schemaVersionOf } from '../../src/store/schema.ts';
import { buildPrototypeDb } from '../fixtures/store-v0-prototype.ts';
import { sampleBook } from '../fixtures/sample-book.ts';

const step = (version: number, up: Migration['up'] = async () => {}): Migration => ({ version, title: `step ${version}`, up });
function planningDefaults(): Partial<Settings> {
  const { orderPrefix, nextOrderNumber, kittingDays, safetyDays, horizonDays, stockValuation } = defaultSettings();
  return { orderPrefix, nextOrderNumber, kittingDays, safetyDays, horizonDays, stockValuation };
}
/** The newest released schema, and the version a next step would produce. */
const LAST = MIGRATIONS.length;
const NEXT = LAST + 1;

function rawOpen(factory: IDBFactory, name: string): Promise<IDBDatabase> {
  return new Promise((resolve, reject) => {
    const r = factory.open(name);
    r.onsuccess = () => resolve(r.result);
    r.onerror = () => reject(r.error);
  });
}
function rawGet<T>(req: IDBRequest<T>): Promise<T> {
  return new Promise((resolve, reject) => {
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => reject(req.error);
  });
}

describe('migration ordering rules', () => {
  it('accepts the released steps', () => {
    expect(migrationProblems(MIGRATIONS)).toEqual([]);
  });
  it('requires the first step to be version 1', () => {
    expect(migrationProblems([step(2)])).toEqual(['migrations must start at version 1, but the first step is version 2']);
    expect(migrationProblems([step(0), step(1)])[0]).toBe('migrations must start at version 1, but the first step is version 0');
  });
  it('requires each step to rise by one', () => {
    expect(migrationProblems([step(1), step(3)])).toEqual([
      'migration step 2 has version 3; each step must be one above the step before (2)',
    ]);
    expect(migrationProblems([step(1), step(2), step(2)])).toHaveLength(1);
  });
  it('requires at least one step', () => {
    expect(migrationProblems([])).toEqual(['there are no migration steps; the first must be version 1']);
  });
  it('runs every step for a new database and only the later ones for an older one', () => {
    const steps = [step(1), step(2), step(3)];
    expect(stepsToRun(steps, undefined).map((s) => s.version)).toEqual([1, 2, 3]);
    expect(stepsToRun(steps, 0).map((s) => s.version)).toEqual([1, 2, 3]);
    expect(stepsToRun(steps, 2).map((s) => s.version)).toEqual([3]);
    expect(stepsToRun(steps, 3)).toEqual([]);
  });
  it('maps schema versions to IndexedDB versions one above (version 1 was the prototype)', () => {
    expect(idbVersionOf(1)).toBe(2);
    expect(schemaVersionOf(0)).toBeUndefined();
    expect(schemaVersionOf(1)).toBe(0);
    expect(schemaVersionOf(2)).toBe(1);
  });
  it('refuses to open with a broken list of steps, saying why', async () => {
    await expect(openBookStore('rungbook-broken', { factory: new IDBFactory(), migrations: [step(1), step(3)] })).rejects.toThrow(
      /migrations are broken: migration step 2 has version 3/,
    );
  });
});

describe('upgrade from the prototype database (schema 0)', () => {
  it('converts every prototype record and replaces its stores', async () => {
    const factory = new IDBFactory();
    await buildPrototypeDb(factory, 'rungbook-proto');
    const store = await openBookStore('rungbook-proto', { factory });
    const book = await store.load();
    expect(await store.schemaVersion()).toBe(LAST);
    store.close();

    expect(book.settings).toMatchObject({ rev: 1, bookName: 'Prototype book', company: 'Kestrel Test Works', baseCurrency: 'EUR' });
    expect(book.settings.rates).toEqual({ EUR: 1, USD: 0.9 });
    expect(book.parts).toEqual([
      {
        id: 'p1', rev: 1, mpn: 'kt-r 0603/473', maker: 'Kestrel Passives', description: 'Resistor 47k', kind: 'resistor',
        value: 47000, unit: 'Ω', ratings: { p_max: 0.1 }, package: '',
      },
      // an unknown prototype kind becomes 'other'; missing ratings become none
      { id: 'p2', rev: 1, mpn: 'KT-Q600', maker: 'Kestrel Semis', description: 'MOSFET 600 V', kind: 'other', ratings: {}, package: '' },
    ]);
    expect(book.suppliers).toEqual([{ id: 's1', rev: 1, name: 'Harbour Components', currency: 'EUR', notes: '' }]);
    expect(book.quotes).toEqual([
      {
        id: 'q1', rev: 1, partId: 'p1', supplierId: 's1', supplierCode: '', currency: 'EUR',
        breaks: [
          { qty: 1, price: 0.05 },
          { qty: 100, price: 0.012 },
        ],
        moq: 10, pack: 10, leadDays: 0, date: '2024-11-02', source: 'manual',
      },
    ]);
    // the prototype allowed a repeated code; schema 1 has a unique index, so the second one is made distinct
    expect(book.variants.map((v) => v.code)).toEqual(['KT3', 'KT3-v2']);
    expect(book.variants.every((v) => v.rev === 1)).toBe(true);

    const db = await rawOpen(factory, 'rungbook-proto');
    expect(db.version).toBe(idbVersionOf(LAST));
    expect(Array.from(db.objectStoreNames)).not.toContain('kv');
    // Step 1 stored each part with its normalised maker part number (for an index step 4 dropped); reading leaves it out.
    const p1 = await rawGet(db.transaction('parts').objectStore('parts').get('p1'));
    expect(p1).toMatchObject({ id: 'p1', mpnKey: mpnKey('KT-R0603-473') });
    db.close();
  });
});

describe('step 2: stores for orders and stock movements', () => {
  it('adds the two stores to a schema-1 database, keeps every record, and then holds orders and movements', async () => {
    const factory = new IDBFactory();
    (await openBookStore('rungbook-step2', { factory, migrations: MIGRATIONS.slice(0, 1) })).close();
    // Records as schema 1 kept them, written straight into its stores.
    const sample = sampleBook();
    const run = { id: 'run_9', rev: 1, name: 'Autumn', variantId: 'var_3', quantity: 200, dateWanted: '2025-09-01', notes: '' };
    const raw1 = await rawOpen(factory, 'rungbook-step2');
    expect(Array.from(raw1.objectStoreNames)).not.toContain('orders');
    const tx = raw1.transaction(['parts', 'suppliers', 'variants', 'runs', 'settings'], 'readwrite');
    const { orderPrefix: _a, nextOrderNumber: _b, kittingDays: _c, safetyDays: _d, horizonDays: _e, stockValuation: _f, ...settings } = sample.settings;
    tx.objectStore('settings').put(settings);
    for (const p of sample.parts) tx.objectStore('parts').put({ ...p, mpnKey: mpnKey(p.mpn) });
    for (const x of sample.suppliers) tx.objectStore('suppliers').put(x);
    for (const x of sample.variants) tx.objectStore('variants').put(x);
    tx.objectStore('runs').put(run);
    await new Promise((resolve) => (tx.oncomplete = resolve));
    raw1.close();

    // Step 2 and any later ones run.
    const v2 = await openBookStore('rungbook-step2', { factory });
    expect(await v2.schemaVersion()).toBe(LAST);
    const book = await v2.load();
    expect([book.parts, book.suppliers, book.variants, book.runs]).toEqual([sample.parts, sample.suppliers, sample.variants, [run]]);
    expect([book.orders, book.stockMoves]).toEqual([[], []]);
    // The planning settings a schema-1 Book never had come in at their defaults.
    expect(book.settings).toEqual({ ...sample.settings, ...planningDefaults() });
    await v2.replaceAll(sample);
    expect(await v2.load()).toEqual(sample);
    v2.close();
    const db = await rawOpen(factory, 'rungbook-step2');
    expect(Array.from(db.objectStoreNames)).toEqual(expect.arrayContaining(['orders', 'stockMoves']));
    db.close();
  });
});

describe('step 3: a store for customer price lists', () => {
  it('adds the store to a schema-2 database, keeps every record, and then holds price lists', async () => {
    const factory = new IDBFactory();
    const sample = sampleBook();
    (await openBookStore('rungbook-step3', { factory, migrations: MIGRATIONS.slice(0, 2) })).close();
    // Records as schema 2 kept them, written straight into its stores.
    const raw2 = await rawOpen(factory, 'rungbook-step3');
    expect(Array.from(raw2.objectStoreNames)).not.toContain('priceLists');
    const tx = raw2.transaction(['parts', 'suppliers', 'variants', 'settings'], 'readwrite');
    tx.objectStore('settings').put(sample.settings);
    for (const p of sample.parts) tx.objectStore('parts').put({ ...p, mpnKey: mpnKey(p.mpn) });
    for (const x of sample.suppliers) tx.objectStore('suppliers').put(x);
    for (const x of sample.variants) tx.objectStore('variants').put(x);
    await new Promise((resolve) => (tx.oncomplete = resolve));
    raw2.close();

    const v3 = await openBookStore('rungbook-step3', { factory });
    expect(await v3.schemaVersion()).toBe(LAST);
    const book = await v3.load();
    expect([book.parts, book.suppliers, book.variants, book.settings]).toEqual([sample.parts, sample.suppliers, sample.variants, sample.settings]);
    expect(book.priceLists).toEqual([]);
    // New records (revision 0) are stored at revision 1.
    await v3.apply({ put: { priceLists: sample.priceLists.map((l) => ({ ...l, rev: 0 })) } });
    expect((await v3.load()).priceLists).toEqual(sample.priceLists.map((l) => ({ ...l, rev: 1 })));
    v3.close();
    const db = await rawOpen(factory, 'rungbook-step3');
    expect(Array.from(db.objectStoreNames)).toContain('priceLists');
    db.close();
  });
});

describe('step 4: the indexes nothing reads are dropped', () => {
  it('keeps every record of a schema-3 database, keeps the unique variant code and writes parts as the Book holds them', async () => {
    const factory = new IDBFactory();
    const sample = sampleBook();
    (await openBookStore('rungbook-step4', { factory, migrations: MIGRATIONS.slice(0, 3) })).close();
    const raw3 = await rawOpen(factory, 'rungbook-step4');
    const indexes = (db: IDBDatabase): Record<string, string[]> => {
      const names = Array.from(db.objectStoreNames);
      const tx = db.transaction(names);
      return Object.fromEntries(names.map((n) => [n, Array.from(tx.objectStore(n).indexNames)]));
    };
    expect(indexes(raw3)['parts']).toEqual(['byKind', 'byMpnKey']);
    // Records as schema 3 kept them, written straight into its stores: parts with their normalised maker part number.
    const tx = raw3.transaction(['parts', 'suppliers', 'variants', 'buildLines', 'runs', 'settings'], 'readwrite');
    tx.objectStore('settings').put(sample.settings);
    for (const p of sample.parts) tx.objectStore('parts').put({ ...p, mpnKey: mpnKey(p.mpn) });
    for (const x of sample.suppliers) tx.objectStore('suppliers').put(x);
    for (const x of sample.variants) tx.objectStore('variants').put(x);
    for (const x of sample.buildLines) tx.objectStore('buildLines').put(x);
    for (const x of sample.runs) tx.objectStore('runs').put(x);
    await new Promise((resolve) => (tx.oncomplete = resolve));
    raw3.close();

    const v4 = await openBookStore('rungbook-step4', { factory });
    expect(await v4.schemaVersion()).toBe(4);
    const book = await v4.load();
    expect([book.parts, book.suppliers, book.variants, book.buildLines, book.runs, book.settings]).toEqual([
      sample.parts, sample.suppliers, sample.variants, sample.buildLines, sample.runs, sample.settings,
    ]);
    // Two variants with one code are still refused: the index is a rule of the Book, not a look-up.
    const taken = { ...sample.variants[1]!, id: 'var_other', rev: 0, code: sample.variants[0]!.code };
    await expect(v4.apply({ put: { variants: [taken] } })).rejects.toThrow(/uniqueness rule/);
    await v4.replaceAll(sample);
    expect(await v4.load()).toEqual(sample);
    v4.close();

    const db = await rawOpen(factory, 'rungbook-step4');
    const left = indexes(db);
    expect(Object.entries(left).filter(([, names]) => names.length > 0)).toEqual([['variants', ['byCode']]]);
    // A part written now is stored as the Book holds it.
    expect(await rawGet(db.transaction('parts').objectStore('parts').get(sample.parts[0]!.id))).toEqual(sample.parts[0]);
    db.close();
  });

  it('is the schema the store names as its newest', () => {
    expect(SCHEMA_VERSION).toBe(MIGRATIONS.length);
  });
});

describe('the next schema is one added step', () => {
  it('runs only the new step on a database at the last schema and keeps every record', async () => {
    const factory = new IDBFactory();
    const v1 = await openBookStore('rungbook-next', { factory });
    await v1.replaceAll(sampleBook());
    v1.close();

    const ran: string[] = [];
    const next = step(NEXT, async (db, tx, from) => {
      ran.push(`${NEXT} from ${from}`);
      // a plausible future change: find runs by the date wanted
      tx.objectStore('runs').createIndex('byDateWanted', 'dateWanted');
      expect(db.objectStoreNames.contains('runs')).toBe(true);
    });
    const v2 = await openBookStore('rungbook-next', { factory, migrations: [...MIGRATIONS, next] });
    expect(ran).toEqual([`${NEXT} from ${LAST}`]);
    expect(await v2.schemaVersion()).toBe(NEXT);
    expect(await v2.load()).toEqual(sampleBook());
    v2.close();

    const db = await rawOpen(factory, 'rungbook-next');
    expect(db.version).toBe(idbVersionOf(NEXT));
    expect(Array.from(db.transaction('runs').objectStore('runs').indexNames)).toContain('byDateWanted');
    db.close();
  });

  it('runs new steps in order on a new database', async () => {
    const ran: number[] = [];
    const store = await openBookStore('rungbook-order', {
      factory: new IDBFactory(),
      migrations: [...MIGRATIONS, step(NEXT, async () => void ran.push(NEXT)), step(NEXT + 1, async () => void ran.push(NEXT + 1))],
    });
    expect(ran).toEqual([NEXT, NEXT + 1]);
    expect(await store.schemaVersion()).toBe(NEXT + 1);
    store.close();
  });

  it('leaves the database as it was when a step fails', async () => {
    const factory = new IDBFactory();
    const v1 = await openBookStore('rungbook-failstep', { factory });
    await v1.replaceAll(sampleBook());
    v1.close();
    const bad = step(NEXT, async () => {
      throw new Error('the step could not convert a record');
    });
    await expect(openBookStore('rungbook-failstep', { factory, migrations: [...MIGRATIONS, bad] })).rejects.toThrow(
      /could not be opened: the step could not convert a record/,
    );
    const again = await openBookStore('rungbook-failstep', { factory });
    expect(await again.schemaVersion()).toBe(LAST);
    expect(await again.load()).toEqual(sampleBook());
    again.close();
  });

  it('refuses a database written by a newer schema with a reload message', async () => {
    const factory = new IDBFactory();
    const newer = await openBookStore('rungbook-newer', { factory, migrations: [...MIGRATIONS, step(NEXT)] });
    newer.close();
    await expect(openBookStore('rungbook-newer', { factory })).rejects.toThrow(/saved by a newer Rungbook/);
  });
});
