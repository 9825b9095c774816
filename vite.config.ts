// Build settings, and the step that makes the built app work offline: the service worker (src/ui/service-worker.ts)
// is built as its own script, sw.js, with the list of every built and public file written in front of it.
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';
import { defineConfig } from 'vite';
import type { Plugin, ResolvedConfig } from 'vite';
import { CONTENT_SECURITY_POLICY } from './scripts/security-headers.mjs';

const SW_SOURCE = resolve(import.meta.dirname, 'src/ui/service-worker.ts');
const SW_FILE = 'sw.js';

function filesUnder(dir: string): string[] {
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    return [];
  }
  return names.flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? filesUnder(p) : [p];
  });
}

/** Builds sw.js and prefixes it with `self.__RB_PRECACHE = {version, files}`; files are relative to the base. */
function offlineApp(): Plugin {
  let config: ResolvedConfig;
  return {
    name: 'rungbook-offline',
    apply: 'build',
    configResolved(resolved) {
      config = resolved;
    },
    buildStart() {
      if (config.build.ssr) return;
      this.emitFile({ type: 'chunk', id: SW_SOURCE, fileName: SW_FILE });
    },
    writeBundle(options, bundle) {
      const outDir = options.dir ?? resolve(config.root, config.build.outDir);
      const built = Object.keys(bundle).filter((f) => f !== SW_FILE && !f.endsWith('.map'));
      const publicFiles = config.publicDir ? filesUnder(config.publicDir).map((p) => relative(config.publicDir, p).split('\\').join('/')) : [];
      const files = [...new Set([...built, ...publicFiles])].filter((f) => f !== 'index.html').sort();
      // The version hashes every file's bytes, so any change installs a new worker and a new cache.
      const hash = createHash('sha256');
      for (const f of files.concat('index.html')) {
        hash.update(f);
        hash.update(readFileSync(join(outDir, f)));
      }
      const list = { version: hash.digest('hex').slice(0, 16), files: ['', ...files] };
      const swPath = join(outDir, SW_FILE);
      const script = readFileSync(swPath, 'utf8');
      if (/^\s*(import|export)\b/m.test(script)) {
        this.error(`${SW_FILE} must be one plain script, but the build gave it imports or exports`);
      }
      writeFileSync(swPath, `self.__RB_PRECACHE = ${JSON.stringify(list)};\n${script}`);
    },
  };
}

const KEPT_SCRIPT = resolve(import.meta.dirname, 'scripts/kept-demo-figures.ts');
/** Must equal SHIPPED_FIGURES_FILE in src/ui/figures-keep.ts (a test checks it). */
export const SHIPPED_FIGURES_FILE = 'kept-demo-figures.json';

/**
 * Ships the demo Book's figures (scripts/kept-demo-figures.ts), keyed by the file name of the chunk that starts the
 * figures worker, so a first start shows unit costs with its first table instead of after the formula engine loads.
 */
function keptDemoFigures(): Plugin {
  let config: ResolvedConfig;
  return {
    name: 'rungbook-kept-demo-figures',
    apply: 'build',
    configResolved(resolved) {
      config = resolved;
    },
    generateBundle(_options, bundle) {
      if (config.build.ssr) return;
      const chunk = Object.values(bundle).find((c) => c.type === 'chunk' && c.moduleIds.some((id) => id.endsWith('/src/ui/costing-service.ts')));
      if (!chunk) return;
      const engine = chunk.fileName.slice(chunk.fileName.lastIndexOf('/') + 1);
      const run = spawnSync(process.execPath, ['--import', 'tsx', KEPT_SCRIPT, engine], { cwd: config.root, encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 });
      if (run.status !== 0) this.error(`the demo Book's figures could not be worked out for the build: ${run.stderr || run.error?.message || `exit ${String(run.status)}`}`);
      this.emitFile({ type: 'asset', fileName: SHIPPED_FIGURES_FILE, source: run.stdout });
    },
  };
}

