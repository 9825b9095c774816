// A week's job on a fresh profile in real Chromium, as a practitioner did it: a new variant, a new supplier's price
// file, a run of 3,000 costed and frozen, its costed BOM downloaded, two variants compared at that run size, the Book
// saved as a file and opened again in another browser profile — with what a person would notice checked at each step
// against the same figures worked out in Node from the Book file the app wrote.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { COLLECTIONS, mpnKey } from '../../src/domain/book.ts';
import type { Book } from '../../src/domain/book.ts';
import { demoBook } from '../../src/domain/demo-book.ts';
import { money } from '../../src/domain/format.ts';
import { parseBookFile } from '../../src/io/book-file.ts';
import { costVariant, costedBomCsv, costedTotalLabels, exportBytes, runCosting } from '../../src/io/run-export.ts';
import { AppUnderTest, compareFigures, pageLoaded, railTo, readerText, saved, text, WIDE_VIEWPORT } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();
const grid = '[data-testid="family-table"]';
const PRICE_FILE = join(process.cwd(), 'public', 'demo', 'kelvaro-quote-2026-08.csv');
const SUPPLIER = 'Corrandel Semiconductors';
const RUN = 'Autumn FR4-50-CD';

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

function value<T>(r: { ok: true; value: T } | { ok: false; error: string }): T {
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

/** A Book with each collection in id order and no date of the last Book file, to compare two copies record for record. */
function comparable(book: Book): Record<string, unknown> {
  const out: Record<string, unknown> = { ...book, settings: { ...book.settings, lastExportAt: undefined } };
  for (const name of COLLECTIONS) out[name] = [...book[name]].sort((a, b) => a.id.localeCompare(b.id));
  return out;
}

async function familyCell(page: Page, code: string, key: string) {
  const codes = (await page.locator(`${grid} tbody th`).allTextContents()).map(readerText);
  const keys = await page.locator(`${grid} thead th`).evaluateAll((ths) => ths.map((th) => th.getAttribute('data-key')));
  expect(codes).toContain(code);
  expect(keys).toContain(key);
  return page.locator(`${grid} [data-r="${codes.indexOf(code)}"][data-c="${keys.indexOf(key)}"]`);
}

/** Types a value over a Family grid cell and keeps it. */
async function setCell(page: Page, code: string, key: string, typed: string, shown: string): Promise<void> {
  const cell = await familyCell(page, code, key);
  await cell.click();
  await page.keyboard.type(typed);
  await page.keyboard.press('Enter');
  await saved(page);
  await expect.poll(async () => readerText(await (await familyCell(page, code, key)).textContent())).toBe(shown);
}

async function download(page: Page, button: string): Promise<{ name: string; bytes: Buffer }> {
  const [file] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: button }).click()]);
  return { name: file.suggestedFilename(), bytes: readFileSync((await file.path())!) };
}

async function openRun(page: Page): Promise<void> {
  await page.locator('[data-testid="runs-table"]').waitFor();
  await page.getByRole('button', { name: RUN, exact: true }).click();
  await page.locator('rb-run-detail h2', { hasText: `Run ${RUN}` }).waitFor();
  await page.locator('[data-testid="run-bom"]').waitFor();
}

