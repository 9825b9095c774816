// The Compare page in real Chromium on the demo Book: unit costs equal the costing workbook's figures, a what-if
// exchange rate moves them by exactly the workbook's amounts and is discarded or kept, a what-if labour time moves
// every unit cost by the hand-worked standard-cost amount, another run size is costed on the spot, and the charts and
// the difference table add up to the unit costs.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { CostingWorkbook, resolutionFromFamily } from '../../src/engine/costing.ts';
import { resolveFamily } from '../../src/engine/family.ts';
import { AppUnderTest, WIDE_VIEWPORT, compareFigures, saved } from './harness.ts';
import type { Session } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();
const resolution = resolutionFromFamily(resolveFamily(demo));

function workbook(): CostingWorkbook {
  const r = CostingWorkbook.open(demo, resolution);
  if (!r.ok) throw new Error(r.error);
  return r.value;
}

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

function open(hash: string): Promise<Session> {
  return app.open(hash, { viewport: WIDE_VIEWPORT, ready: '[data-testid="compare-table"]' });
}

type Shown = { code: string; run: number; value: number };

/** Every unit cost on the page, as the number behind the cell. */
async function shownCosts(page: Page): Promise<Shown[]> {
  await compareFigures(page);
  const cells = page.locator('[data-testid="unit-cost"]');
  const n = await cells.count();
  const out: Shown[] = [];
  for (let i = 0; i < n; i++) {
    const c = cells.nth(i);
    out.push({
      code: (await c.getAttribute('data-variant'))!,
      run: Number(await c.getAttribute('data-run')),
      value: Number((await c.getAttribute('data-value')) || NaN),
    });
  }
  return out;
}

function expected(wb: CostingWorkbook, shown: Shown[]): number[] {
  return shown.map((s) => {
    const v = demo.variants.find((x) => x.code === s.code)!;
    if (demo.settings.runSizes.includes(s.run)) return wb.unitCost(v.id, s.run);
    // A run size the Book does not list has no cell; its costed BOM gives the same figure.
    const bom = wb.costedBom(v.id, s.run);
    return bom.ok && bom.value.complete ? bom.value.unitCost : NaN;
  });
}

async function setWhatIf(page: Page, key: string, value: string): Promise<void> {
  await page.locator(`[data-whatif="${key}"]`).fill(value);
}

