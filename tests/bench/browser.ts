// Browser figures of the benchmark, in Debian's headless Chromium: the built app's first view of the Family page,
// and on the bench page (tests/bench/page) the costing measurements and the app's price import into IndexedDB.
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium } from 'playwright-core';
import type { BrowserContext, Page } from 'playwright-core';
import { preview } from 'vite';
import type { PreviewServer } from 'vite';
import { CHROMIUM_FLAGS, CHROMIUM_PATH } from '../browser/harness.ts';
import { PROJECT_ROOT, builtApp, scratchDir, viteBuild } from './bundle.ts';
import type { BenchOptions, BenchSection, Figures } from './harness.ts';
import { IMPORT_SAMPLE } from './import.ts';
import { referenceImportBook, writeBookFile } from './book-file.ts';
import { responsiveFigures } from './responsive.ts';
import { median, oneLine, round } from './stats.ts';

const FLAGS = [
  ...CHROMIUM_FLAGS,
  // window.gc and exact performance.memory, for heap figures taken after a full collection.
  '--js-flags=--expose-gc',
  '--enable-precise-memory-info',
];

/** Rows of the browser import in a quick run (the full run imports the 50,000-row file). */
export const QUICK_IMPORT_ROWS = 10_000;

/**
 * What counts as "costs shown" on the Family page: a cell holding a figure, found by one of these (container, cell)
 * pairs. The page repeats every unit cost in its "at a glance" table (the td.num cells after the checks column); the
 * other marks keep the figure working if cost cells get marked another way. Without any, first_view_ms is measured
 * to the family table's first row, and the JSON says so.
 */
export const FAMILY_COST_CELLS = [
  { container: '[data-testid="family-glance"]', cell: 'tbody td.num' },
  { container: '[data-testid="family-table"]', cell: '[data-unit-cost]' },
  { container: '[data-testid="family-table"]', cell: 'td.unit-cost' },
] as const;

/**
 * Runs in every document before the app's scripts: each animation frame it looks (through shadow roots) for the
 * family table and a cost cell, and notes the time since navigation start. A string, so no build helper leaks in.
 */
export function firstViewProbe(costCells: readonly { container: string; cell: string }[]): string {
  return `(() => {
  if (location.pathname.includes('/tests/bench/')) return;
  const found = {};
  window.__rbFirstView = found;
  const marks = ${JSON.stringify(costCells)};
  const deep = (root, sel) => {
    const hit = root.querySelector(sel);
    if (hit) return hit;
    for (const el of root.querySelectorAll('*')) {
      if (el.shadowRoot) {
        const inner = deep(el.shadowRoot, sel);
        if (inner) return inner;
      }
    }
    return null;
  };
  const tick = () => {
    const table = deep(document, '[data-testid="family-table"]');
    if (table && found.table === undefined && table.querySelector('tbody tr')) found.table = performance.now();
    if (found.cost === undefined) {
      for (const m of marks) {
        const container = deep(document, m.container);
        if (!container) continue;
        const shown = [...container.querySelectorAll(m.cell)].some((c) => /[0-9]/.test(c.textContent || ''));
        if (shown) {
          found.cost = performance.now();
          found.costSelector = m.container + ' ' + m.cell;
          break;
        }
      }
    }
    if (found.cost === undefined && performance.now() < 30000) requestAnimationFrame(tick);
  };
  requestAnimationFrame(tick);
})();`;
}

interface FirstView {
  table?: number;
  cost?: number;
  costSelector?: string;
}

export async function serve(configFile: string, outDir: string): Promise<{ server: PreviewServer; url: string }> {
  const server = await preview({
    configFile,
    root: PROJECT_ROOT,
    build: { outDir },
    preview: { port: 0, host: '127.0.0.1', strictPort: false },
    logLevel: 'warn',
  });
  const address = server.httpServer.address();
  if (!address || typeof address === 'string') throw new Error('the preview server has no port');
  return { server, url: `http://127.0.0.1:${address.port}/` };
}

