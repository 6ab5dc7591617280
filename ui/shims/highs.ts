// HiGHS for the page's solve worker. The worker is a blob: script with no address of its own, and a page
// opened from disk may not fetch, so the Emscripten loader is never left to find highs.wasm: the page
// compiles the WebAssembly once (ui/solverAssets.ts) and hands the module to each worker (provideHighs),
// and the loader instantiates it through its instantiateWasm hook.
// @ts-expect-error resolved by the vite alias to highs/build/highs.mjs
import loader from 'highs-loader';

type Receive = (instance: WebAssembly.Instance) => void;
type Loader = (settings: { instantiateWasm: (imports: WebAssembly.Imports, receive: Receive) => object }) => Promise<unknown>;

let provide: (m: WebAssembly.Module) => void = () => {};
const compiled = new Promise<WebAssembly.Module>((ok) => { provide = ok; });

/** The compiled highs.wasm, sent by the page right after the worker starts. */
export function provideHighs(module: WebAssembly.Module): void {
  provide(module);
}

export default function loadHighs(): Promise<unknown> {
  return new Promise((ok, fail) => {
    (loader as Loader)({
      instantiateWasm(imports, receive) {
        compiled.then((m) => WebAssembly.instantiate(m, imports)).then(receive, fail);
        // Emscripten's contract: an empty object now, the instance later through receive.
        return {};
      },
    }).then(ok, fail);
  });
}
