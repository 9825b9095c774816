import { defineConfig } from 'vitest/config';

// Two projects: `unit` runs in Node (fake-indexeddb for storage); `browser` builds the app and drives
// Debian's headless Chromium through playwright-core (see tests/browser/global-setup.ts).
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          include: ['tests/unit/**/*.test.ts'],
          environment: 'node',
          testTimeout: 30_000,
        },
      },
      {
        test: {
          name: 'browser',
          include: ['tests/browser/**/*.test.ts'],
          environment: 'node',
          globalSetup: ['tests/browser/global-setup.ts'],
          fileParallelism: false,
          testTimeout: 90_000,
          hookTimeout: 180_000,
        },
      },
    ],
  },
});
