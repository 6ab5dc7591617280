// File boundaries of the CLI: read JSON with clear messages, write atomically (temp name, then rename).
import { renameSync, writeFileSync, unlinkSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { InputError } from '../src/model/errors.js';
import { isFile } from '../src/model/jsonFile.js';
import type { SolveStatus } from '../src/model/types.js';
import { emit, type Io } from './io.js';

export { readJsonFile } from '../src/model/jsonFile.js';

/** Write the whole file under a temporary name in the same folder, then rename: never half-written. */
export function writeFileAtomic(path: string, data: string | Uint8Array): void {
  writeFilesAtomic([[path, data]]);
}

/**
 * Write several files all or nothing: every one goes to a temporary name first; then each existing file is
 * set aside and the new one renamed into place. If any step fails, the new files are removed and the old
 * ones put back, so a failure leaves every existing file untouched and no new file behind.
 */
export function writeFilesAtomic(files: readonly (readonly [string, string | Uint8Array])[]): void {
  const staged: { tmp: string; path: string; old: string | null; placed: boolean }[] = [];
  let current = '';
  try {
    for (const [path, data] of files) {
      current = path;
      const tmp = join(dirname(path), `.thickring-tmp-${process.pid}-${basename(path)}`);
      staged.push({ tmp, path, old: null, placed: false });
      writeFileSync(tmp, data);
    }
    for (const f of staged) {
      current = f.path;
      if (isFile(f.path)) {
        renameSync(f.path, `${f.tmp}.old`);
        f.old = `${f.tmp}.old`;
      }
      renameSync(f.tmp, f.path);
      f.placed = true;
    }
  } catch (e) {
    for (const f of staged.slice().reverse()) {
      try { if (f.placed) unlinkSync(f.path); else unlinkSync(f.tmp); } catch { /* never written */ }
      try { if (f.old !== null) renameSync(f.old, f.path); } catch { /* nothing set aside */ }
    }
    const msg = e instanceof Error ? e.message : String(e);
    throw new InputError(`output file '${current}' cannot be written (${msg}): check the folder exists and is writable`);
  }
  for (const f of staged) {
    try { if (f.old !== null) unlinkSync(f.old); } catch { /* already gone */ }
  }
}

/**
 * Print a solve's result (and write it to `-o` when given) the same way for every solving command. A failed
 * or infeasible solve writes nothing, so a file already at `-o` stays as it was, and then fails the command.
 * `text` gets the path written, if any.
 */
export function emitResult(
  io: Io, json: boolean, output: string | undefined, what: string,
  result: { status: SolveStatus; verification: { messages: string[] } }, text: (written: string | undefined) => string,
): void {
  const failed = result.status === 'failed' || result.status === 'infeasible';
  if (output !== undefined && !failed) writeFileAtomic(output, JSON.stringify(result, null, 2) + '\n');
  emit(io, json, result, () => text(failed ? undefined : output));
  if (failed) throw new Error(`no verified ${what} (status ${result.status}): ${result.verification.messages[0] ?? 'see the result'}`);
}
