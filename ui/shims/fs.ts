// Browser stand-in for node:fs: the page reads files through the file picker, never by path, so any
// path-based read means "no such file" (resolveSpec then treats its argument as a catalogue spec).
function noFiles(path: unknown): never {
  throw new Error(`no file system in the browser (${String(path)})`);
}
export const readFileSync = noFiles;
export const statSync = noFiles;
export const existsSync = (): boolean => false;
export default { readFileSync, statSync, existsSync };
