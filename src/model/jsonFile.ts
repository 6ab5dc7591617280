// Reading a JSON input file with one-line messages that name the file and the fix (bad input: exit code 2).
import { readFileSync, statSync } from 'node:fs';
import { InputError } from './errors.js';

/**
 * Parsed contents of the `what` file at `path` ("layout", "result", ...). `fix` is the advice given when the
 * text is not JSON.
 */
export function readJsonFile(path: string, what: string, fix = 'fix the syntax'): unknown {
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
    throw new InputError(`${what} file '${path}' is not valid JSON (${msg}): ${fix}`);
  }
}

/** True when `path` names an existing regular file (not a folder, not missing). */
export function isFile(path: string): boolean {
  try {
    return statSync(path).isFile();
  } catch {
    return false;
  }
}
