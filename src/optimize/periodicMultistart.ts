// Multistart for weaves: seeded starts of the periodic solve on the worker pool (a WebAssembly abort ends
// only its worker), every outcome re-checked by the independent checker (src/check/verify.ts) on a block
// of cells (3 along a chain, 3 × 3 of a sheet: every pair in the block, linking as the pattern intends,
// tube <= R), and the best verified one packaged as a result file with the periodic figures.
import { verifyConfiguration, CLEARANCE_TOLERANCE } from '../check/verify.js';
import { blockLinking, cellMeasure, expandCells, periodicKind, type PeriodicKind, type PeriodicLink } from '../model/periodic.js';
import type { WeaveWeight } from '../model/periodicMaterials.js';
import { RESULT_FORMAT, type Bound, type Certificate, type ResultRing, type SolveResult, type StartRecord, type Verification } from '../model/result.js';
import type { Lattice, SolveStatus } from '../model/types.js';
import { packingRadius, withGap } from './bound.js';
import { DEFAULT_MAX_ITERATIONS, DEFAULT_PERTURBATION, startSeed, type StartProgress } from './multistart.js';
import type { PeriodicOutcome, PeriodicProblem } from './periodicProblem.js';
import { runPool, type Algorithm, type PoolResult, type PoolTask } from './pool.js';

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

export interface PeriodicMultistartOptions {
  starts: number;
  workers: number;
  seed: number;
  tol: number;
  maxIterations?: number;
  perturbation?: number;
  algorithm?: Algorithm;
  spec: string;
  command: string;
  units: string | null;
  /** Cells per lattice direction for the independent check (default 3). */
  verifyCells?: number;
  onProgress?: (event: StartProgress) => void;
  /** Test-only: make the worker die, as on a WebAssembly abort, for these starts and algorithms. */
  simulateAbort?: { start: number; algorithms: Algorithm[] }[];
}

export const DEFAULT_VERIFY_CELLS = 3;
/** Two tubes this close (times tol) count as equal when choosing between starts. */
const TIE_FACTOR = 10;

export async function runPeriodicMultistart(problem: PeriodicProblem, options: PeriodicMultistartOptions): Promise<PeriodicSolveResult> {
  const t0 = performance.now();
  const tasks: PoolTask[] = [];
  for (let k = 0; k < options.starts; k++) {
    const task: PoolTask = {
      id: k,
      problem,
      options: {
        tol: options.tol,
        maxIterations: options.maxIterations ?? DEFAULT_MAX_ITERATIONS,
        seed: startSeed(options.seed, k),
        perturbation: k === 0 ? 0 : options.perturbation ?? DEFAULT_PERTURBATION,
        algorithm: options.algorithm ?? 'slsqp',
      },
    };
    const abort = options.simulateAbort?.find((s) => s.start === k);
    if (abort) task.simulateAbort = abort.algorithms;
    tasks.push(task);
  }
  const counts = problem.lattice.vectors.map(() => options.verifyCells ?? DEFAULT_VERIFY_CELLS);
  const clearanceTolerance = Math.max(CLEARANCE_TOLERANCE, TIE_FACTOR * options.tol);
  const checked: Checked[] = new Array(tasks.length);
  let done = 0;
  let bestTube = NaN;
  await runPool(tasks, {
    workers: options.workers,
    onResult: (r) => {
      const outcome = r.outcome as PeriodicOutcome | null;
      const c: Checked = { result: r, outcome, verification: outcome ? verifyPeriodic(problem, outcome, counts, clearanceTolerance) : null };
      checked[r.id] = c;
      done++;
      if (usable(c) && !(outcome!.tube <= bestTube)) bestTube = outcome!.tube;
      options.onProgress?.({
        done, total: tasks.length, start: r.id, seed: tasks[r.id]!.options.seed, status: outcome?.status ?? 'failed',
        tube: outcome?.tube ?? NaN, retries: r.retries, errors: r.errors, bestTube,
      });
    },
  });
  const best = pickBest(checked, options.tol);
  const starts: StartRecord[] = checked.map((c, k) => ({
    seed: tasks[k]!.options.seed,
    status: c.outcome?.status ?? 'failed',
    tube: c.outcome?.tube ?? 0,
    iterations: c.outcome?.iterations ?? 0,
    history: c.outcome?.history ?? [],
    retries: c.result.retries,
  }));
  const errors = checked.flatMap((c) => c.result.errors.map((e) => `start ${c.result.id}: ${e}`));
  return buildResult(problem, options, best, starts, errors, counts, (performance.now() - t0) / 1000);
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
    const R = problem.rings[i]!.radius, wi = problem.tubeRatios[i]!, k = through[i]!;
    const rk = packingRadius(k);
    const tube = k === 0 ? R / wi : (rk * R) / (wMin[i]! + rk * wi);
    if (best === null || tube < best.tube) best = { tube, ring: i, through: k, gap: 0 };
  }
  return best;
}

