// The service worker that lets Rungbook open with the network gone: it keeps every file of the built app in a cache
// named by the build, answers page loads from the network when it can and from that cache when it cannot.
// The build (vite.config.ts) puts the list of files in front of this script as `self.__RB_PRECACHE`.
// This file runs in the worker: it imports nothing, so the build emits it as one plain script.

interface PrecacheList {
  /** Changes with every build that changes any file, so a new build installs a new worker. */
  version: string;
  /** Paths relative to the worker's scope; "" is the app page itself. */
  files: string[];
}

const worker = self as unknown as ServiceWorkerGlobalScope & { __RB_PRECACHE?: PrecacheList };
const list: PrecacheList = worker.__RB_PRECACHE ?? { version: 'unbuilt', files: [] };
const CACHE_PREFIX = 'rungbook-app-';
const CACHE = `${CACHE_PREFIX}${list.version}`;

function inScope(path: string): string {
  return new URL(path, worker.registration.scope).href;
}

worker.addEventListener('install', (event) => {
  // `cache: 'reload'` skips the HTTP cache, so the cache holds exactly the files of this build.
  const requests = list.files.map((f) => new Request(inScope(f), { cache: 'reload' }));
  event.waitUntil(caches.open(CACHE).then((cache) => cache.addAll(requests)));
  // No skipWaiting: tabs still running the old build keep its cache (their pages load chunks lazily) until they
  // all close; the next visit then runs the new build.
});

worker.addEventListener('activate', (event) => {
  event.waitUntil(
    (async () => {
      for (const key of await caches.keys()) {
        if (key.startsWith(CACHE_PREFIX) && key !== CACHE) await caches.delete(key);
      }
      // A page load asks the network while this worker starts, rather than after (see `page`).
      await worker.registration.navigationPreload?.enable().catch(() => undefined);
      // The first visit's page comes under the worker at once, so what it loads later is answered offline too.
      await worker.clients.claim();
    })(),
  );
});

let cacheOpened: Promise<Cache> | undefined;
let storedRequests: Promise<Map<string, Request>> | undefined;

/** A URL without its query: the files are stored and looked up by origin and path. */
function fileKey(url: string): string {
  const u = new URL(url);
  return `${u.origin}${u.pathname}`;
}

/**
 * The stored copy of a file of this build, or undefined when the build has no such file. The requests the files
 * were stored under are listed once per worker start, and each file is then matched by its very stored request:
 * a match with ignoreSearch or ignoreVary made the browser read every entry of the cache for each file (200-400 ms
 * per file of a start on a busy 2-core machine). The stored request also carries the headers a "Vary: Origin" from
 * the server compares, which a module script's request (with its Origin header) would not match.
 */
async function fromCache(request: Request | string): Promise<Response | undefined> {
  const cache = await (cacheOpened ??= caches.open(CACHE));
  storedRequests ??= cache.keys().then((keys) => new Map(keys.map((r) => [fileKey(r.url), r] as const)));
  const held = (await storedRequests).get(fileKey(typeof request === 'string' ? request : request.url));
  return held ? cache.match(held) : undefined;
}

async function page(request: Request, preloaded: Promise<Response | undefined>): Promise<Response> {
  try {
    const response = (await preloaded.catch(() => undefined)) ?? (await fetch(request));
    if (response.ok) return response;
    return (await fromCache(inScope(''))) ?? response;
  } catch {
    // Offline (or the server is down): the app page of this build, which loads only files held here too.
    const cached = (await fromCache(inScope(''))) ?? (await fromCache(inScope('index.html')));
    return cached ?? new Response('Rungbook is offline and this page was never stored. Connect once and reload.', {
      status: 503,
      headers: { 'Content-Type': 'text/plain; charset=utf-8' },
    });
  }
}

async function file(request: Request): Promise<Response> {
  // Built files are named by their content, so a cached copy is always the right one.
  return (await fromCache(request)) ?? fetch(request);
}

worker.addEventListener('fetch', (event) => {
  const request = event.request;
  if (request.method !== 'GET') return;
  const url = new URL(request.url);
  if (url.origin !== worker.location.origin) return;
  if (request.mode === 'navigate') event.respondWith(page(request, Promise.resolve(event.preloadResponse as Promise<Response | undefined> | undefined)));
  else event.respondWith(file(request));
});
