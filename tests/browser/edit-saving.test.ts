// Edits shown while they save, in real Chromium: a build line or quote edit closes its form and shows in its row at
// once, marked as saving, while the Book stores it; a save that fails puts the row back as stored and opens the form
// again with the edit as typed and the reason, and nothing is kept across a reload.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { DEFAULT_DB_NAME } from '../../src/ui/book-service.ts';
import { AppUnderTest, WIDE_VIEWPORT, readerText, saved, text } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

/**
 * Holds the Book's writes: a read-write transaction over every store of the Book's database, kept busy until
 * `release(page)`, so the app's next write waits behind it (IndexedDB runs overlapping read-write transactions in turn).
 */
async function holdWrites(page: Page): Promise<void> {
  await page.evaluate(async (name) => {
    const db = await new Promise<IDBDatabase>((resolve, reject) => {
      const r = indexedDB.open(name);
      r.onsuccess = () => resolve(r.result);
      r.onerror = () => reject(r.error);
    });
    const stores = [...db.objectStoreNames];
    const tx = db.transaction(stores, 'readwrite');
    const store = tx.objectStore(stores[0]!);
    const w = window as unknown as { __holdWrites?: boolean };
    w.__holdWrites = true;
    const spin = (): void => {
      if (w.__holdWrites) store.count().onsuccess = spin;
    };
    spin();
    tx.oncomplete = () => db.close();
  }, DEFAULT_DB_NAME);
}

function release(page: Page): Promise<void> {
  return page.evaluate(() => void ((window as unknown as { __holdWrites?: boolean }).__holdWrites = false));
}

/** Makes every later IndexedDB write throw as on a full disk (the save is refused whole). */
async function failWrites(page: Page): Promise<void> {
  await page.evaluate(() => {
    const proto = IDBObjectStore.prototype;
    for (const name of ['put', 'add'] as const) {
      proto[name] = function write(): IDBRequest<IDBValidKey> {
        throw new DOMException('The quota has been exceeded.', 'QuotaExceededError');
      };
    }
  });
}

const line = demo.buildLines.find((l) => /^\d+$/.test(l.qtyRule) && l.appliesWhen === '' && l.partId !== undefined)!;
const more = String(Number(line.qtyRule) + 1);
const lineRow = (page: Page) => page.locator(`[data-testid="build-lines"] tbody tr[data-id="${line.id}"]`);
const qtyShown = (page: Page) => lineRow(page).locator('td.rule').nth(1).locator('code').first().textContent();

async function editQuantity(page: Page): Promise<void> {
  await lineRow(page).getByRole('button', { name: 'edit' }).click();
  await page.locator('#f-qtyRule input').fill(more);
  await page.getByRole('button', { name: 'Save the line' }).click();
}

const grid = '[data-testid="family-table"]';
const first = [...demo.variants].sort((a, b) => a.code.localeCompare(b.code))[0]!;

/** The Family grid's cell of the first variant (by code) in the column `key`. */
async function gridCell(page: Page, key: string) {
  const keys = await page.locator(`${grid} thead th`).evaluateAll((ths) => ths.map((th) => th.getAttribute('data-key')));
  const codes = (await page.locator(`${grid} tbody th`).allTextContents()).map(readerText);
  return page.locator(`${grid} [data-r="${codes.indexOf(first.code)}"][data-c="${keys.indexOf(key)}"]`);
}

/** Types `value` into the first variant's load_w cell and keeps it with Enter. */
async function editLoad(page: Page, value: string): Promise<void> {
  const target = await gridCell(page, 'load_w');
  await target.click();
  await page.keyboard.press('Enter');
  await page.keyboard.press('Control+A');
  await page.keyboard.type(value);
  await page.keyboard.press('Enter');
}

