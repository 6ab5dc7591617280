// File boundaries of the CLI: read JSON with clear messages, write atomically (temp name, then rename).
import { renameSync, writeFileSync, unlinkSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { InputError } from '../src/model/errors.js';

export { readJsonFile } from '../src/model/jsonFile.js';

/** Write the whole file under a temporary name in the same folder, then rename: never half-written. */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  const tmp = join(dirname(path), `.thickring-tmp-${process.pid}-${basename(path)}`);
  try {
    writeFileSync(tmp, data);
    renameSync(tmp, path);
  } catch (e) {
    try { unlinkSync(tmp); } catch { /* nothing was written */ }
    const msg = e instanceof Error ? e.message : String(e);
    throw new InputError(`output file '${path}' cannot be written (${msg}): check the folder exists and is writable`);
  }
}