describe('the first week', () => {
  it('walks a new variant, a new supplier’s prices, a run of 3,000, freeze, export, compare, and the Book file saved and reopened', async () => {
    const { page, errors, foreignRequests } = await app.start({ viewport: WIDE_VIEWPORT });
    await page.goto(baseUrl);
    await pageLoaded(page, 'Start here');
    await page.locator('rb-start-page').getByRole('link', { name: 'See the variants' }).click();
    await pageLoaded(page, 'Family');
    await page.locator(`${grid} tbody tr`).first().waitFor();

    // Monday: a 50 W member with the 12 V zener, from the best seller.
    await (await familyCell(page, 'FR4-60-CD', 'code')).click();
    await page.getByRole('button', { name: 'Duplicate' }).click();
    await saved(page);
    await page.keyboard.type('FR4-50-CD');
    await page.keyboard.press('Enter');
    await saved(page);
    await setCell(page, 'FR4-50-CD', 'load_w', '50', '50 W');
    await setCell(page, 'FR4-50-CD', 'v_z', '12', '12 V');

    // Tuesday: a new supplier, created on the Import page, and its price file.
    await railTo(page, '#/import');
    await page.locator('#import-supplier').selectOption({ label: 'New supplier…' });
    const form = page.locator('form[aria-label="New supplier"]');
    await form.locator('#f-name').fill(SUPPLIER);
    await form.locator('#f-currency').fill('USD');
    await form.getByRole('button', { name: 'Create the supplier' }).click();
    await expect.poll(async () => readerText(await page.locator('#import-supplier option:checked').textContent())).toBe(`${SUPPLIER} (USD)`);
    await page.locator('[data-testid="price-file"]').setInputFiles(PRICE_FILE);
    await page.locator('[data-testid="mapping-table"]').waitFor();
    await page.locator('[data-testid="no-problems"]').waitFor();
    const lines = readFileSync(PRICE_FILE, 'utf8').trim().split(/\r?\n/).slice(1);
    const inBook = new Set(demo.parts.map((p) => mpnKey(p.mpn)));
    const matched = new Set(lines.map((l) => mpnKey(l.slice(0, l.indexOf(',')))).filter((k) => inBook.has(k)));
    await page.getByRole('button', { name: 'Confirm this mapping' }).click();
    await page.getByRole('button', { name: 'Import all', exact: true }).click();
    await page.locator('[data-testid="import-done"]').waitFor();
    await saved(page);
    // A supplier with no quotes before supersedes none.
    await expect(text(page, '[data-testid="import-done"]')).resolves.toMatch(new RegExp(`${matched.size} new quotes, 0 quotes superseded`));
    await railTo(page, '#/quotes');
    await page.locator('[data-testid="quotes-supplier"]').selectOption({ label: SUPPLIER });
    await expect.poll(() => page.locator('[data-testid="quotes-table"] tbody tr').count()).toBe(matched.size);

    // Wednesday: a run of 3,000 of the new variant, costed and frozen.
    await railTo(page, '#/runs');
    await page.getByRole('button', { name: 'Add a run' }).click();
    await page.locator('#f-name').fill(RUN);
    await page.locator('#f-variantId').selectOption('FR4-50-CD');
    await page.locator('#f-quantity').fill('3000');
    await page.locator('#f-dateWanted').fill('2026-11-16');
    await page.getByRole('button', { name: 'Add the run' }).click();
    await page.locator('rb-run-detail h2', { hasText: `Run ${RUN}` }).waitFor();
    await page.locator('[data-testid="run-bom"]').waitFor();
    await saved(page);
    const liveTotals = await text(page, '[data-testid="run-totals"]');
    const liveLines = await page.locator('[data-testid="run-bom"] tbody tr').count();
    await page.getByRole('button', { name: 'Freeze the costing' }).click();
    await page.locator('[data-testid="run-comparison"]').waitFor();
    await saved(page);
    await expect(text(page, '[data-testid="run-comparison"]')).resolves.toMatch(/Nothing would change/);
    // Frozen with the same quotes, the run shows the same figures.
    await expect(text(page, '[data-testid="run-totals"]')).resolves.toBe(liveTotals);

    // Thursday: the costed BOM for the buyer; the Export page starts on the run just worked on.
    await railTo(page, '#/export');
    await page.locator('#x-run').waitFor();
    await expect.poll(async () => readerText(await page.locator('#x-run option:checked').textContent())).toContain(RUN);
    await page.locator('[data-testid="export-preview"]').waitFor();
    const csv = await download(page, 'Download costed BOM CSV');
    expect(csv.name).toBe('FR4-50-CD-3000-costed-bom.csv');

    // Friday: the Book saved as a file; every figure seen this week is the one worked out from that file.
    await railTo(page, '#/family');
    const file = await download(page, 'Download this Book as a file');
    const parsed = parseBookFile(file.bytes.toString('utf8'));
    if (!parsed.ok) throw new Error(`the downloaded Book does not read: ${JSON.stringify(parsed.problems)}`);
    const book: Book = parsed.book;
    const variant = book.variants.find((v) => v.code === 'FR4-50-CD')!;
    expect(variant.params).toMatchObject({ load_w: 50, v_z: 12, r_bleed: 470e3 });
    const supplier = book.suppliers.find((s) => s.name === SUPPLIER)!;
    expect(supplier.currency).toBe('USD');
    expect(book.quotes.filter((q) => q.supplierId === supplier.id)).toHaveLength(matched.size);
    const run = book.runs.find((r) => r.name === RUN)!;
    expect(run).toMatchObject({ variantId: variant.id, quantity: 3000 });
    expect(run.frozen).toBeDefined();
    const costing = value(runCosting(book, run));
    // Freezing changed nothing: today's costing of the run is the frozen one.
    expect(value(runCosting(book, run, { fresh: true })).bom).toEqual(costing.bom);
    expect(liveLines).toBe(costing.bom.lines.length);
    const labels = costedTotalLabels(book.settings.baseCurrency, book.settings.marginPct);
    expect(liveTotals).toContain(`${labels.unitCost}${money(costing.bom.unitCost, 'unitCost')}`);
    expect(liveTotals).toContain(`${labels.runTotal}${money(costing.bom.runTotal, 'total')}`);
    expect(csv.bytes.equals(Buffer.from(exportBytes(value(costedBomCsv(costing, undefined, { run: run.name })))))).toBe(true);
    // The 12 V 0.5 W zener the new variant takes, which the new supplier's file prices too, is on its BOM.
    expect(costing.bom.lines.some((l) => l.mpn === 'QX-Z12-05')).toBe(true);

    // Compare the new variant with the one it came from, at the run size of the week.
    await railTo(page, '#/compare');
    await page.locator('[data-testid="compare-choices"]').waitFor();
    await page.getByRole('button', { name: 'None', exact: true }).click();
    await page.locator('[data-testid="compare-none"]').waitFor();
    for (const code of ['FR4-50-CD', 'FR4-60-CD']) await page.locator('[data-testid="compare-choices"] label', { hasText: new RegExp(`^\\s*${code}\\s*$`) }).locator('input').check();
    const runSize = page.locator('[data-testid="difference-run"]');
    await runSize.fill('3000');
    await runSize.press('Enter');
    await expect.poll(async () => readerText(await page.locator('#diff-h + p').textContent())).toContain('a run of 3,000 units');
    await compareFigures(page);
    const unit = (code: string): number => value(costVariant(book, book.variants.find((v) => v.code === code)!.id, 3000)).bom.unitCost;
    // Variant A is the first ticked in the Book's order (FR4-50-CD), B the other; the total is B − A, to the cent.
    const total = Number((await text(page, '[data-testid="difference-total"]')).replace('−', '-').replace('+', ''));
    expect(total).toBeCloseTo(unit('FR4-60-CD') - unit('FR4-50-CD'), 2);
    await expect(page.locator('[data-testid="difference-table"] tbody tr', { hasText: 'QX-Z12-05' }).count()).resolves.toBe(1);
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);

    // Next Monday, on another machine: the Book file opened in a fresh profile holds the week's work as it was left.
    const other = await app.start({ viewport: WIDE_VIEWPORT });
    await other.page.goto(`${baseUrl}#/runs`);
    await pageLoaded(other.page, 'Runs');
    await other.page.locator('rb-book-menu input[type="file"]').setInputFiles({ name: 'week.rungbook.json', mimeType: 'application/json', buffer: file.bytes });
    await other.page.locator('rb-book-menu dialog[open]').getByRole('button', { name: 'Replace with the file' }).click();
    await other.page.locator('[data-testid="notice"]', { hasText: 'Opened week.rungbook.json' }).waitFor();
    await openRun(other.page);
    await expect(text(other.page, '[data-testid="run-totals"]')).resolves.toBe(liveTotals);
    await expect(text(other.page, `[data-testid="runs-table"] tr[data-id="${run.id}"]`)).resolves.toMatch(/frozen/);
    await railTo(other.page, '#/export');
    await other.page.locator('[data-testid="export-preview"]').waitFor();
    await expect.poll(async () => readerText(await other.page.locator('#x-run option:checked').textContent())).toContain(RUN);
    const again = await download(other.page, 'Download costed BOM CSV');
    expect(again.bytes.equals(csv.bytes)).toBe(true);
    const reopened = await download(other.page, 'Download this Book as a file');
    const back = parseBookFile(reopened.bytes.toString('utf8'));
    if (!back.ok) throw new Error('the Book file downloaded after reopening does not read');
    // The same Book, record for record, apart from the date of the last Book file (the opening counts as one).
    expect(comparable(back.book)).toStrictEqual(comparable(book));
    expect(other.errors).toEqual([]);
  });
});
