// The Build page in real Chromium: a build line added through the form shows in a variant's resolved BOM with the
// quantity its rule gives; a rule that fails for some variants is refused with the reason beside its field; lines
// move up and are deleted. The pure draft rules behind the form are checked in Node (tests/unit/ui-build-rules.test.ts).
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { orderedLines } from '../../src/ui/build-rules.ts';
import { AppUnderTest, WIDE_VIEWPORT, saved } from './harness.ts';
import type { Session } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

function open(hash: string): Promise<Session> {
  return app.open(hash, { viewport: WIDE_VIEWPORT, ready: '[data-testid="build-lines"]' });
}

function variant(code: string) {
  const v = demo.variants.find((x) => x.code === code);
  if (!v) throw new Error(`demo has no variant ${code}`);
  return v;
}

async function lineCount(page: Page): Promise<number> {
  return page.locator('[data-testid="build-lines"] tbody tr').count();
}

describe('Build page', () => {
  it('adds a build line whose rules show in a variant’s resolved BOM', async () => {
    const { page, errors } = await open('#/build');
    expect(await lineCount(page)).toBe(demo.buildLines.length);
    await expect(page.locator('rb-mains-caution p').textContent()).resolves.toMatch(/can kill.*not a certification/s);

    await page.getByRole('button', { name: 'Add a build line' }).click();
    await page.locator('#f-designators').fill('R90, R91');
    await page.locator('#f-part').fill('AV-R06-100R');
    await page.locator('#f-qtyRule input').fill('steps - 1');
    await page.locator('#f-appliesWhen input').fill('supply="dropper"');
    await page.locator('#f-category').selectOption('electronics');
    await page.locator('#f-attrition').fill('2 %');
    // The preview tries the line on every variant as it is typed.
    await page.locator('[data-testid="line-preview"] span', { hasText: 'FR5-75-CD' }).waitFor();
    await page.getByRole('button', { name: 'Add the line' }).click();
    await page.locator('[data-testid="build-lines"] tbody tr', { hasText: 'R90, R91' }).waitFor();
    await saved(page);
    expect(await lineCount(page)).toBe(demo.buildLines.length + 1);

    // FR5-75-CD has steps = 5 and a dropper supply: the quantity rule gives 5 − 1 = 4 per unit (worked by hand).
    const fr5 = variant('FR5-75-CD');
    expect(fr5.params.steps).toBe(5);
    expect(fr5.params.supply).toBe('dropper');
    await page.locator('[data-testid="bom-variant"]').selectOption(fr5.id);
    const row = page.locator('[data-testid="resolved-bom"] tbody tr', { hasText: 'R90, R91' });
    await row.waitFor();
    const cells = await row.locator('td').allTextContents();
    expect(cells[1]).toContain('yes');
    expect(cells[2]).toBe('AV-R06-100R');
    expect(cells[4]).toBe('4');

    // FR5-150-RT takes its logic supply from a transformer, so the applies-when rule leaves the line out.
    const rt = variant('FR5-150-RT');
    expect(rt.params.supply).toBe('transformer');
    await page.locator('[data-testid="bom-variant"]').selectOption(rt.id);
    await page.locator('[data-testid="bom-totals"]', { hasText: 'FR5-150-RT' }).waitFor();
    expect(await page.locator('[data-testid="resolved-bom"] tbody tr', { hasText: 'R90, R91' }).count()).toBe(0);
    await page.getByLabel('only lines that are fitted').uncheck();
    await expect(page.locator('[data-testid="resolved-bom"] tbody tr', { hasText: 'R90, R91' }).locator('td').nth(1).textContent()).resolves.toContain('no');

    // Kept across a reload: it is in the Book, not only on screen.
    await page.reload();
    await page.locator('[data-testid="build-lines"] tbody tr', { hasText: 'R90, R91' }).waitFor();
    expect(errors).toEqual([]);
  });

  it('refuses a rule that fails for some variants and says which, beside the field', async () => {
    const { page, errors } = await open('#/build');
    await page.getByRole('button', { name: 'Add a build line' }).click();
    await page.locator('#f-designators').fill('R95');
    await page.locator('#f-part').fill('AV-R06-100R');
    // Only dropper variants have r_bleed; without an applies-when rule the others cannot answer.
    await page.locator('#f-qtyRule input').fill('IF(r_bleed > 500000, 2, 1)');
    await page.locator('#f-category').selectOption('electronics');
    await page.getByRole('button', { name: 'Add the line' }).click();
    const problem = page.locator('[data-problem-for="qtyRule"]');
    await problem.waitFor();
    const text = (await problem.textContent()) ?? '';
    expect(text).toContain('FR5-150-RT');
    expect(text).toContain('r_bleed');
    expect(text).not.toContain('FR5-75-CD');
    await expect(page.locator('#f-qtyRule input').getAttribute('aria-invalid')).resolves.toBe('true');
    expect(await lineCount(page)).toBe(demo.buildLines.length);

    // An unclosed bracket is refused before any variant is tried; an unknown part likewise.
    await page.locator('#f-qtyRule input').fill('IF(steps > 3, 2');
    await page.locator('#f-part').fill('NO-SUCH-PART');
    await page.getByRole('button', { name: 'Add the line' }).click();
    await expect(page.locator('[data-problem-for="qtyRule"]').textContent()).resolves.toMatch(/never closed/);
    await expect(page.locator('[data-problem-for="part"]').textContent()).resolves.toMatch(/no part NO-SUCH-PART/);
    expect(await lineCount(page)).toBe(demo.buildLines.length);
    expect(errors).toEqual([]);
  });

  it('moves a line up and deletes a line after asking', async () => {
    const { page, errors } = await open('#/build');
    const designators = async (): Promise<string[]> =>
      page.locator('[data-testid="build-lines"] tbody tr td:nth-child(2)').allTextContents();
    const before = await designators();
    const order = orderedLines(demo).map((l) => l.designators);
    expect(before).toEqual(order);
    await page.getByRole('button', { name: `Move ${order[1]} up` }).click();
    await saved(page);
    await expect.poll(designators).toEqual([order[1], order[0], ...order.slice(2)]);

    const last = order[order.length - 1]!;
    const row = page.locator('[data-testid="build-lines"] tbody tr', { hasText: last }).last();
    await row.getByRole('button', { name: 'delete' }).click();
    await row.getByRole('button', { name: 'Keep' }).click();
    expect(await lineCount(page)).toBe(order.length);
    await row.getByRole('button', { name: 'delete' }).click();
    await row.getByRole('button', { name: 'Delete' }).click();
    await saved(page);
    await expect.poll(() => lineCount(page)).toBe(order.length - 1);
    expect(errors).toEqual([]);
  });
});
