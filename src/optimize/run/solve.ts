// Inflate: maximise the common tube over ring poses (see problem.ts).
//
// The outer trust-region loop (outerLoop.ts, shared with the weave solver periodicSolve.ts) runs on the
// ring chart: at the current poses the kernel finds every strut of every pair; struts and sampled
// near-contacts are linearised in a gauge-free chart (chart.ts, the symmetry imposed) and the SQP step
// (sqpStep.ts: exact Lagrangian Hessian, sparse interior-point QP; or, as the bench baseline, the
// first-order proximal QP of localStep.ts) proposes a step, judged on the exact kernel with the linking
// matrix (and any departure bound) re-checked. Once the predicted gain is small, Newton on the KKT system
// of the active set (polish.ts, up to DENSE_POLISH_MAX_FREE variables) finishes to ~1e-13, accepted only if
// the kernel agrees. Non-negative strut forces (certificate.ts: the step's own multipliers checked first,
// else NNLS) certify a Kuhn–Tucker point, and the curvature of the Lagrangian along the contacts
// (secondOrder.ts) tells a maximum from a saddle: a symmetric arrangement is often a saddle among all
// arrangements, and the loop steps off it along the ascent direction (saddleEscape.ts, at most MAX_ESCAPES
// times unless options.maxEscapes says otherwise) and climbs on.
// The polish and the assessment are those of every chart (solveOnChart.ts); this file sets up the ring
// problem (symmetry imposed or departure bounded, the start) and hands over the ring chart.
import { InputError } from '../../model/errors.js';
import { departureResidual, ringOrbits, symmetrize, trivialOrbits, type RingOrbits } from '../../model/symmetry.js';
import type { Ring, Symmetry } from '../../model/types.js';
import { buildChart, posedAt, ringsOf, type Chart, type GaugeGroup, type Posed } from '../chart/chart.js';
import { collectConstraints } from '../constraints/collect.js';
import { inflateOutcomeOut, inflateProblemIn, layoutFrame, optionsIn } from '../chart/layoutFrame.js';
import type { Constraint, DepartureSpec } from '../constraints/constraints.js';
import { readySolvers, type InnerAlgorithm } from '../step/localStep.js';
import { CREEP_STOP, runOuterLoop, type Assessed, type Polished, type StepForces } from '../step/outerLoop.js';
import { perturbRings } from '../chart/perturb.js';
import { RING_POLISH, ringKktModel } from '../certify/polish.js';
import { packingBound } from '../certify/bound.js';
import type { InflateProblem, SolveOptions, SolveOutcome } from './problem.js';
import { assessOnChart, polishOnChart, type ChartSolve, type SolveChart } from './solveOnChart.js';
import { linkingHolds, maxViolation, pairPlan, radiusLimit, scanPairs, trueTube, type PairPlan, type PairScan } from '../constraints/scan.js';
import {
  ESCAPE_STEPS_REL, MAX_ESCAPES, PERTURB_RETRIES, copyRing, noCertificate, withTubes,
} from '../step/trustRegion.js';

/**
 * Free variables above which the dense Newton polish (kktNewton.ts, O(n³) least squares) is skipped: the
 * SQP step converges on its own there (chain:40 needed one polish step after it), and above ~50 rings the
 * polish took half of the solve.
 */
const DENSE_POLISH_MAX_FREE = 300;

/** Relative rounding allowed on the departure bound. */
const DEPARTURE_ROUNDING_REL = 1e-12;

export async function solveInflate(problem: InflateProblem, options: SolveOptions): Promise<SolveOutcome> {
  validate(problem);
  // Solve centred and in units of the largest radius (layoutFrame.ts), then map back.
  const frame = layoutFrame(problem.rings, problem.symmetry ?? problem.departure?.symmetry ?? null);
  return inflateOutcomeOut(frame, await solveInFrame(inflateProblemIn(frame, problem), optionsIn(frame, options)), problem);
}

