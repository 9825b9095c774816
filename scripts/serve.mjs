#!/usr/bin/env node
// Serves the built app (dist/) on the loopback address, the way `npm start` runs it and the browser tests see it:
// static files with their content types, index.html for app paths, the security headers on every response,
// sw.js and index.html revalidated on each visit, hashed assets cached for good, and nothing outside the folder.
//
//   node scripts/serve.mjs [--port N] [--dir DIR]      (or PORT=N; port 5173 by default, 0 for any free port)
import { createReadStream } from 'node:fs';
import { realpath, stat } from 'node:fs/promises';
import { createServer } from 'node:http';
import { extname, join, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import { SECURITY_HEADERS } from './security-headers.mjs';

export const HOST = '127.0.0.1';
export const DEFAULT_PORT = 5173;
export const DEFAULT_ROOT = fileURLToPath(new URL('../dist', import.meta.url));

const CONTENT_TYPES = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.map': 'application/json; charset=utf-8',
  '.webmanifest': 'application/manifest+json; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.jpg': 'image/jpeg',
  '.jpeg': 'image/jpeg',
  '.webp': 'image/webp',
  '.ico': 'image/x-icon',
  '.woff2': 'font/woff2',
  '.wasm': 'application/wasm',
  '.txt': 'text/plain; charset=utf-8',
  '.csv': 'text/csv; charset=utf-8',
  '.tsv': 'text/tab-separated-values; charset=utf-8',
};

/** How long a browser may keep a file: names with a build hash never change, everything else is revalidated. */
function cacheControl(urlPath) {
  if (urlPath.startsWith('/assets/')) return 'public, max-age=31536000, immutable';
  return 'no-cache';
}

/**
 * The URL path of a request, percent-decoded, or undefined when it is malformed or tries to leave the folder
 * (a `..` segment, plainly or encoded, a backslash or a NUL).
 */
export function requestPath(rawUrl) {
  const raw = (rawUrl ?? '/').split(/[?#]/, 1)[0];
  if (!raw.startsWith('/')) return undefined;
  let path;
  try {
    path = decodeURIComponent(raw);
  } catch {
    return undefined;
  }
  if (path.includes('\0') || path.includes('\\')) return undefined;
  if (path.split('/').some((segment) => segment === '..')) return undefined;
  return path;
}

/** A regular file's path and size, or undefined; the real path must stay inside the real root (no symlink out). */
async function fileIn(realRoot, urlPath) {
  const candidate = resolve(realRoot, `.${urlPath}`);
  try {
    const real = await realpath(candidate);
    if (real !== realRoot && !real.startsWith(realRoot + sep)) return undefined;
    const info = await stat(real);
    return info.isFile() ? { path: real, size: info.size, mtimeMs: info.mtimeMs } : undefined;
  } catch {
    return undefined;
  }
}

/**
 * An HTTP server (not yet listening) for the built app in `root`. Paths without a file extension that match no file
 * get index.html, so the app opens at any of its own addresses; a missing file with an extension is a 404.
 */
export function createAppServer({ root = DEFAULT_ROOT } = {}) {
  // A missing folder fails each request (500), not the process.
  const realRootPromise = realpath(resolve(root));
  realRootPromise.catch(() => {});

  const server = createServer(async (req, res) => {
    for (const [name, value] of Object.entries(SECURITY_HEADERS)) res.setHeader(name, value);
    const plain = (status, text, extra = {}) => {
      res.writeHead(status, { 'Content-Type': 'text/plain; charset=utf-8', 'Cache-Control': 'no-store', ...extra });
      res.end(req.method === 'HEAD' ? undefined : `${text}\n`);
    };
    try {
      if (req.method !== 'GET' && req.method !== 'HEAD') return plain(405, 'Method not allowed', { Allow: 'GET, HEAD' });
      const urlPath = requestPath(req.url);
      if (urlPath === undefined) return plain(400, 'Bad request');
      const realRoot = await realRootPromise;

      let servedPath = urlPath.endsWith('/') ? `${urlPath}index.html` : urlPath;
      let file = await fileIn(realRoot, servedPath);
      if (!file && !extname(urlPath)) {
        servedPath = '/index.html';
        file = await fileIn(realRoot, servedPath);
      }
      if (!file) return plain(404, 'Not found');

      const etag = `"${file.size.toString(16)}-${Math.floor(file.mtimeMs).toString(16)}"`;
      const headers = {
        'Content-Type': CONTENT_TYPES[extname(file.path).toLowerCase()] ?? 'application/octet-stream',
        'Cache-Control': cacheControl(servedPath),
        ETag: etag,
      };
      if (req.headers['if-none-match'] === etag) {
        res.writeHead(304, headers);
        return res.end();
      }
      res.writeHead(200, { ...headers, 'Content-Length': file.size });
      if (req.method === 'HEAD') return res.end();
      const stream = createReadStream(file.path);
      stream.on('error', () => res.destroy());
      stream.pipe(res);
    } catch {
      if (res.headersSent) res.destroy();
      else plain(500, 'Server error');
    }
  });
  // A request Node cannot parse gets its 400 with the same headers.
  server.on('clientError', (_error, socket) => {
    if (!socket.writable) return socket.destroy();
    const headers = Object.entries(SECURITY_HEADERS).map(([name, value]) => `${name}: ${value}\r\n`);
    socket.end(`HTTP/1.1 400 Bad Request\r\n${headers.join('')}Content-Length: 0\r\nConnection: close\r\n\r\n`);
  });
  return server;
}

/** Starts the server on HOST; resolves with the server and the address to open. */
export async function serveApp({ root = DEFAULT_ROOT, port = DEFAULT_PORT } = {}) {
  const server = createAppServer({ root });
  await new Promise((done, fail) => {
    server.once('error', fail);
    server.listen(port, HOST, () => {
      server.off('error', fail);
      done();
    });
  });
  const address = server.address();
  return { server, url: `http://${HOST}:${address.port}/` };
}

async function main() {
  const { values } = parseArgs({ options: { port: { type: 'string' }, dir: { type: 'string' } } });
  const portText = values.port ?? process.env.PORT ?? String(DEFAULT_PORT);
  const port = Number(portText);
  if (!/^\d+$/.test(portText) || port > 65535) throw new Error(`not a port number: ${portText}`);
  const root = values.dir ? resolve(values.dir) : DEFAULT_ROOT;
  try {
    await stat(join(root, 'index.html'));
  } catch {
    throw new Error(`no built app in ${root}: run \`npm run build\` first (or \`npm start\`, which builds)`);
  }
  let started;
  try {
    started = await serveApp({ root, port });
  } catch (e) {
    if (e?.code === 'EADDRINUSE') throw new Error(`port ${port} is in use: choose another with --port N or PORT=N`);
    throw e;
  }
  console.log(`Rungbook is running: open ${started.url}  (Ctrl+C stops it)`);
  const stop = () => started.server.close(() => process.exit(0)).closeAllConnections();
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((e) => {
    console.error(`rungbook serve: ${e instanceof Error ? e.message : String(e)}`);
    process.exit(1);
  });
}
