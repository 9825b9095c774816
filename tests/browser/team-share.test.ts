// The Team page in real Chromium, against the team server started by this file on 127.0.0.1 (its own port and data
// folder, stopped by its pid at the end): one profile shares its Book, a second profile opens the shared Book and
// gets the first one's settings, an edit on the first reaches the second, and a bad address is refused beside its
// field with nothing shared. The page's security policy lets it reach a server on loopback.
import { afterAll, afterEach, beforeAll, describe, expect, inject, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { AppUnderTest, launchChromium, openSession, pageLoaded, saved } from './harness.ts';
import type { Browser, Session } from './harness.ts';
import { EDITOR, OWNER, addPerson, startServer, stopAllServers } from '../fixtures/team-server.ts';
import type { Person, Running } from '../fixtures/team-server.ts';

const baseUrl = inject('baseUrl');
const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

let dir = '';
let server: Running;
let browser: Browser;
const sessions: Session[] = [];

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-team-ui-'));
  server = await startServer(dir, ['--owner', OWNER.name, '--allow-origin', new URL(baseUrl).origin]);
  expect(addPerson(dir, EDITOR, 'editor').status).toBe(0);
  browser = await launchChromium();
}, 120_000);

afterAll(async () => {
  for (const s of sessions) await s.close();
  await browser?.close();
  await stopAllServers();
  rmSync(dir, { recursive: true, force: true });
});

/** Answers "not found" from the team server, by address: replication asks for its checkpoints before they exist. */
const notFound = new Map<Session, string[]>();

/** The console errors of a profile, less one "not found" line for each checkpoint the server did not hold yet. */
function errorsBeyondCheckpoints(s: Session): string[] {
  const checkpoints = (notFound.get(s) ?? []).filter((u) => u.includes('/_local/')).length;
  let left = checkpoints;
  const rest = s.errors.filter((e) => !(/status of 404/.test(e) && left-- > 0));
  expect(notFound.get(s)?.length ?? 0, (notFound.get(s) ?? []).join(', ')).toBe(checkpoints);
  return rest;
}

async function profile(): Promise<Session> {
  const s = await openSession(browser, baseUrl);
  sessions.push(s);
  notFound.set(s, []);
  s.page.on('response', (r) => {
    if (r.status() === 404 && r.url().startsWith(server.url)) notFound.get(s)!.push(r.url());
  });
  await s.page.goto(`${baseUrl}#/team`);
  await pageLoaded(s.page, 'Team');
  return s;
}

async function fill(s: Session, p: Person, address = server.url, book = 'bench-team'): Promise<void> {
  await s.page.locator('#f-server').fill(address);
  await s.page.locator('#f-book').fill(book);
  await s.page.locator('#f-user').fill(p.name);
  await s.page.locator('#f-password').fill(p.password);
}

/** The labour rate the profile's Rates page shows, drawn afresh (through the rail, keeping the tab's sharing). */
async function labourRate(s: Pick<Session, 'page'>): Promise<string> {
  await s.page.locator('nav a[href="#/team"]').click();
  await pageLoaded(s.page, 'Team');
  await s.page.locator('nav a[href="#/settings"]').click();
  await pageLoaded(s.page, 'Rates');
  return s.page.locator('#f-labourRatePerHour').inputValue();
}

/** Saves a labour rate on the Rates page of the tab. */
async function setLabourRate(s: Pick<Session, 'page'>, rate: string): Promise<void> {
  await s.page.locator('nav a[href="#/settings"]').click();
  await pageLoaded(s.page, 'Rates');
  await s.page.locator('#f-labourRatePerHour').fill(rate);
  await s.page.getByRole('button', { name: 'Save the settings' }).click();
  await saved(s.page);
}

