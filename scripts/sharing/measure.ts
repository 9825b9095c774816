// Measures one sync engine sharing a large Book between two people on this machine (SHARING.md has the results):
//   npx tsx scripts/sharing/measure.ts pouchdb|yjs [quotes]
// The server and each person's copy run in processes of their own on 127.0.0.1 (a free port), so each one's memory
// is its own; every byte on the wire is counted by the server's sockets. Each figure is measured once (the machine is
// shared): read them as orders of magnitude. Prints one JSON object.
// The chosen engine's packages are the project's own; the other engine's are not kept, so before measuring it run
//   npm install --no-save yjs@13.6.33 @hocuspocus/server@4.7.0 @hocuspocus/provider@4.8.0 ws@8.23.0
// (and y-indexeddb@9.0.12 for bundle-size.ts), then `npm ci` to go back to the project's packages.
import { fork } from 'node:child_process';
import type { ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import type { EngineName } from './engines.ts';
import { SHARED_BOOK_QUOTES } from './seed-book.ts';

const engine = process.argv[2] as EngineName;
if (engine !== 'pouchdb' && engine !== 'yjs') throw new Error('usage: measure.ts pouchdb|yjs [quotes]');
const quotes = Number(process.argv[3] ?? SHARED_BOOK_QUOTES);
const here = import.meta.dirname;
const STEP_LIMIT_MS = 600_000;
const log = (text: string): void => void process.stderr.write(`${new Date().toISOString().slice(11, 19)} ${text}\n`);

interface Peer {
  proc: ChildProcess;
  call<T = Record<string, unknown>>(cmd: string, ...args: unknown[]): Promise<T>;
  events: { event: string; key: string; at: number }[];
}

function start(file: string, args: string[]): Promise<Peer> {
  const proc = fork(join(here, file), args, { execArgv: ['--import', 'tsx', '--expose-gc', '--max-old-space-size=8192'] });
  const pending = new Map<number, { resolve(v: unknown): void; reject(e: Error): void }>();
  const events: Peer['events'] = [];
  let next = 1;
  return new Promise((resolve, reject) => {
    proc.once('exit', (code) => reject(new Error(`${file} stopped (${code}) before it was ready`)));
    proc.on('message', (m: { ready?: boolean; id?: number; result?: unknown; error?: string; event?: string; key: string; at: number }) => {
      if (m.ready) {
        resolve({
          proc,
          events,
          call: (cmd, ...args) =>
            new Promise((res, rej) => {
              const id = next++;
              // A step that has not finished in ten minutes is reported as such rather than waited on for ever.
              const timer = setTimeout(() => rej(new Error(`${file}: ${cmd} did not finish within ${STEP_LIMIT_MS / 60_000} min`)), STEP_LIMIT_MS);
              pending.set(id, { resolve: (v) => (clearTimeout(timer), res(v as never)), reject: (e) => (clearTimeout(timer), rej(e)) });
              proc.send({ id, cmd, args });
            }),
        });
      } else if (m.event) {
        events.push({ event: m.event, key: m.key, at: m.at });
      } else if (m.id !== undefined) {
        const p = pending.get(m.id)!;
        pending.delete(m.id);
        if (m.error) p.reject(new Error(m.error));
        else p.resolve(m.result);
      }
    });
  });
}

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });
}

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));
const mb = (bytes: number): number => Math.round((bytes / 1_048_576) * 10) / 10;
const version = (name: string): string => JSON.parse(readFileSync(join(here, '../../node_modules', name, 'package.json'), 'utf8')).version;

async function waitFor(test: () => boolean, ms: number): Promise<boolean> {
  const end = Date.now() + ms;
  while (!test()) {
    if (Date.now() > end) return false;
    await sleep(2);
  }
  return true;
}

