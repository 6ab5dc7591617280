// Inflate a periodic arrangement (a weave): maximise the common tube over the cell's ring poses and the
// lattice vectors (problem.ts PeriodicProblem). The outer trust-region loop is that of solve.ts (outerLoop.ts) on a
// periodic chart: at the current arrangement the kernel finds every strut between a cell ring and every
// image within reach; the struts are linearised (images chained to their ring and to the lattice vectors)
// and the proximal QP of localStep.ts proposes a step (HiGHS bounded in time), judged on the exact kernel
// (true tube, linked pairs unchanged). Once the predicted gain is small, Newton on the KKT system
// (polish.ts, the periodic settings) finishes; non-negative strut forces (certificate.ts) show a Kuhn–Tucker
// point and the curvature of the Lagrangian along the contacts (secondOrder.ts, on the periodic chart) tells
// a maximum from a saddle. At a saddle the loop steps off along the ascent direction, lattice vectors
// included (saddleEscape.ts), and climbs again, as the ring solver does; a saddle it ends on is reported,
// not certified. The polish and the assessment are those of every chart (solveOnChart.ts); this file sets
// up the periodic problem and hands over the periodic chart with what differs on it (weaveSolve).
import { InputError } from '../../model/errors.js';
import { periodicLinks, sameLinks } from '../../model/periodic.js';
import { MAX_LATTICE_REACH } from '../../model/ringPairs.js';
import type { Lattice, Ring } from '../../model/types.js';
import type { certify } from '../certify/certificate.js';
import { layoutFrame, optionsIn, periodicOutcomeOut, periodicProblemIn } from '../chart/layoutFrame.js';
import { readySolvers, type InnerAlgorithm } from '../step/localStep.js';
import { runOuterLoop, type Assessed } from '../step/outerLoop.js';
import { seededRandom } from '../chart/perturb.js';
import { buildPeriodicChart, periodicPosedAt, stateOf, type PeriodicChart, type PeriodicPosed } from '../chart/periodicChart.js';
import type { PeriodicConstraint } from '../constraints/constraints.js';
import { collectPeriodicConstraints } from '../constraints/collect.js';
import { PERIODIC_POLISH, periodicKktModel } from '../certify/polish.js';
import { assessOnChart, polishOnChart, type ChartSolve, type SolveChart } from './solveOnChart.js';
import type { PeriodicContact, PeriodicOutcome, PeriodicProblem } from './problem.js';
import type { SolveOptions } from './problem.js';
import { maxViolation, periodicNearPairs, scanMargin, scanPeriodic, trueTube, type PeriodicPair, type PeriodicScan } from '../constraints/scan.js';
import {
  ESCAPE_STEPS_REL, MAX_ESCAPES, PERTURB_RETRIES, copyRing, noCertificate, withTubes,
} from '../step/trustRegion.js';

export async function solvePeriodic(problem: PeriodicProblem, options: SolveOptions): Promise<PeriodicOutcome> {
  validate(problem);
  // Solve centred and in units of the largest radius (layoutFrame.ts), then map back.
  const frame = layoutFrame(problem.rings);
  return periodicOutcomeOut(frame, await solveInFrame(periodicProblemIn(frame, problem), optionsIn(frame, options)), problem);
}