async function solveInFrame(problem: InflateProblem, options: SolveOptions): Promise<SolveOutcome> {
  await readySolvers();
  const w = problem.tubeRatios.slice();
  const n = problem.rings.length;
  const algorithm: InnerAlgorithm = options.algorithm ?? 'slsqp';
  // ε = 0 means "symmetric": impose the group instead of bounding the departure.
  let symmetry: Symmetry | null = problem.symmetry;
  let departure = problem.departure ?? null;
  if (departure && !(departure.epsilon > 0)) {
    symmetry = departure.symmetry;
    departure = null;
  }
  const orbits: RingOrbits = symmetry ? ringOrbits(problem.rings, symmetry) : trivialOrbits(n);
  let start: Ring[] = symmetry ? symmetrize(problem.rings, symmetry, orbits) : problem.rings.map(copyRing);
  const dep: DepartureSpec | null = departure
    ? { orbits: ringOrbits(departure.reference ?? start, departure.symmetry), epsilon: departure.epsilon } : null;
  const pairs = pairPlan(orbits, n);
  const scale = Math.min(...problem.rings.map((r) => r.radius));

  // Start: perturb from the seed, halving until the linking and the departure bound hold.
  let size = options.perturbation;
  let chosen: Ring[] | null = null;
  for (let k = 0; k <= PERTURB_RETRIES && chosen === null; k++, size /= 2) {
    let cand = perturbRings(start, orbits, options.seed, k === PERTURB_RETRIES ? 0 : size);
    if (dep) cand = shrinkDeparture(cand, dep);
    if (startIsValid(cand, problem.linking, w)) chosen = cand;
  }
  if (chosen === null) {
    return infeasible(start, w, 'the start rings intersect or do not have the required linking numbers');
  }
  start = chosen;

  const startScans = scanPairs(posedOf(start, orbits), pairs, w);
  const state: RingState = { rings: start, scans: startScans, t: trueTube(startScans, radii(start), w) };
  const gauge: GaugeGroup = dep ? { elements: dep.orbits.elements, origin: dep.orbits.origin } : { elements: orbits.elements, origin: orbits.origin };
  const ctx: Context = { orbits, pairs, w, dep, gauge, linking: problem.linking, scale, finalTol: Math.max(options.tol, 1e-15) };
  // Restarts near the bound for small links only: a restart climbs again from a perturbation of every ring,
  // about the cost of a new solve, and long chains and necklaces slow down near R/3 and recover by themselves
  // (necklace:24 stagnates ~20 iterations at 1.5e-5 below it, then converges).
  const restartable = dep === null && n <= RESTART_MAX_RINGS;
  const loopOptions = {
    scale, tMax: radiusLimit(radii(start), w), finalTol: ctx.finalTol, algorithm, stepMethod: options.step ?? 'sqp',
    maxIterations: options.maxIterations, maxEscapes: options.maxEscapes ?? MAX_ESCAPES, onIteration: options.onIteration,
    deadline: options.deadline,
    // The packing bound holds for every arrangement with this linking: a tube that reaches it is a global maximum.
    bound: packingBound(start, w, problem.linking)?.tube,
    creepStop: restartable,
    // Under a departure bound ε a step of s moves the departure by at most s: try steps that fit first.
    escapeSizes: dep ? [0.25 * dep.epsilon / scale, ...ESCAPE_STEPS_REL] : ESCAPE_STEPS_REL,
    chart: (s: RingState) => ringLoopChart(s, ctx),
    admissible: (s: RingState) => withinDeparture(s.rings, dep) && sameLinking(s.rings, problem.linking),
    polish: (s: RingState) => polishOnChart(s, ringSolve(ctx)),
    assess: (s: RingState, p: Polished<RingState> | null, f?: StepForces | null) => assessOnChart(s, ringSolve(ctx), p, f ?? null),
  };
  let run = await runOuterLoop(state, loopOptions);
  // Creeping near the packing bound (a degenerate maximiser): climb again from perturbations of the best
  // arrangement, within the same iteration budget; seeded from the start's seed, so any worker gets the same.
  if (restartable) {
    const report = options.onIteration;
    run = await restartNearBound(run, ctx, options, (s, maxIterations, done) => runOuterLoop(s, {
      ...loopOptions, maxIterations, onIteration: report && ((i: number, t: number) => report(done + i, t)),
    }));
  }
  const fin = run.fin;
  return {
    status: run.status, tube: fin.state.t, rings: withTubes(fin.state.rings, fin.state.t, w), iterations: run.iterations,
    history: run.history, contacts: fin.cert.contacts, certificate: fin.cert.certificate, message: run.message,
    stopReason: run.stopReason,
  };
}

// --- helpers ---

/**
 * Restarts from a stalled arrangement that crept near the packing bound, at most, and only up to this many rings.
 * Single solves of the free torus:3 from 43 seeds (5 % perturbations of the catalogue pose): 31 end certified
 * with 4 restarts, 41 with 8 (the slowest 0.9 s); a restart lands inside the maximising family about half
 * the time.
 */
