// Builds the app once per run, into a folder of this run's own (so runs at the same time never serve each other's
// half-written files), and serves it on a free loopback port for the browser tests, through the same server as
// `npm start` (scripts/serve.mjs), so the tests see the headers users get. Then starts the app once on a fresh
// profile and keeps the storage its first start leaves (the demo Book in IndexedDB), for tests not about first start.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build } from 'vite';
import { serveApp } from '../../scripts/serve.mjs';
import type { TestProject } from 'vitest/node';
import type {} from 'vitest';
import { launchChromium } from './harness.ts';
import type { SeededState } from './harness.ts';

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
    /** Browser storage after the app's first start, with IndexedDB (see seededState below). */
    seededState: SeededState;
  }
}

/** Opens the app on a fresh profile, waits until the first start has written the demo Book, and takes the storage. */
async function seededState(baseUrl: string): Promise<SeededState> {
  const browser = await launchChromium();
  try {
    const context = await browser.newContext();
    const page = await context.newPage();
    await page.goto(`${baseUrl}#/parts`);
    await page.locator('[data-testid="parts-table"] tbody tr').first().waitFor({ timeout: 120_000 });
    await page.locator('rb-save-state [data-state="saved"]').waitFor({ timeout: 120_000 });
    const state = await context.storageState({ indexedDB: true });
    // The declared type leaves out the IndexedDB part that `indexedDB: true` adds to each origin.
    const databases = state.origins.flatMap((o) => (o as { indexedDB?: { name: string }[] }).indexedDB ?? []);
    if (!databases.some((db) => db.name === 'rungbook')) {
      throw new Error('the first start left no Book in IndexedDB to seed the browser tests with');
    }
    return state;
  } finally {
    await browser.close();
  }
}

export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  const outDir = mkdtempSync(join(tmpdir(), 'rungbook-dist-'));
  // vitest sets NODE_ENV=test, which would make Vite pick development builds of Lit; test what users get.
  const nodeEnv = process.env.NODE_ENV;
  process.env.NODE_ENV = 'production';
  try {
    await build({ logLevel: 'warn', mode: 'production', build: { outDir, emptyOutDir: true } });
  } finally {
    process.env.NODE_ENV = nodeEnv;
  }
  const { server, url } = await serveApp({ root: outDir, port: 0 });
  const stop = async (): Promise<void> => {
    const closed = new Promise<void>((done) => server.close(() => done()));
    server.closeAllConnections();
    await closed;
    rmSync(outDir, { recursive: true, force: true });
  };
  try {
    project.provide('baseUrl', url);
    project.provide('seededState', await seededState(url));
  } catch (e) {
    await stop();
    throw e;
  }
  return stop;
}
