// Vite build of the `thickring ui` page: the library's own TypeScript bundled for the browser.
// Node-only modules the page never reaches at run time (file reads behind resolveSpec, the
// worker_threads pool) are swapped for browser shims here, so src/ stays unchanged.
//
// Everything is a classic script, so the same files work from a server and straight from disk (file://),
// where chromium refuses module scripts, module workers and fetch:
//   index.html             ui/index.html with a plain <script src="./assets/page.js">
//   assets/page.js         the page (main.ts) as one IIFE
//   assets/solver.js       loaded on the first solve: sets globalThis.thickringSolver = { worker, highs },
//                          the solve worker (solveWorker.ts, one IIFE with nlopt-js's embedded WebAssembly)
//                          as text for a blob: Worker, and HiGHS's WebAssembly as base64
//   assets/plotly.min.js   the plotting library as installed (UMD), loaded when a comparison has a curve
//   style.css              from ui/public
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import { dirname, resolve } from 'node:path';
import { build, defineConfig, type InlineConfig, type Plugin, type Rollup } from 'vite';

const here = dirname(fileURLToPath(import.meta.url));
const shim = (name: string): string => resolve(here, 'shims', name);
const require = createRequire(import.meta.url);

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

/**
 * HiGHS arrives compiled from the page (ui/shims/highs.ts), so the loader's own way to find highs.wasm
 * (a URL next to the script) is dead code; left in, vite would inline a second copy of the WebAssembly.
 */
function highsWithoutWasmUrl(): Plugin {
  const lookup = 'new URL("highs.wasm",import.meta.url).href';
  return {
    name: 'thickring-highs-without-wasm-url',
    enforce: 'pre',
    transform(code, id) {
      if (!/[\\/]highs[\\/]build[\\/]highs\.mjs$/.test(id)) return null;
      if (!code.includes(lookup)) throw new Error(`highs.mjs no longer finds its wasm with ${lookup}: update ui/vite.config.ts`);
      // The other uses of the script's address are on Node-only paths or guarded; a classic script has none.
      return code.replace(lookup, '"highs.wasm"').replaceAll('import.meta.url', 'undefined');
    },
  };
}

/** What the page and the worker builds share: shims, `global` for nlopt-js's UMD bundle, the target. */
function common(): InlineConfig {
  return {
    root: here,
    logLevel: 'warn',
    plugins: [browserPool(), highsWithoutWasmUrl()],
    define: { global: 'globalThis', 'process.env.NODE_ENV': '"production"' },
    resolve: {
      alias: [
        // The bare names and node:module come from nlopt-js's UMD bundle and the HiGHS loader, on their
        // Node-only paths; shimmed rather than left to vite's empty stand-ins, which warn on every build.
        { find: /^(node:)?fs$/, replacement: shim('fs.ts') },
        { find: /^(node:)?path$/, replacement: shim('path.ts') },
        { find: /^node:os$/, replacement: shim('os.ts') },
        { find: /^(node:)?crypto$/, replacement: shim('crypto.ts') },
        { find: /^node:module$/, replacement: shim('module.ts') },
        { find: /^highs$/, replacement: shim('highs.ts') },
        { find: /^highs-loader$/, replacement: resolve(here, '../node_modules/highs/build/highs.mjs') },
      ],
    },
  };
}

/** Build the solve worker as one classic script (dynamic imports inlined) and return its code. */
async function buildWorker(): Promise<string> {
  const out = await build({
    ...common(),
    configFile: false,
    publicDir: false,
    build: {
      write: false,
      target: 'es2022',
      minify: true,
      reportCompressedSize: false,
      lib: { entry: resolve(here, 'solveWorker.ts'), formats: ['iife'], name: 'thickringSolveWorker', fileName: () => 'solve-worker.js' },
    },
  });
  const outputs = (Array.isArray(out) ? out : [out]) as Rollup.RollupOutput[];
  const chunks = outputs.flatMap((o) => o.output).filter((o): o is Rollup.OutputChunk => o.type === 'chunk');
  if (chunks.length !== 1) throw new Error(`the solve worker should build to one script, got ${chunks.length}`);
  return chunks[0]!.code;
}

/** Emit index.html, the solver script and the plotting library beside the page script. */
function pageFiles(): Plugin {
  return {
    name: 'thickring-page-files',
    async generateBundle() {
      const html = readFileSync(resolve(here, 'index.html'), 'utf8');
      const entry = '<script type="module" src="./main.ts"></script>';
      if (!html.includes(entry)) throw new Error(`ui/index.html must load the page with ${entry}`);
      this.emitFile({ type: 'asset', fileName: 'index.html', source: html.replace(entry, '<script defer src="./assets/page.js"></script>') });
      const worker = await buildWorker();
      const highs = readFileSync(resolve(here, '../node_modules/highs/build/highs.wasm')).toString('base64');
      this.emitFile({
        type: 'asset', fileName: 'assets/solver.js',
        source: `globalThis.thickringSolver={worker:${JSON.stringify(worker)},highs:"${highs}"};\n`,
      });
      this.emitFile({ type: 'asset', fileName: 'assets/plotly.min.js', source: readFileSync(require.resolve('plotly.js-dist-min/plotly.min.js')) });
    },
  };
}

const page = common();
export default defineConfig({
  ...page,
  plugins: [...(page.plugins ?? []), pageFiles()],
  build: {
    outDir: resolve(here, '../dist/ui'),
    emptyOutDir: true,
    target: 'es2022',
    chunkSizeWarningLimit: 8000,
    reportCompressedSize: false,
    lib: { entry: resolve(here, 'main.ts'), formats: ['iife'], name: 'thickringPage', fileName: () => 'assets/page.js' },
  },
});
