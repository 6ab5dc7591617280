// Entry point of the `thickring` binary: the only place that catches errors and picks exit codes
// (2 for bad input, 1 for a failed computation).
import { Command, CommanderError } from 'commander';
import { isInputError } from '../src/model/errors.js';
import { safeJson, safeLine, safeText } from '../src/model/displayName.js';
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

/** `writeErr` takes commander's own messages (usage errors, help after an error); subcommands inherit it. */
export function buildProgram(io: Io, writeErr: (s: string) => void = (s) => io.err(safeText(s))): Command {
  const program = new Command('thickring')
    .description('Thickest tubes for links of round rings, with proof, reports, meshes and contact tracks.')
    .version('0.1.0')
    .exitOverride()
    .showHelpAfterError('(run with --help for usage)')
    .configureOutput({ writeOut: (s) => io.out(s), writeErr });
  for (const add of COMMANDS) add(program, io);
  return program;
}

export async function main(argv: string[], io: Io = processIo): Promise<number> {
  // With --json every outcome is one JSON object on stdout, errors included: commander's own messages are held back.
  const json = argv.includes('--json') && !argv.includes('--help') && !argv.includes('-h');
  let commanderMessage = '';
  const program = json ? buildProgram(io, (s) => { commanderMessage += s; }) : buildProgram(io);
  try {
    await program.parseAsync(argv, { from: 'user' });
    return 0;
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.exitCode === 0) return 0;
      // Without --json commander has already printed its message.
      if (!json) return 2;
      return fail(io, json, (e.message || commanderMessage).replace(/^error: /, '').trim(), optionIn(e.message), 2);
    }
    if (isInputError(e)) return fail(io, json, e.message, fieldOf(e), 2);
    const msg = e instanceof Error ? e.message : String(e);
    return fail(io, json, `computation failed: ${msg}`, null, 1);
  }
}

/** The one way an error leaves the program: a JSON object on stdout with --json, else one safe line on stderr. */
function fail(io: Io, json: boolean, message: string, field: string | null, exitCode: number): number {
  if (json) io.out(safeJson(JSON.stringify({ error: { message, field, exitCode } })));
  else io.err(`thickring: ${safeLine(message)}`);
  return exitCode;
}

// The field an input error is about: its own `field` when it names one, else the option or file the message starts with.
function fieldOf(e: Error): string | null {
  const own = (e as { field?: unknown }).field;
  if (typeof own === 'string') return own;
  const opt = optionIn(e.message) ?? /^(result file|layout|tracks file) '[^']*'/.exec(e.message)?.[0];
  if (opt) return opt;
  // Messages lead with their subject ("ring A: center[0] ... "): the subject and the value named after it.
  const lead = /^([^:]{1,60}): ([A-Za-z$][\w$]*(?:\[\d+\])*)/.exec(e.message);
  if (lead) return `${lead[1]}: ${lead[2]}`;
  return /^([^:]{1,60}):/.exec(e.message)?.[1] ?? null;
}

function optionIn(message: string): string | null {
  return /(^|\s|')(--?[a-z][\w-]*)/.exec(message)?.[2] ?? null;
}
