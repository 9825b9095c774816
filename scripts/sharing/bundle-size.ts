// Size of each sync engine's browser client as the app would ship it: a tiny entry per engine bundled from
// node_modules with esbuild (minified, for browsers), then gzipped at the default level, as servers send it.
//   npx tsx scripts/sharing/bundle-size.ts   (the Yjs entry needs the packages measure.ts names installed first;
// esbuild is the one tsx brings)
import { build } from 'esbuild';
import { gzipSync } from 'node:zlib';

const ENTRIES: Record<string, string> = {
  // The browser edition: IndexedDB and HTTP adapters, replication, map/reduce queries.
  'pouchdb-browser': `export { default } from 'pouchdb-browser';`,
  // Only what sharing a Book needs: the core, the IndexedDB and HTTP adapters and replication.
  'pouchdb-core + idb + http + replication': `import P from 'pouchdb-core'; import idb from 'pouchdb-adapter-idb'; import http from 'pouchdb-adapter-http'; import rep from 'pouchdb-replication'; export default P.plugin(idb).plugin(http).plugin(rep);`,
  // Yjs with its IndexedDB store and the Hocuspocus provider.
  'yjs + y-indexeddb + @hocuspocus/provider': `export * as Y from 'yjs'; export { IndexeddbPersistence } from 'y-indexeddb'; export { HocuspocusProvider } from '@hocuspocus/provider';`,
};

const out: Record<string, { min_kb: number; gzip_kb: number }> = {};
for (const [name, contents] of Object.entries(ENTRIES)) {
  const r = await build({
    stdin: { contents, resolveDir: import.meta.dirname, loader: 'js' },
    bundle: true,
    minify: true,
    format: 'esm',
    platform: 'browser',
    target: 'es2022',
    write: false,
    logLevel: 'error',
    define: { global: 'globalThis', 'process.env.NODE_ENV': '"production"' },
  });
  const bytes = r.outputFiles[0]!.contents;
  out[name] = { min_kb: Math.round(bytes.length / 102.4) / 10, gzip_kb: Math.round(gzipSync(bytes).length / 102.4) / 10 };
}
process.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
