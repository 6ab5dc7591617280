// Output channel of a command: stdout for the result, stderr for progress and warnings.
import { safeJson, safeText } from '../src/model/displayName.js';

export interface Io {
  out(text: string): void;
  err(text: string): void;
  /** True when stderr is a terminal (progress bars only then). */
  interactive: boolean;
}

export const processIo: Io = {
  out: (t) => process.stdout.write(t.endsWith('\n') ? t : t + '\n'),
  err: (t) => process.stderr.write(t.endsWith('\n') ? t : t + '\n'),
  interactive: Boolean(process.stderr.isTTY),
};

/** Print a result: exactly one JSON object with --json, else the human text. */
export function emit(io: Io, json: boolean, result: unknown, text: () => string): void {
  // Names and strings from input files reach the output: nothing that drives a terminal goes out raw.
  if (json) io.out(safeJson(JSON.stringify(result)));
  else io.out(safeText(text()));
}
