// Customer price lists and landed cost in real Chromium: a price list added through the form prices every variant as
// domain/price-lists.ts does in Node from the same Book, bad entries are refused beside their fields with nothing
// saved, the CSV for customers is the export module's very bytes; a supplier's landed terms and a quote's delivery
// term are saved through their forms, and the run's costed BOM then shows the landed cost the costing works out.
import { afterEach, describe, expect, inject, it } from 'vitest';
import { readFileSync } from 'node:fs';
import Papa from 'papaparse';
import type { Page } from 'playwright-core';
import type { Book, PriceList } from '../../src/domain/book.ts';
import { toCents } from '../../src/domain/costing.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { priceTable } from '../../src/domain/price-lists.ts';
import type { PriceTable } from '../../src/domain/price-lists.ts';
import { money } from '../../src/domain/format.ts';
import { exportBytes } from '../../src/io/csv-write.ts';
import { familyUnitCosts, priceListCsv, priceListFileName, priceListHeader } from '../../src/io/price-list-export.ts';
import { costedTotalLabels, runCosting } from '../../src/io/run-export.ts';
import { AppUnderTest, WIDE_VIEWPORT, pageLoaded, readerText, saved, text } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

function value<T>(r: { ok: true; value: T } | { ok: false; error: string }): T {
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

// The demo Book fixes its costing date, so Node and the browser cost every variant from the same quotes.
const costs = value(familyUnitCosts(demo));

/** The list the form adds: a markup on cost in pounds, rounded up to half a pound. */
const trade: PriceList = { id: 'pl_trade', rev: 1, name: 'Trade (GBP)', currency: 'GBP', basis: 'markup', pct: 45, rounding: { step: 0.5, mode: 'up' }, notes: 'Installers’ trade counter.' };

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

async function openPrices(): Promise<Awaited<ReturnType<AppUnderTest['open']>>> {
  const session = await app.open('#/prices');
  await pageLoaded(session.page, 'Price lists');
  await session.page.locator('[data-testid="price-table"]').first().waitFor({ timeout: 60_000 });
  return session;
}

/** A list's table as shown: the run size of each price column, and per variant code the prices as numbers. */
async function shownTable(page: Page, name: string): Promise<{ runs: number[]; prices: Map<string, number[]> }> {
  const section = page.locator('rb-price-lists-page section', { has: page.locator('h2', { hasText: name }) });
  const table = section.locator('[data-testid="price-table"]');
  const heads = (await table.locator('thead th').allTextContents()).map(readerText);
  const runs = heads.slice(2).map((h) => Number(/^at ([\d,]+)/.exec(h)![1]!.replace(/,/g, '')));
  const rows = await table.locator('tbody tr').evaluateAll((trs) => trs.map((tr) => [...tr.querySelectorAll('td')].map((td) => td.textContent ?? '')));
  return { runs, prices: new Map(rows.map((r) => [readerText(r[0]!), r.slice(2).map((c) => Number(readerText(c)))])) };
}

/** The domain's table for `list` in the shape shownTable reads, in the run order the page shows. */
function expectedTable(list: PriceList, book: Book, runs: number[]): Map<string, number[]> {
  const t = priceTable(list, book, costs);
  return new Map(t.rows.map((r) => [r.variant, runs.map((run) => r.cells.find((c) => c.run === run)!.price ?? NaN)]));
}

async function fillTradeList(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Add a price list' }).click();
  await page.locator('#f-name').fill(trade.name);
  await page.locator('#f-currency').fill('gbp');
  await page.locator('#f-basis').selectOption(trade.basis);
  await page.locator('#f-pct').fill(String(trade.pct));
  await page.locator('#f-roundingStep').fill('0,5');
  await page.locator('#f-roundingMode').selectOption(trade.rounding!.mode);
  await page.locator('#f-notes').fill(trade.notes);
}

describe('customer price lists', () => {
  it('prices every variant on the demo lists and on a list added through the form as the domain does, also after a reload', async () => {
    const { page, errors } = await openPrices();
    for (const list of demo.priceLists) {
      const shown = await shownTable(page, list.name);
      expect(shown.runs).toEqual(demo.settings.runSizes);
      expect(shown.prices).toEqual(expectedTable(list, demo, shown.runs));
    }

    await fillTradeList(page);
    await page.getByRole('button', { name: 'Add the price list' }).click();
    await saved(page);
    const book: Book = { ...demo, priceLists: [...demo.priceLists, trade] };
    const want = expectedTable(trade, book, demo.settings.runSizes);
    expect(want.size).toBe(demo.variants.length);
    // The figures worker may still be loading its engine (costs kept or shipped were shown meanwhile).
    await expect.poll(async () => (await shownTable(page, trade.name)).prices, { timeout: 60_000 }).toEqual(want);

    // A markup is a share of the cost: price = cost × (1 + markup), here converted at the Book's rate (EUR per GBP)
    // and rounded up to whole half pounds (common practice). Each price is a whole number of steps at or above the
    // unconverted figure, less than one step above it.
    const rate = demo.settings.rates.GBP!;
    for (const c of costs.filter((x) => Number.isFinite(x.unitCost))) {
      const exact = (c.unitCost * 1.45) / rate;
      const price = want.get(c.variant)![demo.settings.runSizes.indexOf(c.run)]!;
      expect(Number.isInteger(price / 0.5)).toBe(true);
      expect(price).toBeGreaterThanOrEqual(exact - 1e-9);
      expect(price).toBeLessThan(exact + 0.5);
    }

    await page.reload();
    await page.locator('[data-testid="price-table"]').first().waitFor({ timeout: 60_000 });
    // The figures worker may still be loading its engine (costs kept or shipped were shown meanwhile).
    await expect.poll(async () => (await shownTable(page, trade.name)).prices, { timeout: 60_000 }).toEqual(want);
    await expect(text(page, `[data-testid="price-lists-table"] tbody tr:has-text("${trade.name}")`)).resolves.toContain('rounded up 0.5');
    expect(errors).toEqual([]);
  });

  it('refuses bad entries beside their fields and saves nothing, also across a reload', async () => {
    const { page, errors } = await openPrices();
    const listRows = page.locator('[data-testid="price-lists-table"] tbody tr');
    await expect(listRows.count()).resolves.toBe(demo.priceLists.length);

    await page.getByRole('button', { name: 'Add a price list' }).click();
    await page.locator('#f-name').fill(' wholesale ');
    await page.locator('#f-currency').fill('CHF');
    await page.locator('#f-basis').selectOption('margin');
    await page.locator('#f-pct').fill('100');
    await page.locator('#f-roundingStep').fill('0');
    await page.getByRole('button', { name: 'Add the price list' }).click();

    await expect(text(page, '[data-problem-for="name"]')).resolves.toMatch(/another price list is already called wholesale/);
    await expect(text(page, '[data-problem-for="currency"]')).resolves.toMatch(/CHF has no exchange rate/);
    await expect(text(page, '[data-problem-for="roundingStep"]')).resolves.toMatch(/above 0/);
    // A gross margin is a share of the price, price = cost / (1 − margin): 100 % has no price (common practice).
    await expect(text(page, '[data-problem-for="pct"]')).resolves.toMatch(/margin must be below 100/);
    await expect(text(page, 'rb-price-lists-page form .actions [role="alert"]')).resolves.toBe('Nothing saved: fix the marked fields.');
    expect(await page.locator('#f-name').getAttribute('aria-invalid')).toBe('true');

    // A markup has no such bound, but text is not a percent.
    await page.locator('#f-basis').selectOption('markup');
    await page.locator('#f-pct').fill('forty');
    await page.getByRole('button', { name: 'Add the price list' }).click();
    await expect(text(page, '[data-problem-for="pct"]')).resolves.toMatch(/must be a number of percent/);
    await expect(listRows.count()).resolves.toBe(demo.priceLists.length);
    await expect(page.locator('[data-testid="price-table"]').count()).resolves.toBe(demo.priceLists.length);

    await page.getByRole('button', { name: 'Cancel' }).click();
    await page.reload();
    await page.locator('[data-testid="price-table"]').first().waitFor({ timeout: 60_000 });
    await expect(listRows.count()).resolves.toBe(demo.priceLists.length);
    expect((await listRows.locator('td:first-child').allTextContents()).map(readerText).sort()).toEqual(demo.priceLists.map((l) => l.name).sort());
    expect(errors).toEqual([]);
  });

  it('deletes a list from its row once asked, and it stays deleted after a reload', async () => {
    const { page, errors } = await openPrices();
    const listRows = page.locator('[data-testid="price-lists-table"] tbody tr');
    const gone = demo.priceLists[0]!;
    const row = page.locator(`[data-testid="price-lists-table"] tbody tr[data-id="${gone.id}"]`);
    await row.getByRole('button', { name: 'delete', exact: true }).click();
    await expect(text(page, `[data-testid="price-lists-table"] tbody tr[data-id="${gone.id}"] td.acts`)).resolves.toContain(`Delete ${gone.name}?`);
    // Keep asks nothing more and keeps it.
    await row.getByRole('button', { name: 'Keep' }).click();
    await row.getByRole('button', { name: 'delete', exact: true }).click();
    await row.getByRole('button', { name: 'Delete', exact: true }).click();
    await expect.poll(() => listRows.count()).toBe(demo.priceLists.length - 1);
    // Its table of prices goes with it (the tables are drawn again once the figures are in).
    await expect.poll(() => page.locator('[data-testid="price-table"]').count()).toBe(demo.priceLists.length - 1);
    await saved(page);
    await page.reload();
    await page.locator('[data-testid="price-lists-table"]').waitFor({ timeout: 60_000 });
    await expect.poll(() => listRows.count()).toBe(demo.priceLists.length - 1);
    expect((await listRows.locator('td:first-child').allTextContents()).map(readerText).sort()).toEqual(demo.priceLists.slice(1).map((l) => l.name).sort());
    expect(errors).toEqual([]);
  });

  it('downloads the CSV for customers: the export module’s very bytes, prices only, one row per list and variant', async () => {
    const { page, errors } = await openPrices();
    await fillTradeList(page);
    await page.getByRole('button', { name: 'Add the price list' }).click();
    await saved(page);
    await page.locator('rb-price-lists-page h2', { hasText: trade.name }).waitFor();
    await page.locator('rb-price-lists-page p.empty', { hasText: 'Working out' }).waitFor({ state: 'detached', timeout: 60_000 });

    // The lists in the order the page keeps them.
    const names = (await page.locator('[data-testid="price-lists-table"] tbody tr td:first-child').allTextContents()).map(readerText);
    const all = [...demo.priceLists, trade];
    const lists = names.map((n) => all.find((l) => l.name === n)!);
    expect(new Set(lists)).toEqual(new Set(all));
    const book: Book = { ...demo, priceLists: lists };
    const tables: PriceTable[] = lists.map((l) => priceTable(l, book, costs));

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Price lists CSV' }).click()]);
    expect(download.suggestedFilename()).toBe(priceListFileName(demo.settings.bookName));
    const bytes = readFileSync(await download.path());
    expect(bytes.equals(Buffer.from(exportBytes(value(priceListCsv(tables)))))).toBe(true);

    // Read as a customer's program would (RFC 4180: CRLF records, a header row): prices only, no cost column.
    const rows = Papa.parse<string[]>(bytes.toString('utf8'), { newline: '\r\n', skipEmptyLines: true }).data;
    const head = rows[0]!;
    expect(head).toEqual(priceListHeader(demo.settings.runSizes));
    expect(head.join(' ')).not.toMatch(/cost/i);
    expect(rows.length - 1).toBe(lists.length * demo.variants.length);
    const shown = await shownTable(page, trade.name);
    for (const r of rows.slice(1).filter((x) => x[0] === trade.name)) {
      expect(r[1]).toBe('GBP');
      expect(r.slice(4).map(Number)).toEqual(shown.prices.get(r[2]!));
    }
    expect(errors).toEqual([]);
  });
});

describe('landed cost through the forms', () => {
  const run = demo.runs.find((r) => r.id === 'run_spring_fr4_60')!;
  const kelvaro = demo.suppliers.find((s) => s.id === 'sup_kelvaro')!;
  const terms = { freightPerOrder: { amount: 40, currency: 'USD' }, freightPct: 2, dutyPct: 3.5, chargesPerOrder: { amount: 12, currency: 'EUR' } };
  // A quote of Kelvaro's the run buys on, once the landed terms weigh in the choice.
  const landedBook: Book = { ...demo, suppliers: demo.suppliers.map((s) => (s.id === kelvaro.id ? { ...s, ...terms } : s)) };
  const bought = value(runCosting(landedBook, run)).bom.lines.filter((l) => l.supplierId === kelvaro.id);
  const ddpQuote = demo.quotes.find((q) => q.id === bought[0]!.quoteId)!;

  it('saves a supplier’s landed terms and a quote’s delivery term, and the run’s costed BOM shows the landed cost the costing works out', async () => {
    expect(bought.length).toBeGreaterThan(1);
    const { page, errors } = await app.open('#/suppliers', { viewport: WIDE_VIEWPORT, ready: '[data-testid="suppliers-table"]' });
    const supplierRow = page.locator(`[data-testid="suppliers-table"] tbody tr[data-id="${kelvaro.id}"]`);
    await supplierRow.getByRole('button', { name: 'edit' }).click();

    // Bad entries first: each refused beside its field, nothing saved.
    await page.locator('#f-freightPerOrder').fill('40');
    await page.locator('#f-freightCurrency').fill('CHF');
    await page.locator('#f-dutyPct').fill('three');
    await page.getByRole('button', { name: 'Save the supplier' }).click();
    await expect(text(page, '[data-problem-for="freightCurrency"]')).resolves.toMatch(/no rate for CHF/);
    await expect(text(page, '[data-problem-for="dutyPct"]')).resolves.toMatch(/a number ≥ 0/);
    await expect(text(page, `[data-testid="suppliers-table"] tbody tr[data-id="${kelvaro.id}"] td:nth-child(5)`)).resolves.toBe('—');

    await page.locator('#f-freightCurrency').fill('');
    await page.locator('#f-freightPct').fill('2');
    await page.locator('#f-dutyPct').fill('3.5 %');
    await page.locator('#f-chargesPerOrder').fill('12');
    await page.getByRole('button', { name: 'Save the supplier' }).click();
    await saved(page);
    await expect
      .poll(() => text(page, `[data-testid="suppliers-table"] tbody tr[data-id="${kelvaro.id}"] td:nth-child(5)`))
      .toBe('freight 40 USD/order + 2 %, duty 3.5 %, charges 12 EUR/order');

    // The quote's delivery term, chosen in the quote form and there again after a reload.
    await app.goto(page, '#/quotes', '[data-testid="quotes-table"]');
    const quoteRow = page.locator(`[data-testid="quotes-table"] tbody tr[data-id="${ddpQuote.id}"]`);
    await quoteRow.getByRole('button', { name: 'edit' }).click();
    await page.locator('#f-incoterm').selectOption('DDP');
    await page.getByRole('button', { name: 'Save the quote' }).click();
    await saved(page);
    await page.reload();
    await page.locator('[data-testid="quotes-table"]').waitFor();
    await quoteRow.getByRole('button', { name: 'edit' }).click();
    await expect(page.locator('#f-incoterm').inputValue()).resolves.toBe('DDP');
    await page.getByRole('button', { name: 'Cancel' }).click();

    // The same Book in Node: the run's costing with these terms.
    const book: Book = { ...landedBook, quotes: demo.quotes.map((q) => (q.id === ddpQuote.id ? { ...q, incoterm: 'DDP' as const } : q)) };
    const costing = value(runCosting(book, run));
    const lines = costing.bom.lines;
    const ddp = lines.find((l) => l.quoteId === ddpQuote.id)!;
    const other = lines.find((l) => l.supplierId === kelvaro.id && l.quoteId !== ddpQuote.id)!;
    // Incoterms 2020 (ICC; from memory): under DDP the seller pays carriage and import duty, so the line bears only the
    // payment charges; with no term on the quote all of the supplier's landed costs are ours, duty at 3.5 % of the
    // goods' value rounded to the cent (domain/landed.ts; customs duty on the goods' value, US basis, from memory).
    expect(ddp.incoterm).toBe('DDP');
    expect([ddp.freight, ddp.duty]).toEqual([0, 0]);
    expect(toCents(other.duty!)).toBe(Math.round((toCents(other.extendedBase) * 35) / 1000));
    expect(costing.bom.landedRun).toBeGreaterThan(0);

    await app.goto(page, '#/runs', '[data-testid="runs-table"]');
    await page.getByRole('button', { name: run.name, exact: true }).click();
    const bom = page.locator('[data-testid="run-bom"]');
    await bom.waitFor();
    const total = (n: number): string => money(n, 'total');
    const rows = bom.locator('tbody tr');
    await expect(rows.count()).resolves.toBe(lines.length);
    for (const [i, l] of lines.entries()) {
      const row = rows.nth(i);
      await expect(row.locator('td.part .code').textContent().then(readerText)).resolves.toBe(l.mpn);
      const landed = readerText(await row.locator('td.landed').textContent());
      const sum = (toCents(l.freight ?? 0) + toCents(l.duty ?? 0) + toCents(l.charges ?? 0)) / 100;
      expect(landed.startsWith(total(sum)), `${l.mpn}: ${landed}`).toBe(true);
      for (const part of ['freight', 'duty', 'charges'] as const) {
        const n = l[part] ?? 0;
        if (n !== 0) expect(landed).toContain(`${part} ${total(n)}`);
        else expect(landed).not.toContain(part);
      }
    }
    await expect(rows.nth(lines.indexOf(ddp)).locator('td.supplier').textContent().then(readerText)).resolves.toContain(`${ddp.supplierCode} · DDP`);
    const labels = costedTotalLabels(costing.bom.currency, demo.settings.marginPct);
    const landedTotal = page.locator('[data-testid="run-totals"] tr', { hasText: labels.landedRun });
    await expect(landedTotal.locator('td.num').textContent().then(readerText)).resolves.toBe(total(costing.bom.landedRun!));

    // With landed cost on its lines, the costed BOM still fits a 1,400-pixel window.
    const fits = await bom.evaluate((t) => ({ table: t.scrollWidth, frame: t.parentElement!.clientWidth }));
    expect(fits.table).toBeLessThanOrEqual(fits.frame + 1);
    expect(errors).toEqual([]);
  });
});