// ---- helpers -------------------------------------------------------------------------------------

interface Checked {
  result: PoolResult;
  outcome: PeriodicOutcome | null;
  verification: Verification | null;
}

function usable(c: Checked): boolean {
  const o = c.outcome;
  return o !== null && (o.status === 'optimal' || o.status === 'stalled') && c.verification?.ok === true;
}

/** Verified first, then the larger tube; near-ties prefer a certified optimum, then the lower start. */
function pickBest(checked: Checked[], tol: number): Checked | null {
  let best: Checked | null = null;
  for (const c of checked) {
    if (!usable(c)) continue;
    if (best === null) { best = c; continue; }
    const a = c.outcome!, b = best.outcome!;
    const tie = Math.abs(a.tube - b.tube) <= TIE_FACTOR * tol * Math.max(a.tube, b.tube);
    if (tie ? a.certificate.certified && !b.certificate.certified : a.tube > b.tube) best = c;
  }
  if (best) return best;
  for (const c of checked) {
    if (!c.outcome) continue;
    if (best === null || c.outcome.tube > best.outcome!.tube) best = c;
  }
  return best;
}

function buildResult(
  problem: PeriodicProblem, options: PeriodicMultistartOptions, best: Checked | null, starts: StartRecord[],
  errors: string[], counts: number[], elapsedSeconds: number,
): PeriodicSolveResult {
  const ratios = problem.tubeRatios;
  const outcome = best?.outcome ?? null;
  const rings = outcome?.rings ?? problem.rings;
  const lattice: Lattice = outcome?.lattice ?? problem.lattice;
  const tube = outcome?.tube ?? 0;
  const verification: Verification = best?.verification ?? {
    ok: false, minClearance: 0, linkingPreserved: false, tubeWithinRadius: false,
    messages: [`no start produced a configuration: all ${starts.length} failed`, ...errors],
  };
  let status: SolveStatus = outcome?.status ?? 'failed';
  if (outcome && (status === 'optimal' || status === 'stalled') && !verification.ok) {
    status = 'failed';
    verification.messages.push('the solver reported a feasible weave that the independent check rejects');
  }
  const resultRings: ResultRing[] = rings.map((r, i) => {
    const ti = tube * (ratios[i] ?? 1);
    return {
      name: r.name, center: [r.center[0], r.center[1], r.center[2]], normal: [r.normal[0], r.normal[1], r.normal[2]],
      radius: r.radius, tube: ti, aspectRatio: ti > 0 ? (r.radius - ti) / ti : 0,
    };
  });
  const m = rings.length;
  const linking = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  for (const l of problem.links) {
    if (l.i !== l.j && l.shift.every((s) => s === 0)) linking[l.i]![l.j] = linking[l.j]![l.i] = l.linking;
  }
  const certificate: Certificate = outcome?.certificate ?? {
    method: 'none', balanceResidual: 0, maxViolation: 0, activeStruts: 0, certified: false, note: 'no solve finished',
  };
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
    format: RESULT_FORMAT,
    command: options.command,
    spec: options.spec,
    units: options.units,
    status,
    tube,
    tubeOverCore: tube / Math.min(...rings.map((r) => r.radius)),
    aspectRatio: Math.max(...resultRings.map((r) => r.aspectRatio)),
    tubeRatios: ratios.slice(),
    rings: resultRings,
    linking,
    symmetry: null,
    lattice: { vectors: lattice.vectors.map((v) => [v[0], v[1], v[2]]) },
    contacts: (outcome?.contacts ?? []).map(({ shift: _s, ...c }) => c),
    certificate,
    bound: withGap(periodicBound(problem), tube),
    starts,
    verification,
    periodic,
    elapsedSeconds,
  };
}
