// The solver's code for the page, fetched without fetch: the first solve adds assets/solver.js as a classic
// <script> (allowed from a server and from disk alike), which sets globalThis.thickringSolver to the solve
// worker's source text and HiGHS's WebAssembly as base64 (see ui/vite.config.ts). Workers then start from a
// blob: URL of that text, and HiGHS is compiled once here and shared with every worker.
// The plotting library comes the same way (assets/plotly.min.js), when a comparison has a curve to draw.

declare global {
  // eslint-disable-next-line no-var
  var thickringSolver: { worker: string; highs: string } | undefined;
}

export interface SolverAssets {
  /** blob: URL of the solve worker's classic script. */
  workerUrl: string;
  /** highs.wasm, compiled. */
  highs: WebAssembly.Module;
}

/** Folder of the page's own scripts (assets/), known only while page.js runs its top level. */
const ASSETS = new URL('./', (document.currentScript as HTMLScriptElement | null)?.src || new URL('assets/', document.baseURI).href).href;

let solver: Promise<SolverAssets> | null = null;
let plotly: Promise<unknown> | null = null;

export function solverAssets(): Promise<SolverAssets> {
  solver ??= loadScript('solver.js').then(async () => {
    const s = globalThis.thickringSolver;
    if (!s) throw new Error('assets/solver.js loaded but did not define the solver: rebuild the page (npm run build)');
    globalThis.thickringSolver = undefined;
    const workerUrl = URL.createObjectURL(new Blob([s.worker], { type: 'text/javascript' }));
    const highs = await WebAssembly.compile(fromBase64(s.highs));
    return { workerUrl, highs };
  });
  // A failed load may be tried again with the next solve.
  solver.catch(() => { solver = null; });
  return solver;
}

/** The plotting library (plotly.js-dist-min, which sets window.Plotly). */
export function plotlyLibrary<T>(): Promise<T> {
  plotly ??= loadScript('plotly.min.js').then(() => {
    const p = (globalThis as { Plotly?: unknown }).Plotly;
    if (!p) throw new Error('assets/plotly.min.js loaded but did not define Plotly: rebuild the page (npm run build)');
    return p;
  });
  plotly.catch(() => { plotly = null; });
  return plotly as Promise<T>;
}

function loadScript(name: string): Promise<void> {
  return new Promise((ok, fail) => {
    const s = document.createElement('script');
    s.src = ASSETS + name;
    s.onload = () => { s.remove(); ok(); };
    s.onerror = () => { s.remove(); fail(new Error(`could not load ${s.src}: keep the page's assets folder beside index.html`)); };
    document.head.appendChild(s);
  });
}

function fromBase64(text: string): Uint8Array<ArrayBuffer> {
  const bin = atob(text);
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  return bytes;
}