async function solveInFrame(problem: PeriodicProblem, options: SolveOptions): Promise<PeriodicOutcome> {
  await readySolvers();
  const w = problem.tubeRatios.slice();
  const R = Float64Array.from(problem.rings.map((r) => r.radius));
  const scale = Math.min(...R);
  const tMax = Math.min(...problem.rings.map((r, i) => r.radius / w[i]!));
  const algorithm: InnerAlgorithm = options.algorithm ?? 'slsqp';
  const maxEscapes = options.maxEscapes ?? MAX_ESCAPES;
  const ctx: Ctx = { w, R, scale, tMax, links: problem.links, finalTol: Math.max(options.tol, 1e-15), maxEscapes };

  // Start: perturb from the seed, halving until the linked pairs hold and nothing touches.
  let size = options.perturbation;
  let start: State | null = null;
  for (let k = 0; k <= PERTURB_RETRIES && start === null; k++, size /= 2) {
    const cand = perturb(problem.rings, problem.lattice, options.seed, k === PERTURB_RETRIES ? 0 : size);
    const s = stateAt(cand.rings, cand.lattice, ctx);
    if (s.t > 0 && sameLinks(problem.links, periodicLinks(s.rings, s.lattice))) start = s;
  }
  if (start === null) return infeasible(problem, 'the start rings intersect or do not have the pattern\'s linked pairs');

  const run = await runOuterLoop(start, {
    scale, tMax, finalTol: ctx.finalTol, algorithm, stepMethod: options.step ?? 'sqp',
    maxIterations: options.maxIterations, maxEscapes: ctx.maxEscapes, onIteration: options.onIteration,
    deadline: options.deadline,
    escapeSizes: ESCAPE_STEPS_REL,
    chart: (s) => periodicLoopChart(s, ctx),
    admissible: (s) => sameLinks(ctx.links, periodicLinks(s.rings, s.lattice)),
    polish: (s) => polishOnChart(s, weaveSolve(ctx)),
    assess: (s, p) => assessOnChart(s, weaveSolve(ctx), p),
  });
  const fin = run.fin.state;
  return {
    status: run.status, tube: fin.t, rings: withTubes(fin.rings, fin.t, w), lattice: copyLattice(fin.lattice),
    iterations: run.iterations, history: run.history, contacts: run.fin.contacts, certificate: run.fin.cert.certificate,
    message: run.message, stopReason: run.stopReason,
  };
}

// ---- helpers -------------------------------------------------------------------------------------

interface Ctx {
  w: number[];
  R: Float64Array;
  scale: number;
  tMax: number;
  links: PeriodicProblem['links'];
  finalTol: number;
  maxEscapes: number;
}

interface State {
  rings: Ring[];
  lattice: Lattice;
  scans: PeriodicScan[];
  t: number;
}

interface Final extends Assessed<State, PeriodicConstraint> {
  contacts: PeriodicContact[];
}

/** The periodic chart at the arrangement, for the outer loop. */
function periodicLoopChart(state: State, ctx: Ctx): SolveChart<State, PeriodicConstraint, PeriodicPosed> {
  const pc = buildPeriodicChart(state.rings, state.lattice);
  return {
    nFree: pc.nFree,
    model: periodicKktModel(pc),
    constraints: (margin) => collect(pc, state, ctx, margin),
    at: (z) => {
      const trial = stateOf(pc, periodicPosedAt(pc, z));
      return stateAt(trial.rings, trial.lattice, ctx);
    },
  };
}

/** Scan every pair within reach and take the true tube. */
function stateAt(rings: Ring[], lattice: Lattice, ctx: Ctx): State {
  const pc = buildPeriodicChart(rings, lattice);
  const pp = periodicPosedAt(pc, new Float64Array(pc.nFree));
  const margin = scanMargin(ctx.R, ctx.w);
  // A step that makes the lattice vectors nearly parallel would need thousands of copies: reject it.
  const pairs: PeriodicPair[] | null = periodicNearPairs(rings, lattice, margin, MAX_LATTICE_REACH);
  if (pairs === null) return { rings, lattice, scans: [], t: -Infinity };
  const scans = scanPeriodic(pp, pairs, ctx.w);
  return { rings, lattice, scans, t: trueTube(scans, ctx.R, ctx.w) };
}

/** Struts within `margin` (layout units) of touching, with gradients, and the radius limit. */
function collect(pc: PeriodicChart, state: State, ctx: Ctx, margin: number): PeriodicConstraint[] {
  const pp = periodicPosedAt(pc, new Float64Array(pc.nFree));
  return collectPeriodicConstraints(pc, pp, state.scans, { t: state.t, margin, w: ctx.w });
}

/**
 * The periodic chart for the shared polish and assessment (solveOnChart.ts): every step of the polish by
 * the SVD, curvature on copies, certified only with a second-order test, and at a saddle an escape is
 * taken only where the forces balance (else kept as the way off while thresholds are tried).
 */