describe('edits shown while they save', () => {
  it('shows a build line edit in its row at once, marked as saving, until the Book has stored it', async () => {
    const { page, errors } = await app.open('#/build', { viewport: WIDE_VIEWPORT, ready: '[data-testid="build-lines"]' });
    await saved(page);
    expect(await qtyShown(page)).toBe(line.qtyRule);
    await holdWrites(page);
    await editQuantity(page);

    await lineRow(page).locator('[data-testid="line-status"]', { hasText: 'saving…' }).waitFor();
    expect(await qtyShown(page)).toBe(more);
    expect(await page.locator('#line-form-h').count()).toBe(0);
    // No second edit of the row while its save is under way.
    expect(await lineRow(page).getByRole('button', { name: 'edit' }).count()).toBe(0);

    await release(page);
    await lineRow(page).getByRole('button', { name: 'edit' }).waitFor();
    await saved(page);
    expect(await qtyShown(page)).toBe(more);
    await expect(text(page, `[data-testid="build-lines"] tr[data-id="${line.id}"] [data-testid="line-status"]`)).resolves.not.toContain('saving');
    await page.reload();
    await lineRow(page).waitFor();
    expect(await qtyShown(page)).toBe(more);
    expect(errors).toEqual([]);
  });

  it('shows a Family grid edit in its cell at once, marked as saving, until the Book has stored it', async () => {
    const { page, errors } = await app.open('#/family');
    await page.locator(`${grid} tbody tr`).first().waitFor();
    await saved(page);
    const target = await gridCell(page, 'load_w');
    expect(readerText(await target.textContent())).toBe(`${first.params.load_w} W`);
    await holdWrites(page);
    await editLoad(page, '72');
    await expect.poll(async () => readerText(await target.textContent())).toBe('72 W');
    await expect(target.getAttribute('class')).resolves.toMatch(/\btone-saving\b/);

    await release(page);
    await saved(page);
    await expect.poll(async () => target.getAttribute('class')).not.toMatch(/\btone-saving\b/);
    expect(readerText(await target.textContent())).toBe('72 W');
    await page.reload();
    await page.locator(`${grid} tbody tr`).first().waitFor();
    expect(readerText(await (await gridCell(page, 'load_w')).textContent())).toBe('72 W');
    expect(errors).toEqual([]);
  });

  it('puts a Family grid cell back as stored, with the reason, when its save fails', async () => {
    const { page, errors } = await app.open('#/family');
    await page.locator(`${grid} tbody tr`).first().waitFor();
    await saved(page);
    const target = await gridCell(page, 'load_w');
    await holdWrites(page);
    await failWrites(page);
    await editLoad(page, '72');
    await expect.poll(async () => readerText(await target.textContent())).toBe('72 W');

    await release(page);
    const notice = page.locator('[data-testid="family-notice"][role="alert"]');
    await notice.waitFor();
    await expect(notice.textContent()).resolves.toMatch(/storage space/);
    await expect.poll(async () => readerText(await target.textContent())).toBe(`${first.params.load_w} W`);
    await expect(target.getAttribute('class')).resolves.not.toMatch(/\btone-saving\b/);
    await page.reload();
    await page.locator(`${grid} tbody tr`).first().waitFor();
    expect(readerText(await (await gridCell(page, 'load_w')).textContent())).toBe(`${first.params.load_w} W`);
    expect(errors).toEqual([]);
  });

  it('puts a build line back as stored and opens its form again with the reason when the save fails', async () => {
    const { page, errors } = await app.open('#/build', { viewport: WIDE_VIEWPORT, ready: '[data-testid="build-lines"]' });
    await saved(page);
    await holdWrites(page);
    await failWrites(page);
    await editQuantity(page);
    await lineRow(page).locator('[data-testid="line-status"]', { hasText: 'saving…' }).waitFor();
    expect(await qtyShown(page)).toBe(more);

    await release(page);
    const notice = page.locator('section[aria-labelledby="line-form-h"] p.notice[role="alert"]');
    await notice.waitFor();
    await expect(notice.textContent()).resolves.toMatch(/storage space/);
    // The form holds the edit as typed; the row is the line as stored.
    await expect(page.locator('#f-qtyRule input').inputValue()).resolves.toBe(more);
    await expect(page.locator('#line-form-h').textContent()).resolves.toContain(line.designators);
    expect(await qtyShown(page)).toBe(line.qtyRule);
    await expect(lineRow(page).locator('[data-testid="line-status"]').textContent()).resolves.not.toContain('saving');

    await page.reload();
    await lineRow(page).waitFor();
    expect(await qtyShown(page)).toBe(line.qtyRule);
    expect(errors).toEqual([]);
  });

  it('puts a quote back as stored and opens its form again with the reason when the save fails', async () => {
    const q = demo.quotes.find((x) => x.id === 'quote_kelvaro_zener_12v_05')!;
    const { page, errors } = await app.open('#/quotes', { ready: '[data-testid="quotes-table"]' });
    await saved(page);
    const row = page.locator(`[data-testid="quotes-table"] tbody tr[data-id="${q.id}"]`);
    const before = await text(page, `[data-testid="quotes-table"] tr[data-id="${q.id}"] td.breaks`);
    await row.getByRole('button', { name: 'edit' }).click();
    await page.locator('#f-break-price-0').fill('0.0777');
    await holdWrites(page);
    await failWrites(page);
    await page.getByRole('button', { name: 'Save the quote' }).click();

    // At once: the form closes and the row shows the new price, marked as saving.
    await page.locator('rb-quote-form').waitFor({ state: 'detached' });
    await row.locator('td.status-cell', { hasText: 'saving…' }).waitFor();
    await expect(text(page, `[data-testid="quotes-table"] tr[data-id="${q.id}"] td.breaks`)).resolves.toContain('@ 0.0777');

    await release(page);
    const notice = page.locator('rb-quote-form p.notice[role="alert"]');
    await notice.waitFor();
    await expect(notice.textContent()).resolves.toMatch(/storage space/);
    await expect(page.locator('#f-break-price-0').inputValue()).resolves.toBe('0.0777');
    await expect(text(page, `[data-testid="quotes-table"] tr[data-id="${q.id}"] td.breaks`)).resolves.toBe(before);
    await expect(row.locator('td.status-cell').textContent()).resolves.not.toContain('saving');

    await page.reload();
    await row.waitFor();
    await expect(text(page, `[data-testid="quotes-table"] tr[data-id="${q.id}"] td.breaks`)).resolves.toBe(before);
    expect(errors).toEqual([]);
  });
});
