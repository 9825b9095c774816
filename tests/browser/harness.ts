// Starts Debian's headless Chromium through playwright-core with a fresh profile; collects console errors. Also the
// steps every browser test shares: open the built app at a page, wait for a save, read text as a reader sees it.
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { mkdtempSync, rmSync } from 'node:fs';
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

export interface Session {
  context: BrowserContext;
  page: Page;
  /** Console errors and uncaught page errors seen so far. */
  errors: string[];
  /** Requests made to any origin other than the app's. */
  foreignRequests: string[];
  close(): Promise<void>;
}

/** A persistent context so IndexedDB and the service worker behave as for a person; one profile per session. */
export async function openSession(baseUrl: string): Promise<Session> {
  const dir = mkdtempSync(join(tmpdir(), 'rungbook-chromium-'));
  const context = await chromium.launchPersistentContext(dir, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    args: CHROMIUM_FLAGS,
    acceptDownloads: true,
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const errors: string[] = [];
  const foreignRequests: string[] = [];
  const origin = new URL(baseUrl).origin;
  const watch = (p: Page): void => {
    p.on('console', (m) => {
      if (m.type() === 'error') errors.push(m.text());
    });
    p.on('pageerror', (e) => errors.push(String(e)));
  };
  watch(page);
  context.on('page', watch);
  context.on('request', (r) => {
    const url = r.url();
    if (!url.startsWith(origin) && !url.startsWith('data:') && !url.startsWith('blob:')) foreignRequests.push(url);
  });
  return {
    context,
    page,
    errors,
    foreignRequests,
    async close() {
      await context.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** A window wide enough for the Build, Compare and Rates pages to show every column without wrapping. */
export const WIDE_VIEWPORT = { width: 1400, height: 1000 } as const;

/** How a test wants a page of the app shown. */
export interface ShowOptions {
  /** Window size, for tests whose checks depend on the layout (wide tables, charts). */
  viewport?: { width: number; height: number };
  /** A selector that shows the page has drawn its data; waited for once the page has loaded. */
  ready?: string;
}

/**
 * The one browser session a test has open on the built app. A test file makes one and closes it after each test
 * (`afterEach(() => app.close())`), so a failing test never leaves Chromium running.
 */
export class AppUnderTest {
  private session: Session | undefined;

  constructor(readonly baseUrl: string) {}

  /** A fresh profile with no page loaded yet. */
  async start(): Promise<Session> {
    this.session = await openSession(this.baseUrl);
    return this.session;
  }

  /** A fresh profile showing `path` of the app (a page's hash such as `#/parts`). */
  async open(path: string, options: ShowOptions = {}): Promise<Session> {
    const session = await this.start();
    if (options.viewport) await session.page.setViewportSize(options.viewport);
    await this.goto(session.page, path, options.ready);
    return session;
  }

  /** Loads `path` of the app in `page` (another tab, say) and waits for `ready` when given. */
  async goto(page: Page, path: string, ready?: string): Promise<void> {
    await page.goto(`${this.baseUrl}${path}`);
    if (ready !== undefined) await page.locator(ready).waitFor();
  }

  async close(): Promise<void> {
    await this.session?.close();
    this.session = undefined;
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
