// Customer price lists: margin against markup, conversion to the list's currency, the rounding rule, the form's
// messages and the Book's rules between lists, and `rungbook prices` giving the app workbook's figures.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Papa from 'papaparse';
import { demoBook } from '../../src/domain/demo-book.ts';
import type { Book, PriceList } from '../../src/domain/book.ts';
import { listPrice, priceListDraft, priceTable, pricedAt, roundPrice, validatePriceList } from '../../src/domain/price-lists.ts';
import { checkBook } from '../../src/domain/schema.ts';
import { sortVariants } from '../../src/domain/variant-order.ts';
import { familyUnitCosts, priceListCsv, priceListHeader, priceTables } from '../../src/io/price-list-export.ts';
import { captureIo, writeBook } from './cli-helpers.ts';
import { main } from '../../src/cli/main.ts';
import { value } from './costing-fixtures.ts';

const list = (extra: Partial<PriceList>): PriceList => ({ id: 'pl', rev: 1, name: 'Wholesale', currency: 'EUR', basis: 'margin', pct: 20, notes: '', ...extra });

describe('the price on a list', () => {
  it('prices a margin on the price and a markup on the cost (common practice: a 25 % markup is a 20 % margin)', () => {
    // Cost 8.00: 20 % margin → 8.00 / 0.80 = 10.00; 25 % markup → 8.00 × 1.25 = 10.00; 20 % markup → 9.60.
    expect(pricedAt(8, 'margin', 20)).toBeCloseTo(10, 12);
    expect(pricedAt(8, 'markup', 25)).toBeCloseTo(10, 12);
    expect(value(listPrice(8, list({ basis: 'markup', pct: 20 }), 1))).toBe(9.6);
    expect(value(listPrice(8, list({ basis: 'margin', pct: 20 }), 1))).toBe(10);
    // 40 % margin on 6.2417 → 10.402833… → 10.40 (to the cent, half away from zero).
    expect(value(listPrice(6.2417, list({ pct: 40 }), 1))).toBe(10.4);
  });

  it("converts to the list's currency at the Book's rate, then rounds once", () => {
    // 10.00 EUR at 0.92 EUR per USD = 10.869565… USD → 10.87 to the cent; to 0.05 nearest 10.85, up 10.90; to 1 up 11.
    const usd = list({ currency: 'USD' });
    expect(value(listPrice(8, usd, 0.92))).toBe(10.87);
    expect(value(listPrice(8, { ...usd, rounding: { step: 0.05, mode: 'nearest' } }, 0.92))).toBe(10.85);
    expect(value(listPrice(8, { ...usd, rounding: { step: 0.05, mode: 'up' } }, 0.92))).toBe(10.9);
    expect(value(listPrice(8, { ...usd, rounding: { step: 1, mode: 'up' } }, 0.92))).toBe(11);
  });

  it('rounds to steps without float noise: a price already on a step stays, halves go away from zero', () => {
    expect(roundPrice(1.1, { step: 0.05, mode: 'up' })).toBe(1.1);
    expect(roundPrice(1.125, { step: 0.05, mode: 'nearest' })).toBe(1.15);
    expect(roundPrice(1.15, { step: 0.05, mode: 'nearest' })).toBe(1.15);
    expect(roundPrice(2.5, { step: 1, mode: 'nearest' })).toBe(3);
    expect(roundPrice(1.005, undefined)).toBe(1.01);
  });

  it('refuses what cannot be priced with a reason', () => {
    expect(listPrice(NaN, list({}), 1)).toEqual({ ok: false, error: expect.stringMatching(/cannot be computed/) });
    expect(listPrice(8, list({ currency: 'CHF' }), undefined)).toEqual({ ok: false, error: expect.stringMatching(/CHF has no exchange rate/) });
    expect(listPrice(8, list({ pct: 100 }), 1)).toEqual({ ok: false, error: expect.stringMatching(/below 100/) });
  });

  it('tables every variant at every run size, leaving a price out where the cost is missing', () => {
    const book = demoBook();
    const t = priceTable(list({ currency: 'USD' }), book, [
      { variantId: book.variants[0]!.id, variant: book.variants[0]!.code, run: 500, unitCost: 8 },
      { variantId: book.variants[0]!.id, variant: book.variants[0]!.code, run: 2000, unitCost: NaN, error: 'R1: no usable quote' },
    ]);
    expect(t.runs).toEqual([500, 2000]);
    expect(t.rows).toHaveLength(book.variants.length);
    const usdRate = book.settings.rates['USD']!;
    expect(t.rows[0]!.cells[0]!.price).toBe(Math.round((10 / usdRate) * 100) / 100);
    expect(t.rows[0]!.cells[1]).toMatchObject({ price: undefined, error: 'R1: no usable quote' });
  });

  it('lists the variants in the one order of every page, whatever order the Book keeps them in', () => {
    const book = demoBook();
    const order = sortVariants(book.variants).map((v) => v.code);
    expect(book.variants.map((v) => v.code)).not.toEqual(order);
    for (const variants of [book.variants, [...book.variants].reverse()]) {
      expect(priceTable(list({}), { ...book, variants }, []).rows.map((r) => r.variant)).toEqual(order);
    }
  });
});

