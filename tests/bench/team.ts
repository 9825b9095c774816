// Sharing figures of the benchmark: two browser profiles sharing one Book through the team server, in Debian's
// headless Chromium on the production build, on loopback. The server is started by this section on 127.0.0.1 on a
// free port with a data folder of its own, and stopped by its pid at the end (even when a step fails).
//   team_edit_reach_ms     one edit saved in profile A (the labour rate on the Rates page) until profile B's Rates
//                          page shows it: median of several edits, timed from the click on the save button
//   team_import_reach_ms   the benchmark's price import committed in A (its "imported" line shown) until B's Book
//                          holds all its new quotes (the Start page's counts); information, no target
// Baseline in the same run: plain replication of the same documents between two in-memory databases of the same sync
// engine in Node, through the same server (team_edit_node_ms, team_import_node_ms): what the engine and the server
// take without a browser or the app, so the browser figures can be judged against the machine's speed.
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium } from 'playwright-core';
import type { Browser, Page } from 'playwright-core';
import type { Database, Doc } from 'pouchdb-core';
import type { PreviewServer } from 'vite';
import type { Book, CollectionName } from '../../src/domain/book.ts';
import { COLLECTIONS } from '../../src/domain/book.ts';
import { DEEP_QUERY } from './responsive.ts';
import { bookDelta } from '../../src/domain/book-ops.ts';
import { importPrices } from '../../src/io/price-import.ts';
import { docsForChange } from '../../src/store/shared-docs.ts';
import { CHROMIUM_FLAGS, CHROMIUM_PATH } from '../browser/harness.ts';
import { TestEngine } from '../fixtures/pouch-engine.ts';
import { samplePriceFile } from '../fixtures/price-sample.ts';
import { EDITOR, OWNER, addPerson, call, startServer, stopServer } from '../fixtures/team-server.ts';
import type { Person, Running } from '../fixtures/team-server.ts';
import { writeBookFile } from './book-file.ts';
import { serve } from './browser.ts';
import { PROJECT_ROOT, builtApp, scratchDir } from './bundle.ts';
import type { BenchOptions, BenchSection, Figures } from './harness.ts';
import { IMPORT_SAMPLE } from './import.ts';
import { median, round } from './stats.ts';

/** Rows of the shared import in a quick run (the full run imports the 50,000-row file). */
export const QUICK_TEAM_IMPORT_ROWS = 5_000;

/** How often the other profile's page is read while waiting for a change to arrive, in ms. */
const POLL_MS = 20;

/**
 * Runs in every document before the app's scripts: a query through shadow roots, the time on a clock both profiles
 * share (ms since the epoch, sub-millisecond), and the time of the last click anywhere in the page. A string, so no
 * build helper leaks in.
 */
const TEAM_PROBE = `(() => {
  ${DEEP_QUERY}
  const now = () => performance.timeOrigin + performance.now();
  const probe = { lastClick: undefined, now, deep: (sel) => deep(document, sel) };
  window.__rbTeam = probe;
  document.addEventListener('click', () => { probe.lastClick = now(); }, true);
})();`;

interface Seen<T> {
  at: number;
  value: T;
}

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

/** The value of a form field on the page (through shadow roots) and the time it was read. */
function fieldValue(page: Page, selector: string): Promise<Seen<string | undefined>> {
  return page.evaluate(`(() => ({ at: window.__rbTeam.now(), value: window.__rbTeam.deep(${JSON.stringify(selector)})?.value }))()`) as Promise<
    Seen<string | undefined>
  >;
}

/** The Start page's counts of the Book (parts, quotes) and the time they were read; undefined when not shown. */
function bookCounts(page: Page): Promise<Seen<{ parts: number; quotes: number } | undefined>> {
  return page.evaluate(`(() => {
    const text = window.__rbTeam.deep('[data-testid="start-counts"]')?.textContent ?? '';
    const m = /(\\d+) parts and (\\d+) quotes/.exec(text);
    return { at: window.__rbTeam.now(), value: m ? { parts: Number(m[1]), quotes: Number(m[2]) } : undefined };
  })()`) as Promise<Seen<{ parts: number; quotes: number } | undefined>>;
}

