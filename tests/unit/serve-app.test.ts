// scripts/serve.mjs, the server of `npm start` and the browser tests: security headers on every response, content
// types, caching, index.html for app paths, and no way out of the served folder.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import type { ChildProcess } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import type { IncomingHttpHeaders, Server } from 'node:http';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { serveApp } from '../../scripts/serve.mjs';
import { CONTENT_SECURITY_POLICY } from '../../scripts/security-headers.mjs';

const ROOT = resolve(import.meta.dirname, '../..');
const INDEX = '<!doctype html><title>Rungbook</title><rb-app></rb-app>';

let dir = '';
let dist = '';
let server: Server | undefined;
let base = '';

beforeAll(async () => {
  // A tiny built app in dist/, with a file beside it that must never be served.
  dir = mkdtempSync(join(tmpdir(), 'rungbook-serve-'));
  dist = join(dir, 'dist');
  mkdirSync(join(dist, 'assets'), { recursive: true });
  mkdirSync(join(dist, 'demo'));
  writeFileSync(join(dist, 'index.html'), INDEX);
  writeFileSync(join(dist, 'sw.js'), 'self.__RB_PRECACHE = {};\n');
  writeFileSync(join(dist, 'assets', 'index-AbC123.js'), 'export {};\n');
  writeFileSync(join(dist, 'assets', 'index-AbC123.css'), 'body{}\n');
  writeFileSync(join(dist, 'manifest.webmanifest'), '{}\n');
  writeFileSync(join(dist, 'icon.svg'), '<svg xmlns="http://www.w3.org/2000/svg"/>\n');
  writeFileSync(join(dist, 'demo', 'prices.csv'), 'part,price\n');
  writeFileSync(join(dir, 'secret.txt'), 'outside the app\n');
  symlinkSync(join(dir, 'secret.txt'), join(dist, 'link.txt'));
  ({ server, url: base } = await serveApp({ root: dist, port: 0 }));
});

afterAll(async () => {
  if (server) await new Promise<void>((done) => server!.close(() => done()));
  if (dir) rmSync(dir, { recursive: true, force: true });
});

interface Reply {
  status: number;
  headers: IncomingHttpHeaders;
  body: string;
}

/** One request with the path sent exactly as written (no URL normalisation, unlike fetch). */
function get(path: string, options: { method?: string; headers?: Record<string, string>; origin?: string } = {}): Promise<Reply> {
  const url = new URL(options.origin ?? base);
  return new Promise((done, fail) => {
    const req = request(
      { host: url.hostname, port: url.port, path, method: options.method ?? 'GET', headers: options.headers },
      (res) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => done({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks).toString('utf8') }));
        res.on('error', fail);
      },
    );
    req.on('error', fail);
    req.end();
  });
}

function expectSecurityHeaders(r: Reply): void {
  const csp = r.headers['content-security-policy'];
  expect(csp).toBe(`${CONTENT_SECURITY_POLICY}; frame-ancestors 'none'`);
  expect(csp).toContain("default-src 'self'");
  expect(csp).toContain("script-src 'self'");
  expect(r.headers['x-content-type-options']).toBe('nosniff');
  expect(r.headers['referrer-policy']).toBe('no-referrer');
  expect(r.headers['cross-origin-opener-policy']).toBe('same-origin');
  expect(r.headers['x-frame-options']).toBe('DENY');
  for (const feature of ['camera', 'microphone', 'geolocation']) expect(r.headers['permissions-policy']).toContain(`${feature}=()`);
}

