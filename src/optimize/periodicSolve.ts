// Inflate a periodic arrangement (a weave): maximise the common tube over the cell's ring poses and the
// lattice vectors (periodicProblem.ts). The method is that of solve.ts on a periodic chart: at the current
// arrangement the kernel finds every strut between a cell ring and every image within reach; the struts
// are linearised (images chained to their ring and to the lattice vectors) and the proximal QP of
// localStep.ts proposes a step (HiGHS bounded in time), judged on the exact kernel (true tube, linked pairs
// unchanged) with a trust radius (the settings of solve.ts, shared in trustRegion.ts). Once the predicted
// gain is small, Newton on the KKT system (periodicPolish.ts) finishes; non-negative strut forces
// (certificate.ts) show a Kuhn–Tucker point and the curvature of the Lagrangian along the contacts
// (secondOrder.ts, on the periodic chart) tells a maximum from a saddle, as in solve.ts. A saddle is
// reported, not certified; the saddle escape of solve.ts is not done here.
import { InputError } from '../model/errors.js';
import { periodicLinks, sameLinks } from '../model/periodic.js';
import { MAX_LATTICE_REACH, latticeReach, ringPairs } from '../model/ringPairs.js';
import type { Lattice, Ring } from '../model/types.js';
import { certify, CURVATURE_TOL } from './certificate.js';
import { localStep, readySolvers, type InnerAlgorithm } from './localStep.js';
import { seededRandom } from './perturb.js';
import { buildPeriodicChart, periodicPosedAt, stateOf, type PeriodicChart } from './periodicChart.js';
import {
  evaluatePeriodic, newPeriodicConstraint, scanPeriodic, type PeriodicConstraint, type PeriodicPair, type PeriodicScan,
} from './periodicConstraints.js';
import { periodicKktModel, polishPeriodic } from './periodicPolish.js';
import type { PeriodicContact, PeriodicOutcome, PeriodicProblem } from './periodicProblem.js';
import type { SolveOptions } from './problem.js';
import { maxViolation, trueTube } from './scan.js';
import { criticalCurvature } from './secondOrder.js';
import {
  ACCEPT_RATIO, ACTIVE_TOLS, BOX_MAX_REL, DELTA_MAX_REL, DELTA_MIN_REL, DELTA_START_REL, GROW_RATIO, MARGIN_BOXES, MAX_STEP_FAILURES,
  PERTURB_RETRIES, POLISH_LOSS_REL, POLISH_TRIGGER_START, copyRing, noCertificate, withTubes,
} from './trustRegion.js';

/** Pairs whose bounding spheres are this many core radii beyond touching distance are not scanned. */
const SCAN_MARGIN_REL = 2;
/** What a weave saddle's note adds: this solver reports a saddle but does not step off it. */
const SADDLE_ADVICE =
  'The weave solver does not step off saddles (the finite-ring solver does): run more starts (--starts) ' +
  'or another --seed to look for the thicker weave.';

