// Starts Debian's headless Chromium through playwright-core with a fresh profile; collects console errors.
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export const CHROMIUM_PATH = process.env.RUNGBOOK_CHROMIUM ?? '/usr/bin/chromium';

const FLAGS = [
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
    args: FLAGS,
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

export type { Browser };
