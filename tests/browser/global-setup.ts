// Builds the app once and serves it from dist/ on a free loopback port for the browser tests.
import { build, preview } from 'vite';
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
  const server = await preview({ preview: { port: 0, host: '127.0.0.1', strictPort: false }, logLevel: 'warn' });
  const address = server.httpServer.address();
  if (!address || typeof address === 'string') throw new Error('preview server has no port');
  project.provide('baseUrl', `http://127.0.0.1:${address.port}/`);
  return async () => {
    await server.close();
  };
}
