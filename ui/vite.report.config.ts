// Vite build of the report's 3D view (reportView.ts) as one classic script for inlining into the
// standalone HTML report (reports/html.ts reads dist/report-view/report-view.js).
import { fileURLToPath } from 'node:url';
import { dirname, resolve } from 'node:path';
import { defineConfig } from 'vite';

const here = dirname(fileURLToPath(import.meta.url));

export default defineConfig({
  root: here,
  logLevel: 'warn',
  build: {
    outDir: resolve(here, '../dist/report-view'),
    emptyOutDir: true,
    target: 'es2022',
    reportCompressedSize: false,
    lib: { entry: resolve(here, 'reportView.ts'), formats: ['iife'], name: 'ThickringView', fileName: () => 'report-view.js' },
  },
});
