// The supplier's order document in real Chromium: the demo plan's orders placed, one opened on the Orders page, its
// document shown as the supplier reads it, downloaded (the very bytes of the export module) and printed alone; the
// ship-to address and a supplier's address and terms refused beside their fields when bad, and printed when saved.
import { afterEach, describe, expect, inject, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { demoBook } from '../../src/domain/demo-book.ts';
import { orderDocumentOf } from '../../src/domain/order-doc.ts';
import { acceptSuggestions } from '../../src/domain/planning.ts';
import { exportBytes, numberText } from '../../src/io/csv-write.ts';
import { orderDocCsv, orderDocFileName, orderTotalLabel } from '../../src/io/order-doc-export.ts';
import { planBook } from '../../src/io/plan-export.ts';
import Papa from 'papaparse';
import { AppUnderTest, readerText, saved } from './harness.ts';
import { pdfPageTexts } from './runs-pdf-text.ts';

const baseUrl = inject('baseUrl');
const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

/** Both demo runs fall within 150 days of this plan date (as the planning browser test places them). */
const PLAN_DATE = '2027-01-04';

function value<T>(r: { ok: true; value: T } | { ok: false; error: string }): T {
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

// The same orders in Node: the demo Book's plan on that date, every suggestion placed.
const demo = demoBook();
const placed = value(acceptSuggestions(demo, value(planBook(demo, { today: PLAN_DATE, horizonDays: 150 })).suggestions, PLAN_DATE));
const order = placed.orders[0]!;
const doc = orderDocumentOf({ ...demo, orders: placed.orders }, order);

describe('the supplier’s order document in the browser', () => {
  it('shows an order’s document, downloads the export module’s bytes and prints it alone', async () => {
    const { page, errors, foreignRequests } = await app.open('#/plan');
    await page.locator('input[name="plan-date"]').fill(PLAN_DATE);
    await page.locator('input[name="horizon"]').fill('150');
    await page.locator('input[name="horizon"]').dispatchEvent('change');
    await page.locator('[data-testid="plan-runs"]').waitFor();
    await page.getByRole('button', { name: `Place all ${placed.orders.length} orders` }).click();
    await page.locator('[data-testid="no-suggestions"]').waitFor();

    await page.goto(`${baseUrl}#/orders`);
    await page.locator(`[data-testid="orders-table"] tr[data-order="${order.number}"] button`).click();
    const shown = page.locator('[data-testid="order-doc"] rb-order-doc');
    await shown.locator('[data-testid="order-doc-page"]').waitFor();

    // What the supplier reads: our number, firm and ship-to, their name, address and terms, their codes, the total.
    const text = readerText(await shown.locator('[data-testid="order-doc-page"]').textContent());
    expect(text).toContain(`Purchase order ${order.number}`);
    for (const line of doc.shipTo.split('\n')) expect(text).toContain(line);
    for (const line of doc.supplier.address.split('\n')) expect(text).toContain(line);
    expect(doc.shipTo).not.toBe('');
    expect(text).toContain(doc.supplier.paymentTerms);
    expect(text).toContain(demo.settings.company);
    for (const l of doc.lines) {
      expect(text).toContain(l.supplierCode);
      expect(text).toContain(l.mpn);
    }
    const total = doc.totals[0]!;
    expect(text).toContain(`${orderTotalLabel(total.currency)}${numberText({ n: total.total, kind: 'money' })}`);
    expect(text).not.toMatch(/designators|need|margin/);

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: `Download order ${order.number} CSV` }).click()]);
    expect(download.suggestedFilename()).toBe(orderDocFileName(doc));
    const bytes = readFileSync(await download.path());
    expect(bytes.equals(Buffer.from(exportBytes(value(orderDocCsv(doc)))))).toBe(true);

    // The print dialogue would block a headless browser; the test prints with page.pdf() instead.
    await page.evaluate(() => {
      (window as unknown as { printed: number }).printed = 0;
      window.print = () => {
        (window as unknown as { printed: number }).printed++;
      };
    });
    await page.getByRole('button', { name: `Print order ${order.number}` }).click();
    await page.waitForFunction(() => (window as unknown as { printed: number }).printed === 1);
    const pages = pdfPageTexts(await page.pdf({ format: 'A4' }));
    const all = pages.join(' ');
    expect(all).toContain(`Purchase order ${order.number}`);
    expect(all).toContain(doc.supplier.name);
    for (const l of doc.lines) expect(all).toContain(l.supplierCode);
    expect(all).toContain(numberText({ n: total.total, kind: 'money' }));
    // Nothing of the app around the document is printed.
    expect(all).not.toContain('Orders are placed from the Plan page');
    expect(all).not.toContain('Download this Book as a file');
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });

  it('refuses a bad ship-to or supplier address beside the field, saves nothing, and prints what is saved', async () => {
    const { page, errors } = await app.open('#/settings', { ready: 'form[aria-label="Costing settings"]' });
    await expect(page.locator('#f-shipTo').inputValue()).resolves.toBe(demo.settings.shipTo);
    const nine = Array.from({ length: 9 }, (_, i) => `line ${i + 1}`).join('\n');
    await page.locator('#f-shipTo').fill(nine);
    await page.getByRole('button', { name: 'Save the settings' }).click();
    await expect(page.locator('[data-problem-for="shipTo"]').textContent()).resolves.toMatch(/9 lines; an address may have at most 8/);
    await page.reload();
    await page.locator('form[aria-label="Costing settings"]').waitFor();
    await expect(page.locator('#f-shipTo').inputValue()).resolves.toBe(demo.settings.shipTo);
    const shipTo = 'Tarnwick Air Controls, dock 3\nUnit 9, Fennick Yard\nHollowmere HX9 4ZZ';
    await page.locator('#f-shipTo').fill(`  ${shipTo.replace(/\n/g, '  \n')}\n\n`);
    await page.getByRole('button', { name: 'Save the settings' }).click();
    await page.locator('[data-testid="settings-saved"]').waitFor();
    await saved(page);

    const kelvaro = demo.suppliers.find((x) => x.id === 'sup_kelvaro')!;
    await page.goto(`${baseUrl}#/suppliers`);
    await page.locator(`rb-suppliers-page tr[data-id="${kelvaro.id}"]`).getByRole('button', { name: 'edit' }).click();
    await page.locator('rb-suppliers-page form[aria-label="Supplier"]').waitFor();
    await expect(page.locator('#f-address').inputValue()).resolves.toBe(kelvaro.address);
    await page.locator('#f-paymentTerms').fill('t'.repeat(201));
    await page.locator('#f-address').fill(nine);
    await page.getByRole('button', { name: 'Save the supplier' }).click();
    await expect(page.locator('[data-problem-for="paymentTerms"]').textContent()).resolves.toMatch(/at most 200/);
    await expect(page.locator('[data-problem-for="address"]').textContent()).resolves.toMatch(/at most 8/);
    await page.reload();
    await page.locator(`rb-suppliers-page tr[data-id="${kelvaro.id}"]`).getByRole('button', { name: 'edit' }).click();
    await expect(page.locator('#f-paymentTerms').inputValue()).resolves.toBe(kelvaro.paymentTerms);
    await page.locator('#f-address').fill('Kelvaro Parts Direct\nInbound orders\n7 Orrin Quay');
    await page.locator('#f-paymentTerms').fill('net 45 days');
    await page.getByRole('button', { name: 'Save the supplier' }).click();
    await page.locator('rb-suppliers-page form[aria-label="Supplier"]').waitFor({ state: 'detached' });
    await saved(page);

    // The run's draft document for that supplier carries both, as saved.
    await page.goto(`${baseUrl}#/runs`);
    await page.locator('[data-testid="runs-table"]').waitFor();
    await page.getByRole('button', { name: demo.runs[0]!.name, exact: true }).click();
    await page.locator('[data-testid="run-purchase"]').waitFor();
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('button', { name: `Order document CSV for ${kelvaro.name}` }).click()]);
    const rows = Papa.parse<string[]>(readFileSync(await download.path(), 'utf8'), { newline: '\r\n' }).data;
    const field = new Map(rows.map((r) => [r[0]!, r[1]!] as const));
    expect(field.get('ship to')).toBe(shipTo);
    expect(field.get('supplier address')).toBe('Kelvaro Parts Direct\nInbound orders\n7 Orrin Quay');
    expect(field.get('payment terms')).toBe('net 45 days');
    expect(field.get('purchase order')).toMatch(/^draft/);
    expect(errors).toEqual([]);
  });
});
