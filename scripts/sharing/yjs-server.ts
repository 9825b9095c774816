// Hocuspocus, Yjs's maintained server, keeping each document's state in a file of the data folder, as measured for
// SHARING.md.
import { readFile, writeFile } from 'node:fs/promises';
import type { Server as HttpServer } from 'node:http';
import { join } from 'node:path';
import { Server } from '@hocuspocus/server';
import * as Y from 'yjs';

export async function startYjsServer(port: number, dir: string): Promise<HttpServer> {
  const file = (name: string): string => join(dir, `${encodeURIComponent(name)}.yjs`);
  const server = new Server({
    port,
    address: '127.0.0.1',
    quiet: true,
    stopOnSignals: false,
    async onLoadDocument({ document, documentName }) {
      const bytes = await readFile(file(documentName)).catch(() => null);
      if (bytes) Y.applyUpdate(document, bytes);
      return document;
    },
    async onStoreDocument({ document, documentName }) {
      await writeFile(file(documentName), Y.encodeStateAsUpdate(document));
    },
  });
  await server.listen();
  return server.httpServer;
}
