// A newcomer's first hour in real Chromium, one test for each stumble a practitioner met: nothing said what the tool
// is for; the Family grid's columns had their meaning only under "Details…"; the mains caution showed at full length
// on every page (twice on a notebook page); Duplicate copied the notes and left the cursor on the original, and after
// renaming the copy Enter landed on another variant; new variants came last on Checks and Runs; the Quotes page could
// not be searched by supplier or part; a run said both "today's quotes" and a costing date, its costed BOM was wider
// than a 1,400-pixel window, named the family's designators (D3–D8 for four diodes), and printed long.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { usedDesignators } from '../../src/domain/designators.ts';
import { VARIANT_PARAMS } from '../../src/domain/params.ts';
import { sortVariants } from '../../src/domain/variant-order.ts';
import { money } from '../../src/domain/format.ts';
import { costedTotalLabels, runCosting } from '../../src/io/run-export.ts';
import { PAGES } from '../../src/ui/pages.ts';
import { MAINS_CAUTION } from '../../src/ui/rb-mains-caution.ts';
import { AppUnderTest, WIDE_VIEWPORT, pageLoaded, readerText, saved, text } from './harness.ts';
import { pdfPageTexts } from './runs-pdf-text.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();
const grid = '[data-testid="family-table"]';
const help = '[data-testid="family-table-column-help"]';

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

async function familyCodes(page: Page): Promise<string[]> {
  return (await page.locator(`${grid} tbody th`).allTextContents()).map(readerText);
}

/** The code of the row holding the grid's active cell. */
async function activeCode(page: Page): Promise<string> {
  const r = await page.locator(`${grid} .active`).first().getAttribute('data-r');
  return readerText(await page.locator(`${grid} tbody tr`).nth(Number(r)).locator('th').textContent());
}

async function go(page: Page, hash: string): Promise<void> {
  await page.evaluate((h) => (location.hash = h), hash);
}

