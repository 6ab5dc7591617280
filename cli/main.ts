// Entry point of the `thickring` binary: the only place that catches errors and picks exit codes
// (2 for bad input, 1 for a failed computation).
import { Command, CommanderError } from 'commander';
import { isInputError } from '../src/model/errors.js';
import { processIo, type Io } from './io.js';
import { register as catalog } from './catalog.js';
import { register as measure } from './measure.js';
import { register as inflate } from './inflate.js';
import { register as compare } from './compare.js';
import { register as report } from './report.js';
import { register as fabricate } from './fabricate.js';
import { register as tracks } from './tracks.js';
import { register as play } from './play.js';
import { register as ui } from './ui.js';

export type Registrar = (program: Command, io: Io) => void;

const COMMANDS: Registrar[] = [catalog, measure, inflate, compare, report, fabricate, tracks, play, ui];

export function buildProgram(io: Io): Command {
  const program = new Command('thickring')
    .description('Thickest tubes for links of round rings, with proof, reports, meshes and contact tracks.')
    .version('0.1.0')
    .exitOverride()
    .showHelpAfterError('(run with --help for usage)')
    .configureOutput({ writeOut: (s) => io.out(s), writeErr: (s) => io.err(s) });
  for (const add of COMMANDS) add(program, io);
  return program;
}

export async function main(argv: string[], io: Io = processIo): Promise<number> {
  const program = buildProgram(io);
  try {
    await program.parseAsync(argv, { from: 'user' });
    return 0;
  } catch (e) {
    if (e instanceof CommanderError) return e.exitCode === 0 ? 0 : 2;
    if (isInputError(e)) {
      io.err(`thickring: ${e.message}`);
      return 2;
    }
    const msg = e instanceof Error ? e.message : String(e);
    io.err(`thickring: computation failed: ${msg}`);
    return 1;
  }
}
