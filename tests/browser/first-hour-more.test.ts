// More of a practitioner's first hour in real Chromium, one test for each stumble: after "Start an empty Book" the
// rail kept the old Book's name (the company stays, as the settings do), the variant form still showed a variant of
// the old Book and undo offered its edits; after opening a Book file the rail said no Book file was downloaded yet;
// the Export page started on another run than the one just opened on the Runs page; on Compare "None" chose the first
// four, the difference section ignored the ticked variants and took only the Book's run sizes, and a variant's unit
// cost showed two decimals there and four on the Runs page (one money rule now, domain/format.ts); the storage in use
// grew with each empty/open cycle. (That growth is the browser's
// IndexedDB write log: every write is appended, cleared records included, until the log is folded into a table and
// compacted, which a persistent Chromium profile did at about 3 MB, falling back to about 0.5 MB for the demo Book.
// Rungbook itself keeps nothing of a replaced Book, which the last test shows.)
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { defaultSettings } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { costedTotalLabels } from '../../src/io/run-export.ts';
import { bucketQuotes } from '../../src/store/schema.ts';
import { AppUnderTest, compareFigures, pageLoaded, railTo, readerText, saved, text, WIDE_VIEWPORT } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

async function confirm(page: Page, label: string): Promise<void> {
  const dialog = page.locator('rb-book-menu dialog[open]');
  await dialog.waitFor();
  await dialog.getByRole('button', { name: label }).click();
  await page.locator('rb-book-menu dialog[open]').waitFor({ state: 'hidden' });
}

