// The built app in real Chromium: it opens on the demo Book, keeps a part added through the form across a reload,
// refuses bad form input with a message beside the field, keeps the page across a reload, and stays on its own origin.
import { afterEach, describe, expect, inject, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import { PAGES } from '../../src/ui/pages.ts';
import { AppUnderTest, partRows, railTo, saved } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

describe('app shell with the Book in IndexedDB', () => {
  it('opens on the demo Book and shows its variants on the Family page with the mains caution', async () => {
    const { page, errors, foreignRequests } = await app.open('#/family');
    const code = demo.variants[0]!.code;
    await page.locator('[data-testid="family-table"] tbody th', { hasText: code }).first().waitFor();
    expect(await page.locator('[data-testid="family-table"] tbody tr').count()).toBe(demo.variants.length);
    await expect(page.locator('rb-mains-caution p').textContent()).resolves.toMatch(/can kill.*not a certification/s);
    await expect(page.locator('[data-testid="book-name"]').textContent()).resolves.toContain(demo.settings.bookName);
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });

  it('keeps a part added through the form after the page is reloaded', async () => {
    const { page, errors, foreignRequests } = await app.open('#/parts');
    const before = await partRows(page);
    expect(before).toBe(demo.parts.length);
    await page.getByRole('button', { name: 'Add a part' }).click();
    await page.locator('#f-mpn').fill('ZZ-TEST-4K7');
    await page.locator('#f-maker').fill('Invented Test Works');
    await page.locator('#f-description').fill('test resistor 4.7 kΩ');
    await page.locator('#f-kind').selectOption('resistor');
    await page.locator('#f-value').fill('4k7');
    await page.locator('#f-package').fill('0603');
    await page.locator('[id="f-rating_p_max"]').fill('100 mW');
    await page.getByRole('button', { name: 'Add the part' }).click();
    const row = page.locator('[data-testid="parts-table"] tbody tr', { hasText: 'ZZ-TEST-4K7' });
    await row.waitFor();
    await saved(page);
    expect(await partRows(page)).toBe(before + 1);

    await page.reload();
    await row.waitFor();
    expect(await partRows(page)).toBe(before + 1);
    // 4k7 is 4.7 kΩ (IEC 60062 RKM code) and 100 mW is 0.1 W (SI prefix m): shown back in engineering notation.
    await expect(row.textContent()).resolves.toMatch(/4\.7 kΩ/);
    await expect(row.textContent()).resolves.toMatch(/p_max 100 mW/);
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });

  it('shows bad part input beside its field and saves nothing', async () => {
    const { page, errors, foreignRequests } = await app.open('#/parts');
    const before = await partRows(page);
    const taken = demo.parts[0]!.mpn;
    await page.getByRole('button', { name: 'Add a part' }).click();
    await page.locator('#f-mpn').fill(taken.toLowerCase());
    await page.locator('#f-maker').fill('Invented Test Works');
    await page.locator('#f-kind').selectOption('capacitor');
    await page.locator('#f-value').fill('12 V');
    await page.getByRole('button', { name: 'Add the part' }).click();

    const mpnProblem = page.locator('[data-problem-for="mpn"]');
    await mpnProblem.waitFor();
    await expect(mpnProblem.textContent()).resolves.toContain('already in the Book');
    await expect(page.locator('[data-problem-for="description"]').textContent()).resolves.toMatch(/required/);
    await expect(page.locator('[data-problem-for="value"]').textContent()).resolves.toMatch(/in V but F was expected/);
    // The message sits in the same form row as its field: right after the input it describes.
    await expect(page.locator('#f-value').getAttribute('aria-describedby')).resolves.toBe('f-value-problem');
    await expect(page.locator('#f-value').getAttribute('aria-invalid')).resolves.toBe('true');
    expect(await partRows(page)).toBe(before);

    await page.reload();
    expect(await partRows(page)).toBe(before);
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });

  it('keeps the page across a reload and says what a page not built yet will hold', async () => {
    const { page, errors } = await app.open('#/suppliers');
    await page.locator('[data-testid="suppliers-table"]').waitFor();
    await page.reload();
    await page.locator('[data-testid="suppliers-table"]').waitFor();
    expect(await page.locator('[data-testid="suppliers-table"] tbody tr').count()).toBe(demo.suppliers.length);
    // Pages are built one by one; while one is not, it says what it will hold instead of showing a fake.
    const unbuilt = PAGES.find((p) => !p.tag);
    if (unbuilt) {
      await railTo(page, `#/${unbuilt.slug}`);
      await page.locator('[data-testid="page-plan"]').waitFor();
      await expect(page.locator('[data-testid="page-plan"] p').textContent()).resolves.toBe(unbuilt.plan);
      expect(new URL(page.url()).hash).toBe(`#/${unbuilt.slug}`);
    } else {
      expect(await page.locator('nav .later').count()).toBe(0);
    }
    expect(errors).toEqual([]);
  });

  it('shows the save state and the storage in use', async () => {
    const { page, errors } = await app.open('#/family');
    await saved(page);
    await page.locator('rb-save-state .storage', { hasText: 'Storage:' }).waitFor();
    await expect(page.locator('rb-save-state [role="status"]').textContent()).resolves.toMatch(/All changes saved/);
    const storage = (await page.locator('rb-save-state .storage').textContent()) ?? '';
    expect(storage).toMatch(/Storage: [\d.]+ \S*B used of [\d.]+ \S*B/);
    expect(errors).toEqual([]);
  });
});
