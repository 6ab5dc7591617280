// `thickring inflate` for weaves: resolve the periodic spec, solve with multistart on the worker pool,
// attach the weight for a wire density and compare with the known optimum or the trade rule of thumb.
import { InputError } from '../../model/errors.js';
import { parseDensity, parseWireDiameter, weaveWeight } from '../../model/periodicMaterials.js';
import { resolvePeriodicSpec, type ResolvedPeriodic } from '../../model/periodicSpec.js';
import type { StartHeartbeat } from './startLoop.js';
import { runPeriodicMultistart, type PeriodicSolveResult, type StartProgress } from './multistart.js';
import type { PeriodicProblem } from './problem.js';

export interface PeriodicRunOptions {
  starts: number;
  workers: number;
  seed: number;
  tol: number;
  /** Wall-clock seconds for the run (StartLoopOptions.timeLimit). */
  timeLimit?: number;
  radii?: number[];
  /** Raw --symmetry: point symmetries of weaves are not imposed, so any value but none is refused. */
  symmetry?: string;
  /** Raw --density (g/cm³ or a material name) and --wire-diameter (mm). */
  density?: string;
  wireDiameter?: string;
  onProgress?: (e: StartProgress) => void;
  onIteration?: (e: StartHeartbeat) => void;
}

export interface PeriodicRun {
  result: PeriodicSolveResult;
  resolved: ResolvedPeriodic;
  /** Lines for the human text (one sentence each). */
  notes: string[];
}

/** Relative difference below which a computed minimum aspect ratio matches a known closed form. */
const KNOWN_MATCH_REL = 1e-6;

export async function runPeriodicInflate(arg: string, options: PeriodicRunOptions, command = 'inflate'): Promise<PeriodicRun> {
  refuseSymmetry(options.symmetry);
  const density = options.density !== undefined ? parseDensity(options.density) : null;
  const wire = options.wireDiameter !== undefined ? parseWireDiameter(options.wireDiameter) : undefined;
  if (wire !== undefined && density === null) throw new InputError('--wire-diameter: only sets the scale of the weight; give --density as well (g/cm3 or a material name such as steel)');
  const resolved = resolvePeriodicSpec(arg, options.radii ? { radii: options.radii } : {});
  const notes = [...resolved.notes];
  if (resolved.layout.symmetry) notes.push('The layout\'s symmetry section is not imposed on a weave.');
  const problem = problemOf(resolved);
  let result = await runPeriodicMultistart(problem, {
    starts: options.starts, workers: options.workers, seed: options.seed, tol: options.tol,
    ...(options.timeLimit !== undefined ? { timeLimit: options.timeLimit } : {}),
    spec: resolved.spec, command, units: resolved.layout.units ?? null,
    ...(options.onProgress ? { onProgress: options.onProgress } : {}),
    ...(options.onIteration ? { onIteration: options.onIteration } : {}),
  });
  if (density && result.tube > 0) {
    const weight = weaveWeight({ rings: result.rings, lattice: result.lattice, units: result.units }, density, wire);
    result = { ...result, periodic: { ...result.periodic, weight } };
  }
  notes.push(...comparisonNotes(resolved, result));
  return { result, resolved, notes };
}

/** Point symmetries of weaves are not imposed: any --symmetry but none is bad input. */
export function refuseSymmetry(symmetry: string | undefined): void {
  if (symmetry !== undefined && symmetry.trim().toLowerCase() !== 'none') {
    throw new InputError(`--symmetry ${symmetry}: point symmetries of weaves are not imposed (the lattice already repeats the cell); leave --symmetry out`);
  }
}

export function problemOf(resolved: ResolvedPeriodic): PeriodicProblem {
  return {
    rings: resolved.layout.rings.map(({ tube: _t, ...r }) => r),
    lattice: resolved.layout.lattice,
    tubeRatios: resolved.tubeRatios,
    links: resolved.links,
  };
}

/** The known closed form (equal rings) or the trade rule of thumb, beside the computed minimum. */
export function comparisonNotes(resolved: ResolvedPeriodic, result: PeriodicSolveResult): string[] {
  const notes: string[] = [];
  const w = resolved.weave;
  if (!w || !(result.tube > 0)) return notes;
  const equal = resolved.layout.rings.every((r) => r.radius === resolved.layout.rings[0]!.radius) && resolved.tubeRatios.every((x) => x === 1);
  const ar = result.aspectRatio;
  if (w.knownOptimum && equal) {
    const rel = (ar - w.knownOptimum.aspectRatio) / w.knownOptimum.aspectRatio;
    notes.push(
      `Known minimum ${w.knownOptimum.formula}; this result differs by ${rel.toExponential(2)} (relative, dimensionless)` +
        `${Math.abs(rel) <= KNOWN_MATCH_REL ? '' : ' - more than expected'}. Source: ${w.knownOptimum.source}.`,
    );
  }
  if (w.trade) {
    const range = w.trade.low === w.trade.high ? `about ${w.trade.low}` : `${w.trade.low} to ${w.trade.high}`;
    notes.push(
      `Trade rule of thumb: ${w.trade.what} at aspect ratio ${range} (dimensionless; ${w.trade.source}). ` +
        `The geometric minimum here is ${ar.toFixed(3)}: real rings spring back, are not perfectly round and need room to close, ` +
        'and the geometric minimum may be a locked weave that cannot be worked (see docs/weaves.md).',
    );
  }
  return notes;
}
