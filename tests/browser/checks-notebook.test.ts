// Notebook pages of the user's own in real Chromium: a new page from the rail, grid formulas that read the Book by
// name (VAR, CHECK_STATUS, PART_PRICE), text kept as text, renaming, recalculation when the Book changes, the page
// kept across a reload, and deleting it.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { AppUnderTest, saved } from './harness.ts';

const baseUrl = inject('baseUrl');

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

async function write(page: Page, address: string, text: string): Promise<void> {
  await page.locator(`rb-user-page button[data-cell="${address}"]`).first().click();
  const input = page.locator('rb-user-page rb-formula-input[data-field="cell"] input');
  await input.fill(text);
  await input.press('Enter');
  await saved(page);
}

function shown(page: Page, address: string) {
  return page.locator(`rb-user-page button[data-cell="${address}"]`).first();
}

describe('notebook pages of the user’s own', () => {
  it('adds a page whose grid reads the Book, keeps text as text, and survives a reload', async () => {
    const { page, errors } = await app.open('#/family');
    await page.getByRole('button', { name: '+ New notebook page' }).click();
    await page.locator('rb-user-page h1').waitFor();
    expect(new URL(page.url()).hash).toMatch(/^#\/notebook\//);
    await expect(page.locator('rb-user-page rb-mains-caution p').textContent()).resolves.toMatch(/can kill/);

    // Demo Book: FR5-75-CD is rated 75 W; its 1 MΩ bleeder fails the 34 V-in-1 s rule (IEC 60335-1 cl. 22.5 as
    // quoted in secondary sources: 38.74 V remain after 1 s).
    await write(page, 'A1', '=VAR("FR5-75-CD", "load_w") * 2');
    await expect.poll(() => shown(page, 'A1').textContent()).toMatch(/^\s*150\s*$/);
    await write(page, 'B1', '=CHECK_STATUS("FR5-75-CD", "bleeder_time")');
    await expect.poll(() => shown(page, 'B1').textContent()).toMatch(/fail/);
    await write(page, 'A2', '=PART_PRICE("NO-SUCH-PART", 10)');
    await shown(page, 'A2').click();
    await expect(page.locator('rb-user-page [data-testid="cell-message"]').textContent()).resolves.toContain(
      'PART_PRICE: no part with maker part number "NO-SUCH-PART" in the Book',
    );
    // An engineering value typed with its unit is a number: 0.47 µF at 230 V 50 Hz draws 33.96 mA
    // (capacitive dropper, basic circuit theory, from memory).
    await write(page, 'B2', '0.47 uF');
    await page.getByRole('button', { name: '+ column' }).click();
    await saved(page);
    await write(page, 'C2', '=XCAP_AMPS(B2, 230, 50) * 1000');
    await expect.poll(() => shown(page, 'C2').textContent()).toMatch(/33\.96/);

    await page.getByRole('button', { name: 'edit heading and text' }).click();
    await page.locator('rb-user-page #sec-heading').fill('Bleeder <b>notes</b>');
    await page.locator('rb-user-page #sec-text').fill('Plain words, <i>not markup</i>.');
    await page.getByRole('button', { name: 'Save the section' }).click();
    await saved(page);
    await expect(page.locator('rb-user-page section h2').first().textContent()).resolves.toContain('Bleeder <b>notes</b>');
    expect(await page.locator('rb-user-page section h2 b').count()).toBe(0);
    expect(await page.locator('rb-user-page section p.text i').count()).toBe(0);

    await page.getByRole('button', { name: 'rename' }).click();
    await page.locator('rb-user-page input[aria-label="page title"]').fill('Bleeder sums');
    await page.getByRole('button', { name: 'Rename', exact: true }).click();
    await page.locator('nav a', { hasText: 'Bleeder sums' }).waitFor();
    await saved(page);

    await page.reload();
    await expect.poll(() => shown(page, 'A1').textContent()).toMatch(/^\s*150\s*$/);
    await expect(page.locator('rb-user-page h1').textContent()).resolves.toBe('Bleeder sums');
    expect(errors).toEqual([]);
  });

  it('moves a section down and up, and keeps the order across a reload', async () => {
    const { page, errors } = await app.open('#/family');
    await page.getByRole('button', { name: '+ New notebook page' }).click();
    await page.locator('rb-user-page h1').waitFor();
    await page.getByRole('button', { name: 'Add a text section' }).click();
    await saved(page);
    // A grid section's heading also shows the sheet name its cells are read by (Section1): keep the first word.
    const headings = () => page.locator('rb-user-page section h2').allTextContents().then((t) => t.map((x) => x.trim().split(/\s|(?=Section\d)/)[0]));
    await expect.poll(headings).toEqual(['Calculation', 'Notes']);
    // Only the first section offers "move down", only the last "move up".
    expect(await page.getByRole('button', { name: 'move down' }).count()).toBe(1);
    expect(await page.getByRole('button', { name: 'move up' }).count()).toBe(1);
    await page.getByRole('button', { name: 'move down' }).click();
    await saved(page);
    await expect.poll(headings).toEqual(['Notes', 'Calculation']);
    await page.reload();
    await expect.poll(headings).toEqual(['Notes', 'Calculation']);
    await page.getByRole('button', { name: 'move up' }).click();
    await saved(page);
    await expect.poll(headings).toEqual(['Calculation', 'Notes']);
    expect(errors).toEqual([]);
  });

  it('recalculates when a variant changes elsewhere, and can be deleted', async () => {
    const { page, errors } = await app.open('#/family');
    await page.getByRole('button', { name: '+ New notebook page' }).click();
    await page.locator('rb-user-page h1').waitFor();
    const here = page.url();
    await write(page, 'A1', '=VAR("FR5-75-CD", "load_w")');
    await expect.poll(() => shown(page, 'A1').textContent()).toMatch(/^\s*75\s*$/);

    await page.goto(`${baseUrl}#/checks`);
    await page.locator('button.cell[data-variant="FR5-75-CD"][data-check="load_i"]').click();
    const load = page.locator('[data-testid="check-detail"] input[data-param="load_w"]');
    await load.fill('90');
    await load.press('Enter');
    await saved(page);

    await page.goto(here);
    await expect.poll(() => shown(page, 'A1').textContent()).toMatch(/^\s*90\s*$/);

    const title = (await page.locator('rb-user-page h1').textContent()) ?? '';
    await page.getByRole('button', { name: 'delete page' }).click();
    await page.getByRole('button', { name: 'Delete the page' }).click();
    await page.locator('[data-testid="family-table"]').waitFor();
    await saved(page);
    expect(await page.locator('nav a', { hasText: title }).count()).toBe(0);
    expect(errors).toEqual([]);
  });
});
