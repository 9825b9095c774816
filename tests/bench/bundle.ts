// Builds the app once per bench run (production mode, as users get it) into a temporary folder, and measures the
// gzip size of its JavaScript and CSS: the whole app and its largest chunk.
import { mkdtempSync, readFileSync, readdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative, resolve } from 'node:path';
import { gzipSync } from 'node:zlib';
import { build } from 'vite';
import type { BenchSection, Figures } from './harness.ts';
import { round } from './stats.ts';

export const PROJECT_ROOT = resolve(import.meta.dirname, '../..');

export interface BuiltFile {
  /** Path relative to the build folder, with forward slashes. */
  path: string;
  bytes: number;
  gzipBytes: number;
}

function filesUnder(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? filesUnder(p) : [p];
  });
}

/** Every .js and .css file under `dir` with its raw and gzip size (default gzip level, as servers send it). */
export function builtAssets(dir: string): BuiltFile[] {
  return filesUnder(dir)
    .filter((p) => /\.(js|mjs|css)$/.test(p))
    .map((p) => {
      const data = readFileSync(p);
      return { path: relative(dir, p).split('\\').join('/'), bytes: data.length, gzipBytes: gzipSync(data).length };
    })
    .sort((a, b) => b.gzipBytes - a.gzipBytes);
}

/** Flat bundle figures from the built files: totals in kB (1,000 bytes, as size budgets are usually quoted). */
export function bundleFigures(files: readonly BuiltFile[]): Figures {
  const kb = (n: number): number => round(n / 1000, 1);
  const largest = files[0];
  return {
    bundle_files: files.length,
    bundle_kb: kb(files.reduce((s, f) => s + f.bytes, 0)),
    bundle_gzip_kb: kb(files.reduce((s, f) => s + f.gzipBytes, 0)),
    bundle_css_gzip_kb: kb(files.filter((f) => f.path.endsWith('.css')).reduce((s, f) => s + f.gzipBytes, 0)),
    bundle_largest_chunk: largest?.path ?? null,
    bundle_largest_gzip_kb: largest ? kb(largest.gzipBytes) : null,
  };
}

/** Runs a Vite build with NODE_ENV=production (so Lit's production build is used, as in the browser tests). */
export async function viteBuild(configFile: string, outDir: string): Promise<void> {
  const nodeEnv = process.env['NODE_ENV'];
  process.env['NODE_ENV'] = 'production';
  try {
    await build({ configFile, root: PROJECT_ROOT, mode: 'production', logLevel: 'warn', build: { outDir, emptyOutDir: true } });
  } finally {
    if (nodeEnv === undefined) delete process.env['NODE_ENV'];
    else process.env['NODE_ENV'] = nodeEnv;
  }
}

let scratch: string | undefined;
let appBuild: Promise<string> | undefined;

/** A temporary folder for this bench run, removed when the process ends. */
export function scratchDir(): string {
  if (!scratch) {
    const dir = mkdtempSync(join(tmpdir(), 'rungbook-bench-'));
    scratch = dir;
    process.on('exit', () => rmSync(dir, { recursive: true, force: true }));
  }
  return scratch;
}

/** The app built once for this bench run (dist/ is left alone: it belongs to the developer's own builds). */
export function builtApp(): Promise<string> {
  appBuild ??= (async () => {
    const out = join(scratchDir(), 'app');
    await viteBuild(join(PROJECT_ROOT, 'vite.config.ts'), out);
    return out;
  })();
  return appBuild;
}

export const bundleSection: BenchSection = {
  name: 'bundle',
  async run({ log }): Promise<Figures> {
    log('bundle: building the app');
    const t = performance.now();
    const dir = await builtApp();
    const f: Figures = { app_build_ms: round(performance.now() - t, 0) };
    return { ...f, ...bundleFigures(builtAssets(dir)) };
  },
};
