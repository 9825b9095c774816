// The Family grid in real Chromium: a price edited on the Quotes page changes the Family page's unit cost (to the
// figure a fresh costing of the edited Book gives); three variants pasted as tab-separated text (a paste event with
// clipboardData dispatched on the grid, as the browser sends for Ctrl+V) appear, and undo takes them away again;
// keyboard editing with Enter, Escape and Tab; a copy gives the selected block as tab-separated text.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Locator, Page } from 'playwright-core';
import type { Book } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { currencyMoney } from '../../src/domain/format.ts';
import { formatTsv } from '../../src/domain/tsv.ts';
import { CostingWorkbook, resolutionFromFamily } from '../../src/engine/costing.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { paramText } from '../../src/ui/record-forms.ts';
import { AppUnderTest, figuresShown, readerText, saved } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();
const grid = '[data-testid="family-table"]';

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

async function go(page: Page, hash: string): Promise<void> {
  await page.evaluate((h) => (location.hash = h), hash);
}

/** Column index by its key: a parameter name, `code`, `name`, `checks` or `cost_<run>`. */
async function columnIndex(page: Page, key: string): Promise<number> {
  const keys = await page.locator(`${grid} thead th`).evaluateAll((ths) => ths.map((th) => th.getAttribute('data-key')));
  const i = keys.indexOf(key);
  if (i < 0) throw new Error(`no column ${key} in ${keys.join(' | ')}`);
  return i;
}

async function rowIndex(page: Page, code: string): Promise<number> {
  const codes = (await page.locator(`${grid} tbody th`).allTextContents()).map(readerText);
  return codes.indexOf(code);
}

function cell(page: Page, r: number, c: number): Locator {
  return page.locator(`${grid} [data-r="${r}"][data-c="${c}"]`);
}

async function cellText(page: Page, code: string, heading: string): Promise<string> {
  const r = await rowIndex(page, code);
  const c = await columnIndex(page, heading);
  return readerText(await cell(page, r, c).textContent());
}

/** Unit costs of a Book as the CLI works them out, formatted as the grid shows money. */
function costText(book: Book, variantId: string, run: number): string {
  const wb = CostingWorkbook.open(book, resolutionFromFamily(resolveFamily(book)));
  if (!wb.ok) throw new Error(wb.error);
  const u = wb.value.unitCost(variantId, run);
  wb.value.close();
  return currencyMoney(u, book.settings.baseCurrency, 'unitCost');
}

