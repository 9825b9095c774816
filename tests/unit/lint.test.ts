// ESLint inside `npm test`: a finding fails this test with file:line, rule and message, instead of stopping the
// run. The second half proves the layer rules of eslint.config.js bite, by linting small snippets placed in each
// layer: these tables are the project's layering (folders as in the README's Layout), the config is how it is enforced.
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { ESLint } from 'eslint';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));

/** One line per finding: `src/x.ts:12:3 rule-id message`. */
function findings(results: ESLint.LintResult[]): string[] {
  return results.flatMap((r) =>
    r.messages.map((m) => `${relative(ROOT, r.filePath)}:${m.line}:${m.column} ${m.ruleId ?? '(parse)'} ${m.message}`),
  );
}

describe('lint', () => {
  // About 20 s of CPU for the whole tree, most of it import-x/no-cycle; the margin is for a busy machine.
  it('finds nothing in src, tests, bin and the config files', async () => {
    const eslint = new ESLint({ cwd: ROOT });
    const results = await eslint.lintFiles(['.']);
    expect(results.length).toBeGreaterThan(100);
    expect(findings(results)).toEqual([]);
  }, 180_000);
});

/** Which of our layers each layer may import. */
const MAY_IMPORT: Record<string, string[]> = {
  domain: ['domain'],
  engine: ['domain', 'engine'],
  store: ['domain', 'store'],
  io: ['domain', 'engine', 'io'],
  ui: ['domain', 'engine', 'store', 'io', 'ui'],
  cli: ['domain', 'engine', 'io', 'cli'],
};
const LAYERS = Object.keys(MAY_IMPORT);

/** Packages each layer may use or not; the layer's own package (idb for store, Lit for ui…) is allowed. */
const PACKAGES: Record<string, { allowed: string[]; forbidden: string[] }> = {
  domain: { allowed: ['valibot'], forbidden: ['lit', 'lit/decorators.js', '@lit/context', 'idb', 'hyperformula', 'papaparse', 'node:fs'] },
  engine: { allowed: ['hyperformula', 'valibot'], forbidden: ['lit', '@lit/context', 'idb', 'papaparse'] },
  store: { allowed: ['idb'], forbidden: ['lit', 'hyperformula', 'papaparse'] },
  io: { allowed: ['papaparse', 'hyperformula'], forbidden: ['lit', 'idb'] },
  ui: { allowed: ['lit', 'lit/directives/live.js', '@lit/context'], forbidden: [] },
  cli: { allowed: ['hyperformula', 'node:fs'], forbidden: ['lit/decorators.js', 'idb'] },
};

/** A real file of each layer, so the import resolves as it would in the tree. */
function someFileOf(layer: string): string {
  const name = readdirSync(join(ROOT, 'src', layer)).filter((n) => n.endsWith('.ts')).sort()[0];
  if (!name) throw new Error(`src/${layer} has no .ts file`);
  return name;
}

describe('layer rules (eslint.config.js)', () => {
  // Only the import rules matter here; no-cycle would walk the tree for every snippet.
  const eslint = new ESLint({ cwd: ROOT, overrideConfig: { rules: { 'import-x/no-cycle': 'off' } } });

  async function ruleHits(filePath: string, code: string, rule: string): Promise<string[]> {
    const results = await eslint.lintText(code, { filePath: join(ROOT, filePath) });
    return findings(results).filter((f) => f.includes(` ${rule} `) || f.includes('(parse)'));
  }

  it('src/domain may not import ui, whether by import, re-export or dynamic import', async () => {
    const ui = `../ui/${someFileOf('ui')}`;
    for (const code of [`import '${ui}';`, `export * from '${ui}';`, `export const load = () => import('${ui}');`]) {
      const hits = await ruleHits('src/domain/probe.ts', code, 'import-x/no-restricted-paths');
      expect(hits, code).toHaveLength(1);
      expect(hits[0]).toContain('src/domain may import only domain');
    }
  });

  it('a nested folder is held to its layer', async () => {
    const hits = await ruleHits('src/engine/functions/probe.ts', `import '../../store/${someFileOf('store')}';`, 'import-x/no-restricted-paths');
    expect(hits).toHaveLength(1);
  });

  for (const layer of LAYERS) {
    it(`src/${layer} imports only ${MAY_IMPORT[layer]!.join(', ')}`, async () => {
      for (const target of LAYERS) {
        const code = `import '../${target}/${someFileOf(target)}';`;
        const hits = await ruleHits(`src/${layer}/probe.ts`, code, 'import-x/no-restricted-paths');
        expect(hits, `${layer} → ${target}`).toHaveLength(MAY_IMPORT[layer]!.includes(target) ? 0 : 1);
      }
    });

    it(`src/${layer} uses only the packages its layer may`, async () => {
      const { allowed, forbidden } = PACKAGES[layer]!;
      for (const name of [...allowed, ...forbidden]) {
        const hits = await ruleHits(`src/${layer}/probe.ts`, `import '${name}';`, 'no-restricted-imports');
        expect(hits, `${layer} → ${name}`).toHaveLength(forbidden.includes(name) ? 1 : 0);
      }
    });
  }

  it('src/ may not import tests', async () => {
    const hits = await ruleHits('src/ui/probe.ts', `import '../../tests/fixtures/sample-book.ts';`, 'import-x/no-restricted-paths');
    expect(hits).toHaveLength(1);
  });

  it('src/domain may not touch the DOM or browser storage', async () => {
    const code = 'export const title = (): string => document.title;\nexport const db = (): unknown => indexedDB;';
    expect(await ruleHits('src/domain/probe.ts', code, 'no-restricted-globals')).toHaveLength(2);
    expect(await ruleHits('src/ui/probe.ts', code, 'no-restricted-globals')).toHaveLength(0);
  });

  it('finds an import cycle in src', async () => {
    // Take a domain file that imports a sibling, and have the sibling import it back.
    const domain = join(ROOT, 'src/domain');
    const pair = readdirSync(domain)
      .filter((n) => n.endsWith('.ts'))
      .flatMap((from) => {
        // A value import: a type-only import makes no cycle at run time, and the rule leaves it be.
        const to = /^import (?!type )[^']*'\.\/([\w-]+\.ts)';$/m.exec(readFileSync(join(domain, from), 'utf8'))?.[1];
        return to ? [{ from, to }] : [];
      })[0];
    expect(pair, 'a domain file importing a sibling').toBeDefined();
    const results = await new ESLint({ cwd: ROOT }).lintText(`import './${pair!.from}';`, {
      filePath: join(domain, pair!.to),
    });
    expect(findings(results).filter((f) => f.includes(' import-x/no-cycle '))).toHaveLength(1);
  }, 60_000);
});
