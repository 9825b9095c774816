// Shared pieces of `npm run bench`: timing helpers, the list of sections, targets, machine description.
// To add figures (import_ms, browser figures, bundle size), write a section and add it to BENCH_SECTIONS in
// tests/bench/sections.ts; add its targets to TARGETS below. A section returns flat named figures.
import os from 'node:os';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

export type Figure = number | string | boolean | null;
export type Figures = Record<string, Figure>;

export interface BenchOptions {
  /** Reduced set that runs in well under a minute. */
  quick: boolean;
  /** Prints a progress line (to stderr, so stdout stays table + JSON). */
  log(text: string): void;
}

export interface BenchSection {
  name: string;
  run(options: BenchOptions): Promise<Figures>;
}

/** A target a figure should meet; `max` is inclusive. */
export interface Target {
  figure: string;
  max: number;
  source: string;
}

export const TARGETS: Target[] = [
  { figure: 'open_ms', max: 500, source: 'issue 5' },
  { figure: 'edit_ms', max: 16, source: 'issue 5' },
  { figure: 'engine_vs_plain', max: 20, source: 'issue 5' },
  { figure: 'open_vs_naive', max: 0.3, source: 'issue 7' },
  { figure: 'large_open_ms', max: 3000, source: 'issue 5' },
  { figure: 'large_heap_mb', max: 400, source: 'issue 5' },
  { figure: 'import_ms', max: 3000, source: 'issue 7' },
  { figure: 'first_view_ms', max: 1500, source: 'issue 7' },
];

export function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/** Milliseconds one call takes. */
export function timeMs(fn: () => void): number {
  const t = performance.now();
  fn();
  return performance.now() - t;
}

export function round(n: number, digits = 1): number {
  const f = 10 ** digits;
  return Math.round(n * f) / f;
}

/** Heap in use after a full collection, in MB (needs node --expose-gc; otherwise without the collection). */
export function heapMb(): number {
  const gc = (globalThis as { gc?: () => void }).gc;
  if (gc) {
    gc();
    gc();
  }
  return process.memoryUsage().heapUsed / 1_048_576;
}

export function machine(): Figures {
  const cpus = os.cpus();
  return {
    cpus: cpus.length,
    cpu_model: cpus[0]?.model ?? 'unknown',
    memory_mb: Math.round(os.totalmem() / 1_048_576),
    node: process.version,
    platform: `${process.platform} ${process.arch}`,
  };
}

export function versions(): Figures {
  const out: Figures = {};
  for (const name of ['hyperformula', 'lit', 'idb', 'papaparse', 'vite', 'typescript', 'tsx']) {
    try {
      // Read the installed package file directly: some packages do not export their package.json.
      const file = fileURLToPath(new URL(`../../node_modules/${name}/package.json`, import.meta.url));
      const pkg = JSON.parse(readFileSync(file, 'utf8')) as { version: string };
      out[name] = pkg.version;
    } catch {
      out[name] = null;
    }
  }
  return out;
}

/** Which targets the figures meet: true, false, or null when the figure was not measured. */
export function targetsMet(figures: Figures): Record<string, boolean | null> {
  const out: Record<string, boolean | null> = {};
  for (const t of TARGETS) {
    const v = figures[t.figure];
    out[t.figure] = typeof v === 'number' && Number.isFinite(v) ? v <= t.max : null;
  }
  return out;
}
