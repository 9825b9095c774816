// Supplier price files through the built app in real Chromium: a demo file read in the worker, its mapping confirmed,
// committed and seen on the Quotes page (then undone); HTML in a description shown as text and never run; a file whose
// last row is bad commits nothing; a second import of the same file is reported.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { mpnKey } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { AppUnderTest, TempFiles, railTo, saved, text } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();
const KELVARO = demo.suppliers.find((s) => s.name === 'Kelvaro Parts Direct')!;
const DEMO_FILE = 'kelvaro-quote-2026-08.csv';
const DEMO_PATH = join(process.cwd(), 'public', 'demo', DEMO_FILE);
/** The header of the Kelvaro demo file, reused so generated files read like theirs (long layout, one row per break). */
const HEADER = 'Mfr Part No,Description,Supplier Part,Break Qty,Unit Price (USD),Min Order Qty,Pack Size,Lead Time (weeks),Quoted On';

const app = new AppUnderTest(baseUrl);
const files = new TempFiles('rungbook-prices');
afterEach(async () => {
  await app.close();
  files.clear();
});
const writeTemp = (name: string, text: string): string => files.write(name, text);

/** Rows of the quotes table (the demo Book has fewer quotes than one screenful, so all of them are drawn). */
async function quoteRows(page: Page): Promise<number> {
  await page.locator('[data-testid="quotes-table"]').waitFor();
  return page.locator('[data-testid="quotes-table"] tbody tr').count();
}

/** Chooses the supplier and the file on the Import page and waits until the file has been read and checked. */
async function readFile(page: Page, path: string): Promise<void> {
  await page.locator('#import-supplier').selectOption(KELVARO.id);
  await page.locator('[data-testid="price-file"]').setInputFiles(path);
  await page.locator('[data-testid="mapping-table"]').waitFor();
}

