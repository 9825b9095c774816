// A Book shared through the team server (started by this file on 127.0.0.1, stopped by its pid at the end): three
// people, each with their own Book in fake IndexedDB and a bridge to the shared copy. An edit on one reaches the
// other; both edit offline and reconnect (fields merged, a field both changed kept for a person with both values);
// a reader's edit is refused with a clear message, nothing written locally or on the server; a shared document
// that does not fit the Book schema is named and kept out of the Book.
import 'fake-indexeddb/auto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { emptyBook } from '../../src/domain/book.ts';
import type { Quote } from '../../src/domain/book.ts';
import { ShareBridge, createSharedBook } from '../../src/store/share-bridge.ts';
import { BookService } from '../../src/ui/book-service.ts';
import { EDITOR, OWNER, READER, addPerson, call, startServer, stopAllServers } from '../fixtures/team-server.ts';
import type { Person, Running } from '../fixtures/team-server.ts';
import { TestEngine } from '../fixtures/pouch-engine.ts';

const Engine = TestEngine;
const BOOK = 'workshop-book';

let dir = '';
let server: Running;
const services: BookService[] = [];
const bridges: ShareBridge[] = [];
let count = 0;

/** A person's copy: their own Book (the demo Book for the one who shares, else empty) and a bridge to the server. */
async function person(p: Person, shares: boolean): Promise<{ service: BookService; bridge: ShareBridge }> {
  const service = await BookService.open(`rungbook-share-${++count}`);
  services.push(service);
  if (!shares) expect((await service.replaceBook(emptyBook())).ok).toBe(true);
  return { service, bridge: await bridgeFor(service, p, `replica-${count}`) };
}

/** A bridge from a person's Book to the server, over the replica named (kept from before when it exists). */
async function bridgeFor(service: BookService, p: Person, replicaName: string, start?: 'resume'): Promise<ShareBridge> {
  const bridge = await ShareBridge.open({
    side: service,
    target: { server: server.url, book: BOOK, user: p.name, password: p.password },
    replicaName,
    engine: Engine,
    adapter: 'memory',
    ...(start ? { start } : {}),
  });
  bridges.push(bridge);
  return bridge;
}

