// The team server (scripts/team-server.ts) on loopback, started and stopped by this file: roles enforced by the
// server (a reader's write refused with nothing written, an editor's write landing, an editor unable to change
// roles), wrong passwords refused, the shared Book kept across a restart, and a backup made by copying the stopped
// server's data folder. Replication goes through PouchDB's own client, as the app's will.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cpSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Database } from 'pouchdb-core';
import { refusal, route } from '../../scripts/team/access.ts';
import { sampleBook } from '../fixtures/sample-book.ts';
import { EDITOR, OWNER, READER, addPerson, call, startServer, stopAllServers, stopServer, teamCli } from '../fixtures/team-server.ts';
import type { Person, Running } from '../fixtures/team-server.ts';
import { TestEngine as PouchDB } from '../fixtures/pouch-engine.ts';


let dir = '';

function cli(args: string[], env: Record<string, string>): ReturnType<typeof teamCli> {
  return teamCli(dir, args, env);
}

function remote(server: Running, p: Person): Database {
  return new PouchDB(`${server.url}book`, { auth: { username: p.name, password: p.password } });
}

let localCount = 0;
function localCopy(): Database {
  return new PouchDB(`team-test-${++localCount}`, { adapter: 'memory' });
}

const quote = sampleBook().quotes[0]!;
const QUOTE_ID = `quotes/${quote.id}`;

let server: Running;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-team-'));
  server = await startServer(dir, ['--owner', OWNER.name]);
  const added = [addPerson(dir, EDITOR, 'editor'), addPerson(dir, READER, 'reader')];
  for (const r of added) expect(r.status, r.stderr).toBe(0);
  // The owner opens the shared Book (creating a database is an owner's step).
  expect((await call(`${server.url}book`, OWNER, { method: 'PUT' })).status).toBe(201);
}, 90_000);

afterAll(async () => {
  await stopAllServers();
  rmSync(dir, { recursive: true, force: true });
});

describe('who may do what (the team server\'s rule, before any request reaches the engine)', () => {
  it('sorts replication\'s reads, record writes and owners\' work apart', () => {
    const need = (method: string, path: string): string => {
      const r = route(method, path);
      return r.kind === 'db' ? r.need : r.kind;
    };
    // What PouchDB's replicator asks when it pulls: every one a read.
    for (const [m, p] of [['GET', '/book'], ['GET', '/book/_changes?since=0'], ['POST', '/book/_revs_diff'], ['POST', '/book/_bulk_get?revs=true'], ['POST', '/book/_all_docs'], ['GET', '/book/_local/abc'], ['HEAD', '/book/quotes%2Fq1']]) {
      expect(need(m!, p!), `${m} ${p}`).toBe('read');
    }
    // Records and checkpoints written: an editor's.
    for (const [m, p] of [['POST', '/book/_bulk_docs'], ['PUT', '/book/quotes%2Fq1'], ['DELETE', '/book/quotes%2Fq1?rev=1-a'], ['POST', '/book'], ['PUT', '/book/_local/abc']]) {
      expect(need(m!, p!), `${m} ${p}`).toBe('write');
    }
    // The database itself and what runs inside the server: an owner's.
    for (const [m, p] of [['PUT', '/book'], ['DELETE', '/book'], ['PUT', '/book/_design/rules'], ['PUT', '/book/_security'], ['POST', '/book/_compact'], ['POST', '/book/_purge']]) {
      expect(need(m!, p!), `${m} ${p}`).toBe('owner');
    }
    expect(need('GET', '/')).toBe('root');
    expect(need('GET', '/_team/me')).toBe('team');
    for (const p of ['/_config', '/_replicate', '/_utils/', '/_users/x', '/Book', '/%E0%A4%A']) expect(need('GET', p), p).toBe('unknown');
  });

  it('lets a reader read only, an editor read and write, an owner everything, each refusal saying why', () => {
    expect([refusal('rita', 'reader', 'read'), refusal('edna', 'editor', 'write'), refusal('olive', 'owner', 'owner')]).toEqual([null, null, null]);
    expect(refusal('rita', 'reader', 'write')).toMatchObject({ status: 403, error: 'forbidden', reason: expect.stringMatching(/Nothing was written/) });
    expect(refusal('edna', 'editor', 'owner')?.reason).toBe('only an owner of this team may do this (edna is an editor). Nothing was changed.');
  });
});

