// Import stumbles a practitioner met, through the built app in real Chromium: a pre-filled currency replaced by what is
// typed, a column set to "not used" that stays so, rows without a date on the Book's costing date, a warning before
// superseding quotes whose pack a file cannot give, the banner after an undo naming the parts that stay, a
// remembered mapping whose columns match standing confirmed, and an MOQ per price break that no longer folds into one.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { AppUnderTest, TempFiles, readerText, saved, text } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();
const KELVARO = demo.suppliers.find((s) => s.name === 'Kelvaro Parts Direct')!;
/** A Kelvaro part whose current quote has a pack above 1. */
const PACKED = demo.quotes.find((q) => q.supplierId === KELVARO.id && q.supersededBy === undefined && q.pack > 1)!;
const PACKED_MPN = demo.parts.find((p) => p.id === PACKED.partId)!.mpn;
const NEW_MPN = 'QX-INVENTED-77';

const app = new AppUnderTest(baseUrl);
const files = new TempFiles('rungbook-stumbles');
afterEach(async () => {
  await app.close();
  files.clear();
});
const writeTemp = (name: string, text: string): string => files.write(name, text);

async function readFile(page: Page, path: string): Promise<void> {
  await page.locator('#import-supplier').selectOption(KELVARO.id);
  await page.locator('[data-testid="price-file"]').setInputFiles(path);
  await page.locator('[data-testid="mapping-table"]').waitFor();
}

describe('import stumbles', () => {
  it('replaces the pre-filled currency of a new supplier with what is typed', async () => {
    const { page, errors } = await app.open('#/import');
    await page.locator('#import-supplier').selectOption('__new__');
    const currency = page.locator('#f-currency');
    await expect(currency.inputValue()).resolves.toBe(demo.settings.baseCurrency);
    await currency.click();
    await page.keyboard.type('USD');
    await expect(currency.inputValue()).resolves.toBe('USD');
    expect(errors).toEqual([]);
  });

  it('keeps a column set to "not used", dates rows on the costing date, warns of lost packs, and says what an undo left', async () => {
    expect(PACKED_MPN).toBeTruthy();
    const file = writeTemp('no-pack.csv', `Mfr Part No,Break Qty,Unit Price (USD),Min Order Qty\n${PACKED_MPN},1,0.5,1\n${NEW_MPN},1,0.7,1\n`);
    const { page, errors } = await app.open('#/import');
    await readFile(page, file);
    await expect(page.locator('#map-moq').inputValue()).resolves.toBe('Min Order Qty');
    await page.locator('#map-moq').selectOption('');
    await expect.poll(() => text(page, '[data-key="moq"] .from')).toBe('not used, chosen here');
    await page.locator('[data-testid="no-problems"]').waitFor();
    await expect(page.locator('#map-moq').inputValue()).resolves.toBe('');

    // No date column: the quote date is the Book's costing date.
    await expect(text(page, '[data-testid="preview-table"] tbody tr')).resolves.toContain(demo.settings.costingDate!);
    // The file has no pack column: the quote it supersedes had pack PACKED.pack, and the review says so first.
    await expect(text(page, '[data-testid="lost-pack-moq"]')).resolves.toMatch(/no MOQ or pack column: 1 quote it supersedes had a pack or MOQ above 1/);

    await page.locator(`[data-testid="unmatched-table"] select`).selectOption('create');
    await page.getByRole('button', { name: 'Confirm this mapping' }).click();
    await page.getByRole('button', { name: 'Import all', exact: true }).click();
    await page.locator('[data-testid="import-done"]').waitFor();
    await saved(page);
    await expect(text(page, '[data-testid="import-done"]')).resolves.toMatch(/Imported no-pack\.csv .*1 new part/);

    const batch = page.locator('[data-testid="batches-table"] tbody tr', { hasText: 'no-pack.csv' });
    await batch.getByRole('button', { name: 'undo' }).click();
    await batch.getByRole('button', { name: 'Undo', exact: true }).click();
    await batch.locator('text=↶ undone').waitFor();
    await saved(page);
    await expect(text(page, '[data-testid="undo-result"]')).resolves.toMatch(/Undone the import of no-pack\.csv: 2 quote\(s\) removed, 1 restored\./);
    await expect(text(page, '[data-testid="import-done"]')).resolves.toMatch(/The import of no-pack\.csv for Kelvaro Parts Direct was undone/);
    await expect(text(page, '[data-testid="undo-parts-kept"]')).resolves.toContain(NEW_MPN);
    expect(errors).toEqual([]);
  });

  it('starts a price break at its own MOQ when the file gives one per break, and says so in the review', async () => {
    const file = writeTemp('moq-per-break.csv', `Mfr Part No,Break Qty,Unit Price (USD),Min Order Qty\n${PACKED_MPN},1,0.5,10\n${PACKED_MPN},100,0.4,250\n`);
    const { page, errors } = await app.open('#/import');
    await readFile(page, file);
    await expect(page.locator('#map-moq').inputValue()).resolves.toBe('Min Order Qty');
    await page.locator('[data-testid="no-problems"]').waitFor();
    const row = page.locator('[data-testid="preview-table"] tbody tr', { hasText: PACKED_MPN });
    // Each break starts at its own MOQ; the quote's MOQ is the smallest break's.
    await expect(row.locator('td.breaks').textContent().then(readerText)).resolves.toBe('10 @ 0.5 · 250 @ 0.4');
    await expect(row.locator('td.num').nth(1).textContent().then(readerText)).resolves.toBe('10');
    const notes = readerText(await page.locator('ul.notes').textContent());
    expect(notes).toContain(`${PACKED_MPN}, break at 1 (line 2) starts at its MOQ 10`);
    expect(notes).toContain(`${PACKED_MPN}, break at 100 (line 3) starts at its MOQ 250`);
    expect(errors).toEqual([]);
  });

  it('stands a remembered mapping confirmed when the file has the same columns, ready to import at once', async () => {
    const header = 'Mfr Part No,Break Qty,Unit Price (USD),Quoted On';
    const first = writeTemp('same-1.csv', `${header}\n${PACKED_MPN},1,0.5,2026-09-01\n`);
    const second = writeTemp('same-2.csv', `${header}\n${PACKED_MPN},1,0.45,2026-09-20\n`);
    const { page, errors } = await app.open('#/import');
    await readFile(page, first);
    await page.getByRole('button', { name: 'Confirm this mapping' }).click();
    await page.getByRole('button', { name: 'Import all', exact: true }).click();
    await page.locator('[data-testid="import-done"]').waitFor();
    await saved(page);

    await readFile(page, second);
    await expect(text(page, '[data-testid="mapping-confirmed"]')).resolves.toMatch(/Same columns as remembered/);
    await expect(page.getByRole('button', { name: 'Confirm this mapping' }).count()).resolves.toBe(0);
    const importAll = page.getByRole('button', { name: 'Import all', exact: true });
    await expect(importAll.isEnabled()).resolves.toBe(true);
    // Changing a field asks for the mapping to be checked again.
    await page.locator('#map-date').selectOption('');
    await page.getByRole('button', { name: 'Confirm this mapping' }).waitFor();
    expect(errors).toEqual([]);
  });
});
