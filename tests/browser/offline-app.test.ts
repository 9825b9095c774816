// The built app with the network gone: after one visit the service worker holds every file, so the app reloads,
// opens every page and saves edits offline; back online, nothing was lost. The manifest makes it installable.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { demoBook } from '../../src/domain/demo-book.ts';
import { PAGES } from '../../src/ui/pages.ts';
import { AppUnderTest, pageLoaded, partRows, railTo, saved } from './harness.ts';

const baseUrl = inject('baseUrl');
const demo = demoBook();

const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

/** Waits until the service worker has stored the app and answers this page's requests. */
async function offlineReady(page: Page): Promise<void> {
  await page.evaluate(async () => {
    await navigator.serviceWorker.ready;
  });
  await page.waitForFunction(() => navigator.serviceWorker.controller !== null);
}

describe('the app offline', () => {
  it('reloads, opens every page and keeps an edit made with the network gone', async () => {
    const { page, context, errors, foreignRequests } = await app.open('#/parts');
    expect(await partRows(page)).toBe(demo.parts.length);
    await offlineReady(page);

    expect(errors).toEqual([]);
    await context.setOffline(true);
    // A file the worker never stored proves the network really is gone for this page.
    const reached = await page.evaluate(async () => {
      try {
        await fetch(`/never-stored-${Date.now()}.txt`);
        return true;
      } catch {
        return false;
      }
    });
    expect(reached).toBe(false);
    // That refused fetch is logged as a console error on purpose; from here on there must be none.
    errors.splice(0);

    await page.reload();
    expect(await partRows(page)).toBe(demo.parts.length);
    // Every page of the rail loads its code from the worker's store.
    for (const p of PAGES) {
      await railTo(page, `#/${p.slug}`);
      await pageLoaded(page, p.title);
    }
    await expect(page.locator('[data-testid="notice"]').count()).resolves.toBe(0);

    await railTo(page, '#/parts');
    await page.getByRole('button', { name: 'Add a part' }).click();
    await page.locator('#f-mpn').fill('ZZ-OFFLINE-1');
    await page.locator('#f-maker').fill('Invented Test Works');
    await page.locator('#f-description').fill('part added with the network gone');
    await page.locator('#f-kind').selectOption('resistor');
    await page.locator('#f-value').fill('10k');
    await page.locator('#f-package').fill('0603');
    await page.getByRole('button', { name: 'Add the part' }).click();
    const row = page.locator('[data-testid="parts-table"] tbody tr', { hasText: 'ZZ-OFFLINE-1' });
    await row.waitFor();
    await saved(page);

    await page.reload();
    await row.waitFor();

    await context.setOffline(false);
    await page.reload();
    await row.waitFor();
    expect(await partRows(page)).toBe(demo.parts.length + 1);
    await expect(row.textContent()).resolves.toMatch(/10 kΩ/);
    expect(errors).toEqual([]);
    expect(foreignRequests).toEqual([]);
  });

  it('is installable: the manifest names the app and icons of our own, and the worker controls the page', async () => {
    const { page, errors } = await app.open('#/family');
    await offlineReady(page);
    const manifest = await page.evaluate(async () => {
      const href = document.querySelector<HTMLLinkElement>('link[rel="manifest"]')!.href;
      const m = (await (await fetch(href)).json()) as { name: string; start_url: string; display: string; icons: { src: string; sizes: string }[] };
      const icons = await Promise.all(m.icons.map(async (i) => (await fetch(new URL(i.src, href))).status));
      return { ...m, iconStatus: icons };
    });
    expect(manifest.name).toBe('Rungbook');
    expect(manifest.display).toBe('standalone');
    // Installability in Chromium wants icons of at least 192 px and 512 px (common practice, from memory).
    expect(manifest.icons.map((i) => i.sizes)).toEqual(expect.arrayContaining(['192x192', '512x512']));
    expect(manifest.iconStatus.every((s) => s === 200)).toBe(true);
    const scope = await page.evaluate(async () => (await navigator.serviceWorker.getRegistration())?.scope);
    expect(scope).toBe(baseUrl);
    expect(errors).toEqual([]);
  });
});
