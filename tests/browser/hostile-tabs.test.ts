// Two tabs of one browser (same origin, same IndexedDB) editing the same record from copies that went stale: nothing
// is lost without notice. Edits to different fields of one notebook section, or different cells of one Family row,
// are merged field by field and the saving tab says so; edits to the same field are refused in the later tab with a
// notice naming the field and the other tab's value, and the earlier value stays.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';
import { AppUnderTest, readerText, saved } from './harness.ts';
import type { Session } from './harness.ts';

const baseUrl = inject('baseUrl');
const grid = '[data-testid="family-table"]';

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

/** Waits until `page` has re-read the Book after another tab's save. */
async function refreshed(page: Page): Promise<void> {
  await page.locator('rb-save-state .storage', { hasText: 'Updated from another tab' }).waitFor();
}

/** A new notebook page made in the first tab, open in both. */
async function notebookInTwoTabs(): Promise<{ a: Page; b: Page; s: Session }> {
  const s = await app.open('#/family', { ready: grid });
  const a = s.page;
  await a.getByRole('button', { name: '+ New notebook page' }).click();
  await a.locator('rb-user-page h1').waitFor();
  await saved(a);
  const b = await s.context.newPage();
  await app.goto(b, new URL(a.url()).hash, 'rb-user-page h1');
  return { a, b, s };
}

async function openSectionForm(page: Page): Promise<void> {
  await page.locator('rb-user-page').getByRole('button', { name: 'edit heading and text' }).first().click();
  await page.locator('rb-user-page #sec-heading').waitFor();
}

async function saveSectionForm(page: Page): Promise<void> {
  await page.locator('rb-user-page').getByRole('button', { name: 'Save the section' }).click();
}

async function section(page: Page): Promise<{ heading: string; text: string }> {
  const s = page.locator('rb-user-page section.sheet').first();
  const heading = readerText(await s.locator('h2').textContent()).replace(/\s*Section1$/, '');
  const text = (await s.locator('p.text').count()) ? readerText(await s.locator('p.text').textContent()) : '';
  return { heading, text };
}

async function familyInTwoTabs(): Promise<{ a: Page; b: Page; s: Session }> {
  const s = await app.open('#/family', { ready: grid });
  const b = await s.context.newPage();
  await app.goto(b, '#/family', grid);
  return { a: s.page, b, s };
}

async function columnIndex(page: Page, key: string): Promise<number> {
  const keys = await page.locator(`${grid} thead th`).evaluateAll((ths) => ths.map((th) => th.getAttribute('data-key')));
  const i = keys.indexOf(key);
  if (i < 0) throw new Error(`no column ${key} in ${keys.join(' | ')}`);
  return i;
}

function cell(page: Page, r: number, c: number): Locator {
  return page.locator(`${grid} [data-r="${r}"][data-c="${c}"]`);
}

/** Starts editing a cell and types a value, leaving the editor open. */
async function typeInCell(page: Page, r: number, c: number, value: string): Promise<void> {
  await cell(page, r, c).click();
  await page.keyboard.press('Enter');
  await page.locator(`${grid} input.editor`).waitFor();
  await page.keyboard.press('Control+A');
  await page.keyboard.type(value);
}

async function commitCell(page: Page): Promise<void> {
  await page.keyboard.press('Enter');
  await page.locator(`${grid} input.editor`).waitFor({ state: 'detached' });
}