describe('the first hour', () => {
  it('opens a fresh profile on a first view saying what Rungbook does, with three first steps, and the rail brings it back', async () => {
    const { page, errors, foreignRequests } = await app.start();
    await page.goto(baseUrl);
    await pageLoaded(page, 'Start here');
    expect(new URL(page.url()).hash).toBe('#/start');
    await expect(text(page, '[data-testid="start-lead"]')).resolves.toMatch(/fan speed regulators.*checks.*quotes.*costed BOM/);
    await expect(text(page, '[data-testid="start-counts"]')).resolves.toBe(`${demo.variants.length} variants, ${demo.parts.length} parts and ${demo.quotes.length} quotes`);
    const ways = page.locator('[data-testid="start-ways"] h2');
    expect((await ways.allTextContents()).map(readerText)).toEqual(['Look around the demo Book', 'Start your own family', 'Open a Book file']);

    // Opening a Book file goes through the Book menu's own item: the browser's file chooser opens.
    const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.locator('rb-start-page').getByRole('button', { name: 'Open a Book file…' }).click()]);
    expect(chooser.isMultiple()).toBe(false);
    // Starting a family of one's own asks first, as the menu does.
    await page.locator('rb-start-page').getByRole('button', { name: 'Start an empty Book…' }).click();
    await page.getByRole('button', { name: 'Empty the Book' }).waitFor();
    await page.keyboard.press('Escape');

    await page.locator('rb-start-page').getByRole('link', { name: 'See the variants' }).click();
    await pageLoaded(page, 'Family');
    // Not the first start any more: the bare address opens the Book's first page; the rail links the first view.
    await page.goto(baseUrl);
    await pageLoaded(page, 'Family');
    await page.locator('nav a[href="#/start"]').click();
    await pageLoaded(page, 'Start here');
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });

  it('gives every Family column its name, unit and meaning where the column is, on hover and on keyboard focus', async () => {
    const { page, errors } = await app.open('#/family', { viewport: WIDE_VIEWPORT, ready: `${grid} tbody tr >> nth=0` });
    const keys = await page.locator(`${grid} thead th`).evaluateAll((ths) => ths.map((th) => th.getAttribute('data-key') ?? ''));
    const std = new Map(VARIANT_PARAMS.map((p) => [p.name, p] as const));
    const params = keys.filter((k) => std.has(k));
    expect(params.length).toBeGreaterThan(20);
    // Hover: the help line names the column under the pointer.
    for (const k of params.slice(0, 6)) {
      await page.locator(`${grid} thead th[data-key="${k}"]`).hover();
      const p = std.get(k)!;
      await expect.poll(() => text(page, help)).toBe(`${k}${p.unit ? ` (${p.unit})` : ''} — ${p.doc}`);
    }
    await page.mouse.move(0, 0);
    // Keyboard: every column, walked with the arrow keys, says what it holds.
    await page.locator(`${grid} [data-r="0"][data-c="0"]`).click();
    for (let c = 0; c < keys.length; c++) {
      const line = await text(page, help);
      expect(line).toMatch(/ — \S/);
      const p = std.get(keys[c]!);
      if (p) expect(line).toBe(`${p.name}${p.unit ? ` (${p.unit})` : ''} — ${p.doc}`);
      await page.keyboard.press('ArrowRight');
    }
    expect(errors).toEqual([]);
  });

  it('shows the mains caution once per page as one short line, and in full on the printed sheet', async () => {
    const { page, errors } = await app.open('#/family', { viewport: WIDE_VIEWPORT });
    const visible = (): Promise<number> => page.locator('rb-mains-caution p:visible').count();
    for (const entry of PAGES) {
      await go(page, `#/${entry.slug}`);
      await pageLoaded(page, entry.title);
      await expect.poll(visible).toBe(entry.mains ? 1 : 0);
      if (entry.mains) {
        const box = await page.locator('rb-mains-caution p').boundingBox();
        expect(box!.height).toBeLessThan(30);
        await expect(text(page, 'rb-mains-caution .short')).resolves.toMatch(/can kill.*not a certification.*local codes.*qualified person/);
      }
    }
    await page.getByRole('button', { name: '+ New notebook page' }).click();
    await page.locator('rb-user-page h1').waitFor();
    await expect.poll(visible).toBe(1);
    expect(errors).toEqual([]);
  });

  it('gives a duplicate a note of its own and the cursor; after renaming the copy the cursor stays on it', async () => {
    const { page, errors } = await app.open('#/family', { viewport: WIDE_VIEWPORT, ready: `${grid} tbody tr >> nth=0` });
    const source = demo.variants.find((v) => v.code === 'FR4-60-CD')!;
    const at = (await familyCodes(page)).indexOf(source.code);
    await page.locator(`${grid} [data-r="${at}"][data-c="0"]`).click();
    await page.getByRole('button', { name: 'Duplicate' }).click();
    await saved(page);
    await expect.poll(() => familyCodes(page)).toContain('FR4-60-CD-copy');
    await expect.poll(() => activeCode(page)).toBe('FR4-60-CD-copy');

    // Renamed by typing over its code: the row sorts before its original, and the cursor goes with it.
    await page.keyboard.type('FR4-50-CD');
    await page.keyboard.press('Enter');
    await saved(page);
    await expect.poll(() => familyCodes(page)).toContain('FR4-50-CD');
    const codes = await familyCodes(page);
    expect(codes.indexOf('FR4-50-CD')).toBeLessThan(codes.indexOf('FR4-60-CD'));
    await expect.poll(() => activeCode(page)).toBe('FR4-50-CD');

    // The copy's note is its own, the original's stays with the original.
    await page.getByRole('button', { name: 'Details…' }).click();
    await expect(page.locator('#f-code').inputValue()).resolves.toBe('FR4-50-CD');
    await expect(page.locator('#f-notes').inputValue()).resolves.toBe('Copy of FR4-60-CD.');
    expect(source.notes).not.toBe('Copy of FR4-60-CD.');
    expect(errors).toEqual([]);
  });

  it('lists a new variant in its place in the one order on Family, Checks and the Runs form, also after a reload', async () => {
    const { page, errors } = await app.open('#/family', { viewport: WIDE_VIEWPORT, ready: `${grid} tbody tr >> nth=0` });
    const source = demo.variants.find((v) => v.code === 'FR3-40-CD')!;
    const at = (await familyCodes(page)).indexOf(source.code);
    await page.locator(`${grid} [data-r="${at}"][data-c="0"]`).click();
    await page.getByRole('button', { name: 'Duplicate' }).click();
    await saved(page);
    await expect.poll(() => activeCode(page)).toBe('FR3-40-CD-copy');
    await page.keyboard.type('FR3-50-CD');
    await page.keyboard.press('Enter');
    await saved(page);
    const want = sortVariants([...demo.variants, { ...source, id: 'x', code: 'FR3-50-CD' }]).map((v) => v.code);
    expect(want.indexOf('FR3-50-CD')).toBe(1);

    for (const reload of [false, true]) {
      if (reload) await page.reload();
      await go(page, '#/family');
      await expect.poll(() => familyCodes(page)).toEqual(want);
      await go(page, '#/checks');
      const matrix = page.locator('[data-testid="checks-matrix"] thead th[data-variant]');
      await matrix.first().waitFor();
      await expect.poll(async () => matrix.evaluateAll((ths) => ths.map((th) => th.getAttribute('data-variant')))).toEqual(want);
      await go(page, '#/runs');
      await page.getByRole('button', { name: 'Add a run' }).click();
      const options = (await page.locator('#f-variantId option').allTextContents()).map(readerText).filter((o) => want.includes(o));
      expect(options).toEqual(want);
      await page.getByRole('button', { name: 'Cancel' }).click();
    }
    expect(errors).toEqual([]);
  });

  it('finds quotes by supplier, by part and by words', async () => {
    const { page, errors } = await app.open('#/quotes', { ready: '[data-testid="quotes-table"]' });
    const rows = page.locator('[data-testid="quotes-table"] tbody tr');
    await expect(text(page, '[data-testid="quotes-shown"]')).resolves.toBe(`${demo.quotes.length} of ${demo.quotes.length} shown`);
    const supplier = demo.suppliers[1]!;
    await page.locator('[data-testid="quotes-supplier"]').selectOption(supplier.id);
    const bySupplier = demo.quotes.filter((q) => q.supplierId === supplier.id);
    await expect.poll(() => rows.count()).toBe(bySupplier.length);
    const ids = await rows.evaluateAll((trs) => trs.map((tr) => tr.getAttribute('data-id')));
    expect(new Set(ids)).toEqual(new Set(bySupplier.map((q) => q.id)));

    const part = demo.parts.find((p) => bySupplier.some((q) => q.partId === p.id))!;
    await page.locator('[data-testid="quotes-part"]').selectOption(part.id);
    const both = bySupplier.filter((q) => q.partId === part.id);
    await expect.poll(() => rows.count()).toBe(both.length);
    await expect(text(page, '[data-testid="quotes-shown"]')).resolves.toBe(`${both.length} of ${demo.quotes.length} shown`);

    await page.getByRole('button', { name: 'show all' }).click();
    await page.getByLabel('Filter quotes').fill(part.mpn);
    const byWords = demo.quotes.filter((q) => q.partId === part.id);
    await expect.poll(() => rows.count()).toBe(byWords.length);
    expect(errors).toEqual([]);
  });

  it('says once what a run is costed from, fits its costed BOM in a 1,400-pixel window, and names the designators the variant places', async () => {
    const run = demo.runs.find((r) => r.id === 'run_spring_fr4_60')!;
    const variant = demo.variants.find((v) => v.id === run.variantId)!;
    const { page, errors } = await app.open('#/runs', { viewport: WIDE_VIEWPORT, ready: '[data-testid="runs-table"]' });
    await page.getByRole('button', { name: run.name, exact: true }).click();
    const bom = page.locator('[data-testid="run-bom"]');
    await bom.waitFor();
    const detail = await text(page, '[data-testid="run-detail"]');
    expect(detail).toContain(`costed from the quotes valid on ${demo.settings.costingDate}, the Book’s costing date`);
    expect(detail).not.toMatch(/today’s quotes|quotes valid on .* quotes valid on/);

    // Every column in view, the last ones included, with no sideways scrolling.
    const fits = await bom.evaluate((t) => ({ table: t.scrollWidth, frame: t.parentElement!.clientWidth, right: t.getBoundingClientRect().right }));
    expect(fits.table).toBeLessThanOrEqual(fits.frame + 1);
    expect(fits.right).toBeLessThanOrEqual(WIDE_VIEWPORT.width);
    for (const heading of ['extended EUR', 'landed EUR', 'leftover']) {
      const box = await bom.locator('thead th', { hasText: heading }).boundingBox();
      expect(box!.x + box!.width).toBeLessThanOrEqual(WIDE_VIEWPORT.width);
    }

    // The steering diodes: the family line names D3–D8 for six steps; this variant has four.
    const steps = Number(variant.params.steps);
    expect(steps).toBe(4);
    const refs = (await bom.locator('tbody td.refs').allTextContents()).map(readerText);
    expect(refs).toContain(usedDesignators('D3–D8', steps));
    expect(refs).toContain('D3–D6');
    expect(refs).not.toContain('D3–D8');
    const costing = runCosting(demo, run);
    if (!costing.ok) throw new Error(costing.error);
    expect(costing.value.bom.lines.find((l) => l.lineIds.includes('line_steering'))!.designators).toBe('D3–D6');
    expect(errors).toEqual([]);
  });

  it('prints the run sheet on at most two A4 pages, and a shop-floor sheet with no price', async () => {
    const run = demo.runs.find((r) => r.id === 'run_spring_fr4_60')!;
    const costing = runCosting(demo, run);
    if (!costing.ok) throw new Error(costing.error);
    const { page, errors } = await app.open('#/runs', { ready: '[data-testid="runs-table"]' });
    await page.getByRole('button', { name: run.name, exact: true }).click();
    await page.locator('[data-testid="run-bom"]').waitFor();
    await page.evaluate(() => {
      window.print = () => undefined;
    });

    await page.getByRole('button', { name: 'Print run sheet' }).click();
    await page.locator('rb-run-sheet [data-testid="sheet-bom"]').waitFor({ state: 'attached' });
    const priced = pdfPageTexts(await page.pdf({ format: 'A4' }));
    expect(priced.length).toBeLessThanOrEqual(2);
    const labels = costedTotalLabels('EUR', demo.settings.marginPct);
    expect(priced.join(' ')).toContain(`${labels.unitCost} ${money(costing.value.bom.unitCost, 'unitCost')}`);

    await page.getByRole('button', { name: 'Print shop-floor sheet' }).click();
    await page.locator('rb-run-sheet [data-testid="sheet-kit"]').waitFor({ state: 'attached' });
    // A title wrapped after a hyphen reads back with a space after it.
    const kit = pdfPageTexts(await page.pdf({ format: 'A4' })).join(' ').replace(/- /g, '-');
    expect(kit).toContain(`Shop-floor sheet · ${run.name}`);
    expect(kit).toContain(MAINS_CAUTION.normalize('NFKC'));
    for (const l of costing.value.bom.lines) expect(kit).toContain(l.mpn);
    expect(kit).not.toContain(labels.unitCost);
    expect(kit).not.toContain('EUR');
    expect(errors).toEqual([]);
  });
});
