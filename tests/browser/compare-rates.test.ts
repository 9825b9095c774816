// The Rates page in real Chromium: bad costing settings are refused beside their fields and nothing is saved; good
// ones are saved as the settings record and the Compare page costs the new run sizes with them. The pure checks of
// the settings draft and of run-size lists are run in Node (tests/unit/ui-build-costing.test.ts).
import { afterEach, describe, expect, inject, it } from 'vitest';
import { demoBook } from '../../src/domain/demo-book.ts';
import { CostingWorkbook, resolutionFromFamily } from '../../src/engine/costing.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { AppUnderTest, compareFigures, saved, WIDE_VIEWPORT } from './harness.ts';
import type { Session } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

function open(hash: string): Promise<Session> {
  return app.open(hash, { viewport: WIDE_VIEWPORT, ready: 'form[aria-label="Costing settings"]' });
}

describe('Rates page', () => {
  it('refuses bad settings beside their fields and saves nothing', async () => {
    const { page, errors } = await open('#/settings');
    await expect(page.locator('#f-runSizes').inputValue()).resolves.toBe(demo.settings.runSizes.join(', '));
    await page.locator('#f-marginPct').fill('100');
    await page.locator('#f-runSizes').fill('500, 500');
    await page.locator('[id="f-rate_USD"]').fill('');
    await page.locator('[id="f-attrition_resistor"]').fill('150');
    await page.locator('#f-costingDate').fill('2026-02-30');
    await page.getByRole('button', { name: 'Save the settings' }).click();
    for (const name of ['marginPct', 'runSizes', 'rate:USD', 'attrition:resistor', 'costingDate']) {
      await page.locator(`[data-problem-for="${name}"]`).waitFor();
    }
    await expect(page.locator('[data-problem-for="rate:USD"]').textContent()).resolves.toMatch(/quotes are in USD/);
    await page.reload();
    await page.locator('form[aria-label="Costing settings"]').waitFor();
    await expect(page.locator('#f-marginPct').inputValue()).resolves.toBe(String(demo.settings.marginPct));
    await expect(page.locator('#f-runSizes').inputValue()).resolves.toBe(demo.settings.runSizes.join(', '));
    expect(errors).toEqual([]);
  });

  it('saves new run sizes and a labour rate that the Compare page then costs with', async () => {
    const { page, errors } = await open('#/settings');
    await page.locator('#f-runSizes').fill('5000, 1000');
    await page.locator('#f-labourRatePerHour').fill('30');
    await page.getByRole('button', { name: 'Save the settings' }).click();
    await page.locator('[data-testid="settings-saved"]').waitFor();
    await saved(page);
    await expect(page.locator('#f-runSizes').inputValue()).resolves.toBe('1000, 5000');

    await page.goto(`${baseUrl}#/compare`);
    await page.locator('[data-testid="compare-table"]').waitFor();
    await compareFigures(page);
    const cells = page.locator('[data-testid="unit-cost"]');
    const runs = new Set(await cells.evaluateAll((els) => els.map((e) => Number(e.getAttribute('data-run')))));
    expect([...runs].sort((a, b) => a - b)).toEqual([1000, 5000]);
    const book = { ...demo, settings: { ...demo.settings, runSizes: [1000, 5000], labourRatePerHour: 30 } };
    const wb = CostingWorkbook.open(book, resolutionFromFamily(resolveFamily(book)));
    if (!wb.ok) throw new Error(wb.error);
    try {
      const n = await cells.count();
      for (let i = 0; i < n; i++) {
        const c = cells.nth(i);
        const code = (await c.getAttribute('data-variant'))!;
        const id = demo.variants.find((x) => x.code === code)!.id;
        expect(Number(await c.getAttribute('data-value'))).toBe(wb.value.unitCost(id, Number(await c.getAttribute('data-run'))));
      }
    } finally {
      wb.value.close();
    }
    expect(errors).toEqual([]);
  });
});
