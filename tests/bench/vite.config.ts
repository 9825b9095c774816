// Builds the benchmark page (tests/bench/page) on its own, with the app's worker settings but none of the app's
// offline plugin; the project root stays the root so `/sheets` resolves as it does in the app.
import { resolve } from 'node:path';
import { defineConfig } from 'vite';

export default defineConfig({
  root: resolve(import.meta.dirname, '../..'),
  publicDir: false,
  build: {
    target: 'es2022',
    sourcemap: false,
    chunkSizeWarningLimit: 4000,
    rollupOptions: { input: resolve(import.meta.dirname, 'page/index.html') },
  },
  worker: { format: 'es' },
  preview: { host: '127.0.0.1' },
});
