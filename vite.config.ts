// Build settings, and the step that makes the built app work offline: the service worker (src/ui/service-worker.ts)
// is built as its own script, sw.js, with the list of every built and public file written in front of it.
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
  plugins: [contentSecurityPolicy(), offlineApp()],
  build: {
    target: 'es2022',
    sourcemap: false,
    chunkSizeWarningLimit: 2000,
  },
  worker: { format: 'es' },
  server: { host: '127.0.0.1' },
  preview: { host: '127.0.0.1' },
});
