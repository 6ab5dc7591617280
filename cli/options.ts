// Options shared by the solving commands (inflate, compare): --radii, --symmetry, --starts, --workers,
// --seed, --tol. Bad values are InputError (exit 2) naming the option, what was expected and an example.
import type { Command } from 'commander';
import { InputError } from '../src/model/errors.js';
import { parseSymmetryOption } from '../src/model/symmetry.js';
import type { Layout, Symmetry } from '../src/model/types.js';
import { defaultWorkers } from '../src/optimize/run/pool.js';

export interface SolveCliOptions {
  radii?: number[];
  /** Raw --symmetry text; resolved against the ring count by resolveSymmetry. */
  symmetry?: string;
  starts: number;
  workers: number;
  seed: number;
  tol: number;
  /** Wall-clock seconds for the solve (every start stops then and reports what it has). */
  timeLimit: number;
}

export const DEFAULT_STARTS = 4;
export const DEFAULT_SEED = 0;
export const DEFAULT_TOL = 1e-9;
export const MAX_STARTS = 1000;
export const MAX_WORKERS = 64;
/** Largest seed: seed·1000003 + start must stay an exact integer in a double (< 2^53). */
export const MAX_SEED = 2 ** 31 - 1;
/** Tolerances below this ask for more than double precision can give on a tube radius. */
export const MIN_TOL = 1e-14;
export const MAX_TOL = 1e-2;
/** Default and largest --time-limit (seconds): generous, one hour; at most a week. */
export const DEFAULT_TIME_LIMIT_S = 3600;
export const MAX_TIME_LIMIT_S = 7 * 24 * 3600;

/** Add the shared solving options to a command. */
export function addSolveOptions(cmd: Command): Command {
  return cmd
    .option('--radii <list>', 'core radii, comma separated: one value for all rings or one per ring (layout units)')
    .option('--symmetry <group>', 'impose a symmetry about the z axis through the origin: none, cyclic:N or dihedral:N')
    .option('--starts <n>', `number of seeded starts (default ${DEFAULT_STARTS})`)
    .option('--workers <n>', 'worker threads (default: cores available, at most the starts)')
    .option('--seed <n>', `seed of the start perturbations (default ${DEFAULT_SEED}); start 0 is always the layout as given`)
    .option('--tol <x>', `relative tolerance on the tube radius, dimensionless (default ${DEFAULT_TOL})`)
    .option('--time-limit <sec>', `wall-clock seconds after which every start stops and reports its verified tube, status stalled (default ${DEFAULT_TIME_LIMIT_S})`);
}

/** Validate the raw commander values of the shared options. */
export function readSolveOptions(raw: Record<string, unknown>): SolveCliOptions {
  const starts = raw['starts'] === undefined ? DEFAULT_STARTS : wholeNumber(raw['starts'], '--starts', 1, MAX_STARTS, '8');
  const workers = raw['workers'] === undefined
    ? defaultWorkers(starts)
    : wholeNumber(raw['workers'], '--workers', 1, MAX_WORKERS, '2');
  const seed = raw['seed'] === undefined ? DEFAULT_SEED : wholeNumber(raw['seed'], '--seed', 0, MAX_SEED, '42');
  const tol = raw['tol'] === undefined ? DEFAULT_TOL : tolerance(raw['tol']);
  const timeLimit = raw['timeLimit'] === undefined ? DEFAULT_TIME_LIMIT_S : seconds(raw['timeLimit']);
  const out: SolveCliOptions = { starts, workers, seed, tol, timeLimit };
  if (raw['radii'] !== undefined) out.radii = radiiList(raw['radii']);
  if (raw['symmetry'] !== undefined) {
    const s = String(raw['symmetry']).trim();
    if (s === '') throw new InputError("--symmetry: empty; expected none, cyclic:N or dihedral:N (for example --symmetry cyclic:3)");
    out.symmetry = s;
  }
  return out;
}

/**
 * The symmetry to impose: --symmetry when given, else the layout file's own symmetry, else none.
 * Catalogue layouts carry no symmetry key, so they are solved without one unless asked.
 */
export function resolveSymmetry(option: string | undefined, layout: Layout): Symmetry | null {
  if (option !== undefined) return parseSymmetryOption(option, layout.rings.length);
  const s = layout.symmetry;
  if (!s || s.type === 'none') return null;
  return s;
}

// ---- helpers -------------------------------------------------------------------------------------

function wholeNumber(v: unknown, name: string, min: number, max: number, example: string): number {
  const text = String(v).trim();
  const n = Number(text);
  if (!/^\d+$/.test(text) || !Number.isSafeInteger(n) || n < min || n > max) {
    throw new InputError(`${name}: '${text}' must be a whole number from ${min} to ${max} (for example ${name} ${example})`);
  }
  return n;
}

function tolerance(v: unknown): number {
  const text = String(v).trim();
  const x = Number(text);
  if (text === '' || !Number.isFinite(x) || x < MIN_TOL || x > MAX_TOL) {
    throw new InputError(`--tol: '${text}' must be a number from ${MIN_TOL} to ${MAX_TOL}, dimensionless (for example --tol 1e-9)`);
  }
  return x;
}

function seconds(v: unknown): number {
  const text = String(v).trim();
  const x = Number(text);
  if (text === '' || !Number.isFinite(x) || !(x > 0) || x > MAX_TIME_LIMIT_S) {
    throw new InputError(`--time-limit: '${text}' must be a number of seconds > 0 and at most ${MAX_TIME_LIMIT_S} (for example --time-limit 60)`);
  }
  return x;
}

function radiiList(v: unknown): number[] {
  const text = String(v).trim();
  const parts = text.split(',').map((p) => p.trim());
  const xs = parts.map(Number);
  const bad = parts.findIndex((p, i) => p === '' || !Number.isFinite(xs[i]!) || !(xs[i]! > 0));
  if (text === '' || bad !== -1) {
    const what = text === '' ? 'empty' : `'${parts[bad]}' is not a number > 0`;
    throw new InputError(`--radii: ${what}; give core radii in layout units, one for all rings or one per ring (for example --radii 1 or --radii 1,1.5,1)`);
  }
  return xs;
}
