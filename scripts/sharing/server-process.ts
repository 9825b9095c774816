// A sync engine's server in a process of its own for the measurement, on 127.0.0.1 at the port given, keeping its
// data in the folder given. It counts every byte its sockets read and write and reports them, with its memory,
// when asked over the IPC channel. Stopped by its pid (SIGTERM) by measure.ts.
import type { Server } from 'node:http';
import type { Socket } from 'node:net';
import type { EngineName } from './engines.ts';
import { memoryFigures } from './memory.ts';

const [engine, portText, dir] = process.argv.slice(2) as [EngineName, string, string];
const port = Number(portText);
const server: Server = engine === 'pouchdb' ? await (await import('./pouchdb-server.ts')).startPouchServer(port, dir) : await (await import('./yjs-server.ts')).startYjsServer(port, dir);

const sockets = new Set<Socket>();
let closedIn = 0;
let closedOut = 0;
server.on('connection', (s: Socket) => {
  sockets.add(s);
  s.on('close', () => {
    closedIn += s.bytesRead;
    closedOut += s.bytesWritten;
    sockets.delete(s);
  });
});

function stats(): Record<string, number> {
  let bytesIn = closedIn;
  let bytesOut = closedOut;
  for (const s of sockets) {
    bytesIn += s.bytesRead;
    bytesOut += s.bytesWritten;
  }
  return { bytes_in: bytesIn, bytes_out: bytesOut, ...memoryFigures() };
}

process.on('message', (m: { id: number; cmd: string }) => {
  if (m.cmd === 'stats') process.send!({ id: m.id, result: stats() });
});
process.on('SIGTERM', () => server.close(() => process.exit(0)));
process.send!({ ready: true });
