// Multistart inflation: run several seeded starts on the worker pool (startLoop.ts), check every outcome
// with the independent invariant checker (src/check/verify.ts), keep the best verified one and package it
// as a result file (format thickring-result/1). Rings and weaves differ in the check and the result:
//  rings   every pair, the intended linking matrix; contacts of every orbit image, the packing bound.
//  weaves  a block of cells (3 along a chain, 3 × 3 of a sheet: every pair in the block, linking as the
//          pattern intends, tube <= R); the lattice and the periodic figures, the bound of rings and copies.
import { verifyConfiguration, CLEARANCE_TOLERANCE } from '../../check/verify.js';
import { blockLinking, cellMeasure, expandCells, periodicKind, type PeriodicKind, type PeriodicLink } from '../../model/periodic.js';
import type { WeaveWeight } from '../../model/periodicMaterials.js';
import type { Bound, SolveResult, Verification } from '../../model/result.js';
import type { Lattice, Ring } from '../../model/types.js';
import { ringOrbits } from '../../model/symmetry.js';
import { expandContactOrbits } from '../../model/orbit.js';
import { optimalityOf, optimalityText } from '../../model/result.js';
import { boundAttained, packingBound, ringPackingBound, withGap } from '../certify/bound.js';
import type { InflateProblem, PeriodicOutcome, PeriodicProblem, SolveOutcome } from './problem.js';
import { resultHead, runStarts, settleBest, type StartLoopOptions, type StartsRun } from './startLoop.js';

export { DEFAULT_MAX_ITERATIONS, DEFAULT_PERTURBATION, startSeed, type StartProgress } from './startLoop.js';

export interface MultistartOptions extends StartLoopOptions {
  /** Recorded in the result file. */
  spec: string;
  command: string;
  units: string | null;
}

export async function runMultistart(problem: InflateProblem, options: MultistartOptions): Promise<SolveResult> {
  const t0 = performance.now();
  // Surface a symmetry that does not fit the rings here, as bad input, not as a failed start in a worker.
  if (problem.symmetry) ringOrbits(problem.rings, problem.symmetry);
  // The packing bound holds for every arrangement with this linking: a verified start that reaches it is a global maximum.
  const attains = (o: SolveOutcome): boolean => {
    const bound = packingBound(o.rings, problem.tubeRatios, problem.linking);
    return bound !== null && boundAttained(o.tube, bound.tube, options.tol);
  };
  const run = await runStarts<SolveOutcome>(problem, options, (outcome, tol) => verifyOutcome(problem, outcome, tol), attains);
  return buildRingResult(problem, options, run, (performance.now() - t0) / 1000);
}

/** Verify a solver outcome against the problem's intended link, with no help from the solver. */
export function verifyOutcome(problem: InflateProblem, outcome: SolveOutcome, clearanceTolerance = CLEARANCE_TOLERANCE): Verification {
  return verifyConfiguration(
    { rings: outcome.rings, tube: outcome.tube, tubeRatios: problem.tubeRatios, linking: problem.linking },
    { clearanceTolerance },
  );
}

export interface PeriodicFigures {
  kind: PeriodicKind;
  cellRings: number;
  /** Chain: length of the period (layout units). */
  periodLength?: number;
  /** Sheet: area of the unit cell (layout units²). */
  cellArea?: number;
  /** Chain: rings per layout unit of length. */
  ringsPerUnitLength?: number;
  /** Sheet: rings per square layout unit. */
  ringsPerUnitArea?: number;
  /** The pattern: linked image pairs (ring i of the cell with the copy of ring j at `shift`). */
  links: PeriodicLink[];
  /** Per entry of `contacts`: lattice shift of the copy of ring b that onB lies on. */
  contactShifts: number[][];
  /** Cells per lattice direction of the block the independent checker verified. */
  verifiedBlock: number[];
  /** Weight per metre or square metre for a wire density, when one was given. */
  weight: WeaveWeight | null;
}

export interface PeriodicSolveResult extends SolveResult {
  lattice: Lattice;
  periodic: PeriodicFigures;
}

export interface PeriodicMultistartOptions extends MultistartOptions {
  /** Cells per lattice direction for the independent check (default 3). */
  verifyCells?: number;
}

export const DEFAULT_VERIFY_CELLS = 3;

export async function runPeriodicMultistart(problem: PeriodicProblem, options: PeriodicMultistartOptions): Promise<PeriodicSolveResult> {
  const t0 = performance.now();
  const counts = problem.lattice.vectors.map(() => options.verifyCells ?? DEFAULT_VERIFY_CELLS);
  const run = await runStarts<PeriodicOutcome>(problem, options, (outcome, tol) => verifyPeriodic(problem, outcome, counts, tol));
  return buildPeriodicResult(problem, options, run, counts, (performance.now() - t0) / 1000);
}

/**
 * Independent check of a periodic outcome on a block of cells: every pair in the block clears the sum
 * of its tubes, tube <= R, and the block's linking is the pattern's (up to reversing single rings).
 */
