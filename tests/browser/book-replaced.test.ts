// Replacing the whole Book (Book menu: an empty Book, the demo Book) in real Chromium while forms, selections, an
// import and unsaved settings are open on other pages: every page then shows the new Book's state, never a form, a
// detail or a draft of a record that is gone (pages are kept while the person moves between them, so each held them).
import { join } from 'node:path';
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { AppUnderTest, pageLoaded, railTo, saved } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();
// Not the run the Runs page lists first (that one the Export page would start on anyway).
const run = demo.runs.find((r) => r.id === 'run_pilot_fr5_150')!;
const KELVARO = demo.suppliers.find((s) => s.name === 'Kelvaro Parts Direct')!;

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

async function menuAction(page: Page, item: string, confirmLabel: string): Promise<void> {
  await page.getByRole('button', { name: item }).click();
  const dialog = page.locator('rb-book-menu dialog[open]');
  await dialog.getByRole('button', { name: confirmLabel }).click();
  await page.locator('rb-book-menu dialog[open]').waitFor({ state: 'hidden' });
  await saved(page);
}

async function go(page: Page, hash: string, title: string): Promise<void> {
  await railTo(page, hash);
  await pageLoaded(page, title);
}

describe('a replaced Book', () => {
  it('leaves no page showing or saving a form, detail, draft or import of the Book that was replaced', async () => {
    const { page, errors } = await app.open('#/parts', { ready: '[data-testid="export-reminder"]' });

    // Forms and selections open on several pages, none of them saved.
    await pageLoaded(page, 'Parts');
    await page.locator('rb-parts-page tbody tr').first().getByRole('button', { name: 'edit' }).click();
    await page.locator('rb-parts-page form[aria-label="Part"]').waitFor();
    await go(page, '#/suppliers', 'Suppliers');
    await page.locator('rb-suppliers-page tbody tr').first().getByRole('button', { name: 'edit' }).click();
    await page.locator('rb-suppliers-page form[aria-label="Supplier"]').waitFor();
    await go(page, '#/quotes', 'Quotes');
    await page.locator('[data-testid="quotes-supplier"]').selectOption(KELVARO.id);
    await page.locator('[data-testid="quotes-table"] tbody tr').first().getByRole('button', { name: 'edit' }).click();
    await page.locator('rb-quote-form').waitFor();
    await go(page, '#/runs', 'Runs');
    await page.getByRole('button', { name: run.name, exact: true }).click();
    await page.locator('rb-run-detail h2', { hasText: `Run ${run.name}` }).waitFor();
    await page.getByRole('button', { name: 'Add a run' }).click();
    await page.locator('rb-runs-page form[aria-label="Run"]').waitFor();
    await go(page, '#/checks', 'Checks');
    await page.locator('button.cell[data-variant="FR5-75-CD"][data-check="bleeder_time"]').click();
    await page.locator('[data-testid="check-detail"]').waitFor();
    await go(page, '#/import', 'Import');
    await page.locator('#import-supplier').selectOption(KELVARO.id);
    await page.locator('[data-testid="price-file"]').setInputFiles(join(process.cwd(), 'public', 'demo', 'kelvaro-quote-2026-08.csv'));
    await page.locator('[data-testid="mapping-table"]').waitFor();
    await go(page, '#/settings', 'Rates');
    await page.locator('#f-labourRatePerHour').fill('99');
    await go(page, '#/compare', 'Compare');
    await page.getByRole('button', { name: 'None', exact: true }).click();
    await page.locator('[data-testid="compare-none"]').waitFor();

    // An empty Book: every page shows it, with nothing of the demo Book's records left open.
    await menuAction(page, 'Start an empty Book…', 'Empty the Book');
    await page.locator('rb-compare-page .empty', { hasText: 'No variants yet' }).waitFor();
    await go(page, '#/parts', 'Parts');
    await page.locator('rb-parts-page .empty', { hasText: 'No parts yet' }).waitFor();
    expect(await page.locator('rb-parts-page form[aria-label="Part"]').count()).toBe(0);
    await go(page, '#/suppliers', 'Suppliers');
    await page.locator('rb-suppliers-page .empty', { hasText: 'No suppliers yet' }).waitFor();
    expect(await page.locator('rb-suppliers-page form[aria-label="Supplier"]').count()).toBe(0);
    await go(page, '#/quotes', 'Quotes');
    await page.locator('rb-quotes-page .empty', { hasText: 'No quotes yet' }).waitFor();
    expect(await page.locator('rb-quote-form').count()).toBe(0);
    await expect(page.locator('[data-testid="quotes-supplier"]').inputValue()).resolves.toBe('');
    await go(page, '#/runs', 'Runs');
    await page.locator('rb-runs-page .empty', { hasText: 'No runs yet' }).waitFor();
    expect(await page.locator('rb-runs-page form[aria-label="Run"]').count()).toBe(0);
    expect(await page.locator('rb-run-detail h2').count()).toBe(0);
    await go(page, '#/checks', 'Checks');
    await page.locator('rb-checks-page .empty', { hasText: 'No variants yet' }).waitFor();
    expect(await page.locator('[data-testid="check-detail"]').count()).toBe(0);
    await go(page, '#/import', 'Import');
    expect(await page.locator('[data-testid="mapping-table"]').count()).toBe(0);
    expect(await page.locator('[data-testid="file-name"]').count()).toBe(0);
    await expect(page.locator('#import-supplier').inputValue()).resolves.toBe('');
    await go(page, '#/settings', 'Rates');
    // The empty Book keeps the settings it was started from (the stored labour rate), not the 99 typed and never saved.
    await expect(page.locator('#f-labourRatePerHour').inputValue()).resolves.toBe(String(demo.settings.labourRatePerHour));
    await page.locator('#f-labourRatePerHour').fill('99');

    // The demo Book back, with the very ids of the records open before: still nothing of the old state shows.
    await menuAction(page, 'Put the demo Book back…', 'Load the demo Book');
    await expect(page.locator('#f-labourRatePerHour').inputValue()).resolves.toBe(String(demo.settings.labourRatePerHour));
    await go(page, '#/export', 'Export');
    await page.locator('[data-testid="export-preview"]').waitFor();
    // Not the run opened on the Runs page before the Book was replaced: the one the Runs page lists first, which the
    // Runs page opens too.
    const first = await page.locator('#x-run').inputValue();
    expect(first).not.toBe(run.id);
    await go(page, '#/runs', 'Runs');
    await expect(page.locator('[data-testid="runs-table"] tbody tr').first().getAttribute('data-id')).resolves.toBe(first);
    const listedFirst = demo.runs.find((r) => r.id === first)!;
    await page.locator('rb-run-detail h2#run-h', { hasText: `Run ${listedFirst.name}` }).waitFor();
    expect(await page.locator('rb-runs-page form[aria-label="Run"]').count()).toBe(0);
    await go(page, '#/compare', 'Compare');
    await page.locator('[data-testid="compare-table"]').waitFor();
    expect(await page.locator('[data-testid="compare-none"]').count()).toBe(0);
    expect(errors).toEqual([]);
  });

  it('leaves no form of the replaced Book open in another tab, which follows the Book replaced in this one', async () => {
    const { page, context, errors } = await app.open('#/parts', { ready: '[data-testid="export-reminder"]' });
    await pageLoaded(page, 'Parts');
    const other = await context.newPage();
    await app.goto(other, '#/parts');
    await pageLoaded(other, 'Parts');
    await other.locator('rb-parts-page tbody tr').first().getByRole('button', { name: 'edit' }).click();
    await other.locator('rb-parts-page form[aria-label="Part"]').waitFor();

    await menuAction(page, 'Start an empty Book…', 'Empty the Book');
    await other.locator('rb-parts-page .empty', { hasText: 'No parts yet' }).waitFor();
    expect(await other.locator('rb-parts-page form[aria-label="Part"]').count()).toBe(0);
    expect(errors).toEqual([]);
  });
});
