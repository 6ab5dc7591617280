// Multistart inflation: run several seeded starts on the worker pool, check every outcome with the
// independent invariant checker (src/check/verify.ts), keep the best verified one and package it as
// a result file (format thickring-result/1).
import { verifyConfiguration, CLEARANCE_TOLERANCE } from '../check/verify.js';
import { RESULT_FORMAT, type Certificate, type ResultRing, type SolveResult, type StartRecord, type Verification } from '../model/result.js';
import type { Ring, SolveStatus } from '../model/types.js';
import { ringOrbits } from '../model/symmetry.js';
import { packingBound, withGap } from './bound.js';
import { runPool, type Algorithm, type PoolResult, type PoolTask } from './pool.js';
import type { InflateProblem, SolveOutcome } from './problem.js';

export interface MultistartOptions {
  starts: number;
  workers: number;
  seed: number;
  /** Relative tolerance on the tube radius (dimensionless). */
  tol: number;
  maxIterations?: number;
  /** Start perturbation relative to each ring's radius (dimensionless); start 0 is never perturbed. */
  perturbation?: number;
  algorithm?: Algorithm;
  /** Recorded in the result file. */
  spec: string;
  command: string;
  units: string | null;
  onProgress?: (event: StartProgress) => void;
  /** Test-only: make the worker die, as on a WebAssembly abort, for these starts and algorithms. */
  simulateAbort?: { start: number; algorithms: Algorithm[] }[];
}

export interface StartProgress {
  /** Starts finished so far, and in all. */
  done: number;
  total: number;
  /** The start that just finished. */
  start: number;
  seed: number;
  status: SolveStatus;
  tube: number;
  retries: number;
  /** Failed attempts of this start (worker crashes, errors), one line each. */
  errors: string[];
  /** Best verified tube so far (layout units), NaN when none yet. */
  bestTube: number;
}

/** Seed of start k: seeds travel with the tasks so the answer does not depend on the worker count. */
export function startSeed(seed: number, k: number): number {
  return seed * 1000003 + k;
}

export const DEFAULT_MAX_ITERATIONS = 400;
export const DEFAULT_PERTURBATION = 0.05;
/** Two tubes this close (times tol) count as equal when choosing between starts. */
const TIE_FACTOR = 10;

export async function runMultistart(problem: InflateProblem, options: MultistartOptions): Promise<SolveResult> {
  const t0 = performance.now();
  // Surface a symmetry that does not fit the rings here, as bad input, not as a failed start in a worker.
  if (problem.symmetry) ringOrbits(problem.rings, problem.symmetry);
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

  const clearanceTolerance = Math.max(CLEARANCE_TOLERANCE, TIE_FACTOR * options.tol);
  const checked: Checked[] = new Array(tasks.length);
  let done = 0;
  let bestTube = NaN;
  const check = (r: PoolResult): Checked => {
    const verification = r.outcome ? verifyOutcome(problem, r.outcome, clearanceTolerance) : null;
    return { result: r, verification };
  };
  await runPool(tasks, {
    workers: options.workers,
    onResult: (r) => {
      const c = check(r);
      checked[r.id] = c;
      done++;
      if (usable(c) && !(c.result.outcome!.tube <= bestTube)) bestTube = c.result.outcome!.tube;
      options.onProgress?.({
        done,
        total: tasks.length,
        start: r.id,
        seed: tasks[r.id]!.options.seed,
        status: r.outcome?.status ?? 'failed',
        tube: r.outcome?.tube ?? NaN,
        retries: r.retries,
        errors: r.errors,
        bestTube,
      });
    },
  });

  const best = pickBest(checked, options.tol);
  const starts: StartRecord[] = checked.map((c, k) => ({
    seed: tasks[k]!.options.seed,
    status: c.result.outcome?.status ?? 'failed',
    tube: c.result.outcome?.tube ?? 0,
    iterations: c.result.outcome?.iterations ?? 0,
    history: c.result.outcome?.history ?? [],
    retries: c.result.retries,
  }));
  const errors = checked.flatMap((c) => c.result.errors.map((e) => `start ${c.result.id}: ${e}`));
  return buildResult(problem, options, best, starts, errors, (performance.now() - t0) / 1000);
}