describe('the first hour, more', () => {
  it('starts an empty Book with a new name, no form or undo step of the old Book, and counts an opened file as a Book file', async () => {
    const { page, errors } = await app.open('#/family', { ready: '[data-testid="family-table"] tbody tr >> nth=0' });
    const family = page.locator('rb-family-page');
    await expect(text(page, '[data-testid="book-name"]')).resolves.toContain(demo.settings.bookName);
    // An edit to undo, and the form open on a variant of this Book.
    await family.getByRole('button', { name: 'Duplicate' }).click();
    await saved(page);
    await expect(family.getByTestId('undo').isDisabled()).resolves.toBe(false);
    await family.getByRole('button', { name: 'Details…' }).click();
    await family.locator('#variant-form-h', { hasText: 'Edit variant' }).waitFor();

    await page.getByRole('button', { name: 'Start an empty Book…' }).click();
    await confirm(page, 'Empty the Book');
    await family.locator('.empty', { hasText: 'No variants yet' }).waitFor();
    await saved(page);
    await expect(text(page, '[data-testid="book-name"]')).resolves.toBe(`${defaultSettings().bookName} · ${demo.settings.company}`);
    await expect(family.locator('#variant-form-h').count()).resolves.toBe(0);
    await expect(family.getByTestId('undo').isDisabled()).resolves.toBe(true);
    await expect(family.getByTestId('redo').isDisabled()).resolves.toBe(true);
    await expect(text(page, '[data-testid="export-reminder"]')).resolves.toMatch(/No Book file downloaded yet/);

    // Opening a Book file: that file is a copy of the Book now, so the rail counts from it.
    await page.locator('rb-book-menu input[type="file"]').setInputFiles({ name: 'demo.rungbook.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(demo)) });
    await confirm(page, 'Replace with the file');
    await page.locator('[data-testid="notice"]', { hasText: 'Opened demo.rungbook.json' }).waitFor();
    await saved(page);
    await expect(text(page, '[data-testid="book-name"]')).resolves.toContain(demo.settings.bookName);
    await expect(text(page, '[data-testid="export-reminder"]')).resolves.toBe('Last Book file today.');
    await expect(family.getByTestId('undo').isDisabled()).resolves.toBe(true);
    await page.reload();
    await page.locator('[data-testid="export-reminder"]', { hasText: 'Last Book file today' }).waitFor();
    expect(errors).toEqual([]);
  });

  it('starts the Export page on the run last opened on the Runs page', async () => {
    const { page, errors } = await app.open('#/runs', { ready: '[data-testid="runs-table"]' });
    const runs = [...demo.runs].sort((a, b) => a.dateWanted.localeCompare(b.dateWanted));
    const later = runs[runs.length - 1]!;
    const sooner = runs[0]!;
    const open = async (name: string): Promise<void> => {
      await railTo(page, '#/runs');
      await pageLoaded(page, 'Runs');
      await page.locator('[data-testid="runs-table"] button.quiet', { hasText: name }).click();
      await page.locator('[data-testid="runs-table"] button[aria-pressed="true"]', { hasText: name }).waitFor();
    };
    const exported = async (): Promise<string> => {
      await railTo(page, '#/export');
      await pageLoaded(page, 'Export');
      await page.locator('#x-run').waitFor();
      return page.locator('#x-run').inputValue();
    };
    // With no run opened yet, the run the Runs page shows first: the one wanted soonest.
    await expect(exported()).resolves.toBe(sooner.id);
    await open(later.name);
    await expect(exported()).resolves.toBe(later.id);
    await open(sooner.name);
    await expect(exported()).resolves.toBe(sooner.id);
    expect(errors).toEqual([]);
  });

  it('on Compare, chooses none with "None", compares the ticked variants at any run size, and shows money to the cent', async () => {
    const { page, errors } = await app.open('#/compare', { viewport: WIDE_VIEWPORT, ready: '[data-testid="compare-table"]' });
    const choices = page.locator('[data-testid="compare-choices"] input[type="checkbox"]');
    const compare = page.locator('rb-compare-page');
    await compare.getByRole('button', { name: 'None', exact: true }).click();
    await page.locator('[data-testid="compare-none"]').waitFor();
    await expect(choices.evaluateAll((cs) => cs.filter((c) => (c as HTMLInputElement).checked).length)).resolves.toBe(0);
    await expect(page.locator('[data-testid="compare-table"]').count()).resolves.toBe(0);

    // Tick two variants that are not the first two: the difference section offers just those.
    const codes = demo.variants.map((v) => v.code);
    const ticked = [...demo.variants].slice(-2);
    for (const v of ticked) await page.locator('[data-testid="compare-choices"] label', { hasText: v.code }).locator('input').check();
    await page.locator('[data-testid="difference-table"]').waitFor();
    await compareFigures(page);
    const diff = page.locator('rb-compare-difference');
    const offered = async (label: string): Promise<string[]> => (await diff.getByLabel(label, { exact: true }).locator('option').allTextContents()).map(readerText);
    const tickedCodes = ticked.map((v) => v.code).sort();
    expect(codes.length).toBeGreaterThan(2);
    expect((await offered('variant A')).sort()).toEqual(tickedCodes);
    expect((await offered('variant B')).sort()).toEqual(tickedCodes);
    const [a, b] = await Promise.all(['variant A', 'variant B'].map((l) => diff.getByLabel(l, { exact: true }).inputValue()));
    expect(new Set([a, b])).toEqual(new Set(ticked.map((v) => v.id)));

    // Any run size, typed beside the Book's run sizes.
    const before = await text(page, '[data-testid="difference-total"]');
    await diff.getByTestId('difference-run').fill('3700');
    await diff.getByTestId('difference-run').press('Enter');
    await diff.locator('p.why', { hasText: 'a run of 3,700 units' }).waitFor();
    await compareFigures(page);
    await expect(diff.getByLabel('run size', { exact: true }).inputValue()).resolves.toBe('3700');
    expect(await text(page, '[data-testid="difference-total"]')).toMatch(/^[+−]?\d[\d,]*\.\d\d$/);
    await diff.getByLabel('run size', { exact: true }).selectOption(String(demo.settings.runSizes[0]));
    await diff.locator('p.why', { hasText: `a run of ${demo.settings.runSizes[0]!.toLocaleString('en-GB')} units` }).waitFor();
    await compareFigures(page);
    expect(before).toMatch(/^[+−]?\d[\d,]*\.\d\d$/);

    // Money to the cent as on other pages; a line's part cost per unit keeps four decimals.
    const costs = (await page.locator('[data-testid="unit-cost"]').allTextContents()).map((t) => readerText(t).replace('▼', '').trim());
    expect(costs.length).toBeGreaterThan(0);
    for (const c of costs) expect(c).toMatch(/^\d[\d,]*\.\d\d$/);
    const line = page.locator('[data-testid="difference-table"] tr[data-line] td.num');
    if ((await line.count()) > 0) expect(readerText(await line.first().textContent())).toMatch(/^\d[\d,]*\.\d{2,4}$/);
    expect(errors).toEqual([]);
  });

  it('shows a variant’s unit cost with the same text on the Runs page (whose totals the run sheet prints) and on Compare', async () => {
    const run = demo.runs.find((r) => !r.frozen && demo.settings.runSizes.includes(r.quantity))!;
    const variant = demo.variants.find((v) => v.id === run.variantId)!;
    const labels = costedTotalLabels(demo.settings.baseCurrency, demo.settings.marginPct);
    const { page, errors } = await app.open('#/runs', { viewport: WIDE_VIEWPORT, ready: '[data-testid="runs-table"]' });
    await page.getByRole('button', { name: run.name, exact: true }).click();
    await page.locator('rb-run-detail h2', { hasText: `Run ${run.name}` }).waitFor();
    const row = page.locator('[data-testid="run-totals"] tr', { hasText: labels.unitCost });
    const onRuns = readerText(await row.locator('td.num').textContent()).trim();
    expect(onRuns).toMatch(/^\d[\d,]*\.\d\d$/);

    await railTo(page, '#/compare');
    await pageLoaded(page, 'Compare');
    const choice = page.locator('[data-testid="compare-choices"] label', { hasText: variant.code }).locator('input');
    if (!(await choice.isChecked())) await choice.check();
    await compareFigures(page);
    const cell = page.locator(`[data-testid="unit-cost"][data-variant="${variant.code}"][data-run="${run.quantity}"]`);
    const onCompare = readerText(await cell.textContent()).replace('▼', '').trim();
    expect(onCompare).toBe(onRuns);
    expect(errors).toEqual([]);
  });

  it('keeps nothing of a replaced Book in storage: each empty/open cycle leaves exactly the opened file’s records', async () => {
    const { page, errors } = await app.open('#/family', { ready: '[data-testid="family-table"] tbody tr >> nth=0' });
    /** Records in each object store of the Book's database, as IndexedDB holds them. */
    const stored = (): Promise<Record<string, number>> =>
      page.evaluate(async () => {
        const db = await new Promise<IDBDatabase>((ok, fail) => {
          const r = indexedDB.open('rungbook');
          r.onsuccess = () => ok(r.result);
          r.onerror = () => fail(r.error);
        });
        const names = [...db.objectStoreNames];
        const tx = db.transaction(names, 'readonly');
        const counts = await Promise.all(
          names.map((n) => new Promise<[string, number]>((ok) => (tx.objectStore(n).count().onsuccess = (e) => ok([n, (e.target as IDBRequest<number>).result])))),
        );
        db.close();
        return Object.fromEntries(counts);
      });
    const first = await stored();
    expect(first.quotes).toBe(bucketQuotes(demo.quotes).length);
    let opened: Record<string, number> | undefined;
    for (let cycle = 0; cycle < 2; cycle++) {
      await page.getByRole('button', { name: 'Start an empty Book…' }).click();
      await confirm(page, 'Empty the Book');
      await saved(page);
      const empty = await stored();
      for (const c of ['quotes', 'parts', 'suppliers', 'variants', 'runs', 'buildLines']) expect(empty[c], c).toBe(0);
      await page.locator('rb-book-menu input[type="file"]').setInputFiles({ name: 'demo.rungbook.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(demo)) });
      await confirm(page, 'Replace with the file');
      await saved(page);
      const now = await stored();
      // The file's records only (its checks are its own; the demo the app starts with adds the built-in ones).
      expect({ ...now, checks: 0 }).toEqual({ ...first, checks: 0 });
      if (opened) expect(now).toEqual(opened);
      opened = now;
    }
    expect(errors).toEqual([]);
  });
});
