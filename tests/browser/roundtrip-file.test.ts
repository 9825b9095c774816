// The whole sample Book (every optional field of every record set) opened in the app through the Book menu, kept in
// the browser's IndexedDB across a reload, and downloaded again reads back strictly equal to the file it came from.
import { readFileSync } from 'node:fs';
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { parseBookFile, serializeBook } from '../../src/io/book-file.ts';
import type { Book } from '../../src/domain/book.ts';
import { sampleBook } from '../fixtures/sample-book.ts';
import { AppUnderTest } from './harness.ts';

const app = new AppUnderTest(inject('baseUrl'));
afterEach(() => app.close());

async function download(page: Page): Promise<Book> {
  const [file] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: 'Download this Book as a file' }).click()]);
  const parsed = parseBookFile(readFileSync((await file.path())!, 'utf8'));
  if (!parsed.ok) throw new Error(`the downloaded Book does not read: ${JSON.stringify(parsed.problems)}`);
  return parsed.book;
}

describe('Book file round trip in the app', () => {
  it('opens the full sample Book file and downloads it again, strictly equal, also after a reload', async () => {
    const { page, errors, foreignRequests } = await app.open('#/family');
    await page.locator('[data-testid="family-table"]').waitFor();
    const original = sampleBook();
    await page.locator('rb-book-menu input[type="file"]').setInputFiles({
      name: 'sample.rungbook.json',
      mimeType: 'application/json',
      buffer: Buffer.from(serializeBook(original, { savedAt: '2025-03-02T09:30:00.000Z' })),
    });
    const dialog = page.locator('rb-book-menu dialog[open]');
    await dialog.waitFor();
    await dialog.getByRole('button', { name: 'Replace with the file' }).click();
    await page.locator('[data-testid="notice"]', { hasText: 'Opened sample.rungbook.json' }).waitFor();

    // Opening the file counts as having this Book as a file: the last Book file is the one just opened. Apart from
    // that date, the download is the file.
    const first = await download(page);
    expect(first.settings.lastExportAt).not.toBe(original.settings.lastExportAt);
    expect(Date.now() - Date.parse(first.settings.lastExportAt!)).toBeLessThan(10 * 60_000);
    expect({ ...first, settings: { ...first.settings, lastExportAt: original.settings.lastExportAt } }).toStrictEqual(original);
    expect(first.buildLines[0]!.pinnedSupplierId).toBe('sup_a');

    // The download is remembered in the settings (one revision up); every record is read back from IndexedDB.
    await page.reload();
    await page.locator('[data-testid="export-reminder"]', { hasText: 'Last Book file today' }).waitFor();
    const second = await download(page);
    const { lastExportAt, rev, ...settings } = second.settings;
    expect(lastExportAt).not.toBe(original.settings.lastExportAt);
    expect(rev).toBe(original.settings.rev + 1);
    expect({ ...second, settings: { ...settings, lastExportAt: original.settings.lastExportAt, rev: original.settings.rev } }).toStrictEqual(original);
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });
});
