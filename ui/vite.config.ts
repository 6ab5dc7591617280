// Vite build of the `thickring ui` page: the library's own TypeScript bundled for the browser.
// Node-only modules the page never reaches at run time (file reads behind resolveSpec, the
// worker_threads pool) are swapped for browser shims here, so src/ stays unchanged.
import { fileURLToPath } from 'node:url';
import { dirname, resolve } from 'node:path';
import { defineConfig, type Plugin } from 'vite';

const here = dirname(fileURLToPath(import.meta.url));
const shim = (name: string): string => resolve(here, 'shims', name);

/** The solver's worker pool (src/optimize/run/pool.ts, node:worker_threads) becomes a Web Worker pool. */
function browserPool(): Plugin {
  return {
    name: 'thickring-browser-pool',
    enforce: 'pre',
    resolveId(source, importer) {
      if (source === './pool.js' && importer && /[\\/]src[\\/]optimize[\\/]/.test(importer)) return resolve(here, 'browserPool.ts');
      return null;
    },
  };
}

export default defineConfig({
  root: here,
  base: './',
  logLevel: 'warn',
  plugins: [browserPool()],
  // nlopt-js is a UMD bundle that reads the free variable `global`.
  define: { global: 'globalThis' },
  resolve: {
    alias: [
      { find: /^node:fs$/, replacement: shim('fs.ts') },
      { find: /^node:path$/, replacement: shim('path.ts') },
      { find: /^node:os$/, replacement: shim('os.ts') },
      { find: /^highs$/, replacement: shim('highs.ts') },
      { find: /^highs-loader$/, replacement: resolve(here, '../node_modules/highs/build/highs.mjs') },
    ],
  },
  worker: { format: 'es', plugins: () => [browserPool()] },
  build: {
    outDir: resolve(here, '../dist/ui'),
    emptyOutDir: true,
    target: 'es2022',
    chunkSizeWarningLimit: 8000,
    reportCompressedSize: false,
    modulePreload: false,
  },
});
