// The first view shows unit costs with its first table: on a first start from the demo Book's figures the build
// ships, on later starts from the figures kept for the Book; in both cases the figures worker's own answer, which
// comes later, shows the same costs.
import { afterEach, describe, expect, inject, it } from 'vitest';
import type { Page } from 'playwright-core';
import { DEEP_QUERY } from '../bench/responsive.ts';
import { AppUnderTest, figuresShown } from './harness.ts';

const baseUrl = inject('baseUrl');
const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

/**
 * Runs before the app's scripts: at the first animation frame in which the Family page's "at a glance" table has
 * rows, notes the text of its cost cells (a figure, or "…" while being worked out).
 */
const FIRST_FRAME_PROBE = `(() => {
  ${DEEP_QUERY}
  const tick = () => {
    const glance = deep(document, '[data-testid="family-glance"]');
    const cells = glance ? [...glance.querySelectorAll('tbody td.num')] : [];
    if (cells.length > 0) window.__rbFirstFrame = cells.map((c) => c.textContent.trim());
    else requestAnimationFrame(tick);
  };
  requestAnimationFrame(tick);
})();`;

/**
 * Runs before the app's scripts: notes when the first figures worker is made and when the offline copy is asked for,
 * and the time of the first frame with the "at a glance" table.
 */
const START_ORDER_PROBE = `(() => {
  ${DEEP_QUERY}
  window.__rbStart = {};
  const Made = window.Worker;
  window.Worker = class extends Made {
    constructor(url, options) {
      super(url, options);
      if (String(url).includes('figures-worker') && window.__rbStart.worker === undefined) window.__rbStart.worker = performance.now();
    }
  };
  const register = navigator.serviceWorker.register.bind(navigator.serviceWorker);
  navigator.serviceWorker.register = (...args) => {
    if (window.__rbStart.offline === undefined) window.__rbStart.offline = performance.now();
    return register(...args);
  };
  const tick = () => {
    const glance = deep(document, '[data-testid="family-glance"]');
    if (glance && glance.querySelector('tbody td.num')) window.__rbStart.frame = performance.now();
    else requestAnimationFrame(tick);
  };
  requestAnimationFrame(tick);
})();`;

async function firstFrame(page: Page): Promise<string[]> {
  await page.waitForFunction(() => (window as unknown as { __rbFirstFrame?: string[] }).__rbFirstFrame !== undefined, undefined, { timeout: 60_000 });
  return page.evaluate(() => (window as unknown as { __rbFirstFrame: string[] }).__rbFirstFrame);
}

async function glanceCosts(page: Page): Promise<string[]> {
  await figuresShown(page);
  return page.locator('[data-testid="family-glance"] tbody td.num').allTextContents().then((t) => t.map((s) => s.trim()));
}

/** The figures kept in this browser for the Book `rungbook`: their key, or undefined. */
async function keptKey(page: Page): Promise<string | undefined> {
  return page.evaluate(
    () =>
      new Promise<string | undefined>((resolve) => {
        // Opening a database that does not exist would make it: look first.
        void indexedDB.databases().then((all) => {
          if (!all.some((d) => d.name === 'kept-figures.rungbook')) return resolve(undefined);
          const open = indexedDB.open('kept-figures.rungbook');
          open.onerror = () => resolve(undefined);
          open.onsuccess = () => {
            const db = open.result;
            if (!db.objectStoreNames.contains('kept')) {
              db.close();
              return resolve(undefined);
            }
            const get = db.transaction('kept').objectStore('kept').get('rungbook');
            get.onsuccess = () => resolve((get.result as { key?: string } | undefined)?.key);
            get.onerror = () => resolve(undefined);
            // Closed at once, so the app's own connection is never kept waiting.
            db.close();
          };
        });
      }),
  );
}

describe('the first view', () => {
  it('shows the unit costs with the first table on a first start and after a reload, the same as the figures worker gives', async () => {
    const { page, context, errors } = await app.start();
    await context.addInitScript({ content: FIRST_FRAME_PROBE });
    await page.goto(`${baseUrl}#/family`);
    const first = await firstFrame(page);
    expect(first.length).toBeGreaterThan(0);
    // Every cost cell held a figure in the very frame the table first appeared (shipped with the build).
    expect(first.every((t) => /\d/.test(t))).toBe(true);
    // The figures worker's answer, once in, shows the same costs.
    await expect.poll(() => keptKey(page), { timeout: 60_000 }).toBeDefined();
    expect(await glanceCosts(page)).toEqual(first);

    // A later start: the figures kept for the Book are shown with the first table.
    await page.reload();
    const again = await firstFrame(page);
    expect(again).toEqual(first);
    expect(await glanceCosts(page)).toEqual(first);
    expect(errors).toEqual([]);
  });

  it('leaves the CPU to the first view: the figures worker and the offline copy start after it, and the Family page code is fetched with the app code', async () => {
    const { page, context, errors } = await app.start();
    await context.addInitScript({ content: START_ORDER_PROBE });
    await page.goto(`${baseUrl}#/family`);
    type Start = { frame?: number; worker?: number; offline?: number };
    const started = (): Promise<Start> => page.evaluate(() => ({ ...(window as unknown as { __rbStart: Start }).__rbStart }));
    await expect.poll(async () => { const s = await started(); return s.worker !== undefined && s.offline !== undefined; }, { timeout: 60_000 }).toBe(true);
    const first = await started();
    // On a first start the shipped figures are shown; only then do the worker and the offline copy start.
    expect(first.frame).toBeDefined();
    expect(first.worker!).toBeGreaterThan(first.frame!);
    expect(first.offline!).toBeGreaterThan(first.frame!);
    // The page that most starts open has its code asked for by the app page itself, beside the app's own code.
    const preloaded = await page.evaluate(() => [...document.querySelectorAll('link[rel="modulepreload"]')].map((l) => l.getAttribute('href') ?? ''));
    expect(preloaded.some((h) => /\/rb-family-page-[\w-]+\.js$/.test(h))).toBe(true);
    // The code a start runs comes in a few files (a browser fetches six at a time from one server), not thirty.
    expect(preloaded.length).toBeLessThanOrEqual(3);

    // A later start with kept figures: the same order.
    await expect.poll(() => keptKey(page), { timeout: 60_000 }).toBeDefined();
    await page.reload();
    await expect.poll(async () => (await started()).worker !== undefined, { timeout: 60_000 }).toBe(true);
    const again = await started();
    expect(again.worker!).toBeGreaterThan(again.frame!);
    expect(errors).toEqual([]);
  });
});