export function verifyPeriodic(
  problem: Pick<PeriodicProblem, 'links' | 'tubeRatios'>, outcome: { rings: PeriodicOutcome['rings']; lattice: Lattice; tube: number },
  counts: number[], clearanceTolerance = CLEARANCE_TOLERANCE,
): Verification {
  const rings = expandCells(outcome.rings, outcome.lattice, counts);
  const cells = rings.length / outcome.rings.length;
  const tubeRatios = Array.from({ length: cells }, () => problem.tubeRatios).flat();
  const linking = blockLinking(outcome.rings.length, problem.links, counts);
  const v = verifyConfiguration({ rings, tube: outcome.tube, tubeRatios, linking }, { clearanceTolerance });
  return { ...v, messages: [`checked on a block of ${counts.join(' x ')} cells (${rings.length} rings, every pair)`, ...v.messages] };
}

/**
 * Circle-packing bound on the tube (bound.ts): a ring with k rings or copies through it. A link of ring
 * i with its own copy at ±shift puts two copies through ring i.
 */
export function periodicBound(problem: PeriodicProblem): Bound | null {
  const m = problem.rings.length;
  const through = new Array<number>(m).fill(0);
  const wMin = new Array<number>(m).fill(Infinity);
  for (const l of problem.links) {
    through[l.i]!++;
    through[l.j]!++;
    wMin[l.i] = Math.min(wMin[l.i]!, problem.tubeRatios[l.j]!);
    wMin[l.j] = Math.min(wMin[l.j]!, problem.tubeRatios[l.i]!);
  }
  let best: Bound | null = null;
  for (let i = 0; i < m; i++) {
    const k = through[i]!;
    const tube = ringPackingBound(problem.rings[i]!.radius, problem.tubeRatios[i]!, k, wMin[i]!);
    if (best === null || tube < best.tube) best = { tube, ring: i, through: k, gap: 0 };
  }
  return best;
}

// ---- helpers -------------------------------------------------------------------------------------

function buildRingResult(
  problem: InflateProblem,
  options: MultistartOptions,
  run: StartsRun<SolveOutcome>,
  elapsedSeconds: number,
): SolveResult {
  const ratios = problem.tubeRatios;
  const { outcome, status, verification, certificate, stopReason } = settleBest(run, 'configuration');
  const rings: Ring[] = outcome?.rings ?? problem.rings;
  const tube = outcome?.tube ?? 0;
  const bound = withGap(packingBound(rings, ratios, problem.linking), tube);
  return {
    ...resultHead(options, status, tube, rings, ratios),
    linking: problem.linking.map((row) => row.slice()),
    symmetry: problem.symmetry,
    // The solve sees one ring per orbit: list every image of its contacts.
    contacts: expandContactOrbits(outcome?.contacts ?? [], rings, problem.symmetry),
    certificate,
    optimality: optimalityText(optimalityOf({ bound, verification, certificate }), problem.symmetry),
    bound,
    starts: run.starts,
    verification,
    elapsedSeconds,
    ...(stopReason !== null ? { stopReason } : {}),
  };
}

function buildPeriodicResult(
  problem: PeriodicProblem, options: PeriodicMultistartOptions, run: StartsRun<PeriodicOutcome>, counts: number[], elapsedSeconds: number,
): PeriodicSolveResult {
  const ratios = problem.tubeRatios;
  const { outcome, status, verification, certificate, stopReason } = settleBest(run, 'weave');
  const rings = outcome?.rings ?? problem.rings;
  const lattice: Lattice = outcome?.lattice ?? problem.lattice;
  const tube = outcome?.tube ?? 0;
  const m = rings.length;
  const linking = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  for (const l of problem.links) {
    if (l.i !== l.j && l.shift.every((s) => s === 0)) linking[l.i]![l.j] = linking[l.j]![l.i] = l.linking;
  }
  const kind = periodicKind(lattice);
  const measure = cellMeasure(lattice);
  const periodic: PeriodicFigures = {
    kind, cellRings: m,
    ...(kind === 'chain' ? { periodLength: measure, ringsPerUnitLength: m / measure } : { cellArea: measure, ringsPerUnitArea: m / measure }),
    links: problem.links.map((l) => ({ ...l, shift: l.shift.slice() })),
    contactShifts: (outcome?.contacts ?? []).map((c) => c.shift.slice()),
    verifiedBlock: counts.slice(),
    weight: null,
  };
  return {
    ...resultHead(options, status, tube, rings, ratios),
    linking,
    symmetry: null,
    lattice: { vectors: lattice.vectors.map((v) => [v[0], v[1], v[2]]) },
    contacts: (outcome?.contacts ?? []).map(({ shift: _s, ...c }) => c),
    certificate,
    bound: withGap(periodicBound(problem), tube),
    starts: run.starts,
    verification,
    periodic,
    elapsedSeconds,
    ...(stopReason !== null ? { stopReason } : {}),
  };
}
