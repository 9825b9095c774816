// The Book menu in real Chromium: download the Book as a file, refuse a bad Book file without changing anything,
// start an empty Book (which stays empty after a reload) and put the demo Book back, each asked first.
import { readFileSync } from 'node:fs';
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { parseBookFile } from '../../src/io/book-file.ts';
import { AppUnderTest, railTo } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

async function familyRows(page: Page): Promise<number> {
  await page.locator('rb-family-page section.sheet h2', { hasText: 'Variants' }).waitFor();
  return page.locator('[data-testid="family-table"] tbody tr').count();
}

async function confirm(page: Page, label: string): Promise<void> {
  const dialog = page.locator('rb-book-menu dialog[open]');
  await dialog.waitFor();
  await dialog.getByRole('button', { name: label }).click();
  await dialog.waitFor({ state: 'detached' }).catch(() => undefined);
  await page.locator('rb-book-menu dialog[open]').waitFor({ state: 'hidden' });
}

describe('Book menu', () => {
  it('downloads the whole Book as a Book file that reads back to the same records', async () => {
    const { page, errors } = await app.open('#/family');
    expect(await familyRows(page)).toBe(demo.variants.length);
    const [download] = await Promise.all([
      page.waitForEvent('download'),
      page.getByRole('button', { name: 'Download this Book as a file' }).click(),
    ]);
    expect(download.suggestedFilename()).toMatch(/\.rungbook\.json$/);
    const parsed = parseBookFile(readFileSync((await download.path())!, 'utf8'));
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    expect(parsed.book.variants.map((v) => v.code).sort()).toEqual(demo.variants.map((v) => v.code).sort());
    expect(parsed.book.parts.length).toBe(demo.parts.length);
    expect(parsed.book.quotes.length).toBe(demo.quotes.length);
    // The download is remembered, so the reminder to keep a Book file counts from now.
    await page.locator('[data-testid="export-reminder"]', { hasText: 'Last Book file today' }).waitFor();
    await page.reload();
    await page.locator('[data-testid="export-reminder"]', { hasText: 'Last Book file today' }).waitFor();
    expect(errors).toEqual([]);
  });

  it('refuses a Book file with problems, names where they are, and changes nothing', async () => {
    const { page, errors } = await app.open('#/family');
    expect(await familyRows(page)).toBe(demo.variants.length);
    // A quote pointing at a part that is not in the file: a dangling reference.
    const bad = structuredClone(demo);
    bad.quotes[0]!.partId = 'part_not_in_this_file';
    bad.variants = [];
    await page.locator('rb-book-menu input[type="file"]').setInputFiles({
      name: 'broken.rungbook.json',
      mimeType: 'application/json',
      buffer: Buffer.from(JSON.stringify(bad)),
    });
    const notice = page.locator('[data-testid="notice"]');
    await notice.waitFor();
    const text = (await notice.textContent()) ?? '';
    expect(text).toContain('broken.rungbook.json was not opened');
    expect(text).toContain('quotes[0].partId');
    expect(await familyRows(page)).toBe(demo.variants.length);
    await page.reload();
    expect(await familyRows(page)).toBe(demo.variants.length);
    expect(errors).toEqual([]);
  });

  it('starts an empty Book that stays empty after a reload, and puts the demo Book back', async () => {
    const { page, errors, foreignRequests } = await app.open('#/family');
    expect(await familyRows(page)).toBe(demo.variants.length);

    // Asking first: keeping things as they are changes nothing.
    await page.getByRole('button', { name: 'Start an empty Book…' }).click();
    await confirm(page, 'Keep things as they are');
    expect(await familyRows(page)).toBe(demo.variants.length);

    await page.getByRole('button', { name: 'Start an empty Book…' }).click();
    await confirm(page, 'Empty the Book');
    await page.locator('rb-family-page .empty', { hasText: 'No variants yet' }).waitFor();
    await page.reload();
    await page.locator('rb-family-page .empty', { hasText: 'No variants yet' }).waitFor();
    await railTo(page, '#/parts');
    await page.locator('rb-parts-page .empty', { hasText: 'No parts yet' }).waitFor();

    await page.getByRole('button', { name: 'Put the demo Book back…' }).click();
    await confirm(page, 'Load the demo Book');
    await railTo(page, '#/family');
    await page.locator('[data-testid="family-table"]').waitFor();
    expect(await familyRows(page)).toBe(demo.variants.length);
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });
});
