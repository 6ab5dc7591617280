// The start loop shared by the ring multistart and the weave multistart (both in multistart.ts): seeded
// starts on the worker pool (a WebAssembly abort ends only its worker), every outcome checked as it arrives
// by the caller's independent check, progress reported, and the best verified start chosen; plus the parts
// of the result file both fill the same way.
import { tightestRing } from '../../model/orbit.js';
import { CLEARANCE_TOLERANCE } from '../../check/verify.js';
import { lastGains, RESULT_FORMAT, type Certificate, type ResultRing, type SolveResult, type StartRecord, type Verification } from '../../model/result.js';
import type { Ring, SolveStatus } from '../../model/types.js';
import { runPool, type Algorithm, type PoolResult, type PoolTask } from './pool.js';
import type { SolveOutcome } from './problem.js';

/**
 * Outer iterations per start. The time limit (--time-limit) is what bounds a run; this only stops a start
 * that keeps stepping without end. Measured need at 1e-9: necklace:64 451, necklace:128 351, the jammed
 * 6-ring layout of bench/data 450–570 (bench/scaling.ts, bench/inflate.ts).
 */
export const DEFAULT_MAX_ITERATIONS = 2000;
export const DEFAULT_PERTURBATION = 0.05;
/** Two tubes this close (times tol) count as equal when choosing between starts. */
const TIE_FACTOR = 10;

export interface StartLoopOptions {
  starts: number;
  workers: number;
  seed: number;
  /** Relative tolerance on the tube radius (dimensionless). */
  tol: number;
  maxIterations?: number;
  /** Start perturbation relative to each ring's radius (dimensionless); start 0 is never perturbed. */
  perturbation?: number;
  algorithm?: Algorithm;
  /** The outer loop's step (SolveOptions.step); the second-order step unless told otherwise. */
  step?: 'sqp' | 'proximal';
  /** Wall-clock seconds for the whole run: every start's outer loop stops then and reports what it has. */
  timeLimit?: number;
  onProgress?: (event: StartProgress) => void;
  /** Heard now and then while a start runs: which start, its outer iteration and current tube (layout units). */
  onIteration?: (event: StartHeartbeat) => void;
  /**
   * Stop once a start attains a proven upper bound (the caller's `attains`: for rings, the packing bound with
   * the independent check passed): later starts cannot do better. The starts after the first one that attains
   * it are not run, or, if a worker had already begun one, not counted, so the result is the same on any
   * number of workers; the result lists only the starts up to that one.
   */
  stopAtBound?: boolean;
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

export interface StartHeartbeat {
  start: number;
  iteration: number;
  tube: number;
}

/** One finished start with the independent check of its outcome. */
export interface CheckedStart<O extends SolveOutcome> {
  result: PoolResult;
  outcome: O | null;
  verification: Verification | null;
}

export interface StartsRun<O extends SolveOutcome> {
  /** The chosen start (see pickBest), null when no start produced an outcome. */
  best: CheckedStart<O> | null;
  starts: StartRecord[];
  /** Every failed attempt, prefixed by its start. */
  errors: string[];
}

/** Seed of start k: seeds travel with the tasks so the answer does not depend on the worker count. */
export function startSeed(seed: number, k: number): number {
  return seed * 1000003 + k;
}

/**
 * Run the starts of `problem` on the pool; `verify` checks an outcome with no help from the solver, at a
 * clearance tolerance no tighter than the tie tolerance (a tube within it of the best counts as equal).
 */
export async function runStarts<O extends SolveOutcome>(
  problem: PoolTask['problem'], options: StartLoopOptions, verify: (outcome: O, clearanceTolerance: number) => Verification,
  attains?: (outcome: O) => boolean,
): Promise<StartsRun<O>> {
  const tasks: PoolTask[] = [];
  // One deadline for all starts, on the wall clock every worker shares.
  const deadline = options.timeLimit !== undefined ? Date.now() + 1000 * options.timeLimit : undefined;
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
        ...(options.step !== undefined ? { step: options.step } : {}),
        ...(deadline !== undefined ? { deadline } : {}),
      },
    };
    const abort = options.simulateAbort?.find((s) => s.start === k);
    if (abort) task.simulateAbort = abort.algorithms;
    tasks.push(task);
  }

  const clearanceTolerance = Math.max(CLEARANCE_TOLERANCE, TIE_FACTOR * options.tol);
  const checked: CheckedStart<O>[] = new Array(tasks.length);
  let done = 0;
  let bestTube = NaN;
  /** First start (by index) that attained the bound: later ones are skipped and not counted. */
  let last = tasks.length - 1;
  const onIteration = options.onIteration;
  await runPool(tasks, {
    workers: options.workers,
    skip: (index) => index > last,
    ...(onIteration ? { onIteration: (start: number, iteration: number, tube: number) => onIteration({ start, iteration, tube }) } : {}),
    onResult: (r) => {
      const outcome = r.outcome as O | null;
      const c: CheckedStart<O> = { result: r, outcome, verification: outcome ? verify(outcome, clearanceTolerance) : null };
      checked[r.id] = c;
      done++;
      if (options.stopAtBound && attains && usable(c) && attains(outcome!)) last = Math.min(last, r.id);
      if (usable(c) && !(outcome!.tube <= bestTube)) bestTube = outcome!.tube;
      options.onProgress?.({
        done,
        total: tasks.length,
        start: r.id,
        seed: tasks[r.id]!.options.seed,
        status: outcome?.status ?? 'failed',
        tube: outcome?.tube ?? NaN,
        retries: r.retries,
        errors: r.errors,
        bestTube,
      });
    },
  });

  checked.length = last + 1;
  const starts: StartRecord[] = checked.map((c, k) => ({
    seed: tasks[k]!.options.seed,
    status: c.outcome?.status ?? 'failed',
    tube: c.outcome?.tube ?? 0,
    iterations: c.outcome?.iterations ?? 0,
    history: c.outcome?.history ?? [],
    lastGains: lastGains(c.outcome?.history ?? []),
    retries: c.result.retries,
    stopReason: c.outcome ? stopReasonOf(c.outcome) : `solver failure: ${c.result.errors.at(-1) ?? 'no outcome'}`,
  }));
  const errors = checked.flatMap((c) => c.result.errors.map((e) => `start ${c.result.id}: ${e}`));
  return { best: pickBest(checked, options.tol), starts, errors };
}

