// Storage running out in real Chromium: a write that fails for want of space part way through its transaction is
// refused whole with the storage message, and the Book in memory and in IndexedDB stays exactly as it was.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { Book } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { serializeBook } from '../../src/io/book-file.ts';
import { AppUnderTest, saved } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

/** The demo Book with many extra parts carrying long notes. */
function bigBook(): Book {
  const book = demoBook();
  const filler = 'lot traceability note '.repeat(200);
  const extra = Array.from({ length: 1500 }, (_, i) => ({
    ...book.parts[0]!,
    id: `part_bulk_${i}`,
    rev: 0,
    mpn: `ZZ-BULK-${String(i).padStart(5, '0')}`,
    notes: `${i} ${filler}`,
  }));
  return { ...book, parts: [...book.parts, ...extra] };
}


/**
 * Arms the page's real IndexedDB to fail like a full disk: after `after` writes (put or add), every write throws
 * the browser's QuotaExceededError. Chromium's debugging protocol can lower the reported quota (Storage.overrideQuotaForOrigin),
 * but here IndexedDB writes went on past it, so the failure is injected at the put call instead, in the middle of a
 * real Chromium transaction.
 */
async function failPutsAfter(page: Page, after: number): Promise<void> {
  await page.evaluate((limit) => {
    const proto = IDBObjectStore.prototype;
    let calls = 0;
    for (const name of ['put', 'add'] as const) {
      const original = proto[name];
      proto[name] = function write(this: IDBObjectStore, ...args: Parameters<IDBObjectStore['put']>): IDBRequest<IDBValidKey> {
        calls += 1;
        if (calls > limit) throw new DOMException('The quota has been exceeded.', 'QuotaExceededError');
        return original.apply(this, args);
      };
    }
  }, after);
}

/** Adds a part through the Parts page's form. */
async function addPart(page: Page, mpn: string, description: string): Promise<void> {
  await page.getByRole('button', { name: 'Add a part' }).click();
  await page.locator('#f-mpn').fill(mpn);
  await page.locator('#f-maker').fill('Invented Test Works');
  await page.locator('#f-description').fill(description);
  await page.locator('#f-kind').selectOption('resistor');
  await page.locator('#f-package').fill('0603');
  await page.getByRole('button', { name: 'Add the part' }).click();
}

describe('storage quota reached in Chromium', () => {
  it('refuses a Book file when the quota runs out part way and keeps the Book as it was', async () => {
    const { page, errors } = await app.open('#/parts');
    await page.locator('[data-testid="parts-table"]').waitFor();
    await saved(page);

    // Replacing the Book clears every store first, then puts the new records: failing at the 41st put leaves the
    // transaction with the old Book cleared and part of the new one written, which must all be rolled back.
    await failPutsAfter(page, 40);
    const big = bigBook();
    expect(big.parts.length).toBeGreaterThan(40);
    await page.locator('rb-book-menu input[type="file"]').setInputFiles({
      name: 'big.rungbook.json',
      mimeType: 'application/json',
      buffer: Buffer.from(serializeBook(big)),
    });
    await page.getByRole('button', { name: 'Replace with the file' }).click();
    const notice = page.locator('[data-testid="notice"]', { hasText: 'big.rungbook.json was not opened' });
    await notice.waitFor();
    await expect(notice.textContent()).resolves.toMatch(/no more storage space for this Book, so nothing of this change was saved/);
    await expect(page.locator('rb-save-state [data-state="failed"]').count()).resolves.toBe(1);
    expect(await page.locator('[data-testid="parts-table"] tbody tr').count()).toBe(demo.parts.length);

    // A reload reads the stored Book (and drops the injected failure): it is the Book from before, whole.
    await page.reload();
    await page.locator('[data-testid="parts-table"]').waitFor();
    expect(await page.locator('[data-testid="parts-table"] tbody tr').count()).toBe(demo.parts.length);
    await expect(page.locator('[data-testid="book-name"]').textContent()).resolves.toContain(demo.settings.bookName);
    const stored = await page.evaluate(
      () =>
        new Promise<number>((resolve, reject) => {
          const open = indexedDB.open('rungbook');
          open.onsuccess = () => {
            const req = open.result.transaction('parts').objectStore('parts').count();
            req.onsuccess = () => {
              open.result.close();
              resolve(req.result);
            };
            req.onerror = () => reject(req.error);
          };
          open.onerror = () => reject(open.error);
        }),
    );
    expect(stored).toBe(demo.parts.length);

    // A single new part whose write fails is refused with the same message and is not kept.
    await failPutsAfter(page, 0);
    await addPart(page, 'ZZ-NO-ROOM', 'refused for want of space');
    await page.locator('[data-testid="save-problem"]', { hasText: 'no more storage space' }).waitFor();
    expect(await page.locator('[data-testid="parts-table"] tbody tr', { hasText: 'ZZ-NO-ROOM' }).count()).toBe(0);
    await page.reload();
    await page.locator('[data-testid="parts-table"]').waitFor();
    expect(await page.locator('[data-testid="parts-table"] tbody tr').count()).toBe(demo.parts.length);
    expect(errors).toEqual([]);
  });
});

describe('a first start whose demo Book cannot be stored', () => {
  it('shows the demo Book, says it is not stored, refuses every edit, and a reload starts afresh', async () => {
    const { page, errors } = await app.start();
    // Only on the address with `?noroom`: storing the demo Book begins by clearing each store (the database's own
    // creation clears nothing), and that write fails as on a full disk.
    await page.addInitScript(() => {
      if (!location.search.includes('noroom')) return;
      IDBObjectStore.prototype.clear = function clear(): IDBRequest<undefined> {
        throw new DOMException('The quota has been exceeded.', 'QuotaExceededError');
      };
    });
    await page.goto(`${baseUrl}?noroom#/parts`);
    await page.locator('[data-testid="parts-table"]').waitFor();
    expect(await page.locator('[data-testid="parts-table"] tbody tr').count()).toBe(demo.parts.length);
    const problem = page.locator('[data-testid="save-problem"]');
    await problem.waitFor();
    await expect(problem.textContent()).resolves.toMatch(/the demo Book could not be stored in this browser, so this tab keeps no change until it is reloaded\. .*no more storage/);
    await expect(page.locator('rb-save-state [data-state="failed"]').count()).resolves.toBe(1);

    await addPart(page, 'ZZ-NOT-KEPT', 'refused: the Book is not stored');
    await page.locator('rb-parts-page p.notice[role="alert"]', { hasText: 'the demo Book could not be stored' }).waitFor();
    expect(await page.locator('[data-testid="parts-table"] tbody tr', { hasText: 'ZZ-NOT-KEPT' }).count()).toBe(0);

    // Nothing was stored: the next start is a first start again, and stores the demo Book.
    await page.goto(`${baseUrl}#/parts`);
    await page.locator('[data-testid="parts-table"]').waitFor();
    await saved(page);
    expect(await page.locator('[data-testid="parts-table"] tbody tr').count()).toBe(demo.parts.length);
    expect(await page.locator('[data-testid="parts-table"] tbody tr', { hasText: 'ZZ-NOT-KEPT' }).count()).toBe(0);
    expect(errors).toEqual([]);
  });
});
