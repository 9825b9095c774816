// The Runs and Export pages in real Chromium: the demo run exported as CSV through the page (the download's bytes are
// exactly those the export module makes, and read back equal the costing), a run added and refused through the
// form, a run frozen, and the run sheet printed to PDF whose text holds the variant, the totals and the caution.
import { afterEach, describe, expect, inject, it } from 'vitest';
import { readFileSync } from 'node:fs';
import Papa from 'papaparse';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { toCents } from '../../src/domain/costing.ts';
import { purchaseList } from '../../src/domain/purchase.ts';
import { money } from '../../src/domain/format.ts';
import { MAINS_CAUTION } from '../../src/domain/mains-caution.ts';
import { costedBomCsv, costedTotalLabels, exportBytes, purchaseListCsv, runCosting } from '../../src/io/run-export.ts';
import type { ExportOptions, RunCosting } from '../../src/io/run-export.ts';
import { AppUnderTest } from './harness.ts';
import { pdfPageTexts } from './runs-pdf-text.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();
const run = demo.runs.find((r) => r.id === 'run_spring_fr4_60')!;
const variant = demo.variants.find((v) => v.id === run.variantId)!;

function value<T>(r: { ok: true; value: T } | { ok: false; error: string }): T {
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

// The demo Book fixes its costing date, so Node and the browser cost the run from the same quotes.
const costing: RunCosting = value(runCosting(demo, run));

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

async function chooseDemoRun(page: Page): Promise<void> {
  await page.locator('[data-testid="runs-table"]').waitFor();
  await page.getByRole('button', { name: run.name, exact: true }).click();
  await page.locator('rb-run-detail h2', { hasText: `Run ${run.name}` }).waitFor();
  await page.locator('[data-testid="run-bom"]').waitFor();
}

async function downloadBytes(page: Page, button: string): Promise<{ name: string; bytes: Buffer }> {
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: button }).click()]);
  const path = await download.path();
  return { name: download.suggestedFilename(), bytes: readFileSync(path) };
}

