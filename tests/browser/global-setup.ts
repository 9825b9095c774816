// Builds the app once and serves it from dist/ on a free loopback port for the browser tests, through the same server
// as `npm start` (scripts/serve.mjs), so the tests see the headers users get.
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
  // vitest sets NODE_ENV=test, which would make Vite pick development builds of Lit; test what users get.
  const nodeEnv = process.env.NODE_ENV;
  process.env.NODE_ENV = 'production';
  try {
    await build({ logLevel: 'warn', mode: 'production' });
  } finally {
    process.env.NODE_ENV = nodeEnv;
  }
  const { server, url } = await serveApp({ port: 0 });
  project.provide('baseUrl', url);
  return async () => {
    const closed = new Promise<void>((done) => server.close(() => done()));
    server.closeAllConnections();
    await closed;
  };
}