/**
 * Reads `read` every POLL_MS until `done` holds; the first reading that does. Gives the last reading on timeout. A
 * long wait says what it last read every 15 s through `progress`.
 */
async function pollUntil<T>(
  read: () => Promise<Seen<T>>,
  done: (v: T) => boolean,
  timeoutMs: number,
  progress?: (v: T) => void,
): Promise<{ seen: Seen<T>; ok: boolean }> {
  const end = Date.now() + timeoutMs;
  let told = Date.now();
  for (;;) {
    const seen = await read();
    if (done(seen.value)) return { seen, ok: true };
    if (Date.now() > end) return { seen, ok: false };
    if (progress && Date.now() - told > 15_000) {
      told = Date.now();
      progress(seen.value);
    }
    await sleep(POLL_MS);
  }
}

/** Moves the page to another of the app's pages without a reload (a reload would end the tab's sharing). */
async function goTo(page: Page, hash: string): Promise<void> {
  await page.evaluate((h) => void (location.hash = h), hash);
}

async function fillTeamForm(page: Page, serverUrl: string, book: string, p: Person): Promise<void> {
  await page.locator('#f-server').fill(serverUrl);
  await page.locator('#f-book').fill(book);
  await page.locator('#f-user').fill(p.name);
  await page.locator('#f-password').fill(p.password);
}

/** Waits until the Team page says the sharing is synced; a failure to share is reported in the page's words. */
async function synced(page: Page, timeoutMs: number): Promise<void> {
  const status = page.locator('p.status', { hasText: 'synced' });
  const refused = page.locator('p.notice', { hasText: 'Not shared' });
  await Promise.race([
    status.waitFor({ timeout: timeoutMs }),
    refused.waitFor({ timeout: timeoutMs }).then(async () => Promise.reject(new Error(String(await refused.textContent())))),
  ]);
}

/** The documents the app writes for the change from `before` to `after` (as ShareBridge.pushLocal does, nothing held yet). */
function sharedDocs(before: Book, after: Book, by: string): Doc[] {
  const delta = bookDelta(before, after);
  const puts: { collection: CollectionName | 'settings'; record: { id?: string; rev: number } }[] = [];
  const deletes: { collection: CollectionName; id: string }[] = [];
  for (const c of COLLECTIONS) {
    const d = delta.collections[c];
    if (!d) continue;
    for (const record of ('all' in d ? d.all : d.put) as { id: string; rev: number }[]) puts.push({ collection: c, record });
    if (!('all' in d)) for (const id of d.delete) deletes.push({ collection: c, id });
  }
  if (delta.settings) puts.push({ collection: 'settings', record: delta.settings });
  return docsForChange(puts, deletes, new Map(), by, new Date().toISOString()) as unknown as Doc[];
}

/** Waits until a live replication has caught up (its first pause without an error). */
function caughtUp(rep: { once(event: string, listener: (info: never) => void): unknown }): Promise<void> {
  return new Promise((resolve) => rep.once('paused', () => resolve()));
}

/**
 * The baseline: two in-memory copies in Node, each replicating live with the same server as A and B do (one as the
 * owner, one as an editor), on a shared Book of their own. One settings document edited in the first until it is in
 * the second, several times; then the import's documents written into the first until the second holds them all.
 */