/** Waits until `test` holds, checking every 50 ms; fails naming `what` after `ms`. */
async function until(what: string, test: () => boolean | Promise<boolean>, ms = 30_000): Promise<number> {
  const start = Date.now();
  while (!(await test())) {
    if (Date.now() - start > ms) throw new Error(`waited ${ms} ms for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
  return Date.now() - start;
}

function quoteOf(s: BookService, id: string): Quote {
  return s.book.quotes.find((q) => q.id === id)!;
}

let a: { service: BookService; bridge: ShareBridge };
let b: { service: BookService; bridge: ShareBridge };
let quoteId = '';

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'rungbook-share-'));
  server = await startServer(dir, ['--owner', OWNER.name]);
  for (const r of [addPerson(dir, EDITOR, 'editor'), addPerson(dir, READER, 'reader')]) expect(r.status, r.stderr).toBe(0);
  await createSharedBook({ server: server.url, book: BOOK, user: OWNER.name, password: OWNER.password });
}, 120_000);

afterAll(async () => {
  for (const x of bridges) x.close();
  for (const s of services) s.close();
  await stopAllServers();
  rmSync(dir, { recursive: true, force: true });
});

describe('a Book shared by two people through the team server', () => {
  it("shares one person's Book whole with another, then carries each edit across", async () => {
    a = await person(OWNER, true);
    expect(a.bridge.status.role).toBe('owner');
    await a.bridge.shareWholeBook();
    a.bridge.start();
    b = await person(EDITOR, false);
    expect(b.service.book.quotes).toEqual([]);
    b.bridge.start();
    const sizes = (s: BookService) => [s.book.parts.length, s.book.suppliers.length, s.book.quotes.length, s.book.variants.length, s.book.buildLines.length, s.book.checks.length];
    expect(a.service.book.quotes.length).toBeGreaterThan(1);
    await until('the second copy to hold the whole Book', () => sizes(b.service).join() === sizes(a.service).join() && b.service.book.settings.bookName === a.service.book.settings.bookName, 60_000);
    // The records arrived as saves of the second person's own Book: their fields the same, their revisions its own.
    quoteId = a.service.book.quotes[0]!.id;
    const { rev: _ra, ...sent } = quoteOf(a.service, quoteId);
    const { rev: rb, ...got } = quoteOf(b.service, quoteId);
    expect(got).toEqual(sent);
    expect(rb).toBe(1);

    const q = quoteOf(a.service, quoteId);
    expect((await a.service.save({ put: { quotes: [{ ...q, moq: q.moq + 7 }] } })).ok).toBe(true);
    const ms = await until('the edit to reach the second copy', () => quoteOf(b.service, quoteId).moq === q.moq + 7);
    // Issue 17 asks for one edit to reach the other copy within a second on loopback; the bench measures it, this
    // only keeps it from drifting far (two shared cores).
    expect(ms).toBeLessThan(10_000);
    // And back the other way.
    const qb = quoteOf(b.service, quoteId);
    expect((await b.service.save({ put: { quotes: [{ ...qb, supplierCode: 'WB-100' }] } })).ok).toBe(true);
    await until('the edit to come back', () => quoteOf(a.service, quoteId).supplierCode === 'WB-100');
  }, 120_000);

  it('merges both offline edits field by field on reconnect and keeps a field both changed for a person, with both values', async () => {
    a.bridge.stop();
    b.bridge.stop();
    const qa = quoteOf(a.service, quoteId);
    const qb = quoteOf(b.service, quoteId);
    expect((await a.service.save({ put: { quotes: [{ ...qa, moq: 111, leadDays: 12 }] } })).ok).toBe(true);
    expect((await b.service.save({ put: { quotes: [{ ...qb, moq: 222, supplierCode: 'WB-222' }] } })).ok).toBe(true);
    await Promise.all([a.bridge.settled(), b.bridge.settled()]);
    a.bridge.start();
    b.bridge.start();
    const both = [a, b];
    // One-sided changes merged on both copies: a's lead time and b's order code.
    await until('the merged record on both copies', () =>
      both.every(({ service }) => quoteOf(service, quoteId).leadDays === 12 && quoteOf(service, quoteId).supplierCode === 'WB-222'),
    60_000);
    await until('the conflict listed on both copies', async () => {
      for (const { bridge } of both) if ((await bridge.openConflicts()).length !== 1) return false;
      return true;
    }, 60_000);
    for (const { bridge, service } of both) {
      const [open] = await bridge.openConflicts();
      expect(open!.docId).toBe(`quotes/${quoteId}`);
      expect(open!.field.path).toEqual(['moq']);
      expect(new Set(open!.field.choices.map((c) => `${c.by}=${String(c.value)}`))).toEqual(new Set([`${OWNER.name}=111`, `${EDITOR.name}=222`]));
      for (const c of open!.field.choices) expect(Number.isNaN(Date.parse(c.at))).toBe(false);
      // The Book holds one of the two values for now (the one listed first), the same on both copies.
      expect(quoteOf(service, quoteId).moq).toBe(open!.field.choices[0]!.value);
      expect(open!.note.taken.map((t) => [t.path.join('.'), t.from]).sort()).toEqual([
        ['leadDays', OWNER.name],
        ['supplierCode', EDITOR.name],
      ]);
      expect(bridge.status.conflicts).toBe(1);
    }
    // The person picks the value that was not kept: both copies take it, and the conflict is gone from both lists.
    const [open] = await b.bridge.openConflicts();
    const other = open!.field.choices[1]!.value;
    expect(await b.bridge.choose(open!, other)).toEqual({ ok: true });
    await until('the choice on both copies', () => both.every(({ service }) => quoteOf(service, quoteId).moq === other), 60_000);
    await until('no conflict left on either copy', async () => {
      for (const { bridge } of both) if ((await bridge.openConflicts()).length !== 0) return false;
      return true;
    }, 60_000);
  }, 180_000);

  it('names a shared document that does not fit the Book and keeps it out of the Book', async () => {
    const { rev: _r, ...fields } = quoteOf(a.service, quoteId);
    const bad = { _id: 'quotes/q_bad', record: { ...fields, id: 'q_bad', moq: -5 }, by: OWNER.name, at: new Date().toISOString(), bookVersion: 2 };
    expect((await call(`${server.url}${BOOK}/${encodeURIComponent(bad._id)}`, OWNER, { method: 'PUT', body: bad })).status).toBe(201);
    await until('the problem named on the second copy', () => b.bridge.status.problems.some((p) => p.place === 'quotes/q_bad moq'));
    expect(b.service.book.quotes.some((q) => q.id === 'q_bad')).toBe(false);
    expect(a.service.book.quotes.some((q) => q.id === 'q_bad')).toBe(false);
  }, 60_000);

  it("refuses a reader's edit with a clear message, writing nothing in the reader's Book or on the server", async () => {
    const r = await person(READER, false);
    expect(r.bridge.status.role).toBe('reader');
    r.bridge.start();
    await until('the reader to hold the Book', () => r.service.book.quotes.length === a.service.book.quotes.length, 60_000);
    // The other two go offline, so the server's update sequence moves only if the reader's edit reached it.
    a.bridge.stop();
    b.bridge.stop();
    await Promise.all([a.bridge.settled(), b.bridge.settled()]);
    let before = await call(`${server.url}${BOOK}`, OWNER);
    await until('the server to be still', async () => {
      await new Promise((res) => setTimeout(res, 500));
      const now = await call(`${server.url}${BOOK}`, OWNER);
      const still = now.body['update_seq'] === before.body['update_seq'];
      before = now;
      return still;
    });
    const q = quoteOf(r.service, quoteId);
    const saved = await r.service.save({ put: { quotes: [{ ...q, moq: 9999 }] } });
    expect(saved).toEqual({
      ok: false,
      conflict: false,
      message: 'rita is a reader of this shared Book: readers may read and export it but not change it. Nothing was saved.',
    });
    expect(quoteOf(r.service, quoteId)).toEqual(q);
    await r.service.reload();
    expect(quoteOf(r.service, quoteId)).toEqual(q);
    // The server holds what it held: the same update sequence, the record unchanged.
    await r.bridge.settled();
    const after = await call(`${server.url}${BOOK}`, OWNER);
    expect(after.body['update_seq']).toEqual(before.body['update_seq']);
    const doc = await call(`${server.url}${BOOK}/${encodeURIComponent(`quotes/${quoteId}`)}`, OWNER);
    expect((doc.body['record'] as { moq: number }).moq).toBe(quoteOf(a.service, quoteId).moq);
  }, 120_000);

  it('picks sharing up again after the page was closed: changes made meanwhile are sent, what the replica got is taken in', async () => {
    a.bridge.start();
    // b's page closes (its replica, replica-2, stays in the browser); b goes on working in its Book, not shared.
    b.bridge.close();
    const [q1, q2, q3] = b.service.book.quotes;
    expect((await b.service.save({ put: { quotes: [{ ...q1!, moq: 4242 }] }, settings: { ...b.service.book.settings, labourRatePerHour: 47 } })).ok).toBe(true);
    expect((await b.service.save({ delete: { quotes: [q2!.id] } })).ok).toBe(true);
    // Replication had delivered a version of q3 to the replica just before the page closed, not yet taken in.
    const replica = new Engine('replica-2', { adapter: 'memory' });
    const held = await replica.get<{ record: Record<string, unknown> }>(`quotes/${q3!.id}`);
    await replica.put({ ...held, record: { ...held.record, supplierCode: 'ARRIVED-1' }, by: OWNER.name, at: new Date().toISOString() });
    expect(quoteOf(b.service, q3!.id).supplierCode).not.toBe('ARRIVED-1');

    const resumed = await bridgeFor(b.service, EDITOR, 'replica-2', 'resume');
    resumed.start();
    b = { service: b.service, bridge: resumed };
    await until('what arrived before the close to reach the Book', () => quoteOf(b.service, q3!.id).supplierCode === 'ARRIVED-1', 60_000);
    await until('the changes made while not shared to reach the other copy', () => {
      const s = a.service.book;
      return quoteOf(a.service, q1!.id).moq === 4242 && s.settings.labourRatePerHour === 47 && !s.quotes.some((q) => q.id === q2!.id) && quoteOf(a.service, q3!.id).supplierCode === 'ARRIVED-1';
    }, 60_000);
    // Nothing else moved: b's Book and a's hold the same quotes.
    expect(b.service.book.quotes.map((q) => q.id).sort()).toEqual(a.service.book.quotes.map((q) => q.id).sort());
    expect(await resumed.openConflicts()).toEqual([]);

    // Who changed what and when: the latest changes name b's edits; the quote's versions go back to the first share.
    const recent = await resumed.recentChanges(10);
    const mine = recent.find((v) => v.docId === `quotes/${q1!.id}`);
    expect(mine).toMatchObject({ by: EDITOR.name, deleted: false, changed: ['moq'] });
    expect(recent.find((v) => v.docId === `quotes/${q2!.id}`)).toMatchObject({ by: EDITOR.name, deleted: true, changed: ['deleted'] });
    const versions = await resumed.recordHistory(`quotes/${q1!.id}`);
    expect(versions[0]).toMatchObject({ by: EDITOR.name, changed: ['moq'] });
    expect(versions.length).toBeGreaterThan(1);
    expect(versions.map((v) => v.at)).toEqual([...versions.map((v) => v.at)].sort().reverse());
  }, 120_000);

  it('stops sharing, sending nothing, when a Book file or an empty Book replaces the shared one here', async () => {
    const before = await call(`${server.url}${BOOK}`, OWNER);
    expect((await a.service.replaceBook(a.service.empty())).ok).toBe(true);
    await a.bridge.settled();
    expect(a.bridge.status.state).toBe('stopped');
    expect(a.bridge.status.error).toMatch(/sharing stopped here and nothing of it was sent/);
    a.bridge.start();
    await a.bridge.settled();
    await new Promise((r) => setTimeout(r, 1000));
    const after = await call(`${server.url}${BOOK}`, OWNER);
    expect([after.body['doc_count'], after.body['update_seq']]).toEqual([before.body['doc_count'], before.body['update_seq']]);
    expect(b.service.book.quotes.some((q) => q.id === quoteId)).toBe(true);
  }, 60_000);
});
