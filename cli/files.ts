// File boundaries of the CLI: read JSON with clear messages, write atomically (temp name, then rename).
import { renameSync, writeFileSync, unlinkSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { InputError } from '../src/model/errors.js';

export { readJsonFile } from '../src/model/jsonFile.js';

/** Write the whole file under a temporary name in the same folder, then rename: never half-written. */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  writeFilesAtomic([[path, data]]);
}

/**
 * Write several files all or nothing: every one goes to a temporary name first, and only when all of them
 * are complete are they renamed into place. A failure before that leaves every existing file untouched.
 */
export function writeFilesAtomic(files: readonly (readonly [string, string | Uint8Array])[]): void {
  const staged: [string, string][] = [];
  let current = '';
  try {
    for (const [path, data] of files) {
      current = path;
      const tmp = join(dirname(path), `.thickring-tmp-${process.pid}-${basename(path)}`);
      staged.push([tmp, path]);
      writeFileSync(tmp, data);
    }
    for (const [tmp, path] of staged) {
      current = path;
      renameSync(tmp, path);
    }
  } catch (e) {
    for (const [tmp] of staged) {
      try { unlinkSync(tmp); } catch { /* renamed already, or never written */ }
    }
    const msg = e instanceof Error ? e.message : String(e);
    throw new InputError(`output file '${current}' cannot be written (${msg}): check the folder exists and is writable`);
  }
}