describe('price list records', () => {
  it('are kept with unique names and rated currencies, margins below 100 % (checkBook)', () => {
    const book = demoBook();
    book.priceLists = [list({}), list({ id: 'pl2', name: ' wholesale ' }), list({ id: 'pl3', name: 'Swiss', currency: 'CHF' }), list({ id: 'pl4', name: 'Odd', pct: 120 })];
    const r = checkBook(book);
    expect(r.ok).toBe(false);
    const problems = r.ok ? [] : r.problems.filter((p) => p.path.startsWith('priceLists'));
    expect(problems).toEqual([
      { path: 'priceLists[1].name', message: expect.stringMatching(/price list name "wholesale" is used twice/) },
      { path: 'priceLists[2].currency', message: 'currency CHF has no exchange rate in settings.rates' },
      { path: 'priceLists[3].pct', message: expect.stringMatching(/margin must be below 100 %/) },
    ]);
  });

  it("checks the form's draft field by field and gives a record only when all is well", () => {
    const book: Book = demoBook();
    const rec = { id: 'pl_new', rev: 0 };
    const draft = { ...priceListDraft(), name: 'Export', currency: 'usd', basis: 'markup', pct: '60', roundingStep: '0,05', roundingMode: 'up' };
    const good = validatePriceList(draft, book, rec);
    expect(good).toEqual({ ok: true, record: { ...rec, name: 'Export', currency: 'USD', basis: 'markup', pct: 60, rounding: { step: 0.05, mode: 'up' }, notes: '' } });
    const bad = validatePriceList({ ...draft, name: 'Wholesale', currency: 'CHF', basis: 'margin', pct: '100', roundingStep: '0' }, book, rec);
    expect(bad.ok).toBe(false);
    if (!bad.ok) {
      expect(bad.problems.name).toMatch(/already called Wholesale/);
      expect(bad.problems.currency).toMatch(/CHF has no exchange rate/);
      expect(bad.problems.pct).toMatch(/below 100/);
      expect(bad.problems.roundingStep).toMatch(/above 0/);
    }
    const empty = validatePriceList(priceListDraft(), book, rec);
    expect(empty.ok).toBe(false);
    if (!empty.ok) {
      expect(empty.problems.name).toMatch(/must not be empty/);
      expect(empty.problems.pct).toMatch(/give the margin/);
    }
    // The draft of a saved list reads back as the same list.
    const saved = book.priceLists[1]!;
    expect(validatePriceList(priceListDraft(saved), book, saved)).toEqual({ ok: true, record: saved });
  });
});

describe('price list export and `rungbook prices`', () => {
  let dir = '';
  let file = '';
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'rungbook-prices-'));
    file = writeBook(dir, 'demo.rungbook.json', demoBook());
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('writes one row per list and variant, prices only, as the domain prices them (RFC 4180)', () => {
    const book = demoBook();
    const costs = value(familyUnitCosts(book));
    const tables = priceTables(book, costs);
    const text = value(priceListCsv(tables));
    expect(text.endsWith('\r\n')).toBe(true);
    const rows = Papa.parse<string[]>(text.trimEnd(), { newline: '\r\n' }).data;
    expect(rows[0]).toEqual(priceListHeader(book.settings.runSizes));
    expect(rows[0]!.some((h) => /cost/i.test(h))).toBe(false);
    expect(rows).toHaveLength(1 + book.priceLists.length * book.variants.length);
    for (const t of tables) {
      for (const r of t.rows) {
        const row = rows.find((x) => x[0] === t.list.name && x[2] === r.variant)!;
        expect(row[1]).toBe(t.list.currency);
        r.cells.forEach((c, k) => expect(Number(row[4 + k]), `${t.list.name} ${r.variant} ${c.run}`).toBe(c.price));
      }
    }
  });

  it('prints the same prices as CSV through main(), and each list as a table', async () => {
    const book = demoBook();
    const tables = priceTables(book, value(familyUnitCosts(book)));
    const io = captureIo();
    expect(await main(['prices', file, '--csv', '--delimiter', 'semicolon'], io), io.stderr).toBe(0);
    expect(io.stdout).toBe(value(priceListCsv(tables, { delimiter: 'semicolon', decimal: 'point', bom: false })));
    const one = captureIo();
    expect(await main(['prices', file, '--list', 'export (usd)'], one), one.stderr).toBe(0);
    expect(one.stdout).toMatch(/^Export \(USD\): 60 % markup on the unit cost in EUR, in USD, rounded up 0.05/);
    expect(one.stdout).not.toMatch(/Wholesale/);
  });

  it('refuses an unknown list, a bad date and CSV choices without --csv, with a message', async () => {
    const io = captureIo();
    expect(await main(['prices', file, '--list', 'Retail'], io)).toBe(2);
    expect(io.stderr).toMatch(/no price list called Retail; the Book has Wholesale, Export \(USD\)/);
    const d = captureIo();
    expect(await main(['prices', file, '--date', '2027-13-01'], d)).toBe(2);
    expect(d.stderr).toMatch(/--date must be YYYY-MM-DD/);
    const c = captureIo();
    expect(await main(['prices', file, '--delimiter', 'tab'], c)).toBe(2);
    expect(c.stderr).toMatch(/give them with --csv/);
  });
});
