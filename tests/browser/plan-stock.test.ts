// A season's buying in real Chromium on the demo Book: plan its two runs, place the suggested orders, receive them
// (one line in part), mark the first run built, and see the stock and the next plan follow; import a stock count file
// with a column chosen by hand, and undo it from its import record (reversed in the ledger, not deleted).
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { AppUnderTest } from './harness.ts';

const baseUrl = inject('baseUrl');
const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

/** Both demo runs (wanted 2027-03-15 and 2027-05-03) fall within 150 days of this plan date. */
const PLAN_DATE = '2027-01-04';

async function planAt(page: Page, date: string): Promise<void> {
  await page.locator('input[name="plan-date"]').fill(date);
  await page.locator('input[name="horizon"]').fill('150');
  await page.locator('input[name="horizon"]').dispatchEvent('change');
  await page.locator('[data-testid="plan-runs"]').waitFor();
}

const count = (text: string): number => Number(text.replace(/[^\d-]/g, ''));

describe('planning, orders and stock in the browser', () => {
  it('plans two runs, places the orders, receives one line in part, builds a run, and the stock and next plan follow', async () => {
    const { page, errors } = await app.open('#/plan');
    await page.locator('input[name="plan-date"]').waitFor();
    await planAt(page, PLAN_DATE);
    const runRows = page.locator('[data-testid="plan-runs"] tbody tr');
    await expect.poll(() => runRows.count()).toBe(2);
    const firstRun = (await runRows.first().locator('td').first().textContent())!.trim();

    // A part both runs need: it will be received one short.
    const shared = page.locator('[data-testid="plan-parts"] tbody tr[data-runs="2"]').first();
    const mpn = (await shared.locator('td').first().textContent())!.trim();
    const neededBy = (await shared.locator('td').nth(1).textContent())!;
    const firstNeed = count(new RegExp(`${firstRun.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')} \\(([\\d,]+) by`).exec(neededBy)![1]!);
    expect(firstNeed).toBeGreaterThan(0);

    // Place every suggested order in one step.
    const suggestions = await page.locator('[data-testid="suggestion"]').count();
    expect(suggestions).toBeGreaterThan(0);
    await page.getByRole('button', { name: `Place all ${suggestions} orders` }).click();
    await page.locator('[data-testid="no-suggestions"]').waitFor();

    // Receive every order in full, except the shared part's line: one short.
    await page.goto(`${baseUrl}#/orders`);
    await page.locator('[data-testid="orders-table"]').waitFor();
    await page.locator('input[name="receive-date"]').fill('2027-02-01');
    const numbers = await page.locator('[data-testid="orders-table"] tbody tr').evaluateAll((rows) => rows.map((r) => r.getAttribute('data-order')!));
    expect(numbers).toHaveLength(suggestions);
    let ordered = 0;
    for (const n of numbers) {
      await page.locator(`[data-testid="orders-table"] tr[data-order="${n}"] button`).click();
      const detail = page.locator(`[data-testid="order-detail"][data-order="${n}"]`);
      await detail.waitFor();
      // Each line names the quote its price came from as the supplier's document below does: their code, the quote.
      const used = await detail.locator('[data-testid="quote-used"]').allTextContents();
      const docRows = page.locator('[data-testid="order-doc"] [data-testid="order-doc-page"] tbody tr');
      await expect.poll(() => docRows.count()).toBe(used.length);
      for (const [i, text] of used.entries()) {
        const cells = (await docRows.nth(i).locator('td').allTextContents()).map((c) => c.trim());
        expect(cells[10]).toMatch(/ of \d{4}-\d{2}-\d{2}$/);
        expect(text.trim()).toBe(cells[1] ? `${cells[1]}, ${cells[10]}` : cells[10]);
      }
      const line = detail.locator(`tr[data-mpn="${mpn}"]`);
      if ((await line.count()) === 0) {
        await detail.getByRole('button', { name: 'Receive all' }).click();
        await detail.locator('h3', { hasText: '✓ received' }).waitFor();
        continue;
      }
      ordered = count((await line.locator('td').nth(2).textContent())!);
      const lines = await detail.locator('tbody tr').count();
      for (let i = 0; i < lines; i++) {
        const row = detail.locator('tbody tr').nth(i);
        const q = count((await row.locator('td').nth(2).textContent())!);
        const isShared = (await row.getAttribute('data-mpn')) === mpn;
        await row.locator('input.qty').fill(String(isShared ? q - 1 : q));
      }
      await detail.getByRole('button', { name: 'Receive the quantities typed' }).click();
      await detail.locator('h3', { hasText: '◆ part-received' }).waitFor();
    }
    expect(ordered).toBeGreaterThan(firstNeed);

    // Stock: the shared part is one short of what was ordered.
    await page.goto(`${baseUrl}#/stock`);
    const stockCell = page.locator(`[data-testid="stock-table"] tr[data-mpn="${mpn}"] [data-testid="on-hand"]`);
    await expect.poll(async () => count((await stockCell.textContent()) ?? '')).toBe(ordered - 1);

    // Build the first run: its parts leave stock, and it leaves the plan. Costed with stock first, it takes the
    // shared part from stock, valued at the price paid on its order.
    await page.goto(`${baseUrl}#/plan`);
    await planAt(page, '2027-02-10');
    await page.locator(`[data-testid="plan-runs"] tbody tr`, { hasText: firstRun }).getByRole('button', { name: 'Cost with stock' }).click();
    const stockRow = page.locator('[data-testid="run-stock"] tbody tr', { hasText: mpn });
    await stockRow.waitFor();
    const cells = await stockRow.locator('td').allTextContents();
    expect([count(cells[1]!), count(cells[2]!), cells[4], count(cells[5]!)]).toEqual([firstNeed, firstNeed, 'last price paid', 0]);
    // The shared part's plan figures before the build: gross need, on hand, on order in time and net need.
    const partRow = page.locator(`[data-testid="plan-parts"] tbody tr`, { hasText: mpn });
    const figures = async (): Promise<number[]> => (await partRow.locator('td').allTextContents()).slice(2, 6).map(count);
    const [grossBefore, onHandBefore, onOrderBefore, netBefore] = await figures();
    expect(onHandBefore).toBe(ordered - 1);
    await page.locator(`[data-testid="plan-runs"] tbody tr`, { hasText: firstRun }).getByRole('button', { name: 'Mark built' }).click();
    await page.getByText(`${firstRun} is built on 2027-02-10`).waitFor();
    await expect.poll(() => runRows.count()).toBe(1);
    await expect.poll(async () => (await page.locator('[data-testid="built-runs"]').textContent()) ?? '').toContain(firstRun);
    // The second run is now planned alone: its part's gross need and on hand both fall by what the first run took,
    // and its net need stays what it was (the build issued exactly what the plan had given the first run).
    await expect.poll(figures).toEqual([grossBefore! - firstNeed, onHandBefore! - firstNeed, onOrderBefore, netBefore]);
    expect(await partRow.getAttribute('data-runs')).toBe('1');
    expect((await partRow.locator('td').nth(1).textContent()) ?? '').not.toContain(`${firstRun} (`);
    // The one part still to come is on order in time: the next plan orders nothing.
    await page.locator('[data-testid="no-suggestions"]').waitFor();

    await page.goto(`${baseUrl}#/stock`);
    await expect.poll(async () => count((await stockCell.textContent()) ?? '')).toBe(ordered - 1 - firstNeed);
    await page.locator(`[data-testid="stock-table"] tr[data-mpn="${mpn}"]`).getByRole('button', { name: 'History' }).click();
    const history = page.locator('[data-testid="stock-history"] tbody tr');
    await expect.poll(() => history.count()).toBe(2);
    await expect.poll(async () => (await history.nth(1).textContent()) ?? '').toContain(`run ${firstRun}`);
    expect(errors).toEqual([]);
  }, 180_000);

  it('imports a stock count with a column chosen instead of the guess, records it as an import and undoes it', async () => {
    const { page, errors } = await app.open('#/stock');
    const options = page.locator('select[name="part"] option[value]:not([value=""])');
    // On a fresh profile the demo Book is written first: wait for the page's part list, not a fixed second.
    await options.nth(1).waitFor({ state: 'attached', timeout: 30_000 });
    const [a, b] = (await options.allTextContents()).map((t) => t.trim());
    // "Part" reads as the part number column, but here it holds shelf labels: the part numbers are under "Ref".
    const csv = `Ref;Part;Pieces\r\n${a};shelf 1;1.250\r\n${b};shelf 2;40\r\n`;
    await page.locator('input[name="count-date"]').fill('2027-01-04');
    await page.locator('input[aria-label="stock count file"]').setInputFiles({ name: 'count-jan.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
    await expect.poll(async () => (await page.locator('[data-testid="count-read"]').textContent()) ?? '').toContain('semicolon separated');
    await expect.poll(async () => (await page.locator('[data-testid="problems-table"]').textContent()) ?? '').toContain('no column of the count found');
    await expect.poll(() => page.locator('[data-testid="count-preview"]').count()).toBe(0);

    await page.locator('select[name="column-mpn"]').selectOption('Ref');
    await page.locator('select[name="column-counted"]').selectOption('Pieces');
    const preview = page.locator('[data-testid="count-preview"] tbody tr');
    await expect.poll(() => preview.count()).toBe(2);
    await page.getByRole('button', { name: 'Record this count' }).click();
    // A semicolon file writes decimals with a comma, so "1.250" is one thousand two hundred and fifty.
    const onHandOf = (mpn: string) => page.locator(`[data-testid="stock-table"] tr[data-mpn="${mpn}"] [data-testid="on-hand"]`);
    await expect.poll(async () => count((await onHandOf(a!).textContent()) ?? '')).toBe(1250);
    await expect.poll(async () => count((await onHandOf(b!).textContent()) ?? '')).toBe(40);
    const batch = page.locator('[data-testid="count-batches"] tbody tr', { hasText: 'count-jan.csv' });
    await expect.poll(async () => (await batch.locator('td').nth(3).textContent())?.trim()).toBe('2');

    // Undone later, from its import record: on hand is as it was, the count and its reversal both stay in the
    // history, and the import is marked undone.
    await page.reload();
    await batch.getByRole('button', { name: 'Undo' }).click();
    await expect.poll(async () => (await page.getByText('The count from count-jan.csv is undone').textContent()) ?? '').toContain('2 movements reversed');
    await expect.poll(async () => count((await onHandOf(a!).textContent()) ?? '')).toBe(0);
    await expect.poll(async () => count((await onHandOf(b!).textContent()) ?? '')).toBe(0);
    await expect.poll(async () => (await batch.textContent()) ?? '').toContain('undone');
    await page.locator(`[data-testid="stock-table"] tr[data-mpn="${a}"]`).getByRole('button', { name: 'History' }).click();
    const history = page.locator('[data-testid="stock-history"] tbody tr');
    await expect.poll(() => history.count()).toBe(2);
    const rows = await history.evaluateAll((trs) => trs.map((tr) => [...tr.querySelectorAll('td')].map((td) => td.textContent!.trim())));
    expect(rows.map((r) => [r[1], count(r[2]!), count(r[3]!), r[5]])).toEqual([
      ['counted', 1250, 1250, 'stock count count-jan.csv'],
      ['adjusted', -1250, 0, 'undo of stock count count-jan.csv'],
    ]);
    expect(errors).toEqual([]);
  }, 120_000);
});