/** One visit: navigation start → family table (and cost cell when the page has one), in ms. */
async function visit(page: Page, load: () => Promise<unknown>): Promise<FirstView> {
  await load();
  await page.waitForFunction(() => (window as unknown as { __rbFirstView?: FirstView }).__rbFirstView?.table !== undefined, undefined, {
    timeout: 30_000,
  });
  // Costs may appear a little after the rows; give them a few seconds before deciding the page has none.
  await page
    .waitForFunction(() => (window as unknown as { __rbFirstView?: FirstView }).__rbFirstView?.cost !== undefined, undefined, { timeout: 5_000 })
    .catch(() => undefined);
  return page.evaluate(() => ({ ...(window as unknown as { __rbFirstView: FirstView }).__rbFirstView }));
}

export async function firstViewFigures(context: BrowserContext, appUrl: string, quick: boolean, log: (t: string) => void): Promise<Figures> {
  log('browser: first view of the Family page (fresh profile)');
  await context.addInitScript({ content: firstViewProbe(FAMILY_COST_CELLS) });
  const page = await context.newPage();
  const url = `${appUrl}#/family`;
  const cold = await visit(page, () => page.goto(url, { waitUntil: 'commit' }));
  // A returning visit: let the offline copy finish installing first, as it would between two working days.
  await page
    .evaluate(() => Promise.race([navigator.serviceWorker?.ready.then(() => true), new Promise((r) => setTimeout(() => r(false), 5_000))]))
    .catch(() => undefined);
  const userAgent = await page.evaluate(() => navigator.userAgent);
  const warm: FirstView[] = [];
  for (let i = 0; i < (quick ? 2 : 5); i++) warm.push(await visit(page, () => page.reload({ waitUntil: 'commit' })));
  await page.close();
  const shown = (v: FirstView): number => v.cost ?? v.table!;
  const f: Figures = {
    chromium: /Chrome\/([\d.]+)/.exec(userAgent)?.[1] ?? 'unknown',
    first_view_ms: round(shown(cold)),
    first_view_warm_ms: round(median(warm.map(shown))),
    // Each reload's figure, in order: the median hides whether a slow one is the first reload or any.
    first_view_warm_each_ms: warm.map((v) => round(shown(v))).join(' '),
    first_view_table_ms: round(cold.table!),
    first_view_book: 'demo Book written on first start of a fresh browser profile; warm = reload with the offline copy installed',
  };
  f['first_view_note'] =
    cold.cost !== undefined
      ? `measured to the first unit cost shown on the Family page (${cold.costSelector})`
      : `the Family page showed no unit cost (${FAMILY_COST_CELLS.map((m) => `${m.container} ${m.cell}`).join(', ')}): measured to the family table's first row`;
  return f;
}

interface FreshBrowser {
  context: BrowserContext;
  /** Closes the browser and removes its profile. */
  close(): Promise<void>;
}

