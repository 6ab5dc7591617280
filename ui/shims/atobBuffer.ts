// nlopt-js decodes its embedded WebAssembly with window.atob when there is a window, else with Node's
// Buffer; a Web Worker has neither, so give it the one call it makes (base64 to a binary string) via atob.
// Imported first by the solve worker so it runs before nlopt-js loads.
const g = globalThis as unknown as { Buffer?: unknown };
if (g.Buffer === undefined) {
  g.Buffer = { from: (text: string) => ({ toString: () => atob(text) }) };
}
export {};
