// Two tabs on one Book in real Chromium: an edit in one appears in the other; a save made from an older revision is
// refused with a message and a way to reload, never written over; a schema upgrade in a new tab stops the old one.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { AppUnderTest, saved } from './harness.ts';
import type { Session } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

async function twoTabs(hash: string): Promise<{ a: Page; b: Page; s: Session }> {
  const ready = '[data-testid="parts-table"]';
  const s = await app.open(hash, { ready });
  const b = await s.context.newPage();
  await app.goto(b, hash, ready);
  return { a: s.page, b, s };
}

function partRow(page: Page, id: string) {
  return page.locator(`[data-testid="parts-table"] tbody tr[data-id="${id}"]`);
}

describe('several tabs on one Book', () => {
  it('shows a part added in one tab in the other without a reload', async () => {
    const { a, b, s } = await twoTabs('#/parts');
    await a.getByRole('button', { name: 'Add a part' }).click();
    await a.locator('#f-mpn').fill('ZZ-TAB-SHARED');
    await a.locator('#f-maker').fill('Invented Test Works');
    await a.locator('#f-description').fill('added in the first tab');
    await a.locator('#f-kind').selectOption('capacitor');
    await a.locator('#f-value').fill('2n2');
    await a.locator('#f-package').fill('0805');
    await a.getByRole('button', { name: 'Add the part' }).click();
    await saved(a);

    const inB = b.locator('[data-testid="parts-table"] tbody tr', { hasText: 'ZZ-TAB-SHARED' });
    await inB.waitFor();
    // 2n2 is 2.2 nF (IEC 60062 RKM code).
    await expect(inB.textContent()).resolves.toMatch(/2\.2 nF/);
    expect(await b.locator('[data-testid="parts-table"] tbody tr').count()).toBe(demo.parts.length + 1);
    await b.locator('rb-save-state .storage', { hasText: 'Updated from another tab' }).waitFor();
    expect(s.errors).toEqual([]);
    expect(s.foreignRequests).toEqual([]);
  });

  it('refuses a save made from an older revision, says why and reloads on request', async () => {
    const { a, b, s } = await twoTabs('#/parts');
    const part = demo.parts[0]!;
    // The second tab opens the part first, so its form holds the revision as it was then.
    await partRow(b, part.id).getByRole('button', { name: 'edit' }).click();
    await b.locator('#f-description').fill('edit from the second tab');

    await partRow(a, part.id).getByRole('button', { name: 'edit' }).click();
    await a.locator('#f-description').fill('edit from the first tab');
    await a.getByRole('button', { name: 'Save the part' }).click();
    await saved(a);
    await partRow(b, part.id).filter({ hasText: 'edit from the first tab' }).waitFor();

    await b.getByRole('button', { name: 'Save the part' }).click();
    const problem = b.locator('[data-testid="save-problem"]');
    await problem.waitFor();
    await expect(problem.textContent()).resolves.toMatch(/changed in another tab or window since you opened it/);
    await expect(b.locator('rb-save-state [data-state="failed"]').count()).resolves.toBe(1);
    // Nothing of the second tab's edit was written.
    await expect(partRow(a, part.id).textContent()).resolves.toContain('edit from the first tab');

    await problem.getByRole('button', { name: 'Reload the Book' }).click();
    await problem.waitFor({ state: 'detached' });
    await saved(b);
    await expect(partRow(b, part.id).textContent()).resolves.toContain('edit from the first tab');
    await b.reload();
    await expect(partRow(b, part.id).textContent()).resolves.toContain('edit from the first tab');
    expect(s.errors).toEqual([]);
  });

  it('stops saving and asks to reload when another tab opens the Book with a newer schema', async () => {
    const { a, s } = await twoTabs('#/parts');
    // A third tab plays a newer Rungbook: it opens the Book database one version higher.
    const newer = await s.context.newPage();
    await newer.goto(`${baseUrl}manifest.webmanifest`);
    const upgraded = await newer.evaluate(async () => {
      const info = (await indexedDB.databases()).find((d) => d.name === 'rungbook');
      const version = (info?.version ?? 1) + 1;
      return new Promise<number>((resolve, reject) => {
        const req = indexedDB.open('rungbook', version);
        req.onupgradeneeded = () => undefined;
        req.onsuccess = () => {
          req.result.close();
          resolve(version);
        };
        req.onerror = () => reject(req.error);
      });
    });
    expect(upgraded).toBeGreaterThan(1);

    const banner = a.locator('main .banner', { hasText: 'upgraded its storage' });
    await banner.waitFor();
    await expect(banner.getByRole('button', { name: 'Reload this tab' }).count()).resolves.toBe(1);

    // A change attempted now is refused with the reason, and nothing is written.
    await a.getByRole('button', { name: 'Add a part' }).click();
    await a.locator('#f-mpn').fill('ZZ-AFTER-UPGRADE');
    await a.locator('#f-maker').fill('Invented Test Works');
    await a.locator('#f-description').fill('must not be saved');
    await a.locator('#f-kind').selectOption('resistor');
    await a.locator('#f-package').fill('0603');
    await a.getByRole('button', { name: 'Add the part' }).click();
    await a.locator('rb-parts-page .notice', { hasText: 'reload this tab before making changes' }).waitFor();
    expect(s.errors).toEqual([]);
  });
});
