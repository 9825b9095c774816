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
  await build({ logLevel: 'warn' });
  const server = await preview({ preview: { port: 0, host: '127.0.0.1', strictPort: false }, logLevel: 'warn' });
  const address = server.httpServer.address();
  if (!address || typeof address === 'string') throw new Error('preview server has no port');
  project.provide('baseUrl', `http://127.0.0.1:${address.port}/`);
  return async () => {
    await server.close();
  };
}
