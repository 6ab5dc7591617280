// HiGHS for the page: the Emscripten loader cannot find highs.wasm next to a bundled script by itself,
// so the asset's built URL is handed to it through locateFile.
// @ts-expect-error resolved by the vite alias to highs/build/highs.mjs
import loader from 'highs-loader';
import wasmUrl from 'highs/runtime?url';

export default function loadHighs(): Promise<unknown> {
  return (loader as (settings: { locateFile: (file: string) => string }) => Promise<unknown>)({ locateFile: () => wasmUrl });
}