describe('team server', () => {
  it('keeps passwords only as scrypt hashes', () => {
    const text = readFileSync(join(dir, 'users.json'), 'utf8');
    for (const p of [OWNER, EDITOR, READER]) expect(text).not.toContain(p.password);
    const users = JSON.parse(text).users as Record<string, { role: string; hash: string; salt: string }>;
    expect(Object.fromEntries(Object.entries(users).map(([n, u]) => [n, u.role]))).toEqual({ olive: 'owner', edna: 'editor', rita: 'reader' });
    expect(Buffer.from(users['olive']!.hash, 'base64')).toHaveLength(64);
  });

  it('refuses a wrong password and an unknown user, and tells who it takes a member for', async () => {
    expect((await call(`${server.url}book`, { ...EDITOR, password: 'not-the-password' })).status).toBe(401);
    const unknown = await call(`${server.url}book`, { name: 'mallory', password: 'whatever-1234' });
    expect(unknown.status).toBe(401);
    expect(unknown.body['reason']).toMatch(/not recognised/);
    expect((await call(`${server.url}_team/me`, READER)).body).toEqual({ name: 'rita', role: 'reader' });
  });

  it("lands an editor's write, pushed by replication", async () => {
    const local = localCopy();
    await local.put({ _id: QUOTE_ID, ...quote });
    const result = await local.replicate.to(remote(server, EDITOR));
    expect(result.docs_written).toBe(1);
    const stored = await call(`${server.url}book/${encodeURIComponent(QUOTE_ID)}`, OWNER);
    expect(stored.status).toBe(200);
    expect(stored.body['moq']).toBe(quote.moq);
  });

  it("refuses a reader's write with a clear message and writes nothing", async () => {
    const before = await call(`${server.url}book/${encodeURIComponent(QUOTE_ID)}`, OWNER);
    const info = await call(`${server.url}book`, OWNER);
    // A reader may pull the Book (its replication checkpoint on the server is refused, which PouchDB accepts)…
    const local = localCopy();
    await local.replicate.from(remote(server, READER));
    const copy = await local.get<Record<string, unknown>>(QUOTE_ID);
    expect(copy['moq']).toBe(quote.moq);
    // …but a change it makes and pushes is refused, as is a direct write, a new record and a delete.
    await local.put({ ...copy, moq: 9999 });
    await expect(local.replicate.to(remote(server, READER))).rejects.toMatchObject({ status: 403 });
    const put = await call(`${server.url}book/${encodeURIComponent(QUOTE_ID)}`, READER, { method: 'PUT', body: { ...before.body, moq: 9999 } });
    expect(put.status).toBe(403);
    expect(put.body['reason']).toBe('rita is a reader of this team: readers may read and export the Book but not change it. Nothing was written.');
    expect((await call(`${server.url}book`, READER, { method: 'POST', body: { _id: 'quotes/new', moq: 1 } })).status).toBe(403);
    expect((await call(`${server.url}book/_bulk_docs`, READER, { method: 'POST', body: { docs: [{ _id: 'quotes/new2' }] } })).status).toBe(403);
    expect((await call(`${server.url}book/${encodeURIComponent(QUOTE_ID)}?rev=${String(before.body['_rev'])}`, READER, { method: 'DELETE' })).status).toBe(403);
    // Nothing changed on the server: the same revision, the same value, the same count and update sequence.
    const after = await call(`${server.url}book/${encodeURIComponent(QUOTE_ID)}`, OWNER);
    expect(after.body).toEqual(before.body);
    const infoAfter = await call(`${server.url}book`, OWNER);
    expect([infoAfter.body['doc_count'], infoAfter.body['update_seq']]).toEqual([info.body['doc_count'], info.body['update_seq']]);
  });

  it('lets only an owner change roles, through the server and through the command', async () => {
    const byEditor = await call(`${server.url}_team/users/rita`, EDITOR, { method: 'PUT', body: { role: 'owner' } });
    expect(byEditor.status).toBe(403);
    expect(byEditor.body['reason']).toMatch(/only an owner/);
    expect((await call(`${server.url}_team/users`, EDITOR)).status).toBe(403);
    const cliByEditor = cli(['set-role', READER.name, 'owner', '--as', EDITOR.name], { RUNGBOOK_TEAM_OWNER_PASSWORD: EDITOR.password });
    expect(cliByEditor.status).toBe(1);
    expect(cliByEditor.stderr).toMatch(/edna is an editor: only an owner may add people or change roles; nothing was changed/);
    expect((await call(`${server.url}_team/me`, READER)).body['role']).toBe('reader');
    // An owner may, and the running server follows the change at once.
    const byOwner = await call(`${server.url}_team/users/rita`, OWNER, { method: 'PUT', body: { role: 'editor' } });
    expect(byOwner.status).toBe(200);
    expect((await call(`${server.url}_team/me`, READER)).body['role']).toBe('editor');
    expect(cli(['set-role', READER.name, 'reader', '--as', OWNER.name], { RUNGBOOK_TEAM_OWNER_PASSWORD: OWNER.password }).status).toBe(0);
    expect((await call(`${server.url}_team/me`, READER)).body['role']).toBe('reader');
    expect(cli(['list-users'], {}).stdout).toBe('olive\towner\nedna\teditor\nrita\treader\n');
  }, 90_000);

  it('refuses what the team server does not offer and a team without an owner', async () => {
    expect((await call(`${server.url}_config`, OWNER)).status).toBe(404);
    expect((await call(`${server.url}_replicate`, OWNER, { method: 'POST', body: {} })).status).toBe(404);
    expect((await call(`${server.url}book/_design/x`, EDITOR, { method: 'PUT', body: {} })).status).toBe(403);
    const demote = await call(`${server.url}_team/users/olive`, OWNER, { method: 'PUT', body: { role: 'editor' } });
    expect(demote.status).toBe(400);
    expect(demote.body['reason']).toMatch(/only owner/);
  });

  it('keeps the shared Book across a restart, and a copy of the stopped data folder is a working backup', async () => {
    await stopServer(server);
    const backup = `${dir}-backup`;
    cpSync(dir, backup, { recursive: true });
    try {
      server = await startServer(dir);
      const again = await call(`${server.url}book/${encodeURIComponent(QUOTE_ID)}`, EDITOR);
      expect(again.status).toBe(200);
      expect(again.body['moq']).toBe(quote.moq);
      const restored = await startServer(backup);
      const local = localCopy();
      await local.replicate.from(remote(restored, READER));
      expect((await local.get<Record<string, unknown>>(QUOTE_ID))['moq']).toBe(quote.moq);
      await stopServer(restored);
    } finally {
      rmSync(backup, { recursive: true, force: true });
    }
  }, 90_000);
});
