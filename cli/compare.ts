// `thickring compare SPEC|LAYOUT [--symmetry cyclic:N|dihedral:N] [--json] [-o result.json]`: the
// thickest tube with a symmetry imposed and without it, the gain, how each ring moves, and the
// symmetry-breaking curve. Progress goes to stderr; the result file is what `report` draws.
import cliProgress from 'cli-progress';
import type { Command } from 'commander';
import { compare, type CompareProgress } from '../src/analyze/compare.js';
import { DEFAULT_SWEEP_POINTS } from '../src/analyze/sweep.js';
import { CAUTIONS } from '../src/fabricate/cautions.js';
import { InputError } from '../src/model/errors.js';
import { parseDensity, parseWireDiameter, weaveWeight } from '../src/model/periodicMaterials.js';
import { isPeriodicArg } from '../src/model/periodicSpec.js';
import type { CompareResult } from '../src/model/result.js';
import { resolveSpec } from '../src/model/spec.js';
import { parseSymmetryOption } from '../src/model/symmetry.js';
import { runPeriodicCompare, type PeriodicCompareResult } from '../src/optimize/run/weave.js';
import { formatSummary } from '../reports/summary.js';
import { emitResult } from './files.js';
import type { Io } from './io.js';
import { addSolveOptions, readSolveOptions, type SolveCliOptions } from './options.js';

/** Most steps of the curve one may ask for (each is a full solve). */
const MAX_SWEEP_POINTS = 50;

export function register(program: Command, io: Io): void {
  const cmd = program
    .command('compare')
    .description('Symmetric vs symmetry-broken optimum: how much thicker the rings get when the symmetry is given up.')
    .argument('<spec|layout>', 'catalogue spec (hopf, chain:N, necklace:N, star:K, torus:N, weave:NAME) or layout JSON file; a weave compares one repeated cell with a 2-cell (2 x 2) supercell')
    .option('--json', 'print one JSON object (the compare result file) instead of text')
    .option('-o, --output <file>', 'write the compare result file (format thickring-result/1), e.g. for thickring report')
    .option('--sweep-points <n>', `steps of the symmetry-breaking curve (default ${DEFAULT_SWEEP_POINTS}; 0 skips it)`)
    .option('--density <g/cm3|material>', 'weaves: wire density for the weight per length or area of the single-cell optimum (g/cm3 or steel, sterling-silver, ...)')
    .option('--wire-diameter <mm>', 'weaves: wire diameter in mm that sets the scale of the weight');
  addSolveOptions(cmd).action(async (arg: string, raw: Record<string, unknown>) => {
    const options = readSolveOptions(raw);
    const sweepPoints = raw['sweepPoints'] === undefined ? undefined : sweepCount(raw['sweepPoints']);
    if (isPeriodicArg(arg)) {
      const run = await runWeaveCompare(arg, options, raw, io);
      emitResult(io, raw['json'] === true, raw['output'] as string | undefined, 'comparison', run.result,
        (output) => [weaveHeader(run.result), ...run.notes, '', formatCompare(run.result, output)].join('\n'));
      return;
    }
    for (const flag of ['density', 'wireDiameter']) {
      if (raw[flag] !== undefined) throw new InputError(`--${flag === 'density' ? 'density' : 'wire-diameter'}: applies to weaves only (weave:NAME or a layout with a lattice section); leave it out for ${arg}`);
    }
    const result = await runCompare(arg, options, sweepPoints, io);
    emitResult(io, raw['json'] === true, raw['output'] as string | undefined, 'comparison', result, (output) => formatCompare(result, output));
  });
}

export async function runCompare(arg: string, options: SolveCliOptions, sweepPoints: number | undefined, io: Io): Promise<CompareResult> {
  const resolved = resolveSpec(arg, options.radii ? { radii: options.radii } : {});
  const n = resolved.layout.rings.length;
  const symmetry = options.symmetry === undefined ? undefined : parseSymmetryOption(options.symmetry, n);
  const progress = progressReporter(io);
  try {
    return await compare(resolved, {
      ...(symmetry !== undefined ? { symmetry } : {}),
      tubeRatios: ratiosOf(resolved.layout.rings.map((r) => r.tube)),
      starts: options.starts,
      workers: options.workers,
      seed: options.seed,
      tol: options.tol,
      timeLimit: options.timeLimit,
      ...(sweepPoints !== undefined ? { sweepPoints } : {}),
      onProgress: progress.update,
    });
  } finally {
    progress.stop();
  }
}