describe('price file import through the app', () => {
  it('imports a demo price file after the mapping is confirmed, shows its quotes, and undoes it', async () => {
    // What the file should give, read straight from its text: one quote per distinct maker part number (long layout,
    // one row per break) for the parts the demo Book holds. The part number is the first field and never quoted, so
    // the text before the first comma is exactly it (later fields may be quoted and hold commas).
    const lines = readFileSync(DEMO_PATH, 'utf8').trim().split(/\r?\n/);
    expect(lines[0]!.split(',')[0]).toBe('Mfr Part No');
    expect(lines.some((l) => l.startsWith('"'))).toBe(false);
    const inBook = new Set(demo.parts.map((p) => mpnKey(p.mpn)));
    const fileParts = new Set(lines.slice(1).map((l) => mpnKey(l.slice(0, l.indexOf(',')))));
    const matched = [...fileParts].filter((k) => inBook.has(k));
    const unmatched = [...fileParts].filter((k) => !inBook.has(k));
    const partIdsMatched = new Set(demo.parts.filter((p) => matched.includes(mpnKey(p.mpn))).map((p) => p.id));
    const replaced = demo.quotes.filter((q) => q.supplierId === KELVARO.id && partIdsMatched.has(q.partId) && q.supersededBy === undefined);
    expect(matched.length).toBeGreaterThan(0);

    const { page, errors, foreignRequests } = await app.open('#/quotes');
    const before = await quoteRows(page);
    expect(before).toBe(demo.quotes.length);
    expect(await page.locator(`[data-testid="quotes-table"] tbody tr`, { hasText: DEMO_FILE }).count()).toBe(0);

    await railTo(page, '#/import');
    await readFile(page, DEMO_PATH);
    await expect(page.locator('[data-testid="file-name"]').textContent()).resolves.toBe(DEMO_FILE);
    await expect(page.locator('[data-testid="found-delimiter"]').textContent()).resolves.toContain('comma');
    await expect(page.locator('[data-testid="found-decimal"]').textContent()).resolves.toContain('decimal point');
    await expect(page.locator('[data-testid="found-encoding"]').textContent()).resolves.toContain('UTF-8');
    await expect(page.locator('#map-mpn').inputValue()).resolves.toBe('Mfr Part No');
    await expect(page.locator('#map-price').inputValue()).resolves.toBe('Unit Price (USD)');
    await expect(text(page, '[data-testid="import-progress"]')).resolves.toMatch(new RegExp(`^${lines.length - 1} rows read and checked`));
    await page.locator('[data-testid="no-problems"]').waitFor();
    expect(await page.locator('[data-testid="unmatched-table"] tbody tr').count()).toBe(unmatched.length);

    // Nothing can be imported before the mapping is confirmed.
    const importAll = page.getByRole('button', { name: 'Import all', exact: true });
    await expect(importAll.isDisabled()).resolves.toBe(true);
    await page.getByRole('button', { name: 'Confirm this mapping' }).click();
    await page.locator('[data-testid="mapping-confirmed"]').waitFor();
    await expect(importAll.isEnabled()).resolves.toBe(true);
    await importAll.click();
    await page.locator('[data-testid="import-done"]').waitFor();
    await saved(page);
    await expect(text(page, '[data-testid="import-done"]')).resolves.toMatch(
      new RegExp(`${matched.length} new quotes, ${replaced.length} quotes? superseded`),
    );

    await railTo(page, '#/quotes');
    const fromFile = page.locator('[data-testid="quotes-table"] tbody tr', { hasText: DEMO_FILE });
    await fromFile.first().waitFor();
    // New quotes are added; the ones they replace stay in the Book, marked superseded.
    expect(await quoteRows(page)).toBe(before + matched.length);
    expect(await fromFile.count()).toBe(matched.length);
    expect(await page.locator('[data-testid="quotes-table"] tbody tr[data-state="current"]', { hasText: DEMO_FILE }).count()).toBe(matched.length);
    for (const q of replaced) {
      const old = page.locator(`[data-testid="quotes-table"] tbody tr[data-id="${q.id}"]`);
      await expect(old.getAttribute('data-state')).resolves.toBe('superseded');
      await expect(old.textContent()).resolves.toContain('↷ superseded');
    }

    // The batch is listed with its file and rows; undo takes its quotes away and restores the replaced ones.
    const batch = page.locator('[data-testid="batches-table"] tbody tr', { hasText: DEMO_FILE });
    await expect(batch.textContent()).resolves.toContain(KELVARO.name);
    await expect(batch.locator('td').nth(2).textContent()).resolves.toBe(String(lines.length - 1));
    await batch.getByRole('button', { name: 'undo' }).click();
    await batch.getByRole('button', { name: 'Undo', exact: true }).click();
    await batch.locator('text=↶ undone').waitFor();
    await saved(page);
    expect(await quoteRows(page)).toBe(before);
    for (const q of replaced) {
      await expect(page.locator(`[data-testid="quotes-table"] tbody tr[data-id="${q.id}"]`).getAttribute('data-state')).resolves.not.toBe('superseded');
    }
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });

  it('remembers the mapping for the supplier and reports a second import of the same file', async () => {
    const { page, errors } = await app.open('#/import');
    await page.locator('#import-supplier').selectOption(KELVARO.id);
    await expect(page.locator('[data-testid="supplier-mapping"]').textContent()).resolves.toMatch(/No mapping remembered/);
    await readFile(page, DEMO_PATH);
    await page.getByRole('button', { name: 'Confirm this mapping' }).click();
    await page.getByRole('button', { name: 'Import all', exact: true }).click();
    await page.locator('[data-testid="import-done"]').waitFor();
    await saved(page);

    await page.reload();
    await page.locator('#import-supplier').selectOption(KELVARO.id);
    await expect(page.locator('[data-testid="supplier-mapping"]').textContent()).resolves.toMatch(/mapping from an earlier import is remembered/);
    await readFile(page, DEMO_PATH);
    await expect(page.locator('[data-key="mpn"] .from').textContent()).resolves.toBe('remembered for this supplier');
    // The same columns as remembered: the mapping stands confirmed without asking again.
    await expect(text(page, '[data-testid="mapping-confirmed"]')).resolves.toMatch(/Same columns as remembered/);
    const notice = page.locator('[data-testid="reimport-notice"]');
    await notice.waitFor();
    await expect(notice.textContent()).resolves.toContain(DEMO_FILE);
    await expect(page.getByRole('button', { name: 'Import all', exact: true }).isDisabled()).resolves.toBe(true);
    expect(errors).toEqual([]);
  });

  it('maps by hand a column the header words do not name, reads the file again, and remembers the choice', async () => {
    // "Tariff" is no price word, so the price column is not found until the person points at it.
    const header = 'Mfr Part No,Supplier Part,Break Qty,Tariff (USD),Quoted On';
    const first = writeTemp('tariff-1.csv', `${header}\nQX-Z12-05,KPD-410233,10,0.044,2026-08-20\nQX-Z12-05,KPD-410233,1000,0.02,2026-08-20\n`);
    const second = writeTemp('tariff-2.csv', `${header}\nQX-Z12-13,KPD-410251,10,0.088,2026-09-20\n`);
    const { page, errors } = await app.open('#/import');
    await readFile(page, first);
    await expect(text(page, '[data-testid="problems-table"] tbody tr')).resolves.toMatch(/no price column found/);
    await expect(page.locator('#map-price').inputValue()).resolves.toBe('');

    await page.locator('#map-price').selectOption('Tariff (USD)');
    await page.locator('[data-testid="no-problems"]').waitFor();
    await expect(page.locator('[data-key="price"] .from').textContent()).resolves.toBe('chosen here');
    await expect(text(page, '[data-testid="preview-table"] tbody tr')).resolves.toMatch(/10 @ 0\.044 · 1000 @ 0\.02/);
    await page.getByRole('button', { name: 'Confirm this mapping' }).click();
    await page.getByRole('button', { name: 'Import all', exact: true }).click();
    await page.locator('[data-testid="import-done"]').waitFor();
    await saved(page);

    await page.reload();
    await readFile(page, second);
    await page.locator('[data-testid="no-problems"]').waitFor();
    await expect(page.locator('#map-price').inputValue()).resolves.toBe('Tariff (USD)');
    await expect(page.locator('[data-key="price"] .from').textContent()).resolves.toBe('remembered for this supplier');
    expect(errors).toEqual([]);
  });

  it('reads a demo file fetched from the app, shows its semicolons, decimal commas and prices per 100, and takes an override', async () => {
    const { page, errors } = await app.open('#/import');
    await page.getByRole('button', { name: 'brindlecote-passives-2026-07.csv' }).click();
    await page.locator('[data-testid="mapping-table"]').waitFor();
    // The button also picks the supplier the demo file belongs to.
    await expect(page.locator('#import-supplier').inputValue()).resolves.toBe('sup_brindle');
    await expect(text(page, '[data-testid="found-delimiter"]')).resolves.toBe('semicolon');
    await expect(text(page, '[data-testid="found-decimal"]')).resolves.toMatch(/^decimal comma/);
    await expect(text(page, '[data-testid="found-price-unit"]')).resolves.toBe('per 100');
    await page.locator('[data-testid="no-problems"]').waitFor();
    // "£0,60" per 100 is 0.006 per unit (0.60 / 100).
    await expect(text(page, '[data-testid="preview-table"] tbody tr')).resolves.toContain('100 @ 0.006');

    // Read with a decimal point instead, "0,60" is no number: the problems say so, and nothing can be imported.
    await page.locator('#ov-decimal').selectOption('.');
    await page.locator('[data-testid="problems-table"]').waitFor();
    await expect(text(page, '[data-testid="found-decimal"]')).resolves.toMatch(/decimal point as you chose/);
    await page.locator('#ov-decimal').selectOption('');
    await page.locator('[data-testid="no-problems"]').waitFor();
    expect(errors).toEqual([]);
  });

  it('shows HTML in a description as text and runs nothing', async () => {
    const payload = '<img src=x onerror="window.__pwned=1">';
    // RFC 4180: a field holding quotes is itself quoted and its quotes doubled.
    const cell = `"${payload.replace(/"/g, '""')}"`;
    const path = writeTemp('html-description.csv', `${HEADER}\nZZ-HTML-01,${cell},KPD-999001,10,0.5,10,10,2,2026-08-14\n`);
    const { page, errors } = await app.open('#/import');
    await readFile(page, path);
    const preview = page.locator('[data-testid="preview-table"] td.desc');
    await expect(preview.textContent()).resolves.toBe(payload);
    await expect(page.locator('[data-testid="unmatched-table"] td.desc').textContent()).resolves.toBe(payload);
    // No element was made from the text: no image exists anywhere in the page's shadow trees.
    expect(await page.locator('img[src="x"]').count()).toBe(0);

    await page.locator('[data-testid="unmatched-table"] select').selectOption('create');
    await page.getByRole('button', { name: 'Confirm this mapping' }).click();
    await page.getByRole('button', { name: 'Import all', exact: true }).click();
    await page.locator('[data-testid="import-done"]').waitFor();
    await saved(page);
    await expect(text(page, '[data-testid="import-done"]')).resolves.toMatch(/1 new quote, 0 quotes superseded, 1 new part/);

    await railTo(page, '#/quotes');
    const row = page.locator('[data-testid="quotes-table"] tbody tr', { hasText: 'ZZ-HTML-01' });
    await row.waitFor();
    await expect(row.locator('.part-desc').textContent()).resolves.toBe(payload);
    await railTo(page, '#/parts');
    await expect(page.locator('[data-testid="parts-table"] tbody tr', { hasText: 'ZZ-HTML-01' }).textContent()).resolves.toContain(payload);
    expect(await page.locator('img[src="x"]').count()).toBe(0);
    await expect(page.evaluate(() => (window as unknown as { __pwned?: unknown }).__pwned)).resolves.toBeUndefined();
    expect(errors).toEqual([]);
  });

  it('commits nothing from a file whose last row is bad', async () => {
    // Three good rows for demo parts, then a row whose price is not a number.
    const rows = [
      'QX-Z12-05,Zener diode 12 V,KPD-410233,10,0.044,10,10,5,2026-08-20',
      'QX-Z12-05,Zener diode 12 V,KPD-410233,1000,0.02,10,10,5,2026-08-20',
      'QX-Z12-13,Zener diode 12 V 1.3 W,KPD-410251,10,0.088,10,10,5,2026-08-20',
      'QX-Z15-13,Zener diode 15 V 1.3 W,KPD-410252,10,twelve cents,10,10,5,2026-08-20',
    ];
    const lastLine = rows.length + 1; // the header is line 1
    const path = writeTemp('bad-last-row.csv', `${HEADER}\n${rows.join('\n')}\n`);
    const { page, errors } = await app.open('#/quotes');
    const before = await quoteRows(page);
    const summaryBefore = await page.locator('[data-testid="quotes-summary"]').textContent();

    await railTo(page, '#/import');
    await readFile(page, path);
    const problems = page.locator('[data-testid="problems-table"] tbody tr');
    await problems.first().waitFor();
    expect(await problems.count()).toBe(1);
    const cells = await problems.first().locator('td').allTextContents();
    expect(cells.slice(0, 3)).toEqual([String(lastLine), 'Unit Price (USD)', 'twelve cents']);
    await page.getByRole('button', { name: 'Confirm this mapping' }).click();
    await expect(page.getByRole('button', { name: 'Import all', exact: true }).isDisabled()).resolves.toBe(true);
    await expect(text(page, '[data-testid="import-why"]')).resolves.toMatch(/1 problem must be fixed/);
    // Importing the rest is offered only as its own, separate choice; it is not taken here.
    await page.getByRole('button', { name: /Import only the valid rows/ }).waitFor();

    await railTo(page, '#/quotes');
    expect(await quoteRows(page)).toBe(before);
    await expect(page.locator('[data-testid="quotes-summary"]').textContent()).resolves.toBe(summaryBefore);
    await page.reload();
    expect(await quoteRows(page)).toBe(before);
    await expect(page.locator('[data-testid="batches-table"]').count()).resolves.toBe(0);
    expect(errors).toEqual([]);
  });
  it('imports a file of 2,600 new parts, keeps them after a reload, and undoes the import', async () => {
    const count = 2600;
    const rows = Array.from({ length: count }, (_, i) => `BIG-${String(i).padStart(5, '0')},Large file part ${i},KPB-${i},1,0.10,1,1,2,2026-08-14`);
    const path = writeTemp('large-new-parts.csv', `${HEADER}\n${rows.join('\n')}\n`);
    const { page, errors } = await app.open('#/start');
    /** The Start page's counts of the Book: parts and quotes. */
    const counts = async (): Promise<number[]> => {
      const shown = await text(page, '[data-testid="start-counts"]');
      const m = /([\d,]+) parts? and ([\d,]+) quotes?/.exec(shown);
      expect(m, shown).not.toBeNull();
      return [Number(m![1]!.replace(/,/g, '')), Number(m![2]!.replace(/,/g, ''))];
    };
    await page.locator('[data-testid="start-counts"]').waitFor();
    const [parts, quotes] = await counts();

    await railTo(page, '#/import');
    await readFile(page, path);
    await expect(text(page, '[data-testid="import-progress"]')).resolves.toMatch(/^2,?600 rows read and checked/);
    await page.getByRole('button', { name: 'Confirm this mapping' }).click();
    await page.getByRole('button', { name: 'Create all as new parts' }).click();
    await page.getByRole('button', { name: 'Import all', exact: true }).click();
    await page.locator('[data-testid="import-done"]').waitFor({ timeout: 60_000 });
    await saved(page);
    await expect(text(page, '[data-testid="import-done"]')).resolves.toMatch(/2,?600 new quotes/);

    // Read back from storage: the 2,600 parts and quotes and the batch naming them were all written.
    await page.evaluate(() => (location.hash = '#/start'));
    await page.reload();
    await page.locator('[data-testid="start-counts"]').waitFor();
    expect(await counts()).toEqual([parts! + count, quotes! + count]);
    await railTo(page, '#/quotes');
    const batch = page.locator('[data-testid="batches-table"] tbody tr', { hasText: 'large-new-parts.csv' });
    await expect(batch.locator('td').nth(2).textContent()).resolves.toBe(String(count));
    await batch.getByRole('button', { name: 'undo' }).click();
    await batch.getByRole('button', { name: 'Undo', exact: true }).click();
    await batch.locator('text=↶ undone').waitFor({ timeout: 60_000 });
    await saved(page);
    await page.evaluate(() => (location.hash = '#/start'));
    await page.reload();
    await page.locator('[data-testid="start-counts"]').waitFor();
    expect((await counts())[1]).toBe(quotes);
    expect(errors).toEqual([]);
  });
});