function weaveSolve(ctx: Ctx): ChartSolve<State, PeriodicConstraint, PeriodicPosed, Final> {
  return {
    scale: ctx.scale, finalTol: ctx.finalTol,
    chart: (s) => periodicLoopChart(s, ctx),
    admissible: (s) => sameLinks(ctx.links, periodicLinks(s.rings, s.lattice)),
    maxViolation: (s) => maxViolation(s.scans, s.t),
    polishSettings: PERIODIC_POLISH, maxPolishFree: Infinity,
    curvatureOnCopies: true, secondOrder: { requireSecondOrder: true, saddleAdvice: saddleAdvice(ctx.maxEscapes) }, escapeNeedsBalance: true,
    extend: (a, active) => ({ ...a, ...withShifts(a.cert, active) }),
  };
}

/** What a weave saddle's note adds when the solve ends on one. */
function saddleAdvice(maxEscapes: number): string {
  const why = maxEscapes > 0
    ? `The solver steps off at most ${maxEscapes} saddle${maxEscapes === 1 ? '' : 's'} per start and did not leave this one`
    : 'This solve did not try to step off saddles (maxEscapes 0)';
  return `${why}: run more starts (--starts) or another --seed to look for the thicker weave.`;
}

/** certify lists contacts in the order of the active struts: give each the shift of its image. */
function withShifts(cert: ReturnType<typeof certify>, active: readonly PeriodicConstraint[]): { cert: ReturnType<typeof certify>; contacts: PeriodicContact[] } {
  const struts = active.filter((k) => k.kind === 'strut');
  return { cert, contacts: cert.contacts.map((c, k) => ({ ...c, shift: struts[k]!.shift.slice() })) };
}

/** Move every ring by up to size·R (centre, layout units; tilt, radians) and every lattice vector by up to size·R. */
function perturb(rings: readonly Ring[], lattice: Lattice, seed: number, size: number): { rings: Ring[]; lattice: Lattice } {
  if (seed === 0 || !(size > 0)) return { rings: rings.map(copyRing), lattice: copyLattice(lattice) };
  const pc = buildPeriodicChart(rings, lattice);
  const random = seededRandom(seed);
  const Rmin = Math.min(...rings.map((r) => r.radius));
  const z = new Float64Array(pc.nFree);
  for (let k = 0; k < pc.nFree; k++) {
    const f = pc.free[k]!;
    const R = f < pc.ring.nFull ? rings[Math.floor(f / 5)]!.radius : Rmin;
    z[k] = (2 * random() - 1) * size * R;
  }
  return stateOf(pc, periodicPosedAt(pc, z));
}

function infeasible(problem: PeriodicProblem, why: string): PeriodicOutcome {
  return {
    status: 'infeasible', tube: 0, rings: withTubes(problem.rings, 0, problem.tubeRatios), lattice: copyLattice(problem.lattice),
    iterations: 0, history: [], contacts: [], certificate: noCertificate(why), message: `infeasible start: ${why}`,
  };
}

function copyLattice(l: Lattice): Lattice {
  return { vectors: l.vectors.map((v) => [v[0], v[1], v[2]]) };
}

function validate(p: PeriodicProblem): void {
  const n = p.rings.length;
  if (n === 0) throw new InputError('rings: a periodic layout needs at least one ring in its cell; add rings');
  if (p.tubeRatios.length !== n) throw new InputError(`tubeRatios: ${p.tubeRatios.length} entries for ${n} rings; give one ratio per ring`);
  p.tubeRatios.forEach((w, i) => {
    if (!(w > 0) || !Number.isFinite(w)) throw new InputError(`ring ${p.rings[i]!.name}: tube ratio ${w} must be a finite number > 0`);
  });
  const k = p.lattice.vectors.length;
  if (k < 1 || k > 2) throw new InputError(`lattice: ${k} vectors; give 1 (chain) or 2 (sheet)`);
  if (p.links.length === 0) throw new InputError('links: the pattern links no rings, so nothing holds the weave together; pass rings through each other');
}