/** Weaves: one repeated cell vs a supercell (src/optimize/run/weave.ts); the weight is the cell optimum's. */
export async function runWeaveCompare(arg: string, options: SolveCliOptions, raw: Record<string, unknown>, io: Io): Promise<{ result: PeriodicCompareResult; notes: string[] }> {
  if (raw['sweepPoints'] !== undefined) throw new InputError('--sweep-points: weaves have no symmetry-breaking curve (compare solves one cell and a supercell); leave it out');
  // Bad --density or --wire-diameter is reported before any solve.
  const density = raw['density'] === undefined ? null : parseDensity(String(raw['density']));
  const wire = raw['wireDiameter'] === undefined ? undefined : parseWireDiameter(String(raw['wireDiameter']));
  if (wire !== undefined && density === null) {
    throw new InputError('--wire-diameter: only sets the scale of the weight; give --density as well (g/cm3 or a material name such as steel)');
  }
  const run = await runPeriodicCompare(arg, {
    starts: options.starts, workers: options.workers, seed: options.seed, tol: options.tol, timeLimit: options.timeLimit,
    ...(options.radii ? { radii: options.radii } : {}),
    ...(options.symmetry !== undefined ? { symmetry: options.symmetry } : {}),
  }, (phase, e) => io.err(`compare: ${phase} ${e.done}/${e.total}: tube ${Number.isFinite(e.tube) ? Number(e.tube.toPrecision(8)) : '-'} (layout units)`));
  const s = run.result.symmetric;
  if (density && s.tube > 0) {
    const weight = weaveWeight({ rings: s.rings, lattice: s.lattice, units: s.units }, density, wire);
    run.result.symmetric = { ...s, periodic: { ...s.periodic, weight } };
  }
  return run;
}

function weaveHeader(r: PeriodicCompareResult): string {
  const cell = r.symmetric, w = cell.periodic.weight;
  const lines = [
    `Weave ${r.spec} (${cell.periodic.kind}): minimum aspect ratio ${Number(cell.aspectRatio.toPrecision(10))} with one repeated cell, ` +
      `${Number(r.broken.aspectRatio.toPrecision(10))} with a ${r.supercell.join(' x ')} supercell (inner diameter / wire diameter, dimensionless)`,
  ];
  if (w) lines.push(`Weight of the single-cell optimum: ${Number(w.grams.toPrecision(6))} g per ${w.per} at wire diameter ${Number(w.wireDiameterMm.toPrecision(6))} mm (${w.scale}); density ${w.density.gramsPerCm3} g/cm3, ${w.density.source}`);
  return lines.join('\n');
}

export function formatCompare(result: CompareResult, output?: string): string {
  const lines = [formatSummary(result)];
  if (output) lines.push('', `Result written to ${output} (draw it with: thickring report ${output} -o report.html)`);
  lines.push('', 'Cautions:', ...CAUTIONS.map((c) => `- ${c}`));
  return lines.join('\n');
}

// ---- helpers -------------------------------------------------------------------------------------

function sweepCount(v: unknown): number {
  const text = String(v).trim();
  const k = Number(text);
  if (!/^\d+$/.test(text) || k > MAX_SWEEP_POINTS) {
    throw new InputError(`--sweep-points: '${text}' must be a whole number from 0 to ${MAX_SWEEP_POINTS} (for example --sweep-points 6)`);
  }
  return k;
}

/** Same rule as inflate: layout tubes, when they differ, are ratios r_i = tube · tube_i / largest tube_i. */
function ratiosOf(tubes: (number | undefined)[]): number[] {
  const given = tubes.filter((t): t is number => t !== undefined);
  const maxT = given.length > 0 ? Math.max(...given) : 0;
  if (!given.some((t) => t !== maxT)) return tubes.map(() => 1);
  return tubes.map((t) => (t === undefined ? 1 : t / maxT));
}

const PHASE_LABEL: Record<CompareProgress['phase'], string> = {
  symmetric: 'symmetric optimum',
  perturbed: 'broken, from the symmetric optimum',
  independent: 'broken, independent starts',
  sweep: 'symmetry-breaking curve',
};

/** A bar per phase on an interactive stderr, else one line per finished solve. */
function progressReporter(io: Io): { update: (e: CompareProgress) => void; stop: () => void } {
  const show = (x: number): string => (Number.isFinite(x) ? String(Number(x.toPrecision(8))) : '-');
  if (io.interactive) {
    let bar: cliProgress.SingleBar | null = null;
    let phase: string | null = null;
    return {
      update: (e) => {
        if (phase !== e.phase) {
          bar?.stop();
          phase = e.phase;
          bar = new cliProgress.SingleBar(
            { format: `compare: ${PHASE_LABEL[e.phase]} [{bar}] {value}/{total} | best tube {best} (layout units)`, stream: process.stderr, hideCursor: true },
            cliProgress.Presets.shades_classic,
          );
          bar.start(e.total, 0, { best: '-' });
        }
        bar?.update(e.done, { best: show(e.bestTube) });
      },
      stop: () => bar?.stop(),
    };
  }
  return {
    update: (e) => io.err(
      `compare: ${PHASE_LABEL[e.phase]} ${e.done}/${e.total}: ` +
        (e.epsilon !== undefined ? `departure ≤ ${show(e.epsilon)}, ` : '') +
        `tube ${show(e.tube)}, best ${show(e.bestTube)} (layout units)`,
    ),
    stop: () => {},
  };
}
