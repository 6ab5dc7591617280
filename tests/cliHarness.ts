// Runs the command line in-process with captured output, for the CLI tests.
import { main } from '../cli/main.js';
import type { Io } from '../cli/io.js';

export interface Captured extends Io {
  stdout: string[];
  stderr: string[];
}

export function capture(): Captured {
  const stdout: string[] = [], stderr: string[] = [];
  return { stdout, stderr, out: (t) => stdout.push(t), err: (t) => stderr.push(t), interactive: false };
}

/** `thickring ARGS` with captured output: the exit code main() returns, and what went to stdout and stderr. */
export async function run(args: string[]): Promise<{ code: number; io: Captured }> {
  const io = capture();
  return { code: await main(args, io), io };
}
