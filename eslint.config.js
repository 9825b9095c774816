// Lint rules for Rungbook, run by `npm run lint` and by tests/unit/lint.test.ts inside `npm test`.
// Besides typescript-eslint's recommended rules, this is where the layers of src/ are enforced:
// which folder may import which, which packages stay out of each layer, and no import cycles.
import { defineConfig } from 'eslint/config';
import tseslint from 'typescript-eslint';
import { importX, createNodeResolver } from 'eslint-plugin-import-x';

/** Our layers under src/, and which of them each may import (itself included). */
const LAYERS = {
  domain: ['domain'],
  engine: ['domain', 'engine'],
  store: ['domain', 'store'],
  io: ['domain', 'engine', 'io'],
  ui: ['domain', 'engine', 'store', 'io', 'ui'],
  cli: ['domain', 'engine', 'io', 'cli'],
};

/** Packages each layer may not use: domain stays pure, only ui uses Lit, only store opens IndexedDB. */
const LIT = ['lit', '@lit/*'];
const FORBIDDEN_PACKAGES = {
  domain: [...LIT, 'idb', 'hyperformula', 'papaparse', 'node:*'],
  engine: [...LIT, 'idb', 'papaparse'],
  store: [...LIT, 'hyperformula', 'papaparse'],
  io: [...LIT, 'idb'],
  cli: [...LIT, 'idb'],
};

/** The DOM and browser storage, which TypeScript's lib declares everywhere but src/domain may not touch. */
const BROWSER_GLOBALS = [
  'window', 'self', 'document', 'navigator', 'location', 'localStorage', 'sessionStorage', 'indexedDB',
  'customElements', 'HTMLElement', 'fetch',
];

const zones = [
  ...Object.entries(LAYERS).map(([layer, allowed]) => ({
    target: `./src/${layer}`,
    from: './src',
    except: allowed.map((name) => `./${name}`),
    message: `src/${layer} may import only ${allowed.join(', ')}.`,
  })),
  { target: './src', from: ['./tests', './bin', './scripts'], message: 'src/ ships; it may not import tests, bin or scripts.' },
];

const packageRules = Object.entries(FORBIDDEN_PACKAGES).map(([layer, names]) => ({
  files: [`src/${layer}/**`],
  rules: {
    'no-restricted-imports': [
      'error',
      {
        patterns: [
          {
            group: names.flatMap((n) => (n.endsWith('*') ? [n] : [n, `${n}/*`])),
            message: `src/${layer} may not use this package (see eslint.config.js for each layer's rules).`,
          },
        ],
      },
    ],
  },
}));

/**
 * Flags a second import of the same kind (value, type or namespace) from one module. Unlike the core rule, a
 * bare `import './rb-x.ts'`, which says "this template uses <rb-x>", may sit beside a named import of that file.
 */
const noDuplicateImports = {
  meta: {
    type: 'suggestion',
    docs: { description: 'Merge imports of the same kind from one module' },
    messages: { duplicate: "'{{source}}' is already imported above; merge the two imports." },
    schema: [],
  },
  create(context) {
    const seen = new Set();
    return {
      ImportDeclaration(node) {
        if (node.specifiers.length === 0) return;
        const kind = node.specifiers.some((s) => s.type === 'ImportNamespaceSpecifier') ? 'namespace' : node.importKind ?? 'value';
        const key = `${kind} ${node.source.value}`;
        if (seen.has(key)) context.report({ node, messageId: 'duplicate', data: { source: node.source.value } });
        seen.add(key);
      },
    };
  },
};

export default defineConfig(
  { ignores: ['dist/', '.tmp/', 'tests/bench/out/', 'public/'] },
  {
    files: ['**/*.ts', '**/*.mts', '**/*.js', '**/*.mjs'],
    extends: [tseslint.configs.recommended],
    plugins: { 'import-x': importX, rungbook: { rules: { 'no-duplicate-imports': noDuplicateImports } } },
    languageOptions: { ecmaVersion: 2022, sourceType: 'module' },
    settings: {
      'import-x/resolver-next': [createNodeResolver({ extensions: ['.ts', '.js', '.mjs'] })],
      'import-x/extensions': ['.ts', '.js', '.mjs'],
      'import-x/parsers': { '@typescript-eslint/parser': ['.ts'] },
    },
    linterOptions: { reportUnusedDisableDirectives: 'error' },
    rules: {
      '@typescript-eslint/no-explicit-any': 'error',
      '@typescript-eslint/consistent-type-imports': ['error', { prefer: 'type-imports', fixStyle: 'separate-type-imports' }],
      '@typescript-eslint/no-import-type-side-effects': 'error',
      '@typescript-eslint/no-unused-vars': ['error', { argsIgnorePattern: '^_', varsIgnorePattern: '^_', caughtErrors: 'none' }],
      // A `let` read by a callback before its one assignment (a handler wired up before the object exists) stays `let`.
      'prefer-const': ['error', { ignoreReadBeforeAssign: true }],
      'rungbook/no-duplicate-imports': 'error',
      'import-x/no-restricted-paths': ['error', { zones }],
      'import-x/no-self-import': 'error',
    },
  },
  {
    // Cycles matter where code ships; tests sit outside every cycle since src/ never imports them.
    files: ['src/**'],
    rules: { 'import-x/no-cycle': ['error', { ignoreExternal: true }] },
  },
  ...packageRules,
  {
    files: ['src/domain/**'],
    rules: {
      'no-restricted-globals': [
        'error',
        ...BROWSER_GLOBALS.map((name) => ({ name, message: 'src/domain is pure: no DOM or browser storage.' })),
      ],
    },
  },
  {
    // Tests may reach for `any` to feed deliberately malformed input.
    files: ['tests/**'],
    rules: { '@typescript-eslint/no-explicit-any': 'off' },
  },
);