const figures: Record<string, unknown> = {
  engine,
  versions: engine === 'pouchdb' ? { pouchdb: version('pouchdb-core'), 'express-pouchdb': version('express-pouchdb') } : { yjs: version('yjs'), '@hocuspocus/server': version('@hocuspocus/server'), '@hocuspocus/provider': version('@hocuspocus/provider') },
  node: process.version,
  load_average_at_start: loadavg().map((x) => Math.round(x * 100) / 100),
  quotes,
};
const dir = mkdtempSync(join(tmpdir(), `rungbook-sharing-${engine}-`));
const port = await freePort();
const url = engine === 'pouchdb' ? `http://127.0.0.1:${port}/book` : `ws://127.0.0.1:${port}`;
const server = await start('server-process.ts', [engine, String(port), dir]);
const peers: Peer[] = [];
try {
  const stats = (): Promise<Record<string, number>> => server.call('stats');
  const a = await start('client-process.ts', [engine, url, 'a']);
  const b = await start('client-process.ts', [engine, url, 'b']);
  peers.push(a, b);

  log('first person: the Book loaded into the local copy');
  const seed = await a.call<{ load_ms: number; records: number; quoteKeys: string[] }>('seed', quotes);
  figures['records'] = seed.records;
  figures['local_load_ms'] = seed.load_ms;

  log('first person: the Book sent to the server');
  const s0 = await stats();
  figures['first_push_ms'] = (await a.call<{ ms: number }>('share')).ms;
  const s1 = await stats();
  figures['first_push_wire_mb'] = mb(s1.bytes_in! - s0.bytes_in! + s1.bytes_out! - s0.bytes_out!);

  log('second person: first sync from the server');
  figures['first_sync_ms'] = (await b.call<{ ms: number }>('firstSync')).ms;
  const s2 = await stats();
  figures['first_sync_wire_mb'] = mb(s2.bytes_in! - s1.bytes_in! + s2.bytes_out! - s1.bytes_out!);
  const received = await b.call<number>('count');
  if (received !== seed.records) throw new Error(`the second copy holds ${received} of ${seed.records} records`);
  figures['second_records'] = received;
  figures['second_client_memory'] = await b.call('memory');
  figures['first_client_memory'] = await a.call('memory');
  figures['server_memory_after_first_sync'] = { rss_mb: s2.rss_mb, peak_rss_mb: s2.peak_rss_mb, heap_mb: s2.heap_mb };

  log('both live: one field edited by the first person, seen by the second');
  await a.call('live');
  await b.call('live');
  await sleep(2000);
  const edits: number[] = [];
  const s3 = await stats();
  for (const [i, key] of seed.quoteKeys.slice(0, 3).entries()) {
    await b.call('watch', key);
    b.events.length = 0;
    const { at } = await a.call<{ at: number }>('edit', key, 'moq', 100 + i);
    if (!(await waitFor(() => b.events.some((e) => e.key === key), 10_000))) throw new Error(`the edit of ${key} did not arrive within 10 s`);
    edits.push(Math.round((b.events.find((e) => e.key === key)!.at - at) * 10) / 10);
    await sleep(300);
  }
  const s4 = await stats();
  figures['edit_seen_ms'] = edits;
  figures['edit_wire_kb_per_edit'] = Math.round((s4.bytes_in! - s3.bytes_in! + s4.bytes_out! - s3.bytes_out!) / 3 / 102.4) / 10;

  log('both offline: the same field of the same quote changed by each, then both reconnect');
  const key = seed.quoteKeys[3]!;
  await a.call('offline');
  await b.call('offline');
  await a.call('edit', key, 'moq', 111);
  await sleep(20);
  await b.call('edit', key, 'moq', 222);
  // Each reconnects with one change of its own to send and, after the first, one to receive.
  const reconnects = [await a.call<{ ms: number }>('syncOnce'), await b.call<{ ms: number }>('syncOnce'), await a.call<{ ms: number }>('syncOnce')];
  figures['reconnect_sync_ms'] = reconnects.map((r) => r.ms);
  figures['conflict'] = {
    first_person_set: 111,
    second_person_set: 222,
    first_person_sees: await a.call('read', key, 'moq'),
    second_person_sees: await b.call('read', key, 'moq'),
    first_person_other_values_kept: await a.call('conflicts', key, 'moq'),
    second_person_other_values_kept: await b.call('conflicts', key, 'moq'),
  };
  const s5 = await stats();
  figures['server_memory_at_end'] = { rss_mb: s5.rss_mb, peak_rss_mb: s5.peak_rss_mb, heap_mb: s5.heap_mb };
  figures['load_average_at_end'] = loadavg().map((x) => Math.round(x * 100) / 100);
  for (const p of peers) await p.call('close');
} finally {
  for (const p of peers) if (p.proc.exitCode === null) p.proc.kill();
  if (server.proc.pid) process.kill(server.proc.pid, 'SIGTERM');
  await new Promise((r) => server.proc.once('exit', r));
  rmSync(dir, { recursive: true, force: true });
}
process.stdout.write(`${JSON.stringify(figures, null, 2)}\n`);