async function nodeBaseline(server: Running, importDocs: Doc[], edits: number, prefix: string, limitMs: number, log: (t: string) => void): Promise<Figures> {
  const name = 'bench-node';
  const made = await call(`${server.url}${name}`, OWNER, { method: 'PUT' });
  if (made.status !== 201 && made.status !== 412) throw new Error(`the baseline's shared Book was not created: ${made.status}`);
  const remote = (p: Person): Database => new TestEngine(`${server.url}${name}`, { auth: { username: p.name, password: p.password }, skip_setup: true });
  const a = new TestEngine(`rungbook-bench-team-a-${Date.now()}`, { adapter: 'memory' });
  const b = new TestEngine(`rungbook-bench-team-b-${Date.now()}`, { adapter: 'memory' });
  const repA = a.sync(remote(OWNER), { live: true, retry: true });
  const repB = b.sync(remote(EDITOR), { live: true, retry: true });
  const arrived = new Map<string, () => void>();
  const feed = b.changes({ since: 'now', live: true }).on('change', (c) => arrived.get(c.id)?.());
  try {
    await Promise.all([caughtUp(repA), caughtUp(repB)]);
    log('team: baseline in Node, one edit replicated between two copies through the server');
    const times: number[] = [];
    let rev: string | undefined;
    for (let i = 0; i < edits; i++) {
      const seen = new Promise<void>((resolve) => arrived.set('settings', resolve));
      const t0 = performance.now();
      const put = await a.put({ _id: 'settings', ...(rev ? { _rev: rev } : {}), record: { labourRatePerHour: 40 + i }, by: OWNER.name, at: new Date().toISOString() });
      rev = put.rev;
      await seen;
      times.push(performance.now() - t0);
      await sleep(200);
    }
    log(`team: baseline in Node, ${importDocs.length} documents of the import replicated`);
    const before = (await b.info()).doc_count;
    const t0 = performance.now();
    await a.bulkDocs(importDocs);
    const wrote = performance.now() - t0;
    // Bounded: a copy that has not got them all in time is reported with what it holds.
    let held = 0;
    while ((held = (await b.info()).doc_count - before) < importDocs.length && performance.now() - t0 < limitMs) await sleep(100);
    const all = held >= importDocs.length;
    return {
      team_edit_node_ms: round(median(times)),
      [`${prefix}_node_ms`]: all ? round(performance.now() - t0) : null,
      [`${prefix}_node_write_ms`]: round(wrote),
      [`${prefix}_node_docs`]: importDocs.length,
      ...(all ? {} : { [`${prefix}_node_note`]: `the second copy held ${held} of ${importDocs.length} documents after ${round(limitMs / 60_000)} min` }),
    };
  } finally {
    feed.cancel();
    repA.cancel();
    repB.cancel();
    await a.destroy().catch(() => undefined);
    await b.destroy().catch(() => undefined);
  }
}