describe('Compare page', () => {
  it('shows unit costs equal to the costing workbook’s for the demo Book', async () => {
    const { page, errors } = await open('#/compare');
    await expect(page.locator('rb-mains-caution p').textContent()).resolves.toMatch(/can kill.*not a certification/s);
    const shown = await shownCosts(page);
    const codes = new Set(shown.map((s) => s.code));
    expect(codes.size).toBeGreaterThanOrEqual(2);
    expect(shown.length).toBe(codes.size * demo.settings.runSizes.length);
    const wb = workbook();
    try {
      const want = expected(wb, shown);
      expect(want.every((x) => Number.isFinite(x))).toBe(true);
      expect(shown.map((s) => s.value)).toEqual(want);
      // The figure on screen is the same number, to the cent as money is shown on every page, with tabular numerals.
      const first = page.locator('[data-testid="unit-cost"]').first();
      await expect(first.textContent()).resolves.toContain(want[0]!.toFixed(2));
    } finally {
      wb.close();
    }
    expect(errors).toEqual([]);
  });

  it('moves every figure with a what-if exchange rate, then discards it or keeps it in the Book', async () => {
    const { page, errors } = await open('#/compare');
    const before = await shownCosts(page);
    await setWhatIf(page, 'rate:USD', '1.1');
    await page.locator('[data-testid="whatif-bar"]', { hasText: 'What-if: 1 edit' }).waitFor();
    const after = await shownCosts(page);
    const wb = workbook();
    try {
      expect(wb.setRate('USD', 1.1).ok).toBe(true);
      const want = expected(wb, after);
      expect(after.map((s) => s.value)).toEqual(want);
    } finally {
      wb.close();
    }
    // The demo buys some parts in USD, so a dearer dollar raises some unit costs and lowers none.
    expect(after.some((s, i) => s.value > before[i]!.value)).toBe(true);
    expect(after.every((s, i) => s.value >= before[i]!.value)).toBe(true);
    await expect(page.locator('#side-h').textContent()).resolves.toContain('with what-if');

    // A bad rate is refused beside its field and changes nothing.
    await setWhatIf(page, 'rate:USD', '-2');
    await expect(page.locator('[data-whatif="rate:USD"]').getAttribute('aria-invalid')).resolves.toBe('true');
    expect((await shownCosts(page)).map((s) => s.value)).toEqual(after.map((s) => s.value));

    await page.getByRole('button', { name: 'Discard' }).click();
    await expect.poll(async () => (await shownCosts(page)).map((s) => s.value)).toEqual(before.map((s) => s.value));
    expect(await page.locator('[data-testid="whatif-bar"]').count()).toBe(0);

    await setWhatIf(page, 'rate:USD', '1.1');
    await page.getByRole('button', { name: 'Keep in the Book' }).click();
    await page.locator('[data-testid="notice"]', { hasText: 'kept in the Book' }).waitFor();
    await saved(page);
    await page.reload();
    await page.locator('[data-testid="compare-table"]').waitFor();
    expect((await shownCosts(page)).map((s) => s.value)).toEqual(after.map((s) => s.value));
    expect(await page.locator('[data-testid="whatif-bar"]').count()).toBe(0);
    await expect(page.locator('[data-whatif="rate:USD"]').inputValue()).resolves.toBe('1.1');
    expect(errors).toEqual([]);
  });

  it('adds the hand-worked labour and overhead to every unit cost when labour minutes per unit rise', async () => {
    const { page, errors } = await open('#/compare');
    const before = await shownCosts(page);
    // Standard cost = material + labour + overhead, overhead as a share of labour (cost-accounting textbooks,
    // from memory). Demo: 24 per hour, overhead 18 %. 6 → 12 minutes per unit:
    // labour +6/60 h × 24 = +2.40; overhead +18 % × 2.40 = +0.432; unit cost +2.832. Each figure is rounded to
    // 4 decimals on its own, so the step may differ from 2.832 by at most 0.0001.
    expect(demo.settings.labourRatePerHour).toBe(24);
    expect(demo.settings.overheadPct).toBe(18);
    expect(demo.settings.labourMinutesPerUnit).toBe(6);
    await setWhatIf(page, 'labourMinutesPerUnit', '12');
    await page.locator('[data-testid="whatif-bar"]').waitFor();
    const after = await shownCosts(page);
    after.forEach((s, i) => expect(Math.abs(s.value - before[i]!.value - 2.832)).toBeLessThanOrEqual(0.0001 + 1e-9));
    expect(errors).toEqual([]);
  });

  it('costs a what-if run size on the spot and its charts and differences add up', async () => {
    const { page, errors } = await open('#/compare');
    await setWhatIf(page, 'runs', '500, 2000, 10000, 20000');
    await page.locator('[data-testid="unit-cost"][data-run="20000"]').first().waitFor();
    const shown = await shownCosts(page);
    const wb = workbook();
    try {
      expect(shown.map((s) => s.value)).toEqual(expected(wb, shown));
    } finally {
      wb.close();
    }
    // Bigger runs never cost more per unit here: the curve falls (all-units price breaks only lower the price).
    const codes = [...new Set(shown.map((s) => s.code))];
    for (const code of codes) {
      const row = shown.filter((s) => s.code === code).sort((a, b) => a.run - b.run);
      for (let i = 1; i < row.length; i++) expect(row[i]!.value).toBeLessThanOrEqual(row[i - 1]!.value);
    }

    // The bars' table at 2,000: each row's parts add up to its unit cost.
    const table = page.locator('[data-testid="split-chart"] table');
    const rows = table.locator('tbody tr');
    const n = await rows.count();
    expect(n).toBe(codes.length);
    for (let r = 0; r < n; r++) {
      const cells = (await rows.nth(r).locator('td').allTextContents()).map((t) => t.trim());
      const code = cells[0]!;
      const parts = cells.slice(1, -1).map(Number);
      const total = Number(cells[cells.length - 1]);
      const cost = shown.find((s) => s.code === code && s.run === 2000)!.value;
      expect(total).toBeCloseTo(cost, 2);
      expect(parts.reduce((a, b) => a + b, 0)).toBeCloseTo(total, 1);
    }
    expect(await page.locator('[data-testid="curve-chart"] g[data-series]').count()).toBe(codes.length);

    // The difference table's total is unit cost B − A at the same run size, to the cent as money is shown.
    const total = (await page.locator('[data-testid="difference-total"]').textContent())!.replace('−', '-').replace('+', '');
    const a = shown.find((s) => s.code === codes[0] && s.run === 2000)!.value;
    const b = shown.find((s) => s.code === codes[1] && s.run === 2000)!.value;
    expect(Number(total)).toBeCloseTo(b - a, 2);
    expect(errors).toEqual([]);
  });
});