/** The page most starts open (a returning person's Family page): its code is fetched beside the app's own. */
const START_PAGE_SOURCE = '/src/ui/rb-family-page.ts';

/**
 * Adds modulepreload links for the Family page's code and what it imports. The app loads a page's code only once its
 * own code has run, so without them the page's files were a second round of fetches after the first.
 */
function preloadStartPage(): Plugin {
  let base = '/';
  return {
    name: 'rungbook-preload-start-page',
    apply: 'build',
    configResolved(resolved) {
      base = resolved.base;
    },
    transformIndexHtml: {
      order: 'post',
      handler(_html, ctx) {
        const bundle = ctx.bundle;
        if (!bundle) return [];
        const chunks = Object.values(bundle).filter((c) => c.type === 'chunk');
        const page = chunks.find((c) => c.facadeModuleId?.endsWith(START_PAGE_SOURCE));
        if (!page) throw new Error(`the build has no chunk for ${START_PAGE_SOURCE}`);
        // What the entry imports is preloaded by Vite already.
        const have = new Set<string>();
        const walk = (file: string, into: Set<string>): void => {
          if (into.has(file)) return;
          into.add(file);
          const c = bundle[file];
          if (c?.type === 'chunk') for (const i of c.imports) walk(i, into);
        };
        for (const c of chunks) if (c.isEntry && c.fileName !== SW_FILE) walk(c.fileName, have);
        const wanted = new Set<string>();
        walk(page.fileName, wanted);
        return [...wanted]
          .filter((f) => !have.has(f))
          .map((f) => ({ tag: 'link', attrs: { rel: 'modulepreload', crossorigin: true, href: `${base}${f}` }, injectTo: 'head' as const }));
      },
    },
  };
}

/** The app's entry module. */
const ENTRY_SOURCE = '/src/ui/main.ts';

/**
 * The modules a start runs before its first table: what the entry and the Family page import, statically and
 * through each other. Filled when the module graph is known; the build puts them in one chunk (see below).
 */
const startModules = new Set<string>();

function startChunk(): Plugin {
  return {
    name: 'rungbook-start-chunk',
    apply: 'build',
    buildEnd() {
      startModules.clear();
      const walk = (id: string): void => {
        if (startModules.has(id)) return;
        startModules.add(id);
        for (const next of this.getModuleInfo(id)?.importedIds ?? []) walk(next);
      };
      for (const id of this.getModuleIds()) if (id.endsWith(ENTRY_SOURCE) || id.endsWith(START_PAGE_SOURCE)) walk(id);
    },
  };
}

const CSP_MARK = '__RB_CONTENT_SECURITY_POLICY__';

/** Writes the one Content-Security-Policy (scripts/security-headers.mjs) into index.html's meta tag. */
function contentSecurityPolicy(): Plugin {
  return {
    name: 'rungbook-csp',
    transformIndexHtml: {
      order: 'pre',
      handler(html) {
        if (!html.includes(CSP_MARK)) throw new Error(`index.html has no ${CSP_MARK} for the Content-Security-Policy`);
        return html.replaceAll(CSP_MARK, CONTENT_SECURITY_POLICY);
      },
    },
  };
}

export default defineConfig({
  plugins: [contentSecurityPolicy(), startChunk(), keptDemoFigures(), preloadStartPage(), offlineApp()],
  build: {
    target: 'es2022',
    sourcemap: false,
    chunkSizeWarningLimit: 2000,
    rolldownOptions: {
      output: {
        // The code a start runs before its first table comes in one file, not thirty: a browser fetches six files at
        // a time from one server, so thirty small files were five rounds of requests before anything was drawn.
        codeSplitting: { groups: [{ name: 'start', test: (id: string) => startModules.has(id), priority: 10 }] },
      },
    },
  },
  worker: { format: 'es' },
  server: { host: '127.0.0.1' },
  preview: { host: '127.0.0.1' },
});
