// The weave commands on a periodic spec:
//  inflate  resolve the spec, solve with multistart on the worker pool, attach the weight for a wire density
//           and compare with the known optimum or the trade rule of thumb.
//  compare  the translational analogue of symmetric vs symmetry-broken. The "symmetric" optimum repeats one
//           cell; the "broken" one repeats a supercell of 2 cells (chain) or 2 × 2 cells (sheet), so
//           neighbouring cells may differ. The supercell is solved from small perturbations of the repeated
//           cell optimum (start 0 is that optimum itself, so it cannot come out lower) and from independent
//           starts, and the better verified answer is kept. The gain says whether giving up the single-cell
//           repeat lets the wire get thicker.
import { alignRings } from '../../analyze/align.js';
import { InputError } from '../../model/errors.js';
import { parseDensity, parseWireDiameter, weaveWeight } from '../../model/periodicMaterials.js';
import { expandCells, periodicLinks, sameLinks } from '../../model/periodic.js';
import { resolvePeriodicSpec, type ResolvedPeriodic } from '../../model/periodicSpec.js';
import type { CompareResult } from '../../model/result.js';
import type { Lattice, Ring } from '../../model/types.js';
import type { StartLoopOptions } from './startLoop.js';
import { runPeriodicMultistart, type PeriodicSolveResult, type StartProgress } from './multistart.js';
import type { PeriodicProblem } from './problem.js';