export const teamSection: BenchSection = {
  name: 'team (Chromium, two profiles)',
  async run({ quick, log }: BenchOptions): Promise<Figures> {
    if (!existsSync(CHROMIUM_PATH)) throw new Error(`no Chromium at ${CHROMIUM_PATH} (set RUNGBOOK_CHROMIUM to its path)`);
    const rows = quick ? QUICK_TEAM_IMPORT_ROWS : IMPORT_SAMPLE.rows;
    const prefix = quick ? 'team_import_small' : 'team_import';
    const edits = quick ? 3 : 5;
    // Setting up the shared Book and waiting for the import are bounded: each copy takes several ms a document here.
    const minutes = (full: number, small: number): number => (quick ? small : full) * 60_000;
    const shared = quick ? 'team_small' : 'team';
    // The benchmark's price file and the Book whose parts it prices (half of them quoted already, to be superseded).
    const sample = samplePriceFile({ ...IMPORT_SAMPLE, rows });
    const bookFile = writeBookFile(`team-${rows}.rungbook.json`, sample.book);
    const imported = await importPrices(sample.book, sample.bytes, { supplier: sample.supplier, fileName: sample.fileName });
    if (!imported.ok || !imported.book) throw new Error(`the sample file did not import: ${imported.reason ?? 'no Book'}`);
    const importDocs = sharedDocs(sample.book, imported.book, OWNER.name);
    const priceFile = join(scratchDir(), `team-${sample.fileName}`);
    writeFileSync(priceFile, sample.bytes);

    log('team: building the app');
    const appDir = await builtApp();
    const dir = mkdtempSync(join(tmpdir(), 'rungbook-bench-team-'));
    let app: { server: PreviewServer; url: string } | undefined;
    let server: Running | undefined;
    let browser: Browser | undefined;
    try {
      app = await serve(join(PROJECT_ROOT, 'vite.config.ts'), appDir);
      server = await startServer(dir, ['--owner', OWNER.name, '--allow-origin', new URL(app.url).origin]);
      const added = addPerson(dir, EDITOR, 'editor');
      if (added.status !== 0) throw new Error(`the editor was not added to the team: ${added.stderr.trim()}`);
      const f: Figures = {
        [`${prefix}_file`]: `${sample.rows} rows × ${sample.breaks} breaks into a Book of ${sample.book.parts.length} parts and ${sample.book.quotes.length} quotes (${importDocs.length} shared documents)`,
      };
      Object.assign(f, await nodeBaseline(server, importDocs, edits, prefix, minutes(10, 5), log));

      browser = await chromium.launch({ executablePath: CHROMIUM_PATH, headless: true, args: CHROMIUM_FLAGS });
      const profile = async (): Promise<Page> => {
        const context = await browser!.newContext();
        await context.addInitScript({ content: TEAM_PROBE });
        return context.newPage();
      };

      // A opens the Book the price file is for, and shares it.
      log(`team: profile A opens a Book of ${sample.book.parts.length} parts and ${sample.book.quotes.length} quotes and shares it`);
      const a = await profile();
      await a.goto(`${app.url}#/family`);
      await a.locator('[data-testid="family-table"]').waitFor({ timeout: 60_000 });
      await a.locator('rb-book-menu input[type="file"]').setInputFiles(bookFile.path);
      const dialog = a.locator('rb-book-menu dialog[open]');
      await dialog.waitFor({ timeout: 180_000 });
      await dialog.getByRole('button', { name: 'Replace with the file' }).click();
      await a.locator('[data-testid="notice"]', { hasText: 'Opened' }).waitFor({ timeout: 180_000 });
      await goTo(a, '#/team');
      await fillTeamForm(a, server.url, 'bench-team', OWNER);
      let t = performance.now();
      await a.getByRole('button', { name: 'Share this Book' }).click();
      await synced(a, minutes(30, 5));
      log(`team: A shared its Book in ${round((performance.now() - t) / 1000, 1)} s`);
      f[`${shared}_share_ms`] = round(performance.now() - t);

      // B opens the shared Book: its whole Book arrives through the server.
      log('team: profile B opens the shared Book');
      const b = await profile();
      await b.goto(`${app.url}#/team`);
      await b.locator('#f-server').waitFor({ timeout: 60_000 });
      await fillTeamForm(b, server.url, 'bench-team', EDITOR);
      t = performance.now();
      await b.getByRole('button', { name: 'Open the shared Book here' }).click();
      await synced(b, minutes(30, 5));
      log(`team: B synced in ${round((performance.now() - t) / 1000, 1)} s; waiting for its Book to hold the shared one`);
      await goTo(b, '#/start');
      const whole = await pollUntil(
        () => bookCounts(b),
        (c) => c?.parts === sample.book.parts.length && c.quotes === sample.book.quotes.length,
        minutes(30, 5),
        (c) => log(`team: B's Book holds ${c?.parts ?? '?'} parts and ${c?.quotes ?? '?'} quotes`),
      );
      if (!whole.ok) throw new Error(`B's Book did not get the shared Book: ${JSON.stringify(whole.seen.value)}`);
      f[`${shared}_open_shared_ms`] = round(performance.now() - t);
      f[`${shared}_open_shared_records`] = sample.book.parts.length + sample.book.quotes.length + sample.book.suppliers.length;

      // One edit at a time in A's Rates page, until B's Rates page (a clean form follows the Book) shows it.
      log(`team: ${edits} edits of the labour rate in A, each until B shows it`);
      await goTo(a, '#/settings');
      await goTo(b, '#/settings');
      const rate = a.locator('#f-labourRatePerHour');
      await rate.waitFor();
      await b.locator('#f-labourRatePerHour').waitFor();
      const reach: number[] = [];
      for (let i = 0; i < edits; i++) {
        const value = String(41 + i);
        await rate.fill(value);
        await a.evaluate('void (window.__rbTeam.lastClick = undefined)');
        await a.getByRole('button', { name: 'Save the settings' }).click();
        const shown = await pollUntil(() => fieldValue(b, '#f-labourRatePerHour'), (v) => v === value, 60_000);
        if (!shown.ok) throw new Error(`the labour rate ${value} saved in A did not reach B within 60 s (B shows ${shown.seen.value})`);
        const clicked = (await a.evaluate('window.__rbTeam.lastClick')) as number | undefined;
        if (clicked === undefined) throw new Error('the click on "Save the settings" was not seen');
        reach.push(shown.seen.at - clicked);
        await a.locator('rb-save-state [data-state="saved"]').waitFor();
        await sleep(300);
      }
      f['team_edit_reach_ms'] = round(median(reach));
      f['team_edit_reach_max_ms'] = round(Math.max(...reach));
      f['team_edits'] = edits;

      // The import in A, through the Import page as a person makes it; B waits on its Start page's counts.
      log(`team: profile A imports ${sample.rows} rows; B waits for all the new quotes`);
      await goTo(b, '#/start');
      const start = await pollUntil(() => bookCounts(b), (c) => c !== undefined, 60_000);
      const quotesBefore = start.seen.value!.quotes;
      await goTo(a, '#/import');
      await a.locator('#import-supplier').selectOption(sample.book.suppliers.find((s) => s.name === sample.supplier)!.id);
      await a.locator('[data-testid="price-file"]').setInputFiles(priceFile);
      await a.locator('[data-testid="mapping-table"]').waitFor({ timeout: 300_000 });
      await a.getByRole('button', { name: 'Confirm this mapping' }).click();
      await a.locator('[data-testid="mapping-confirmed"]').waitFor();
      const importAll = a.getByRole('button', { name: 'Import all', exact: true });
      await importAll.waitFor({ state: 'visible' });
      await a.evaluate('void (window.__rbTeam.lastClick = undefined)');
      await importAll.click();
      const done = await pollUntil(
        () => a.evaluate(`({ at: window.__rbTeam.now(), value: !!window.__rbTeam.deep('[data-testid="import-done"]') })`) as Promise<Seen<boolean>>,
        (v) => v,
        minutes(10, 5),
      );
      if (!done.ok) throw new Error('the import in A did not finish in time');
      const clicked = (await a.evaluate('window.__rbTeam.lastClick')) as number;
      log(`team: A committed the import in ${round((done.seen.at - (await a.evaluate('window.__rbTeam.lastClick') as number)) / 1000, 1)} s`);
      const all = await pollUntil(
        () => bookCounts(b),
        (c) => (c?.quotes ?? 0) - quotesBefore >= sample.rows,
        minutes(60, 10),
        (c) => log(`team: B holds ${(c?.quotes ?? quotesBefore) - quotesBefore} of ${sample.rows} new quotes`),
      );
      const received = (all.seen.value?.quotes ?? quotesBefore) - quotesBefore;
      f[`${prefix}_rows`] = sample.rows;
      f[`${prefix}_quotes`] = received;
      f[`${prefix}_commit_ms`] = round(done.seen.at - clicked);
      f[`${prefix}_reach_ms`] = all.ok ? round(all.seen.at - done.seen.at) : null;
      f[`${prefix}_click_to_reach_ms`] = all.ok ? round(all.seen.at - clicked) : null;
      if (!all.ok) f[`${prefix}_note`] = `B held ${received} of ${sample.rows} new quotes when the bench stopped waiting`;
      return f;
    } finally {
      await browser?.close().catch(() => undefined);
      if (server) await stopServer(server).catch(() => undefined);
      await app?.server.close().catch(() => undefined);
      rmSync(dir, { recursive: true, force: true });
    }
  },
};