export async function solvePeriodic(problem: PeriodicProblem, options: SolveOptions): Promise<PeriodicOutcome> {
  validate(problem);
  await readySolvers();
  const w = problem.tubeRatios.slice();
  const R = Float64Array.from(problem.rings.map((r) => r.radius));
  const scale = Math.min(...R);
  const tMax = Math.min(...problem.rings.map((r, i) => r.radius / w[i]!));
  const algorithm: InnerAlgorithm = options.algorithm ?? 'slsqp';
  const ctx: Ctx = { w, R, scale, tMax, links: problem.links, finalTol: Math.max(options.tol, 1e-15) };

  // Start: perturb from the seed, halving until the linked pairs hold and nothing touches.
  let size = options.perturbation;
  let start: State | null = null;
  for (let k = 0; k <= PERTURB_RETRIES && start === null; k++, size /= 2) {
    const cand = perturb(problem.rings, problem.lattice, options.seed, k === PERTURB_RETRIES ? 0 : size);
    const s = stateAt(cand.rings, cand.lattice, ctx);
    if (s.t > 0 && sameLinks(problem.links, periodicLinks(s.rings, s.lattice))) start = s;
  }
  if (start === null) return infeasible(problem, 'the start rings intersect or do not have the pattern\'s linked pairs');

  let state = start;
  let iterations = 0;
  const history = [state.t];
  let delta = DELTA_START_REL * scale;
  let trigger = POLISH_TRIGGER_START;
  let failures = 0;
  let stopReason = 'iteration limit';
  let polished: Polished | null = null;

  while (iterations < options.maxIterations) {
    const pc = buildPeriodicChart(state.rings, state.lattice);
    const box = Math.min(delta, BOX_MAX_REL * scale);
    const cons = collect(pc, state, ctx, MARGIN_BOXES * box);
    const step = await localStep(cons, pc.nFree, state.t, delta, box, tMax, algorithm, trigger * state.t);
    iterations++;
    if (!step.ok) {
      failures++;
      delta *= 0.25;
      history.push(state.t);
      if (failures > MAX_STEP_FAILURES || delta < DELTA_MIN_REL * scale) {
        stopReason = 'the local solver failed';
        break;
      }
      continue;
    }
    const predicted = step.tau;
    if (!(predicted > trigger * state.t) || delta < DELTA_MIN_REL * scale) {
      const p = tryPolish(state, ctx);
      if (p) {
        state = p.state;
        history.push(state.t);
        options.onIteration?.(iterations, state.t);
        polished = p;
        stopReason = 'polished';
        break;
      }
      while (!(predicted > trigger * state.t) && trigger > ctx.finalTol) trigger = Math.max(trigger * 0.01, ctx.finalTol);
      if (!(predicted > trigger * state.t) || delta < DELTA_MIN_REL * scale) {
        stopReason = delta < DELTA_MIN_REL * scale ? 'trust region collapsed' : 'converged without a polish';
        break;
      }
    }
    const trial = stateOf(pc, periodicPosedAt(pc, step.z));
    const next = stateAt(trial.rings, trial.lattice, ctx);
    const ratio = (next.t - state.t) / predicted;
    if (next.t > 0 && ratio >= ACCEPT_RATIO && sameLinks(ctx.links, periodicLinks(next.rings, next.lattice))) {
      state = next;
      if (ratio >= GROW_RATIO) delta = Math.min(2 * delta, DELTA_MAX_REL * scale);
    } else {
      delta *= 0.25;
    }
    history.push(state.t);
    options.onIteration?.(iterations, state.t);
  }

  const fin = assess(state, ctx, polished);
  const status = fin.cert.certificate.certified
    ? 'optimal'
    : stopReason === 'the local solver failed' && iterations <= MAX_STEP_FAILURES + 1 ? 'failed' : 'stalled';
  const message =
    `${status === 'optimal' ? 'certified Kuhn-Tucker point' : status} after ${iterations} outer iterations` +
    ` (${stopReason}${polished ? `: ${polished.message}` : ''}); tube ${state.t} (layout units)`;
  return {
    status, tube: state.t, rings: withTubes(state.rings, state.t, w), lattice: copyLattice(state.lattice),
    iterations, history, contacts: fin.contacts, certificate: fin.cert.certificate, message,
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
}

interface State {
  rings: Ring[];
  lattice: Lattice;
  scans: PeriodicScan[];
  t: number;
}

interface Polished {
  state: State;
  activeTol: number;
  message: string;
}

/** Scan every pair within reach and take the true tube. */
function stateAt(rings: Ring[], lattice: Lattice, ctx: Ctx): State {
  const pc = buildPeriodicChart(rings, lattice);
  const pp = periodicPosedAt(pc, new Float64Array(pc.nFree));
  const margin = 2 * Math.max(...ctx.w) * ctx.tMax + SCAN_MARGIN_REL * ctx.scale;
  // A step that makes the lattice vectors nearly parallel would need thousands of copies: reject it.
  if (latticeReach({ rings, lattice }, margin).some((k) => k > MAX_LATTICE_REACH)) return { rings, lattice, scans: [], t: -Infinity };
  const pairs: PeriodicPair[] = ringPairs({ rings, lattice }, margin).map((p) => ({ a: p.i, b: p.j, shift: p.shift }));
  const scans = scanPeriodic(pp, pairs, ctx.w);
  return { rings, lattice, scans, t: trueTube(scans, ctx.R, ctx.w) };
}

/** Struts within `margin` (layout units) of touching, with gradients, and the radius limit. */
function collect(pc: PeriodicChart, state: State, ctx: Ctx, margin: number): PeriodicConstraint[] {
  const pp = periodicPosedAt(pc, new Float64Array(pc.nFree));
  const out: PeriodicConstraint[] = [];
  for (const s of state.scans) {
    if (s.distance - state.t * s.c > margin) continue;
    for (const k of s.contacts) {
      if (k.d - state.t * s.c > margin) continue;
      const con = newPeriodicConstraint('strut', s.a, s.b, s.shift, k.ta, k.tb, s.c, pc.nFree, s.continuum !== null);
      if (Number.isFinite(evaluatePeriodic(con, pc, pp, true))) out.push(con);
    }
  }
  let best = -1, lim = Infinity;
  ctx.w.forEach((wi, i) => {
    if (ctx.R[i]! / wi < lim) {
      lim = ctx.R[i]! / wi;
      best = i;
    }
  });
  if (best >= 0 && lim - state.t <= margin) {
    const con = newPeriodicConstraint('radius', best, best, [], 0, 0, 1, pc.nFree);
    con.g = lim;
    out.push(con);
  }
  return out;
}

/** Newton on the active set for each candidate threshold; accepted only if the kernel agrees. */
function tryPolish(state: State, ctx: Ctx): Polished | null {
  const pc = buildPeriodicChart(state.rings, state.lattice);
  const all = collect(pc, state, ctx, ACTIVE_TOLS.at(-1)! * state.t);
  let lastSet = '';
  for (const tol of ACTIVE_TOLS) {
    const active = all.filter((k) => k.g - k.c * state.t <= tol * state.t);
    const key = active.map((k) => `${k.kind}${k.a}/${k.b}/${k.shift.join(',')}/${k.tb.toFixed(6)}`).join(';');
    if (active.length === 0 || key === lastSet) continue;
    lastSet = key;
    const lambda0 = certify({ active, nFree: pc.nFree, maxViolation: 0, activeTol: 0, activeTolLimit: 1, polished: false }).lambda;
    const r = polishPeriodic(pc, active, state.t, lambda0, ctx.scale);
    if (!r.ok) continue;
    const trial = stateOf(pc, periodicPosedAt(pc, r.z));
    const next = stateAt(trial.rings, trial.lattice, ctx);
    if (!(next.t >= state.t * (1 - POLISH_LOSS_REL)) || !(next.t >= r.t * (1 - 1e-9))) continue;
    if (!sameLinks(ctx.links, periodicLinks(next.rings, next.lattice))) continue;
    return { state: next, activeTol: tol, message: r.message };
  }
  return null;
}

/**
 * Certificate (first and second order) at the final arrangement: the first active set whose forces
 * balance, with the curvature of the Lagrangian there; a saddle ends the search as in solve.ts.
 */
function assess(state: State, ctx: Ctx, polished: Polished | null): Assessed {
  const pc = buildPeriodicChart(state.rings, state.lattice);
  const t = state.t;
  const all = collect(pc, state, ctx, ACTIVE_TOLS.at(-1)! * t);
  const base = { nFree: pc.nFree, maxViolation: maxViolation(state.scans, t), activeTolLimit: Math.max(10 * ctx.finalTol, ACTIVE_TOLS[1]!), polished: polished !== null };
  let first: Assessed | null = null;
  for (const tol of polished ? [polished.activeTol, ...ACTIVE_TOLS] : ACTIVE_TOLS) {
    const active = all.filter((k) => k.g - k.c * t <= tol * t);
    if (active.length === 0) continue;
    const firstOrder = certify({ ...base, active, activeTol: tol });
    if (!firstOrder.certificate.certified) {
      first ??= withShifts(firstOrder, active);
      continue;
    }
    // On copies: differencing re-tracks the struts, and the reported forces stay those of the balance above.
    const model = periodicKktModel(pc);
    const curv = criticalCurvature(model, active.map((k) => model.copy(k)), firstOrder.lambda, ctx.scale);
    const curvature = curv?.maxCurvature ?? null;
    const cert = certify({ ...base, active, activeTol: tol, curvature, requireSecondOrder: true, saddleAdvice: SADDLE_ADVICE });
    const out = withShifts(cert, active);
    if (cert.certificate.certified || (curvature !== null && curvature > CURVATURE_TOL)) return out;
    first ??= out;
  }
  return first ?? { cert: certify({ ...base, active: [], activeTol: 1 }), contacts: [] };
}

interface Assessed {
  cert: ReturnType<typeof certify>;
  contacts: PeriodicContact[];
}

/** certify lists contacts in the order of the active struts: give each the shift of its image. */
function withShifts(cert: ReturnType<typeof certify>, active: readonly PeriodicConstraint[]): Assessed {
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
