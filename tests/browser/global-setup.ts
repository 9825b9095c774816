// Builds the app once per run, into a folder of this run's own (so runs at the same time never serve each other's
// half-written files), and serves it on a free loopback port for the browser tests, through the same server as
// `npm start` (scripts/serve.mjs), so the tests see the headers users get.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { build } from 'vite';
import { serveApp } from '../../scripts/serve.mjs';
import type { TestProject } from 'vitest/node';
import type {} from 'vitest';

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string;
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
  project.provide('baseUrl', url);
  return async () => {
    const closed = new Promise<void>((done) => server.close(() => done()));
    server.closeAllConnections();
    await closed;
    rmSync(outDir, { recursive: true, force: true });
  };
}