/** Chromium on a fresh profile of its own, as on a first start in a new browser. */
async function freshBrowser(): Promise<FreshBrowser> {
  const profile = mkdtempSync(join(tmpdir(), 'rungbook-bench-chromium-'));
  const context = await chromium
    .launchPersistentContext(profile, { executablePath: CHROMIUM_PATH, headless: true, args: FLAGS })
    .catch((e: unknown) => {
      rmSync(profile, { recursive: true, force: true });
      throw e;
    });
  return {
    context,
    async close() {
      await context.close().catch(() => undefined);
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** Longest gap between animation frames since the probe was (re)started, in ms: how long the page could not draw. */
async function startFrameProbe(page: Page): Promise<void> {
  // A string, so no build helper leaks into the page.
  await page.evaluate(`(() => {
    const probe = { max: 0, last: performance.now() };
    window.__rbGap = probe;
    const tick = () => {
      const now = performance.now();
      probe.max = Math.max(probe.max, now - probe.last);
      probe.last = now;
      if (window.__rbGap === probe) requestAnimationFrame(tick);
    };
    requestAnimationFrame(tick);
  })()`);
}

async function frameGap(page: Page): Promise<number> {
  return page.evaluate('Math.max(window.__rbGap.max, performance.now() - window.__rbGap.last)') as Promise<number>;
}

/**
 * Opening a large Book file in the built app: from choosing the file to the question to replace the Book (read,
 * JSON.parse and validation in the worker), then from the answer to the Family page showing the opened Book (saved
 * into IndexedDB and read back). The person's time to answer is not counted. The longest frame gap of each stage
 * says whether the page kept drawing.
 */
export async function bookOpenFigures(context: BrowserContext, appUrl: string, quick: boolean, log: (t: string) => void): Promise<Figures> {
  const book = await referenceImportBook(quick ? QUICK_IMPORT_ROWS : IMPORT_SAMPLE.rows);
  const file = writeBookFile('open-in-browser.rungbook.json', book);
  const prefix = quick ? 'book_open_browser_small' : 'book_open_browser';
  log(`browser: opening a ${round(file.bytes / 1_048_576, 1)} MB Book file (${book.quotes.length} quotes) through the Book menu`);
  const page = await context.newPage();
  try {
    await page.goto(`${appUrl}#/family`);
    await page.locator('[data-testid="family-table"] tbody tr').first().waitFor({ timeout: 60_000 });
    await startFrameProbe(page);
    const t0 = performance.now();
    await page.locator('rb-book-menu input[type="file"]').setInputFiles(file.path);
    const dialog = page.locator('rb-book-menu dialog[open]');
    await dialog.waitFor({ timeout: 180_000 });
    const read = performance.now() - t0;
    const readGap = await frameGap(page);
    await startFrameProbe(page);
    const t1 = performance.now();
    await dialog.getByRole('button', { name: 'Replace with the file' }).click();
    await page.locator('[data-testid="notice"]', { hasText: 'Opened' }).waitFor({ timeout: 180_000 });
    await page.locator('[data-testid="family-table"] tbody tr').first().waitFor({ timeout: 60_000 });
    const shown = performance.now() - t1;
    const shownGap = await frameGap(page);
    return {
      [`${prefix}_file`]: `reference family + ${quick ? QUICK_IMPORT_ROWS : IMPORT_SAMPLE.rows}-row import: ${book.quotes.length} quotes, ${round(file.bytes / 1_048_576, 1)} MB`,
      [`${prefix}_ms`]: round(read + shown),
      [`${prefix}_read_ms`]: round(read),
      [`${prefix}_read_max_frame_gap_ms`]: round(readGap),
      [`${prefix}_save_show_ms`]: round(shown),
      [`${prefix}_save_show_max_frame_gap_ms`]: round(shownGap),
    };
  } finally {
    await page.close();
  }
}

async function benchPageFigures(context: BrowserContext, pageUrl: string, quick: boolean, log: (t: string) => void): Promise<Figures> {
  const page = await context.newPage();
  const errors: string[] = [];
  page.on('console', (m) => {
    const text = m.text();
    if (text.startsWith('bench: ')) log(`browser ${text.slice(7)}`);
    else if (m.type() === 'error') errors.push(text);
  });
  page.on('pageerror', (e) => errors.push(String(e)));
  await page.goto(`${pageUrl}tests/bench/page/index.html`);
  await page.waitForFunction(() => window.rbBench !== undefined, undefined, { timeout: 30_000 });
  const f: Figures = {};
  try {
    // The naive layout takes several seconds per build: only the full run repeats it in the browser.
    const costing = await page.evaluate(([q, naive]) => window.rbBench!.costing(q, naive), [quick, !quick] as const);
    for (const [k, v] of Object.entries(costing)) if (k !== 'gen_ms' && k !== 'family' && k !== 'large_family') f[`browser_${k}`] = v;
    const planning = await page.evaluate((q) => window.rbBench!.planning(q), quick);
    for (const [k, v] of Object.entries(planning)) if (k !== 'planning_family') f[`browser_${k}`] = v;
    // Writing 75,000 records into IndexedDB takes tens of seconds on a busy machine: the quick run imports a smaller
    // file and names its figures import_browser_small_*, so they are never read as the 50,000-row figure.
    const sample = quick ? { ...IMPORT_SAMPLE, rows: QUICK_IMPORT_ROWS } : IMPORT_SAMPLE;
    log(`browser: price import of ${sample.rows} rows through the worker into IndexedDB`);
    const runs: Figures[] = [];
    for (let i = 0; i < (quick ? 1 : 3); i++) runs.push(await page.evaluate((s) => window.rbBench!.importPrices(s), sample));
    // Report the median run whole (its parts add up), not medians of each part.
    const byTotal = [...runs].sort((a, b) => (a['import_browser_ms'] as number) - (b['import_browser_ms'] as number));
    for (const [k, v] of Object.entries(byTotal[byTotal.length >> 1]!)) f[quick ? k.replace('import_browser_', 'import_browser_small_') : k] = v;
  } finally {
    await page.close();
  }
  if (errors.length > 0) f['browser_page_errors'] = errors.slice(0, 3).join(' | ');
  return f;
}

export const browserSection: BenchSection = {
  name: 'browser (Chromium)',
  async run({ quick, log }: BenchOptions): Promise<Figures> {
    if (!existsSync(CHROMIUM_PATH)) throw new Error(`no Chromium at ${CHROMIUM_PATH} (set RUNGBOOK_CHROMIUM to its path)`);
    log('browser: building the app and the bench page');
    // Either half can fail on its own (a build error, a page that never shows its table); the other still reports.
    const problems: string[] = [];
    const appDir = await builtApp().catch((e: unknown) => void problems.push(`app build: ${oneLine(e, 300)}`));
    const pageDir = join(scratchDir(), 'page');
    const pageConfig = join(PROJECT_ROOT, 'tests/bench/vite.config.ts');
    const pageBuilt = await viteBuild(pageConfig, pageDir).then(
      () => true,
      (e: unknown) => void problems.push(`bench page build: ${oneLine(e, 300)}`),
    );
    if (!appDir && !pageBuilt) throw new Error(problems.join('; '));
    const servers: PreviewServer[] = [];
    let browser: FreshBrowser | undefined;
    try {
      browser = await freshBrowser();
      const context = browser.context;
      const f: Figures = {};
      if (appDir) {
        const app = await serve(join(PROJECT_ROOT, 'vite.config.ts'), appDir);
        servers.push(app.server);
        await firstViewFigures(context, app.url, quick, log).then(
          (figures) => Object.assign(f, figures),
          (e: unknown) => void problems.push(`first view: ${oneLine(e, 300)}`),
        );
        await bookOpenFigures(context, app.url, quick, log).then(
          (figures) => Object.assign(f, figures),
          (e: unknown) => void problems.push(`Book file open: ${oneLine(e, 300)}`),
        );
        // In a browser profile of its own, as a person who starts with the demo Book and opens the reference family:
        // the profile above now holds the 30 MB Book, and the open step would replace that Book while its figures
        // are still being worked out (a case of its own, not the steps these figures stand for).
        const own = await freshBrowser();
        await responsiveFigures(own.context, app.url, log)
          .then(
            (figures) => Object.assign(f, figures),
            (e: unknown) => void problems.push(`responsiveness: ${oneLine(e, 300)}`),
          )
          .finally(() => own.close());
      }
      if (pageBuilt) {
        const bench = await serve(pageConfig, pageDir);
        servers.push(bench.server);
        await benchPageFigures(context, bench.url, quick, log).then(
          (figures) => Object.assign(f, figures),
          (e: unknown) => void problems.push(`bench page: ${oneLine(e, 300)}`),
        );
      }
      if (problems.length > 0) f['browser_problems'] = problems.join('; ');
      return f;
    } finally {
      await browser?.close();
      for (const s of servers) await s.close().catch(() => undefined);
    }
  },
};