describe('two tabs editing the same record from stale copies', () => {
  it('keeps a heading saved in one tab and a text saved from a stale copy in the other, and says it merged', async () => {
    const { a, b, s } = await notebookInTwoTabs();
    const before = await section(a);
    // Tab B opens the section first: its form holds the section as it was then.
    await openSectionForm(b);
    await b.locator('rb-user-page #sec-text').fill('Text written in tab B');

    await openSectionForm(a);
    await a.locator('rb-user-page #sec-heading').fill('Heading from tab A');
    await saveSectionForm(a);
    await saved(a);
    await expect.poll(() => section(a)).toEqual({ heading: 'Heading from tab A', text: before.text });
    await refreshed(b);

    await saveSectionForm(b);
    const notice = b.locator('[data-testid="merge-notice"]');
    await notice.waitFor();
    expect(readerText(await notice.textContent())).toMatch(/kept its heading of section 1; your change to text of section 1 was saved over it/);
    await expect(b.locator('rb-user-page p.notice').textContent()).resolves.toMatch(/also changed in another tab/);

    const both = { heading: 'Heading from tab A', text: 'Text written in tab B' };
    await expect.poll(() => section(b)).toEqual(both);
    await expect.poll(() => section(a)).toEqual(both);
    await a.reload();
    await a.locator('rb-user-page h1').waitFor();
    await expect.poll(() => section(a)).toEqual(both);
    expect(s.errors).toEqual([]);
  });

  it('refuses a heading saved from a stale copy over another tab’s heading, naming the field and its value', async () => {
    const { a, b, s } = await notebookInTwoTabs();
    await openSectionForm(b);
    await b.locator('rb-user-page #sec-heading').fill('Heading from tab B');

    await openSectionForm(a);
    await a.locator('rb-user-page #sec-heading').fill('Heading from tab A');
    await saveSectionForm(a);
    await saved(a);
    await refreshed(b);

    await saveSectionForm(b);
    const problem = b.locator('[data-testid="save-problem"]');
    await problem.waitFor();
    expect(readerText(await problem.textContent())).toMatch(
      /Not saved: .* was changed in another tab or window since you opened it, in the same field as your edit: heading of section 1 is now “Heading from tab A” there \(yours: “Heading from tab B”\)/,
    );
    await expect(b.locator('rb-user-page p.notice[role="alert"]').textContent()).resolves.toMatch(/heading of section 1 is now/);
    // The earlier heading is kept; the later tab keeps its form open with its text, so nothing typed is lost either.
    await expect(b.locator('rb-user-page #sec-heading').inputValue()).resolves.toBe('Heading from tab B');
    await expect.poll(async () => (await section(a)).heading).toBe('Heading from tab A');
    expect(s.errors).toEqual([]);
  });

  it('refuses the later of two commits to the same Family cell with a notice; the earlier value stays', async () => {
    const { a, b, s } = await familyInTwoTabs();
    const c = await columnIndex(a, 'load_w');
    const original = readerText(await cell(a, 0, c).textContent());
    // Tab B starts editing the cell first, from the value it shows then.
    await typeInCell(b, 0, c, '61');

    await typeInCell(a, 0, c, '55');
    await commitCell(a);
    await saved(a);
    await expect.poll(async () => readerText(await cell(a, 0, c).textContent())).toBe('55 W');
    expect(original).not.toBe('55 W');
    await refreshed(b);

    await commitCell(b);
    const notice = b.locator('[data-testid="family-notice"]');
    await notice.waitFor();
    expect(readerText(await notice.textContent())).toMatch(/Not saved: .* parameter load_w is now 55 there \(yours: 61\)/);
    await expect(notice.getAttribute('role')).resolves.toBe('alert');
    await expect.poll(async () => readerText(await cell(b, 0, c).textContent())).toBe('55 W');
    await expect.poll(async () => readerText(await cell(a, 0, c).textContent())).toBe('55 W');
    await a.reload();
    await a.locator(`${grid} tbody tr`).first().waitFor();
    await expect.poll(async () => readerText(await cell(a, 0, c).textContent())).toBe('55 W');
    expect(s.errors).toEqual([]);
  });

  it('merges commits to different cells of the same Family row, keeping both with a notice in the later tab', async () => {
    const { a, b, s } = await familyInTwoTabs();
    const load = await columnIndex(a, 'load_w');
    const name = await columnIndex(a, 'name');
    await typeInCell(b, 0, load, '61');

    await typeInCell(a, 0, name, 'Renamed in tab A');
    await commitCell(a);
    await saved(a);
    await refreshed(b);

    await commitCell(b);
    const notice = b.locator('[data-testid="family-notice"]');
    await notice.waitFor();
    expect(readerText(await notice.textContent())).toMatch(/also changed in another tab: kept its name; your change to parameter load_w was saved over it/);
    await b.locator('[data-testid="merge-notice"]').waitFor();
    for (const p of [a, b]) {
      await expect.poll(async () => readerText(await cell(p, 0, load).textContent())).toBe('61 W');
      await expect.poll(async () => readerText(await cell(p, 0, name).textContent())).toBe('Renamed in tab A');
    }
    // The merged edit undoes as the person's own change only: the other tab's name stays.
    await b.locator('[data-testid="undo"]').click();
    await expect.poll(async () => readerText(await cell(b, 0, load).textContent())).not.toBe('61 W');
    await expect.poll(async () => readerText(await cell(b, 0, name).textContent())).toBe('Renamed in tab A');
    expect(s.errors).toEqual([]);
  });
});
