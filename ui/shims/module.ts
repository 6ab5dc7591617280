// Browser stand-in for node:module: the HiGHS loader asks for createRequire only when it runs under Node.
export function createRequire(from: unknown): never {
  throw new Error(`no require in the browser (${String(from)})`);
}
export default { createRequire };
