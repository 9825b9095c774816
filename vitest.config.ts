import { defineConfig } from 'vitest/config';

// Two projects: `unit` runs in Node (fake-indexeddb for storage); `browser` builds the app once per run and drives
// Debian's headless Chromium through playwright-core (see tests/browser/global-setup.ts and harness.ts).
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
          testTimeout: 30_000,
          // One worker keeps its loaded modules from file to file (the engine and HyperFormula load once, not once per
          // file): on the 2-core machine module loading fell from about 75 s to about 10 s of the unit run. Test files
          // give each test its own store (a new fake-indexeddb factory or database name), so nothing is shared.
          isolate: false,
        },
      },
      {
        test: {
          name: 'browser',
          include: ['tests/browser/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/browser/global-setup.ts'],
          // One file at a time, each with its own Chromium (see harness.ts), so timings stay those of one user.
          fileParallelism: false,
          testTimeout: 90_000,
          hookTimeout: 180_000,
          // A page's answer can wait on the figures worker; on a loaded 2-core machine that took over the one second
          // expect.poll waits by default (a price list added through its form showed after it), so polls wait longer.
          expect: { poll: { timeout: 20_000 } },
        },
      },
    ],
  },
});
