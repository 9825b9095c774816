// A record's delete from its row in real Chromium, as the record pages share it (form-fields.ts rowActions and
// deleteFromRow): a part still used by quotes is not deleted and its row says why; a run asked about and confirmed
// is deleted and stays deleted after a reload.
import { afterEach, describe, expect, inject, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import { partUsers } from '../../src/ui/record-forms.ts';
import { AppUnderTest, readerText, saved, text } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

describe('a record deleted from its row', () => {
  it('keeps a part that quotes still use and says so on its row, also after a reload', async () => {
    const { page, errors } = await app.open('#/parts', { ready: '[data-testid="parts-table"]' });
    const part = demo.parts.find((p) => partUsers(demo, p.id) !== undefined)!;
    const row = page.locator(`[data-testid="parts-table"] tbody tr[data-id="${part.id}"]`);
    await row.getByRole('button', { name: 'delete', exact: true }).click();
    await expect(text(page, `[data-testid="parts-table"] tbody tr[data-id="${part.id}"] [role="alert"]`)).resolves.toBe(partUsers(demo, part.id));
    // Nothing was asked: there is nothing to confirm while the part is used.
    await expect(row.getByRole('button', { name: 'Delete', exact: true }).count()).resolves.toBe(0);
    await page.reload();
    await page.locator('[data-testid="parts-table"]').waitFor();
    await expect(page.locator('[data-testid="parts-table"] tbody tr').count()).resolves.toBe(demo.parts.length);
    await expect(row.count()).resolves.toBe(1);
    expect(errors).toEqual([]);
  });

  it('deletes a run once asked and confirmed, and it stays deleted after a reload', async () => {
    const { page, errors } = await app.open('#/runs', { ready: '[data-testid="runs-table"]' });
    const rows = page.locator('[data-testid="runs-table"] tbody tr');
    const run = demo.runs[0]!;
    const row = page.locator(`[data-testid="runs-table"] tbody tr[data-id="${run.id}"]`);
    await row.getByRole('button', { name: 'delete', exact: true }).click();
    await expect(text(page, `[data-testid="runs-table"] tbody tr[data-id="${run.id}"] td.acts`)).resolves.toContain(`Delete ${run.name}?`);
    await row.getByRole('button', { name: 'Delete', exact: true }).click();
    await expect.poll(() => rows.count()).toBe(demo.runs.length - 1);
    await expect(page.locator(`[data-testid="runs-table"] tbody tr [role="alert"]`).count()).resolves.toBe(0);
    await saved(page);
    await page.reload();
    await page.locator('[data-testid="runs-table"]').waitFor();
    await expect.poll(() => rows.count()).toBe(demo.runs.length - 1);
    const names = (await rows.locator('td:first-child').allTextContents()).map(readerText);
    expect(names).toEqual(demo.runs.filter((r) => r.id !== run.id).map((r) => r.name));
    expect(errors).toEqual([]);
  });
});