describe('Family grid', () => {
  it('shows a new unit cost after a quote price is edited on the Quotes page', async () => {
    const { page, errors } = await app.open('#/family');
    await figuresShown(page);
    const v = demo.variants[0]!;
    const run = demo.settings.runSizes[0]!;
    const heading = `cost_${run}`;
    const before = await cellText(page, v.code, heading);
    expect(before).toBe(costText(demo, v.id, run));

    // The quote this variant's first costed line buys from, at the break it buys at.
    const wb = CostingWorkbook.open(demo, resolutionFromFamily(resolveFamily(demo)));
    if (!wb.ok) throw new Error(wb.error);
    const bom = wb.value.costedBom(v.id, run);
    wb.value.close();
    if (!bom.ok) throw new Error(bom.error);
    const line = [...bom.value.lines].sort((a, b) => b.extendedBase - a.extendedBase)[0]!;
    const quote = demo.quotes.find((q) => q.id === line.quoteId)!;
    const at = quote.breaks.findIndex((b) => b.qty === line.breakQty);
    const price = Number((quote.breaks[at]!.price * 3 + 0.5).toFixed(4));

    await go(page, '#/quotes');
    await page.locator(`[data-testid="quotes-table"] tbody tr[data-id="${quote.id}"]`).getByRole('button', { name: 'edit' }).click();
    await page.locator(`#f-break-price-${at}`).fill(String(price));
    await page.getByRole('button', { name: 'Save the quote' }).click();
    await page.locator('rb-quote-form').waitFor({ state: 'detached' });
    await saved(page);

    await go(page, '#/family');
    await page.locator(`${grid} tbody tr`).first().waitFor();
    const edited: Book = { ...demo, quotes: demo.quotes.map((q) => (q.id === quote.id ? { ...q, breaks: q.breaks.map((b, i) => (i === at ? { ...b, price } : b)) } : q)) };
    const want = costText(edited, v.id, run);
    expect(want).not.toBe(before);
    await expect.poll(() => cellText(page, v.code, heading)).toBe(want);
    expect(errors).toEqual([]);
  });

  it('repeats every variant\'s worst check and unit costs in the at-a-glance table, equal to a fresh costing', async () => {
    const { page, errors } = await app.open('#/family');
    const glance = page.locator('[data-testid="family-glance"]');
    await figuresShown(page);
    const runs = demo.settings.runSizes;
    for (const v of demo.variants) {
      const row = glance.locator('tbody tr').filter({ has: page.locator('th', { hasText: new RegExp(`^${v.code}$`) }) });
      await expect.poll(async () => (await row.locator('td').allTextContents()).map(readerText).slice(1)).toEqual(runs.map((r) => costText(demo, v.id, r)));
      const status = readerText(await row.locator('td').first().textContent());
      expect(status).toBe(await cellText(page, v.code, 'checks'));
    }
    expect(errors).toEqual([]);
  });

  it('adds three variants pasted as tab-separated text with a header row, and undo takes them away', async () => {
    const { page, errors } = await app.open('#/family');
    await page.locator(`${grid} tbody tr`).first().waitFor();
    const src = demo.variants.find((x) => x.code === 'FR4-60-CD')!;
    const names = Object.keys(src.params);
    const codes = ['PX-1', 'PX-2', 'PX-3'];
    // As another program writes it: a header row, CRLF line ends, one name quoted because it holds a tab.
    const text =
      formatTsv([
        ['code', 'name', ...names],
        ...codes.map((code, i) => [code, i === 1 ? 'Pasted\tsecond' : `Pasted ${i + 1}`, ...names.map((n) => paramText(n, src.params[n]))]),
      ]).replace(/\n/g, '\r\n') + '\r\n';

    const table = page.locator(grid);
    await table.evaluate((el, t) => {
      const data = new DataTransfer();
      data.setData('text/plain', t);
      el.dispatchEvent(new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true, composed: true }));
    }, text);
    await expect.poll(() => page.locator(`${grid} tbody tr`).count()).toBe(demo.variants.length + 3);
    await saved(page);
    await expect(readerText(await page.locator('[data-testid="family-notice"]').textContent())).toMatch(/Pasted: 3 new variants/);
    // Same parameters as FR4-60-CD, so the same parts and the same unit cost.
    const heading = `cost_${demo.settings.runSizes[1]!}`;
    const want = await cellText(page, src.code, heading);
    // The new rows' costs come from the figures worker, which may still be loading its engine.
    for (const code of codes) await expect.poll(() => cellText(page, code, heading), { timeout: 60_000 }).toBe(want);
    await expect(cellText(page, 'PX-2', 'name')).resolves.toBe('Pasted second');

    await page.locator('[data-testid="undo"]').click();
    await expect.poll(() => page.locator(`${grid} tbody tr`).count()).toBe(demo.variants.length);
    for (const code of codes) expect(await rowIndex(page, code)).toBe(-1);

    // Redo with the keyboard brings them back, undo with the keyboard takes them away again.
    await table.focus();
    await page.keyboard.press('Control+Y');
    await expect.poll(() => page.locator(`${grid} tbody tr`).count()).toBe(demo.variants.length + 3);
    await page.keyboard.press('Control+Z');
    await expect.poll(() => page.locator(`${grid} tbody tr`).count()).toBe(demo.variants.length);
    await saved(page);
    await page.reload();
    await page.locator(`${grid} tbody tr`).first().waitFor();
    expect(await page.locator(`${grid} tbody tr`).count()).toBe(demo.variants.length);
    expect(errors).toEqual([]);
  });

  it('refuses a paste with a bad value, naming the row and column, and adds nothing', async () => {
    const { page, errors } = await app.open('#/family');
    await page.locator(`${grid} tbody tr`).first().waitFor();
    const text = 'code\tname\tload_w\r\nBAD-1\tGood row\t60\r\nBAD-2\tBad row\t-5\r\n';
    await page.locator(grid).evaluate((el, t) => {
      const data = new DataTransfer();
      data.setData('text/plain', t);
      el.dispatchEvent(new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true, composed: true }));
    }, text);
    await expect(readerText(await page.locator('rb-grid .message').textContent())).toMatch(/Row 2 of the paste \(a new variant\), load_w: Must be above zero\. Nothing was pasted\./);
    expect(await page.locator(`${grid} tbody tr`).count()).toBe(demo.variants.length);
    expect(errors).toEqual([]);
  });

  it('edits a cell from the keyboard: Escape cancels, Enter keeps and moves down, Tab moves right, bad input is refused', async () => {
    const { page, errors } = await app.open('#/family');
    await page.locator(`${grid} tbody tr`).first().waitFor();
    const v = [...demo.variants].sort((a, b) => a.code.localeCompare(b.code))[0]!;
    const r = await rowIndex(page, v.code);
    const c = await columnIndex(page, 'load_w');
    const target = cell(page, r, c);
    const original = readerText(await target.textContent());
    expect(original).toBe(`${v.params.load_w} W`);

    await target.click();
    await expect(target.getAttribute('class')).resolves.toMatch(/\bactive\b/);
    await page.keyboard.press('Enter');
    const editor = page.locator(`${grid} input.editor`);
    await expect(editor.inputValue()).resolves.toBe(`${v.params.load_w} W`);
    await page.keyboard.press('Control+A');
    await page.keyboard.type('55');
    await page.keyboard.press('Escape');
    await editor.waitFor({ state: 'detached' });
    expect(readerText(await target.textContent())).toBe(original);

    // Typing starts editing with the typed character; a value that does not read is refused and the editor stays.
    await page.keyboard.type('abc');
    await page.keyboard.press('Enter');
    await expect(readerText(await page.locator('rb-grid .message').textContent())).toMatch(/^load_w: /);
    await expect(editor.isVisible()).resolves.toBe(true);
    await page.keyboard.press('Escape');
    expect(readerText(await target.textContent())).toBe(original);

    await page.keyboard.type('72');
    await page.keyboard.press('Enter');
    await saved(page);
    await expect.poll(async () => readerText(await target.textContent())).toBe('72 W');
    // Enter moved the active cell down one row, Tab one column right.
    await expect(cell(page, r + 1, c).getAttribute('class')).resolves.toMatch(/\bactive\b/);
    await page.keyboard.press('Tab');
    await expect(cell(page, r + 1, c + 1).getAttribute('class')).resolves.toMatch(/\bactive\b/);
    await page.keyboard.press('ArrowUp');
    await page.keyboard.press('ArrowLeft');
    await expect(target.getAttribute('class')).resolves.toMatch(/\bactive\b/);

    // The edit is one undo step.
    await page.keyboard.press('Control+Z');
    await expect.poll(async () => readerText(await target.textContent())).toBe(original);
    await page.keyboard.press('Control+Shift+Z');
    await expect.poll(async () => readerText(await target.textContent())).toBe('72 W');
    await saved(page);
    await page.reload();
    await page.locator(`${grid} tbody tr`).first().waitFor();
    await expect.poll(async () => readerText(await cell(page, r, c).textContent())).toBe('72 W');
    expect(errors).toEqual([]);
  });

  it('adds a variant typed on the new-row line, duplicates one, deletes after asking, and undoes the delete', async () => {
    const { page, errors } = await app.open('#/family');
    await page.locator(`${grid} tbody tr`).first().waitFor();
    const count = demo.variants.length;
    await page.locator(`${grid} tfoot [data-c="0"]`).click();
    await page.keyboard.type('NEW-1');
    await page.keyboard.press('Enter');
    await expect.poll(() => rowIndex(page, 'NEW-1')).toBeGreaterThanOrEqual(0);
    await expect(cellText(page, 'NEW-1', 'name')).resolves.toBe('NEW-1');

    const src = [...demo.variants].sort((a, b) => a.code.localeCompare(b.code))[0]!;
    await cell(page, await rowIndex(page, src.code), 1).click();
    await page.getByRole('button', { name: 'Duplicate' }).click();
    await expect.poll(() => rowIndex(page, `${src.code}-copy`)).toBeGreaterThanOrEqual(0);
    await expect(cellText(page, `${src.code}-copy`, 'name')).resolves.toBe(`${src.name} (copy)`);
    await expect(cellText(page, `${src.code}-copy`, 'load_w')).resolves.toBe(`${src.params.load_w} W`);
    expect(await page.locator(`${grid} tbody tr`).count()).toBe(count + 2);

    await cell(page, await rowIndex(page, `${src.code}-copy`), 0).click();
    await page.getByRole('button', { name: 'Delete…' }).click();
    await page.getByRole('alertdialog', { name: 'Confirm delete' }).getByRole('button', { name: 'Delete' }).click();
    await expect.poll(() => rowIndex(page, `${src.code}-copy`)).toBe(-1);
    await page.locator('[data-testid="undo"]').click();
    await expect.poll(() => rowIndex(page, `${src.code}-copy`)).toBeGreaterThanOrEqual(0);
    await expect(cellText(page, `${src.code}-copy`, 'load_w')).resolves.toBe(`${src.params.load_w} W`);
    await saved(page);
    expect(errors).toEqual([]);
  });

  it('copies a selected block as tab-separated text', async () => {
    const { page, errors } = await app.open('#/family');
    await page.locator(`${grid} tbody tr`).first().waitFor();
    const sorted = [...demo.variants].sort((a, b) => a.code.localeCompare(b.code));
    await cell(page, 0, 0).click();
    await page.keyboard.press('Shift+ArrowDown');
    await page.keyboard.press('Shift+ArrowRight');
    const copied = await page.locator(grid).evaluate((el) => {
      const data = new DataTransfer();
      el.dispatchEvent(new ClipboardEvent('copy', { clipboardData: data, bubbles: true, cancelable: true, composed: true }));
      return data.getData('text/plain');
    });
    expect(copied).toBe(formatTsv(sorted.slice(0, 2).map((v) => [v.code, v.name])));
    // The keyboard path: Ctrl+C makes the browser send the same copy event to the focused grid.
    await page.keyboard.press('Control+C');
    await expect(readerText(await page.locator('rb-grid .message').textContent())).toBe('Copied 2 × 2 cells as tab-separated text.');
    expect(errors).toEqual([]);
  });
});
