// Debian's headless Chromium through playwright-core: one browser per test file (launched before its first test,
// closed after its last), a fresh browser context per test, so each test starts on empty storage (IndexedDB, service
// worker, cache) as on a fresh profile. Also the steps every browser test shares: open the built app at a page,
// wait for a save, read text as a reader sees it. When a test fails, every page it had open is saved as a screenshot.
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { TestRunner, afterAll, beforeAll } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export const CHROMIUM_PATH = process.env.RUNGBOOK_CHROMIUM ?? '/usr/bin/chromium';

/** Chromium's flags for a headless run on a closed network (no background requests, no downloads). */
export const CHROMIUM_FLAGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

/** Starts Chromium with the flags above; playwright-core gives it a fresh profile directory of its own. */
export function launchChromium(): Promise<Browser> {
  return chromium.launch({ executablePath: CHROMIUM_PATH, headless: true, args: CHROMIUM_FLAGS });
}

export interface Session {
  context: BrowserContext;
  page: Page;
  /** Console errors and uncaught page errors seen so far. */
  errors: string[];
  /** Requests made to any origin other than the app's. */
  foreignRequests: string[];
  close(): Promise<void>;
}

/** How a test wants its browser context. */
export interface StartOptions {
  /** Window size, for tests whose checks depend on the layout (wide tables, charts). */
  viewport?: { width: number; height: number };
}

/**
 * A fresh browser context (empty storage of its own) in `browser`, watched for console errors and foreign requests.
 * On empty storage the app starts as for the first time and writes the demo Book. (Restoring a copy of that storage
 * with playwright's storageState, IndexedDB included, took longer than the app's own first start: medians of 8.6 s
 * against 5.4 s a test, measured side by side on the shared 2-core machine.)
 */
export async function openSession(browser: Browser, baseUrl: string, options: StartOptions = {}): Promise<Session> {
  const context = await browser.newContext({ acceptDownloads: true, ...(options.viewport ? { viewport: options.viewport } : {}) });
  const errors: string[] = [];
  const foreignRequests: string[] = [];
  const origin = new URL(baseUrl).origin;
  const watch = (p: Page): void => {
    p.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    p.on('pageerror', (e) => errors.push(String(e)));
  };
  context.on('page', watch);
  context.on('request', (r) => {
    const url = r.url();
    if (!url.startsWith(origin) && !url.startsWith('data:') && !url.startsWith('blob:')) foreignRequests.push(url);
  });
  const page = await context.newPage();
  return {
    context,
    page,
    errors,
    foreignRequests,
    async close() {
      await context.close();
    },
  };
}

/** A window wide enough for the Build, Compare and Rates pages to show every column without wrapping. */
export const WIDE_VIEWPORT = { width: 1400, height: 1000 } as const;

/** How a test wants a page of the app shown. */
export interface ShowOptions extends StartOptions {
  /** A selector that shows the page has drawn its data; waited for once the page has loaded. */
  ready?: string;
}

/** Where a failed test's screenshots go: one file per open page, named after the test. */
function failureShot(testName: string, i: number): string {
  const slug = testName.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '').slice(0, 80);
  return join(tmpdir(), `rungbook-failed-${slug}${i ? `-${i + 1}` : ''}.png`);
}

/**
 * The built app under test in one test file. Made at the top of the file, it launches Chromium before the file's
 * first test and closes it after the last; each test gets a fresh context from `start` or `open`, which the file
 * closes after each test (`afterEach(() => app.close())`), so no test sees another's storage.
 */
export class AppUnderTest {
  private browser: Browser | undefined;
  private session: Session | undefined;
  private test: ReturnType<typeof TestRunner.getCurrentTest>;

  constructor(readonly baseUrl: string) {
    beforeAll(async () => {
      await this.launch();
    });
    afterAll(async () => {
      await this.close();
      await this.browser?.close();
      this.browser = undefined;
    });
  }

  private async launch(): Promise<Browser> {
    if (!this.browser?.isConnected()) this.browser = await launchChromium();
    return this.browser;
  }

  /** A fresh context, as a fresh profile, with no page loaded yet. */
  async start(options: StartOptions = {}): Promise<Session> {
    await this.close();
    this.test = TestRunner.getCurrentTest();
    this.session = await openSession(await this.launch(), this.baseUrl, options);
    return this.session;
  }

