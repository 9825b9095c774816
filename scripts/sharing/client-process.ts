// One person's copy of the shared Book in a process of its own, so its memory is its own. The measurement
// (measure.ts) drives it over the IPC channel: { id, cmd, args } in, { id, result } or { id, error } out.
import { engineClient } from './engines.ts';
import type { EngineName } from './engines.ts';
import { memoryFigures } from './memory.ts';

const [engine, url, name] = process.argv.slice(2) as [EngineName, string, string];
const client = await engineClient(engine, url, name);
const now = (): number => performance.timeOrigin + performance.now();
let watched = '';


async function timed(step: () => Promise<void>): Promise<{ ms: number }> {
  const t = performance.now();
  await step();
  return { ms: Math.round(performance.now() - t) };
}

const commands: Record<string, (...args: never[]) => Promise<unknown>> = {
  async seed(quotes: number) {
    const { sharedBook } = await import('./seed-book.ts');
    const book = sharedBook(quotes);
    const t = performance.now();
    await client.load(book);
    return { load_ms: Math.round(performance.now() - t), records: await client.count(), quoteKeys: [0.001, 0.05, 0.5, 0.9].map((f) => `quotes/${book.quotes[Math.floor(f * book.quotes.length)]!.id}`) };
  },
  async share() {
    return timed(() => client.share());
  },
  async firstSync() {
    return timed(() => client.firstSync());
  },
  async syncOnce() {
    return timed(() => client.syncOnce());
  },
  async live() {
    await client.goLive((key) => {
      if (key === watched) process.send!({ event: 'seen', key, at: now() });
    });
    return {};
  },
  async offline() {
    await client.goOffline();
    return {};
  },
  async watch(key: string) {
    watched = key;
    return {};
  },
  async edit(key: string, field: string, value: unknown) {
    const at = now();
    await client.edit(key, field, value);
    return { at };
  },
  async read(key: string, field: string) {
    return client.read(key, field);
  },
  async conflicts(key: string, field: string) {
    return client.conflicts(key, field);
  },
  async count() {
    return client.count();
  },
  async memory() {
    return memoryFigures();
  },
  async close() {
    await client.close();
    setTimeout(() => process.exit(0), 50);
    return {};
  },
};

process.on('message', (m: { id: number; cmd: string; args: never[] }) => {
  const run = commands[m.cmd];
  if (!run) return void process.send!({ id: m.id, error: `no command ${m.cmd}` });
  run(...m.args).then(
    (result) => process.send!({ id: m.id, result }),
    (e: unknown) => process.send!({ id: m.id, error: e instanceof Error ? e.stack ?? e.message : String(e) }),
  );
});
process.send!({ ready: true });
