// Two tabs on one Book in real Chromium: an edit saved in one appears in the other, and a save made from an older
// copy of a record is refused with a message and a way to reload, never written over the newer one.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { AppUnderTest } from './harness.ts';

const baseUrl = inject('baseUrl');
const supplier = [...demoBook().suppliers].sort((a, b) => a.name.localeCompare(b.name))[0]!;

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

function row(page: Page) {
  return page.locator(`[data-testid="suppliers-table"] tbody tr[data-id="${supplier.id}"]`);
}

async function editNotes(page: Page, notes: string): Promise<void> {
  await page.locator('#f-notes').fill(notes);
  await page.getByRole('button', { name: 'Save the supplier' }).click();
}

describe('two tabs on one Book', () => {
  it('shows an edit from one tab in the other and refuses a save from a stale copy', async () => {
    const session = await app.start();
    const first = session.page;
    await first.goto(`${baseUrl}#/suppliers`);
    await row(first).waitFor();
    const second = await session.context.newPage();
    await second.goto(`${baseUrl}#/suppliers`);
    await row(second).waitFor();

    // The second tab opens the supplier for editing, then the first tab saves a change to it.
    await row(second).getByRole('button', { name: 'edit' }).click();
    await row(first).getByRole('button', { name: 'edit' }).click();
    await editNotes(first, 'Notes saved in the first tab');
    await row(first).filter({ hasText: 'Notes saved in the first tab' }).waitFor();

    // The second tab's table follows without a reload.
    await row(second).filter({ hasText: 'Notes saved in the first tab' }).waitFor();

    // Saving the form the second tab opened before that edit is refused and says how to recover.
    await editNotes(second, 'Notes from the stale form');
    const problem = second.locator('[data-testid="save-problem"]');
    await problem.waitFor();
    await expect(problem.textContent()).resolves.toMatch(/changed in another tab or window/);
    await expect(row(second).textContent()).resolves.toContain('Notes saved in the first tab');

    // Starting again loads the stored version into the form; a save from there goes through and reaches the first tab.
    await second.getByRole('button', { name: 'Start again from the saved version' }).click();
    await problem.waitFor({ state: 'detached' });
    await expect(second.locator('#f-notes').inputValue()).resolves.toBe('Notes saved in the first tab');
    await editNotes(second, 'Second tab, after starting again');
    await row(second).filter({ hasText: 'Second tab, after starting again' }).waitFor();
    await row(first).filter({ hasText: 'Second tab, after starting again' }).waitFor();

    await second.reload();
    await row(second).waitFor();
    await expect(row(second).textContent()).resolves.toContain('Second tab, after starting again');
    await expect(row(second).textContent()).resolves.not.toContain('stale form');
    expect(session.errors).toEqual([]);
    expect(session.foreignRequests).toEqual([]);
  });

  it('stops saving and asks to reload when another tab upgrades the Book storage', async () => {
    const session = await app.start();
    const first = session.page;
    await first.goto(`${baseUrl}#/suppliers`);
    await row(first).waitFor();
    // Another tab of the same site opens the Book database at a higher version, as a newer Rungbook would.
    const other = await session.context.newPage();
    await other.goto(`${baseUrl}manifest.webmanifest`);
    const upgraded = await other.evaluate(
      () =>
        new Promise<number>((resolve, reject) => {
          const request = indexedDB.open('rungbook', 1_000_000);
          request.onsuccess = () => {
            const version = request.result.version;
            request.result.close();
            resolve(version);
          };
          request.onerror = () => reject(new Error(String(request.error)));
        }),
    );
    expect(upgraded).toBe(1_000_000);
    const banner = first.locator('[role="alert"]', { hasText: 'upgraded its storage' });
    await banner.waitFor();
    await expect(banner.getByRole('button', { name: 'Reload this tab' }).count()).resolves.toBe(1);

    // A save now is refused with that reason instead of failing somewhere out of sight.
    await row(first).getByRole('button', { name: 'edit' }).click();
    await editNotes(first, 'after the upgrade');
    await first.locator('rb-suppliers-page .notice', { hasText: 'reload this tab' }).waitFor();
    await expect(row(first).textContent()).resolves.not.toContain('after the upgrade');
    expect(session.errors).toEqual([]);
  });
});