const MAX_RESTARTS = 8;
const RESTART_MAX_RINGS = 8;
/** Size of a restart's perturbation (relative to each ring's radius, as SolveOptions.perturbation). */
const RESTART_PERTURBATION = 0.05;

type Run = Awaited<ReturnType<typeof runOuterLoop<RingState, Constraint, Posed, Final>>>;

/**
 * After a run that crept near the packing bound (outerLoop.ts CREEP_STOP), perturb the best arrangement and
 * climb again, up to MAX_RESTARTS times while iterations remain and each climb creeps again; keep the thickest
 * run (a certified one among equal tubes). Near a
 * degenerate maximiser the ascent is drawn into corners where contacts form a continuum; a perturbation of
 * 5 % of the radius lands in the basin of a regular point of the maximising family often enough (about half of
 * the restarts from a crept free torus:3, docs/free-torus3.md).
 */
async function restartNearBound(
  first: Run, ctx: Context, options: SolveOptions, climb: (s: RingState, maxIterations: number, done: number) => Promise<Run>,
): Promise<Run> {
  let best = first;
  let iterations = first.iterations;
  const history = first.history.slice();
  let last = first;
  let restarts = 0;
  const certified = (r: Run): boolean => r.status === 'optimal';
  for (let k = 1; k <= MAX_RESTARTS && last.stopReason === CREEP_STOP && !certified(best) && iterations < options.maxIterations; k++) {
    if (options.deadline !== undefined && Date.now() >= options.deadline) break;
    const from = best.fin.state.rings;
    let chosen: Ring[] | null = null;
    for (let h = 0, size = RESTART_PERTURBATION; h < PERTURB_RETRIES && chosen === null; h++, size /= 2) {
      const cand = perturbRings(from, ctx.orbits, restartSeed(options.seed, k), size);
      if (startIsValid(cand, ctx.linking, ctx.w)) chosen = cand;
    }
    if (chosen === null) break;
    const scans = scanPairs(posedOf(chosen, ctx.orbits), ctx.pairs, ctx.w);
    last = await climb({ rings: chosen, scans, t: trueTube(scans, radii(chosen), ctx.w) }, options.maxIterations - iterations, iterations);
    restarts++;
    iterations += last.iterations;
    history.push(...last.history);
    // As between starts: the thicker tube, a certified one among tubes equal to the tolerance.
    const tie = Math.abs(last.fin.state.t - best.fin.state.t) <= 10 * ctx.finalTol * best.fin.state.t;
    if (tie ? certified(last) && !certified(best) : last.fin.state.t > best.fin.state.t) best = last;
  }
  if (restarts === 0) return first;
  return {
    ...best, iterations, history,
    message:
      `${best.message}; restarted ${restarts} time(s) from perturbations of an arrangement that crept near the ` +
      `packing bound (${iterations} outer iterations in all)`,
  };
}

/** A restart's seed: fixed by the start's seed and the restart's number (0 would mean "no perturbation"). */
function restartSeed(seed: number, k: number): number {
  return ((seed * 7919 + k * 104729) % 2147483647) || k;
}

/** The poses with their pair scans and true tube. */
interface RingState {
  rings: Ring[];
  scans: PairScan[];
  t: number;
}

type Final = Assessed<RingState, Constraint>;

interface Context {
  orbits: RingOrbits;
  gauge: GaugeGroup;
  pairs: PairPlan;
  w: number[];
  dep: DepartureSpec | null;
  linking: number[][];
  scale: number;
  finalTol: number;
}

/** The ring chart at the poses, for the outer loop (gauge-free, symmetry imposed). */
function ringLoopChart(state: RingState, ctx: Context): SolveChart<RingState, Constraint, Posed> {
  const chart = buildChart(state.rings, ctx.orbits, ctx.gauge);
  return {
    nFree: chart.nFree,
    model: ringKktModel(chart, ctx.dep),
    constraints: (margin) => {
      const posed = posedAt(chart, new Float64Array(chart.nFree));
      return collectConstraints(chart, posed, state.scans, { t: state.t, margin, w: ctx.w, dep: ctx.dep, samples: true });
    },
    at: (z) => {
      const rings = ringsOf(chart, posedAt(chart, z));
      const scans = scanPairs(posedOf(rings, ctx.orbits), ctx.pairs, ctx.w);
      return { rings, scans, t: trueTube(scans, radii(rings), ctx.w) };
    },
  };
}