describe('runs, exports and the run sheet in the browser', () => {
  it('exports the demo run as CSV through the Export page: the very bytes of the export module, read back equal', async () => {
    const { page, errors, foreignRequests } = await app.open('#/export');
    await page.locator('#x-run').waitFor();
    await page.locator('#x-run').selectOption(run.id);
    await page.locator('[data-testid="export-preview"]').waitFor();

    const plain = await downloadBytes(page, 'Download costed BOM CSV');
    expect(plain.name).toBe(`${variant.code}-${run.quantity}-costed-bom.csv`);
    expect(plain.bytes.equals(Buffer.from(exportBytes(value(costedBomCsv(costing, undefined, { run: run.name })))))).toBe(true);
    // The table block: after the head (the file, the mains caution, the run, the freeze, the rates) and its empty record.
    const rows = Papa.parse<string[]>(plain.bytes.toString('utf8'), { newline: '\r\n', skipEmptyLines: 'greedy' }).data.filter((r) => r.some((c) => c !== ''));
    expect(rows[1]!.slice(0, 2)).toEqual(['mains caution', MAINS_CAUTION]);
    expect(rows[2]!.slice(0, 2)).toEqual(['run', run.name]);
    rows.splice(0, rows.findIndex((r) => r[0] === 'designators'));
    const head = rows[0]!;
    costing.bom.lines.forEach((l, i) => {
      const r = rows[i + 1]!;
      expect(r[head.indexOf('mpn')]).toBe(l.mpn);
      expect(Number(r[head.indexOf('buy')])).toBe(l.buy);
      expect(Math.round(Number(r[head.indexOf('extended_EUR')]) * 100)).toBe(toCents(l.extendedBase));
    });

    // Semicolons, decimal commas and a byte-order mark, chosen on the page.
    await page.locator('#x-delimiter').selectOption('semicolon');
    await page.locator('#x-decimal').selectOption('comma');
    await page.locator('#x-bom').check();
    const options: ExportOptions = { delimiter: 'semicolon', decimal: 'comma', bom: true };
    const marked = await downloadBytes(page, 'Download costed BOM CSV');
    expect([...marked.bytes.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    expect(marked.bytes.equals(Buffer.from(exportBytes(value(costedBomCsv(costing, options, { run: run.name })))))).toBe(true);
    const list = await downloadBytes(page, 'Download purchase list CSV');
    expect(list.name).toBe(`${variant.code}-${run.quantity}-purchase-list.csv`);
    const expected = purchaseListCsv(costing, purchaseList(costing.bom, { dateWanted: run.dateWanted }), options, { run: run.name });
    expect(list.bytes.equals(Buffer.from(exportBytes(value(expected))))).toBe(true);

    // A decimal comma with a comma delimiter is refused beside the field and no file can be made.
    await page.locator('#x-delimiter').selectOption('comma');
    await expect(page.locator('.choices .problem[role="alert"]').textContent()).resolves.toMatch(/decimal comma/);
    expect(await page.getByRole('button', { name: 'Download costed BOM CSV' }).isDisabled()).toBe(true);
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });

  it('shows the costed BOM and totals, refuses a bad run and keeps a good one, and freezes a run', async () => {
    const { page, errors } = await app.open('#/runs');
    await chooseDemoRun(page);
    // The run's own CSV downloads take the Export page's choices, and give the export module's very bytes.
    await page.locator('rb-run-detail summary', { hasText: 'CSV choices' }).click();
    await page.locator('rb-run-detail #x-delimiter').selectOption('tab');
    await page.locator('rb-run-detail #x-bom').check();
    const tabbed: ExportOptions = { delimiter: 'tab', decimal: 'point', bom: true };
    const runBom = await downloadBytes(page, 'Costed BOM CSV');
    expect(runBom.bytes.equals(Buffer.from(exportBytes(value(costedBomCsv(costing, tabbed, { run: run.name })))))).toBe(true);
    const runList = await downloadBytes(page, 'Purchase list CSV');
    const listCsv = purchaseListCsv(costing, purchaseList(costing.bom, { dateWanted: run.dateWanted }), tabbed, { run: run.name });
    expect(runList.bytes.equals(Buffer.from(exportBytes(value(listCsv))))).toBe(true);
    const totals = await page.locator('[data-testid="run-totals"]').textContent();
    const labels = costedTotalLabels('EUR', demo.settings.marginPct);
    expect(totals).toContain(`${labels.unitCost}${money(costing.bom.unitCost, 'unitCost')}`);
    expect(totals).toContain(`${labels.runTotal}${money(costing.bom.runTotal, 'total')}`);
    expect(await page.locator('[data-testid="run-bom"] tbody tr').count()).toBe(costing.bom.lines.length);
    expect(await page.locator('[data-testid="run-purchase"] h3').count()).toBe(purchaseList(costing.bom).orders.length);

    await page.getByRole('button', { name: 'Add a run' }).click();
    await page.locator('#f-name').fill('Trial batch');
    await page.locator('#f-variantId').selectOption(variant.code);
    await page.locator('#f-quantity').fill('12.5');
    await page.locator('#f-dateWanted').fill('2027-02-30');
    await page.getByRole('button', { name: 'Add the run' }).click();
    await expect(page.locator('[data-problem-for="quantity"]').textContent()).resolves.toMatch(/whole number of units/);
    await expect(page.locator('[data-problem-for="dateWanted"]').textContent()).resolves.toMatch(/calendar date/);
    expect(await page.locator('[data-testid="runs-table"] tbody tr').count()).toBe(demo.runs.length);
    await page.locator('#f-quantity').fill('300');
    await page.locator('#f-dateWanted').fill('2027-02-20');
    await page.getByRole('button', { name: 'Add the run' }).click();
    await page.locator('rb-run-detail h2', { hasText: 'Run Trial batch' }).waitFor();
    expect(await page.locator('[data-testid="runs-table"] tbody tr').count()).toBe(demo.runs.length + 1);

    await chooseDemoRun(page);
    await page.getByRole('button', { name: 'Freeze the costing' }).click();
    await page.locator('[data-testid="run-comparison"]').waitFor();
    // Frozen with the very quotes of today, so re-costing today would change nothing.
    await expect(page.locator('[data-testid="run-comparison"]').textContent()).resolves.toMatch(/Nothing would change/);
    await expect(page.locator(`[data-testid="runs-table"] tr[data-id="${run.id}"]`).textContent()).resolves.toMatch(/frozen/);
    await page.reload();
    await chooseDemoRun(page);
    await page.locator('[data-testid="run-comparison"]').waitFor();
    expect(errors).toEqual([]);
  });

  it('prints the run sheet to PDF on A4 and Letter with the variant, the totals, the caution and page numbers', async () => {
    const { page, errors } = await app.open('#/runs');
    await chooseDemoRun(page);
    // The full caution the app carries for print (the screen shows it short) must be on the sheet word for word.
    const caution = (await page.locator('rb-mains-caution p span.full').textContent()) ?? '';
    expect(caution).toMatch(/can kill/);
    // The print dialogue would block a headless browser; the test prints with page.pdf() instead.
    await page.evaluate(() => {
      (window as unknown as { printed: number }).printed = 0;
      window.print = () => {
        (window as unknown as { printed: number }).printed++;
      };
    });
    await page.getByRole('button', { name: 'Print run sheet' }).click();
    await page.waitForFunction(() => (window as unknown as { printed: number }).printed === 1);
    const bom = costing.bom;
    const labels = costedTotalLabels('EUR', demo.settings.marginPct);
    for (const format of ['A4', 'Letter'] as const) {
      const pdf = await page.pdf({ format });
      const pages = pdfPageTexts(pdf);
      const all = pages.join(' ');
      expect(pages.length).toBeGreaterThanOrEqual(1);
      pages.forEach((p, i) => expect(p).toContain(`page ${i + 1} of ${pages.length}`));
      expect(all).toContain(`Run sheet · ${run.name}`);
      expect(all).toContain(`VARIANT ${variant.code}`);
      expect(all).toContain(`${labels.unitCost} ${money(bom.unitCost, 'unitCost')}`);
      expect(all).toContain(`${labels.runTotal} ${money(bom.runTotal, 'total')}`);
      expect(all).toContain(`${labels.materialRun} ${money(bom.materialRun, 'total')}`);
      expect(all).toContain(caution.normalize('NFKC'));
      for (const l of bom.lines) expect(all).toContain(l.mpn);
      // Nothing of the app around the sheet is printed.
      expect(all).not.toContain('Download this Book as a file');
    }
    expect(errors).toEqual([]);
  });
});
