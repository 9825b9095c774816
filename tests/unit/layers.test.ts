// Keeps the project's layering (README, Layout): domain imports nothing of ours but domain; nothing imports ui or cli;
// engine does not reach into store, io or ui.
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, resolve, dirname } from 'node:path';

const SRC = resolve(__dirname, '../../src');

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? files(p) : p.endsWith('.ts') ? [p] : [];
  });
}

function layerOf(path: string): string {
  return relative(SRC, path).split(/[\\/]/)[0]!;
}

function importsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const found: string[] = [];
  const re = /(?:import|export)\s[^'"]*?from\s*['"]([^'"]+)['"]|import\(\s*['"]([^'"]+)['"]\s*\)|import\s+['"]([^'"]+)['"]/g;
  for (const m of text.matchAll(re)) found.push((m[1] ?? m[2] ?? m[3])!);
  return found;
}

/** Which of our layers each layer may import. */
const ALLOWED: Record<string, string[]> = {
  domain: ['domain'],
  engine: ['domain', 'engine'],
  store: ['domain', 'store'],
  io: ['domain', 'engine', 'io'],
  ui: ['domain', 'engine', 'store', 'io', 'ui'],
  cli: ['domain', 'engine', 'io', 'cli'],
};

/** Packages a layer may not use: domain stays pure, the CLI stays free of DOM and IndexedDB. */
const FORBIDDEN_PACKAGES: Record<string, RegExp> = {
  domain: /^(lit|idb|hyperformula|papaparse)(\/|$)/,
  engine: /^(lit|idb)(\/|$)/,
  cli: /^(lit|idb)(\/|$)/,
  io: /^(lit|idb)(\/|$)/,
};

describe('layering (the architecture in README, Layout)', () => {
  const all = files(SRC);
  it('finds the source tree', () => {
    expect(all.length).toBeGreaterThan(5);
  });
  for (const file of all) {
    const layer = layerOf(file);
    it(`${relative(SRC, file)} imports only what its layer may`, () => {
      for (const spec of importsOf(file)) {
        if (spec.startsWith('.')) {
          const target = resolve(dirname(file), spec);
          const targetLayer = layerOf(target);
          expect(ALLOWED[layer] ?? [], `${spec} from ${layer}`).toContain(targetLayer);
        } else {
          const forbidden = FORBIDDEN_PACKAGES[layer];
          if (forbidden) expect(spec, `${layer} may not import ${spec}`).not.toMatch(forbidden);
        }
      }
    });
  }
});