/** The ring chart for the shared polish and assessment (solveOnChart.ts). */
function ringSolve(ctx: Context): ChartSolve<RingState, Constraint, Posed, Final> {
  return {
    scale: ctx.scale, finalTol: ctx.finalTol,
    chart: (s) => ringLoopChart(s, ctx),
    admissible: (s) => sameLinking(s.rings, ctx.linking) && withinDeparture(s.rings, ctx.dep),
    maxViolation: (s) => maxViolation(s.scans, s.t),
    polishSettings: RING_POLISH, maxPolishFree: DENSE_POLISH_MAX_FREE,
    curvatureOnCopies: false, secondOrder: {}, escapeNeedsBalance: false,
    extend: (a) => a,
  };
}

function infeasible(rings: Ring[], w: number[], why: string): SolveOutcome {
  return {
    status: 'infeasible', tube: 0, rings: withTubes(rings, 0, w), iterations: 0, history: [], contacts: [],
    certificate: noCertificate(why), message: `infeasible start: ${why}`,
  };
}

function startIsValid(rings: Ring[], linking: number[][], w: number[]): boolean {
  if (!sameLinking(rings, linking)) return false;
  const orbits = trivialOrbits(rings.length);
  return trueTube(scanPairs(posedOf(rings, orbits), pairPlan(orbits, rings.length), w), radii(rings), w) > 0;
}

/** Linking numbers as intended, computed only where bounding spheres meet (scan.ts linkingHolds). */
function sameLinking(rings: Ring[], linking: number[][]): boolean {
  return linkingHolds(rings, linking);
}

/** The departure bound holds (up to rounding of the projection). */
function withinDeparture(rings: Ring[], dep: DepartureSpec | null): boolean {
  if (dep === null) return true;
  return Math.sqrt(departureResidual(rings, dep.orbits).squared) <= dep.epsilon * (1 + DEPARTURE_ROUNDING_REL);
}

/** Bring the departure from symmetry under the bound by shrinking the asymmetric part of the poses. */
function shrinkDeparture(rings: Ring[], dep: DepartureSpec): Ring[] {
  let cur = rings;
  for (let k = 0; k < 20; k++) {
    const res = departureResidual(cur, dep.orbits);
    const D = Math.sqrt(res.squared);
    if (D <= dep.epsilon) return cur;
    const f = (0.95 * dep.epsilon) / D;
    cur = cur.map((r, i) => {
      const c = [0, 1, 2].map((j) => r.center[j]! - (1 - f) * res.centers[3 * i + j]!);
      const nn = [0, 1, 2].map((j) => r.normal[j]! - ((1 - f) * res.normals[3 * i + j]!) / (r.radius * r.radius));
      const l = Math.hypot(nn[0]!, nn[1]!, nn[2]!);
      return { ...r, center: [c[0]!, c[1]!, c[2]!], normal: [nn[0]! / l, nn[1]! / l, nn[2]! / l] };
    });
  }
  return cur;
}

function posedOf(rings: Ring[], orbits: RingOrbits): Posed {
  const chart: Chart = buildChart(rings, orbits, false);
  return posedAt(chart, new Float64Array(chart.nFree));
}

function radii(rings: Ring[]): Float64Array {
  return Float64Array.from(rings.map((r) => r.radius));
}

function validate(p: InflateProblem): void {
  const n = p.rings.length;
  if (n === 0) throw new InputError('rings: at least one ring is needed; add rings to the layout');
  if (p.tubeRatios.length !== n) {
    throw new InputError(`tubeRatios: ${p.tubeRatios.length} entries for ${n} rings; give one ratio per ring`);
  }
  p.tubeRatios.forEach((w, i) => {
    if (!(w > 0) || !Number.isFinite(w)) {
      throw new InputError(`ring ${p.rings[i]!.name}: tube ratio ${w} must be a finite number > 0`);
    }
  });
  p.rings.forEach((r) => {
    if (!(r.radius > 0) || !Number.isFinite(r.radius)) {
      throw new InputError(`ring ${r.name}: radius ${r.radius} must be a finite number > 0`);
    }
  });
  if (p.linking.length !== n || p.linking.some((row) => row.length !== n)) {
    throw new InputError(`linking: expected a ${n} x ${n} matrix of linking numbers; compute it with linkingMatrix(rings)`);
  }
  if (p.departure && !(p.departure.epsilon >= 0)) {
    throw new InputError(`departure: epsilon ${p.departure.epsilon} must be >= 0 (layout units)`);
  }
  if (p.departure?.reference && p.departure.reference.length !== n) {
    throw new InputError(`departure.reference: ${p.departure.reference.length} rings for ${n}; give the reference poses of the same rings`);
  }
}

export type { Constraint };