interface Checked {
  result: PoolResult;
  verification: Verification | null;
}

/** Verify a solver outcome against the problem's intended link, with no help from the solver. */
export function verifyOutcome(problem: InflateProblem, outcome: SolveOutcome, clearanceTolerance = CLEARANCE_TOLERANCE): Verification {
  return verifyConfiguration(
    { rings: outcome.rings, tube: outcome.tube, tubeRatios: problem.tubeRatios, linking: problem.linking },
    { clearanceTolerance },
  );
}

function usable(c: Checked): boolean {
  const o = c.result.outcome;
  return o !== null && (o.status === 'optimal' || o.status === 'stalled') && c.verification?.ok === true;
}

/**
 * Best start: verified feasible ones first, then the larger tube; tubes equal within TIE_FACTOR·tol
 * prefer a certified optimum, then the lower start index. With no verified start, the largest tube
 * is reported with status 'failed'.
 */
function pickBest(checked: Checked[], tol: number): Checked | null {
  let best: Checked | null = null;
  for (const c of checked) {
    if (!usable(c)) continue;
    if (best === null) { best = c; continue; }
    const a = c.result.outcome!, b = best.result.outcome!;
    const tie = Math.abs(a.tube - b.tube) <= TIE_FACTOR * tol * Math.max(a.tube, b.tube);
    if (tie ? a.certificate.certified && !b.certificate.certified : a.tube > b.tube) best = c;
  }
  if (best) return best;
  for (const c of checked) {
    if (!c.result.outcome) continue;
    if (best === null || c.result.outcome.tube > best.result.outcome!.tube) best = c;
  }
  return best;
}

function buildResult(
  problem: InflateProblem,
  options: MultistartOptions,
  best: Checked | null,
  starts: StartRecord[],
  errors: string[],
  elapsedSeconds: number,
): SolveResult {
  const ratios = problem.tubeRatios;
  const outcome = best?.result.outcome ?? null;
  const rings: Ring[] = outcome?.rings ?? problem.rings;
  const tube = outcome?.tube ?? 0;
  const verification: Verification = best?.verification ?? {
    ok: false,
    minClearance: 0,
    linkingPreserved: false,
    tubeWithinRadius: false,
    messages: [`no start produced a configuration: all ${starts.length} failed`, ...errors],
  };
  let status: SolveStatus = outcome?.status ?? 'failed';
  if (outcome && (status === 'optimal' || status === 'stalled') && !verification.ok) {
    status = 'failed';
    verification.messages.push('the solver reported a feasible configuration that the independent check rejects');
  }
  const resultRings: ResultRing[] = rings.map((r, i) => {
    const ti = tube * (ratios[i] ?? 1);
    return {
      name: r.name,
      center: [r.center[0], r.center[1], r.center[2]],
      normal: [r.normal[0], r.normal[1], r.normal[2]],
      radius: r.radius,
      tube: ti,
      // No tube (a failed solve) has no aspect ratio; 0 keeps the file finite JSON.
      aspectRatio: ti > 0 ? (r.radius - ti) / ti : 0,
    };
  });
  const aspectRatio = Math.max(...resultRings.map((r) => r.aspectRatio));
  const minRadius = Math.min(...rings.map((r) => r.radius));
  const certificate: Certificate = outcome?.certificate ?? {
    method: 'none',
    balanceResidual: 0,
    maxViolation: 0,
    activeStruts: 0,
    certified: false,
    note: 'no solve finished',
  };
  const result: SolveResult = {
    format: RESULT_FORMAT,
    command: options.command,
    spec: options.spec,
    units: options.units,
    status,
    tube,
    tubeOverCore: tube / minRadius,
    aspectRatio,
    tubeRatios: ratios.slice(),
    rings: resultRings,
    linking: problem.linking.map((row) => row.slice()),
    symmetry: problem.symmetry,
    contacts: outcome?.contacts ?? [],
    certificate,
    bound: withGap(packingBound(rings, ratios, problem.linking), tube),
    starts,
    verification,
    elapsedSeconds,
  };
  return result;
}
