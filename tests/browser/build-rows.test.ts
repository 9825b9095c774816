// The Build page's rows in real Chromium: a row is drawn again only when something it shows changed, so what it shows
// must follow every change it reads — the line itself, its part as the Parts page holds it, and its standing across
// the variants once the figures have it.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { AppUnderTest, WIDE_VIEWPORT, railTo, saved, text } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

const line = demo.buildLines.find((l) => /^\d+$/.test(l.qtyRule) && l.appliesWhen === '' && l.partId !== undefined)!;
const part = demo.parts.find((p) => p.id === line.partId)!;
const other = demo.buildLines.find((l) => l.id !== line.id && l.partId !== undefined && l.partId !== line.partId)!;
const row = (page: Page, id: string) => page.locator(`[data-testid="build-lines"] tbody tr[data-id="${id}"]`);

describe('Build page rows', () => {
  it('follow a part renamed on the Parts page and a line edit with its undo, leaving the other rows as they were', async () => {
    const { page, errors } = await app.open('#/build', { viewport: WIDE_VIEWPORT, ready: '[data-testid="build-lines"]' });
    await saved(page);
    const otherBefore = await text(page, `[data-testid="build-lines"] tbody tr[data-id="${other.id}"]`);
    await row(page, line.id).locator('td', { hasText: part.description }).first().waitFor();

    // The part's description changed on the Parts page shows in the line's row on the way back.
    const described = `${part.description} (second source wanted)`;
    await railTo(page, '#/parts');
    await page.locator(`[data-testid="parts-table"] tbody tr[data-id="${part.id}"]`).getByRole('button', { name: 'edit' }).click();
    await page.locator('#f-description').fill(described);
    await page.getByRole('button', { name: 'Save the part' }).click();
    await page.locator(`[data-testid="parts-table"] tbody tr[data-id="${part.id}"]`, { hasText: described }).waitFor();
    await saved(page);
    await railTo(page, '#/build');
    await row(page, line.id).locator('td', { hasText: described }).first().waitFor();

    // A quantity edit shows in its row, and its undo puts the row back; the other line's row reads as before.
    const more = String(Number(line.qtyRule) + 1);
    await row(page, line.id).getByRole('button', { name: 'edit' }).click();
    await page.locator('#f-qtyRule input').fill(more);
    await page.getByRole('button', { name: 'Save the line' }).click();
    await saved(page);
    await row(page, line.id).locator('[data-testid="line-status"]', { hasText: /\d+ of \d+/ }).waitFor();
    await expect(row(page, line.id).locator('td.rule').nth(1).locator('code').first().textContent()).resolves.toBe(more);
    await page.getByTestId('build-undo').click();
    await saved(page);
    await expect.poll(() => row(page, line.id).locator('td.rule').nth(1).locator('code').first().textContent()).toBe(line.qtyRule);
    await expect(text(page, `[data-testid="build-lines"] tbody tr[data-id="${other.id}"]`)).resolves.toBe(otherBefore);
    expect(errors).toEqual([]);
  });
});