describe('the app server', () => {
  it('listens on the loopback address only', () => {
    expect(base).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
    const address = server!.address();
    expect(typeof address === 'object' && address?.address).toBe('127.0.0.1');
  });

  it('serves index.html at / with the security headers, revalidated on every visit', async () => {
    const r = await get('/');
    expect(r.status).toBe(200);
    expect(r.body).toBe(INDEX);
    expect(r.headers['content-type']).toBe('text/html; charset=utf-8');
    expect(r.headers['cache-control']).toBe('no-cache');
    expectSecurityHeaders(r);
  });

  it('gives each kind of file its content type and caching', async () => {
    const cases: [string, string, string][] = [
      ['/sw.js', 'text/javascript; charset=utf-8', 'no-cache'],
      ['/assets/index-AbC123.js', 'text/javascript; charset=utf-8', 'public, max-age=31536000, immutable'],
      ['/assets/index-AbC123.css', 'text/css; charset=utf-8', 'public, max-age=31536000, immutable'],
      ['/manifest.webmanifest', 'application/manifest+json; charset=utf-8', 'no-cache'],
      ['/icon.svg', 'image/svg+xml', 'no-cache'],
      ['/demo/prices.csv', 'text/csv; charset=utf-8', 'no-cache'],
    ];
    for (const [path, type, cache] of cases) {
      const r = await get(path);
      expect(r.status, path).toBe(200);
      expect(r.headers['content-type'], path).toBe(type);
      expect(r.headers['cache-control'], path).toBe(cache);
      expectSecurityHeaders(r);
    }
    expect((await get('/sw.js?v=2')).body).toBe('self.__RB_PRECACHE = {};\n');
  });

  it('answers a revalidation with 304 and HEAD with headers only', async () => {
    const first = await get('/sw.js');
    const again = await get('/sw.js', { headers: { 'If-None-Match': String(first.headers.etag) } });
    expect(again.status).toBe(304);
    expect(again.body).toBe('');
    expectSecurityHeaders(again);
    const head = await get('/assets/index-AbC123.js', { method: 'HEAD' });
    expect(head.status).toBe(200);
    expect(head.headers['content-length']).toBe('11');
    expect(head.body).toBe('');
  });

  it('gives index.html for app paths, and 404 for missing files', async () => {
    for (const path of ['/family', '/runs/2026-07', '/demo', '/demo/']) {
      const r = await get(path);
      expect(r.status, path).toBe(200);
      expect(r.body, path).toBe(INDEX);
      expect(r.headers['cache-control'], path).toBe('no-cache');
    }
    const missing = await get('/assets/gone-123.js');
    expect(missing.status).toBe(404);
    expect(missing.headers['content-type']).toBe('text/plain; charset=utf-8');
    expectSecurityHeaders(missing);
  });

  it('refuses every way out of the served folder', async () => {
    for (const path of [
      '/../secret.txt',
      '/../package.json',
      '/assets/../../secret.txt',
      '/%2e%2e/secret.txt',
      '/%2E%2E/secret.txt',
      '/.%2e/secret.txt',
      '/assets/%2e%2e%2f%2e%2e%2fsecret.txt',
      '/..%2fsecret.txt',
      '/..%5csecret.txt',
      '/%5c..%5csecret.txt',
      '/secret.txt%00.js',
      '/%E0%A4%A',
      'secret.txt',
    ]) {
      const r = await get(path);
      expect(r.status, path).toBe(400);
      expect(r.body, path).not.toContain('outside the app');
      expectSecurityHeaders(r);
    }
    // A link inside the folder to a file outside it is not followed.
    const link = await get('/link.txt');
    expect(link.status).toBe(404);
    expect(link.body).not.toContain('outside the app');
  });

  it('allows only GET and HEAD', async () => {
    const r = await get('/', { method: 'POST' });
    expect(r.status).toBe(405);
    expect(r.headers.allow).toBe('GET, HEAD');
    expectSecurityHeaders(r);
  });

  it('keeps one Content-Security-Policy: index.html takes it from the shared module at build time', () => {
    const html = readFileSync(join(ROOT, 'index.html'), 'utf8');
    expect(html).toContain('content="__RB_CONTENT_SECURITY_POLICY__"');
    expect(html).not.toContain('default-src');
    expect(CONTENT_SECURITY_POLICY).not.toContain('frame-ancestors');
  });
});

describe('node scripts/serve.mjs', () => {
  let child: ChildProcess | undefined;

  afterAll(() => {
    if (child?.pid && child.exitCode === null) process.kill(child.pid, 'SIGTERM');
  });

  it('prints the address to open, serves it, and stops on SIGTERM', async () => {
    child = spawn(process.execPath, [join(ROOT, 'scripts/serve.mjs'), '--port', '0', '--dir', dist], { stdio: ['ignore', 'pipe', 'pipe'] });
    const url = await new Promise<string>((done, fail) => {
      let out = '';
      child!.stdout!.on('data', (c: Buffer) => {
        out += c.toString();
        const m = /open (http:\/\/127\.0\.0\.1:\d+\/)/.exec(out);
        if (m) done(m[1]!);
      });
      child!.once('exit', (code) => fail(new Error(`server exited with ${code}`)));
    });
    const r = await get('/', { origin: url });
    expect(r.status).toBe(200);
    expectSecurityHeaders(r);
    const exited = new Promise<number | null>((done) => child!.once('exit', (code) => done(code)));
    process.kill(child.pid!, 'SIGTERM');
    expect(await exited).toBe(0);
  });

  it('says so and exits 1 when there is no built app', async () => {
    const empty = join(dir, 'empty');
    mkdirSync(empty);
    const run = spawn(process.execPath, [join(ROOT, 'scripts/serve.mjs'), '--port', '0', '--dir', empty], { stdio: ['ignore', 'pipe', 'pipe'] });
    let err = '';
    run.stderr!.on('data', (c: Buffer) => (err += c.toString()));
    const code = await new Promise<number | null>((done) => run.once('exit', (c) => done(c)));
    expect(code).toBe(1);
    expect(err).toMatch(/no built app in .*npm run build/);
  });
});