describe('Team page', () => {
  it('shares a Book from one profile and opens it in another; an edit then reaches the other', async () => {
    const a = await profile();
    // The first person's Book carries a labour rate of its own, to be seen arriving in the other profile.
    await a.page.goto(`${baseUrl}#/settings`);
    await a.page.locator('#f-labourRatePerHour').fill('31');
    await a.page.getByRole('button', { name: 'Save the settings' }).click();
    await saved(a.page);
    await a.page.goto(`${baseUrl}#/team`);
    await pageLoaded(a.page, 'Team');
    await fill(a, OWNER);
    await a.page.getByRole('button', { name: 'Share this Book' }).click();
    await a.page.locator('p.status', { hasText: 'synced' }).waitFor({ timeout: 60_000 });
    await expect(a.page.locator('p.status').textContent()).resolves.toMatch(/Shared as olive \(owner\)/);

    const b = await profile();
    await fill(b, EDITOR);
    await b.page.getByRole('button', { name: 'Open the shared Book here' }).click();
    await b.page.locator('p.status', { hasText: /Shared as edna \(editor\).*synced/ }).waitFor({ timeout: 60_000 });
    // Moving between pages keeps the sharing going (the rail's links, not a reload, which would end it).
    await expect.poll(() => labourRate(b), { timeout: 60_000 }).toBe('31');

    // An edit in the first profile reaches the second.
    await a.page.locator('nav a[href="#/settings"]').click();
    await a.page.locator('#f-labourRatePerHour').fill('33');
    await a.page.getByRole('button', { name: 'Save the settings' }).click();
    await saved(a.page);
    await expect.poll(() => labourRate(b), { timeout: 60_000 }).toBe('33');
    expect(errorsBeyondCheckpoints(a)).toEqual([]);
    expect(errorsBeyondCheckpoints(b)).toEqual([]);
  }, 240_000);

  it('goes on sharing after a reload; after the tab was closed it resumes with the password alone and sends what changed meanwhile', async () => {
    const a = await profile();
    await fill(a, OWNER, server.url, 'reload-team');
    await a.page.getByRole('button', { name: 'Share this Book' }).click();
    await a.page.locator('p.status', { hasText: 'synced' }).waitFor({ timeout: 60_000 });
    const b = await profile();
    await fill(b, EDITOR, server.url, 'reload-team');
    await b.page.getByRole('button', { name: 'Open the shared Book here' }).click();
    await b.page.locator('p.status', { hasText: /Shared as edna \(editor\).*synced/ }).waitFor({ timeout: 60_000 });

    // A reload keeps the tab's sharing: no password asked, and an edit from the other profile still arrives.
    await b.page.reload();
    await pageLoaded(b.page, 'Team');
    await b.page.locator('p.status', { hasText: /Shared as edna \(editor\) on .*reload-team: synced/ }).waitFor({ timeout: 60_000 });
    await setLabourRate(a, '35');
    await expect.poll(() => labourRate(b), { timeout: 60_000 }).toBe('35');

    // The tab is closed; in a new tab of the same profile the person works on before giving the password again.
    const tab = await b.context.newPage();
    await b.page.close();
    await tab.goto(`${baseUrl}#/settings`);
    await pageLoaded(tab, 'Rates');
    await setLabourRate({ page: tab }, '36');
    await tab.locator('nav a[href="#/team"]').click();
    await pageLoaded(tab, 'Team');
    await expect(tab.locator('p.resume').textContent()).resolves.toMatch(/shared as edna \(editor\) on .*reload-team/);
    // Server, shared Book and name are remembered; the password is not.
    await expect(tab.locator('#f-user').inputValue()).resolves.toBe(EDITOR.name);
    await expect(tab.locator('#f-book').inputValue()).resolves.toBe('reload-team');
    await expect(tab.locator('#f-password').inputValue()).resolves.toBe('');
    await tab.locator('#f-password').fill(EDITOR.password);
    await tab.getByRole('button', { name: 'Resume sharing' }).click();
    await tab.locator('p.status', { hasText: /Shared as edna \(editor\).*synced/ }).waitFor({ timeout: 60_000 });
    // The change made while not shared reaches the other profile, and this Book kept it.
    await expect.poll(() => labourRate(a), { timeout: 60_000 }).toBe('36');
    await expect(labourRate({ page: tab })).resolves.toBe('36');
    // Who changed what and when: the Team page lists the settings changed by edna.
    await tab.locator('nav a[href="#/team"]').click();
    await pageLoaded(tab, 'Team');
    await expect
      .poll(() => tab.locator('table.changes tbody tr', { hasText: 'the costing settings' }).first().textContent(), { timeout: 20_000 })
      .toMatch(/edna\s+the costing settings\s+changed labourRatePerHour/);
    expect(errorsBeyondCheckpoints(a)).toEqual([]);
  }, 300_000);

  it('refuses an address that is not one, beside its field, and shares nothing', async () => {
    const { page, errors } = await app.open('#/team');
    await pageLoaded(page, 'Team');
    await page.locator('#f-server').fill('ftp://127.0.0.1/');
    await page.locator('#f-user').fill(OWNER.name);
    await page.locator('#f-password').fill(OWNER.password);
    await page.getByRole('button', { name: 'Share this Book' }).click();
    await page.locator('p.notice', { hasText: 'Nothing was shared' }).waitFor();
    await expect(page.locator('[data-problem-for="server"]').textContent()).resolves.toMatch(/http:\/\/ or https:\/\//);
    expect(await page.locator('p.status').count()).toBe(0);
    expect(errors).toEqual([]);
  }, 60_000);
});
