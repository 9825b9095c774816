// The Quotes page in real Chromium: expired and superseded quotes marked in words and symbols, the filter, editing a
// quote with each bad entry refused beside its field (nothing saved), a good edit kept across a reload, and a manual
// quote that supersedes the current one until it is deleted again.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { AppUnderTest, saved, text } from './harness.ts';
import type { Session } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();
const costingDate = demo.settings.costingDate!;

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

function open(hash: string): Promise<Session> {
  return app.open(hash, { ready: '[data-testid="quotes-table"]' });
}

function row(page: Page, id: string) {
  return page.locator(`[data-testid="quotes-table"] tbody tr[data-id="${id}"]`);
}

describe('Quotes page', () => {
  it('marks expired quotes with words and a symbol, and filters by supplier', async () => {
    // A quote is expired when its last valid day is before the day it is judged at; ISO 8601 dates (YYYY-MM-DD)
    // compare correctly as text (ISO 8601, calendar date, basic ordering).
    const expired = demo.quotes.filter((q) => q.expires !== undefined && q.expires < costingDate);
    expect(expired.length).toBeGreaterThan(0);
    const { page, errors } = await open('#/quotes');
    for (const q of expired) {
      await expect(row(page, q.id).getAttribute('data-state')).resolves.toBe('expired');
      await expect(text(page, `tr[data-id="${q.id}"] .status`)).resolves.toBe(`⌛ expired ${q.expires}`);
    }
    const current = demo.quotes.find((q) => q.expires === undefined && q.supersededBy === undefined)!;
    await expect(text(page, `tr[data-id="${current.id}"] .status`)).resolves.toBe('✓ current');

    const supplier = demo.suppliers.find((s) => s.name === 'Kelvaro Parts Direct')!;
    await page.getByLabel('Filter quotes').fill('kelvaro');
    const expected = demo.quotes.filter((q) => q.supplierId === supplier.id).length;
    await expect.poll(() => page.locator('[data-testid="quotes-table"] tbody tr').count()).toBe(expected);
    const suppliersShown = await page.locator('[data-testid="quotes-table"] tbody tr td:nth-child(2)').allTextContents();
    expect(new Set(suppliersShown)).toEqual(new Set([supplier.name]));
    expect(errors).toEqual([]);
  });

  it('refuses a bad edit beside each field, saves nothing, and keeps a good edit across a reload', async () => {
    const q = demo.quotes.find((x) => x.id === 'quote_kelvaro_zener_12v_05')!;
    const { page, errors } = await open('#/quotes');
    const before = await text(page, `tr[data-id="${q.id}"]`);
    await row(page, q.id).getByRole('button', { name: 'edit' }).click();
    await page.locator('rb-quote-form form').waitFor();

    await page.locator('#f-break-qty-1').fill(String(q.breaks[0]!.qty - 1)); // below the break before it
    await page.locator('#f-break-price-0').fill('-0.01');
    await page.locator('#f-pack').fill('0');
    await page.locator('#f-expires').fill('2026-13-01');
    await page.getByRole('button', { name: 'Save the quote' }).click();

    await expect(text(page, '[data-problem-for="break-qty-1"]')).resolves.toMatch(/above the break before it/);
    await expect(text(page, '[data-problem-for="break-price-0"]')).resolves.toMatch(/cannot be negative/);
    await expect(text(page, '[data-problem-for="pack"]')).resolves.toMatch(/1 or more/);
    await expect(text(page, '[data-problem-for="expires"]')).resolves.toMatch(/YYYY-MM-DD/);
    await expect(page.locator('#f-pack').getAttribute('aria-invalid')).resolves.toBe('true');
    await expect(text(page, `tr[data-id="${q.id}"]`)).resolves.toBe(before);

    // Corrected: breaks rise again, one more break added, a pack and an expiry that read.
    await page.locator('#f-break-qty-1').fill('1000');
    await page.locator('#f-break-price-0').fill('0.05');
    await page.locator('#f-pack').fill('20');
    await page.locator('#f-expires').fill('2026-12-31');
    await page.getByRole('button', { name: 'Add a break' }).click();
    const last = q.breaks.length;
    await page.locator(`#f-break-qty-${last}`).fill('50000');
    await page.locator(`#f-break-price-${last}`).fill('0.009');
    await page.getByRole('button', { name: 'Save the quote' }).click();
    await page.locator('rb-quote-form').waitFor({ state: 'detached' });
    await saved(page);

    const check = async (): Promise<void> => {
      const t = await text(page, `tr[data-id="${q.id}"]`);
      expect(t).toContain(`${q.breaks[0]!.qty} @ 0.05 · 1000 @`);
      // 50000 is written with a thin space between thousands groups on screen (read back here as a plain space).
      expect(t).toContain('50 000 @ 0.009');
      expect(t).toContain('2026-12-31');
    };
    await check();
    await page.reload();
    await page.locator('[data-testid="quotes-table"]').waitFor();
    await check();
    expect(errors).toEqual([]);
  });

  it('adds a manual quote that supersedes the current one, and deleting it makes the old one current again', async () => {
    const old = demo.quotes.find((x) => x.id === 'quote_kelvaro_timer')!;
    const part = demo.parts.find((p) => p.id === old.partId)!;
    const { page, errors } = await open('#/quotes');
    const count = await page.locator('[data-testid="quotes-table"] tbody tr').count();
    await page.getByRole('button', { name: 'Add a quote' }).click();
    await page.locator('#f-partId').selectOption(part.id);
    await page.locator('#f-supplierId').selectOption(old.supplierId);
    await expect(page.locator('#f-currency').inputValue()).resolves.toBe('USD');
    await page.locator('#f-supplierCode').fill('KPD-900008');
    await page.locator('#f-break-price-0').fill('0.3');
    await page.locator('#f-lead').fill('3 weeks');
    await page.getByRole('button', { name: 'Add the quote' }).click();
    await page.locator('rb-quote-form').waitFor({ state: 'detached' });
    await saved(page);

    await expect.poll(() => page.locator('[data-testid="quotes-table"] tbody tr').count()).toBe(count + 1);
    await expect(row(page, old.id).getAttribute('data-state')).resolves.toBe('superseded');
    await expect(text(page, `tr[data-id="${old.id}"] .status`)).resolves.toMatch(/^↷ superseded/);
    const supplier = demo.suppliers.find((s) => s.id === old.supplierId)!;
    // The only current quote for this part from this supplier is the one just added.
    const fresh = page
      .locator('[data-testid="quotes-table"] tbody tr[data-state="current"]', { hasText: part.mpn })
      .filter({ hasText: supplier.name });
    await expect(fresh.count()).resolves.toBe(1);
    // 3 weeks is 21 days (7 days a week).
    await expect(fresh.locator('td').nth(7).textContent()).resolves.toBe('21 d (3 wk)');

    await fresh.getByRole('button', { name: 'delete' }).click();
    await fresh.getByRole('button', { name: 'Delete', exact: true }).click();
    await saved(page);
    await expect.poll(() => page.locator('[data-testid="quotes-table"] tbody tr').count()).toBe(count);
    await expect(row(page, old.id).getAttribute('data-state')).resolves.toBe('current');
    expect(errors).toEqual([]);
  });
});
