// File boundaries of the CLI: read JSON with clear messages, write atomically (temp name, then rename).
import { readFileSync, renameSync, writeFileSync, unlinkSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { InputError } from '../src/model/errors.js';

export function readJsonFile(path: string, what: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    throw new InputError(`${what} file '${path}' cannot be read: check the path and permissions`);
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    throw new InputError(`${what} file '${path}' is not valid JSON (${msg}): fix the syntax`);
  }
}

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