  /** A fresh context showing `path` of the app (a page's hash such as `#/parts`). */
  async open(path: string, options: ShowOptions = {}): Promise<Session> {
    const session = await this.start(options);
    await this.goto(session.page, path, options.ready);
    return session;
  }

  /** Loads `path` of the app in `page` (another tab, say) and waits for `ready` when given. */
  async goto(page: Page, path: string, ready?: string): Promise<void> {
    await page.goto(`${this.baseUrl}${path}`);
    if (ready !== undefined) await page.locator(ready).waitFor();
  }

  /** Closes the test's context; when the test failed, saves a screenshot of each page it had open first. */
  async close(): Promise<void> {
    const session = this.session;
    const test = this.test;
    this.session = undefined;
    this.test = undefined;
    if (!session) return;
    try {
      if (test?.result?.state === 'fail') {
        const pages = session.context.pages();
        for (const [i, p] of pages.entries()) {
          const path = failureShot(test.fullName, i);
          await p.screenshot({ path, fullPage: true, timeout: 10_000 }).then(
            () => console.error(`screenshot of the failed test: ${path}`),
            () => undefined,
          );
        }
      }
    } finally {
      await session.close();
    }
  }
}

/** Moves to `path` (a page's hash such as `#/parts`) through its link in the rail, as a person would. */
export async function railTo(page: Page, path: string): Promise<void> {
  await page.locator(`nav a[href="${path}"]`).click();
}

/** Waits until a page has loaded its code and drawn: its heading (when it has a title) shows, "Loading…" is gone. */
export async function pageLoaded(page: Page, title?: string): Promise<void> {
  if (title) await page.locator('main header h1', { hasText: title }).waitFor();
  await page.locator('main p.muted', { hasText: 'Loading…' }).waitFor({ state: 'detached' });
}

/**
 * Waits until the Family page shows the figures of the Book as it is (they are worked out off the page's thread and
 * arrive a moment after the rows): no figure cell of the at-a-glance table still says "…".
 */
export async function figuresShown(page: Page): Promise<void> {
  const glance = page.locator('[data-testid="family-glance"]');
  await glance.locator('tbody tr').first().waitFor();
  await page.waitForFunction(
    () => {
      const deep = (root: ParentNode): Element | null => {
        const hit = root.querySelector('[data-testid="family-glance"]');
        if (hit) return hit;
        for (const el of root.querySelectorAll('*')) {
          const inner = el.shadowRoot ? deep(el.shadowRoot) : null;
          if (inner) return inner;
        }
        return null;
      };
      const table = deep(document);
      return table !== null && [...table.querySelectorAll('tbody td')].every((td) => td.textContent?.trim() !== '…');
    },
    undefined,
    { timeout: 60_000 },
  );
}

/**
 * Waits until the Compare page shows every figure its views asked for (they are worked out off the page's thread;
 * the page marks itself `data-figures="ready"` once all are held, and drops the mark on any edit).
 */
export async function compareFigures(page: Page): Promise<void> {
  await page.locator('rb-compare-page[data-figures="ready"]').waitFor({ timeout: 60_000 });
}

/** Waits until the last change is written (the save state in the rail says so). */
export async function saved(page: Page): Promise<void> {
  await page.locator('rb-save-state [data-state="saved"]').waitFor();
}

/** Text as a reader sees it: no-break spaces as spaces, runs of white space made single. */
export function readerText(s: string | null): string {
  return (s ?? '').replace(/[\s\u00a0\u202f]+/g, ' ').trim();
}

/** Text of the first element matching `selector`, as a reader sees it (see readerText). */
export async function text(page: Page, selector: string): Promise<string> {
  return readerText(await page.locator(selector).first().textContent());
}

/** Rows of the Parts page's table, once it has drawn. */
export async function partRows(page: Page): Promise<number> {
  await page.locator('[data-testid="parts-table"]').waitFor();
  return page.locator('[data-testid="parts-table"] tbody tr').count();
}

export type { Browser };

/** Files a test writes to hand to the app (price files, Book files), in a folder of their own removed after each test. */
export class TempFiles {
  private dir: string | undefined;
  constructor(private readonly prefix: string) {}

  write(name: string, text: string): string {
    this.dir ??= mkdtempSync(join(tmpdir(), `${this.prefix}-`));
    const path = join(this.dir, name);
    writeFileSync(path, text, 'utf8');
    return path;
  }

  clear(): void {
    if (this.dir) rmSync(this.dir, { recursive: true, force: true });
    this.dir = undefined;
  }
}
