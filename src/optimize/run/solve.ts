// Inflate: maximise the common tube over ring poses (see problem.ts).
//
// The outer trust-region loop (outerLoop.ts, shared with the weave solver periodicSolve.ts) runs on the
// ring chart: at the current poses the kernel finds every strut of every pair; struts and sampled
// near-contacts are linearised in a gauge-free chart (chart.ts, the symmetry imposed) and a proximal QP
// (localStep.ts: nlopt-js SLSQP, HiGHS as companion) proposes a step, judged on the exact kernel with the
// linking matrix (and any departure bound) re-checked. Once the predicted gain is small, Newton on the KKT
// system of the active set (polish.ts) finishes to ~1e-13, accepted only if the kernel agrees.
// Non-negative strut forces (certificate.ts) certify a Kuhn–Tucker point, and the curvature of the
// Lagrangian along the contacts (secondOrder.ts) tells a maximum from a saddle: a symmetric arrangement is
// often a saddle among all arrangements, and the loop steps off it along the ascent direction
// (saddleEscape.ts, at most MAX_ESCAPES times unless options.maxEscapes says otherwise) and climbs on.
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
import { runOuterLoop, type Assessed } from '../step/outerLoop.js';
import { perturbRings } from '../chart/perturb.js';
import { RING_POLISH, ringKktModel } from '../certify/polish.js';
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
  const run = await runOuterLoop(state, {
    scale, tMax: radiusLimit(radii(start), w), finalTol: ctx.finalTol, algorithm, stepMethod: options.step ?? 'sqp',
    maxIterations: options.maxIterations, maxEscapes: options.maxEscapes ?? MAX_ESCAPES, onIteration: options.onIteration,
    deadline: options.deadline,
    // Under a departure bound ε a step of s moves the departure by at most s: try steps that fit first.
    escapeSizes: dep ? [0.25 * dep.epsilon / scale, ...ESCAPE_STEPS_REL] : ESCAPE_STEPS_REL,
    chart: (s) => ringLoopChart(s, ctx),
    admissible: (s) => withinDeparture(s.rings, dep) && sameLinking(s.rings, problem.linking),
    polish: (s) => polishOnChart(s, ringSolve(ctx)),
    assess: (s, p) => assessOnChart(s, ringSolve(ctx), p),
  });
  const fin = run.fin;
  return {
    status: run.status, tube: fin.state.t, rings: withTubes(fin.state.rings, fin.state.t, w), iterations: run.iterations,
    history: run.history, contacts: fin.cert.contacts, certificate: fin.cert.certificate, message: run.message,
    stopReason: run.stopReason,
  };
}

// --- helpers ---

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