/** timeLimit: wall-clock seconds for the run (StartLoopOptions.timeLimit). */
export interface PeriodicRunOptions
  extends Pick<StartLoopOptions, 'starts' | 'workers' | 'seed' | 'tol' | 'timeLimit' | 'onProgress' | 'onIteration'> {
  radii?: number[];
  /** Raw --symmetry: point symmetries of weaves are not imposed, so any value but none is refused. */
  symmetry?: string;
  /** Raw --density (g/cm³ or a material name) and --wire-diameter (mm). */
  density?: string;
  wireDiameter?: string;
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

export interface PeriodicCompareResult extends CompareResult {
  lattice: Lattice;
  periodic: PeriodicSolveResult['periodic'];
  symmetric: PeriodicSolveResult;
  broken: PeriodicSolveResult;
  /** Cells per lattice direction of the broken (supercell) solve. */
  supercell: number[];
}

export type PeriodicComparePhase = 'cell' | 'supercell from the cell optimum' | 'supercell, independent starts';

/**
 * Supercells are checked on a block of 2 per direction: with 2 × 2 original cells each, that block holds
 * every pair of neighbouring supercells (shifts 0 and ±1 along each vector and the diagonal) at a quarter
 * of the cost of 3 × 3.
 */
const SUPERCELL_VERIFY_CELLS = 2;
/** Size of the perturbations of the repeated cell optimum (relative to each ring's radius). */
const SUPERCELL_PERTURBATION = 0.02;

export async function runPeriodicCompare(
  arg: string, options: Omit<PeriodicRunOptions, 'onProgress'>,
  onProgress?: (phase: PeriodicComparePhase, e: StartProgress) => void,
): Promise<{ result: PeriodicCompareResult; notes: string[] }> {
  const t0 = performance.now();
  refuseSymmetry(options.symmetry);
  const resolved = resolvePeriodicSpec(arg, options.radii ? { radii: options.radii } : {});
  const cell = problemOf(resolved);
  const common = {
    workers: options.workers, tol: options.tol, spec: resolved.spec, command: 'compare', units: resolved.layout.units ?? null,
    ...(options.timeLimit !== undefined ? { timeLimit: options.timeLimit } : {}),
  };
  const report = (phase: PeriodicComparePhase) => (e: StartProgress): void => onProgress?.(phase, e);

  const symmetric = await runPeriodicMultistart(cell, { ...common, starts: options.starts, seed: options.seed, onProgress: report('cell') });
  const counts = cell.lattice.vectors.map(() => 2);
  const searches: PeriodicSolveResult[] = [];
  if (usable(symmetric)) {
    const fromOptimum = supercell(cell, symmetric.rings.map(toRing), symmetric.lattice, counts);
    if (fromOptimum) {
      searches.push(await runPeriodicMultistart(fromOptimum, {
        ...common, starts: options.starts, seed: options.seed + 1, perturbation: SUPERCELL_PERTURBATION, verifyCells: SUPERCELL_VERIFY_CELLS,
        onProgress: report('supercell from the cell optimum'),
      }));
    }
  }
  const fromStart = supercell(cell, cell.rings, cell.lattice, counts);
  if (fromStart) {
    searches.push(await runPeriodicMultistart(fromStart, {
      ...common, starts: options.starts, seed: options.seed + 2, verifyCells: SUPERCELL_VERIFY_CELLS, onProgress: report('supercell, independent starts'),
    }));
  }
  const broken = best(searches) ?? symmetric;
  const ok = usable(symmetric) && usable(broken);
  const gain = ok ? broken.tube - symmetric.tube : NaN;
  const gainPercent = ok && symmetric.tube > 0 ? (100 * gain) / symmetric.tube : NaN;
  // The cell optimum repeated over the supercell, aligned onto the broken optimum ring by ring.
  const repeated = expandCells(symmetric.rings.map(toRing), symmetric.lattice, counts);
  const changes = ok && repeated.length === broken.rings.length ? alignRings(broken.rings, repeated).rings.map((c, k) => ({ ...c, name: broken.rings[k]!.name })) : [];
  const messages = [`broken = a supercell of ${counts.join(' x ')} cells, so neighbouring cells may differ; the symmetric optimum repeats one cell`];
  if (!usable(symmetric)) messages.push(`no verified single-cell optimum (status ${symmetric.status}): gain is not available`);
  const result: PeriodicCompareResult = {
    ...broken,
    command: 'compare',
    status: ok ? broken.status : 'failed',
    verification: { ...broken.verification, ok: broken.verification.ok && usable(symmetric), messages: [...broken.verification.messages, ...messages] },
    symmetric,
    broken,
    gain,
    gainPercent,
    changes,
    sweep: [],
    supercell: counts,
    elapsedSeconds: (performance.now() - t0) / 1000,
  };
  return { result, notes: comparisonNotes(resolved, symmetric) };
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

// ---- helpers -------------------------------------------------------------------------------------

/** The supercell problem: the cell's rings repeated, lattice vectors multiplied; null if the pattern changed. */
function supercell(cell: PeriodicProblem, rings: Ring[], lattice: Lattice, counts: number[]): PeriodicProblem | null {
  const big = expandCells(rings, lattice, counts);
  const vectors = lattice.vectors.map((v, k) => [v[0] * counts[k]!, v[1] * counts[k]!, v[2] * counts[k]!] as [number, number, number]);
  const links = periodicLinks(big, { vectors });
  // The repeated cell must be the same weave: every ring keeps its links (count checked on the repeat).
  const cells = big.length / rings.length;
  if (links.length !== cells * cell.links.length) return null;
  const check = periodicLinks(rings, lattice);
  if (!sameLinks(cell.links, check)) return null;
  return { rings: big, lattice: { vectors }, tubeRatios: Array.from({ length: cells }, () => cell.tubeRatios).flat(), links };
}

function usable(r: PeriodicSolveResult): boolean {
  return (r.status === 'optimal' || r.status === 'stalled') && r.verification.ok;
}

function best(results: PeriodicSolveResult[]): PeriodicSolveResult | null {
  let out: PeriodicSolveResult | null = null;
  for (const r of results) {
    if (out === null || (usable(r) && !usable(out)) || (usable(r) === usable(out) && r.tube > out.tube)) out = r;
  }
  if (out === null) return null;
  return { ...out, starts: results.flatMap((r) => r.starts), elapsedSeconds: results.reduce((t, r) => t + r.elapsedSeconds, 0) };
}

function toRing(r: { name: string; center: ArrayLike<number>; normal: ArrayLike<number>; radius: number }): Ring {
  return { name: r.name, center: [r.center[0]!, r.center[1]!, r.center[2]!], normal: [r.normal[0]!, r.normal[1]!, r.normal[2]!], radius: r.radius };
}