/**
 * Status, verification and certificate of the result file from the chosen start. A feasible outcome the
 * independent check rejects is reported as 'failed' (`what` names it in the message: "configuration",
 * "weave").
 */
export function settleBest<O extends SolveOutcome>(
  run: StartsRun<O>, what: string,
): { outcome: O | null; status: SolveStatus; verification: Verification; certificate: Certificate; stopReason: string | null } {
  const { best, starts, errors } = run;
  const outcome = best?.outcome ?? null;
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
    verification.messages.push(`the solver reported a feasible ${what} that the independent check rejects`);
  }
  const certificate: Certificate = outcome?.certificate ?? {
    method: 'none',
    balanceResidual: 0,
    maxViolation: 0,
    activeStruts: 0,
    certified: false,
    note: 'no solve finished',
  };
  // Not certified: say why (the chosen start's stop, or what failed), so the tube and the gap are read rightly.
  let stopReason: string | null = null;
  if (status === 'failed' && outcome && (outcome.status === 'optimal' || outcome.status === 'stalled')) {
    stopReason = 'the independent check rejected the solver\'s configuration';
  } else if (!(status === 'optimal' && certificate.certified)) {
    stopReason = outcome ? stopReasonOf(outcome) : `solver failure: every start failed${errors.length > 0 ? ` (${errors.at(-1)})` : ''}`;
  }
  return { outcome, status, verification, certificate, stopReason };
}

/**
 * Why a start stopped, in words: 'time limit', 'iteration limit', 'solver failure: ...', or the outer loop's own
 * reason ('polished', 'trust region collapsed', ...) with what it means for the certificate.
 */
export function stopReasonOf(o: SolveOutcome): string {
  const r = o.stopReason;
  if (o.status === 'infeasible') return `infeasible start: ${o.message.replace(/^infeasible start: /, '')}`;
  if (r === undefined) return o.message;
  if (r === 'the local solver failed') return 'solver failure: the local step solver failed repeatedly';
  if (r === 'time limit' || r === 'iteration limit' || o.certificate.certified) return r;
  return `${r}; the certificate does not hold (see the certificate note)`;
}

/** The fields every result file starts with, `format` to `rings`; ring i's tube is tube · ratios[i]. */
export function resultHead(
  options: { spec: string; command: string; units: string | null }, status: SolveStatus, tube: number,
  rings: readonly Ring[], ratios: readonly number[],
): Pick<SolveResult, 'format' | 'command' | 'spec' | 'units' | 'status' | 'tube' | 'tubeOverCore' | 'aspectRatio' | 'aspectRatioRing' | 'tubeRatios' | 'rings'> {
  const resultRings = resultRingsOf(rings, tube, ratios);
  return {
    format: RESULT_FORMAT,
    command: options.command,
    spec: options.spec,
    units: options.units,
    status,
    tube,
    tubeOverCore: tube / Math.min(...rings.map((r) => r.radius)),
    // Contract: the smallest aspect ratio over the rings (the tightest ring), and its name.
    ...tightestRing(resultRings),
    tubeRatios: ratios.slice(),
    rings: resultRings,
  };
}

// ---- helpers -------------------------------------------------------------------------------------

function usable<O extends SolveOutcome>(c: CheckedStart<O>): boolean {
  const o = c.outcome;
  return o !== null && (o.status === 'optimal' || o.status === 'stalled') && c.verification?.ok === true;
}

/**
 * Best start: verified feasible ones first, then the larger tube; tubes equal within TIE_FACTOR·tol
 * prefer a certified optimum, then the lower start index. With no verified start, the largest tube
 * is reported (the caller marks it 'failed').
 */
function resultRingsOf(rings: readonly Ring[], tube: number, ratios: readonly number[]): ResultRing[] {
  return rings.map((r, i) => {
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
}

function pickBest<O extends SolveOutcome>(checked: CheckedStart<O>[], tol: number): CheckedStart<O> | null {
  let best: CheckedStart<O> | null = null;
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
