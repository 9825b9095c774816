// The supplier's order document in real Chromium: the demo plan's orders placed, one opened on the Orders page, its
// document shown as the supplier reads it, downloaded (the very bytes of the export module) and printed alone.
import { afterEach, describe, expect, inject, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { demoBook } from '../../src/domain/demo-book.ts';
import { orderDocumentOf } from '../../src/domain/order-doc.ts';
import { acceptSuggestions } from '../../src/domain/planning.ts';
import { exportBytes, numberText } from '../../src/io/csv-write.ts';
import { orderDocCsv, orderDocFileName, orderTotalLabel } from '../../src/io/order-doc-export.ts';
import { planBook } from '../../src/io/plan-export.ts';
import { AppUnderTest, readerText } from './harness.ts';
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
});
