// Inflate: maximise the common tube over ring poses (see problem.ts).
//
// Outer loop (a trust-region method on the max–min problem): at the current poses the kernel finds every
// strut of every pair; struts and sampled near-contacts are linearised in a gauge-free chart (chart.ts) and a
// proximal QP (localStep.ts: nlopt-js SLSQP, HiGHS as companion) proposes a step. The step is judged on the
// exact kernel: the true tube of the new poses (min over pairs of distance / (w_a + w_b)) against the
// predicted gain, with the linking matrix (and any departure bound) re-checked; the radius shrinks on
// rejection and grows on success, so the tube never decreases (settings in trustRegion.ts, shared with
// periodicSolve.ts). Once the predicted gain is small, Newton on
// the KKT system of the active set (polish.ts) finishes to ~1e-13, accepted only if the kernel agrees.
// Non-negative strut forces (certificate.ts) certify a Kuhn–Tucker point, and the curvature of the
// Lagrangian along the contacts (secondOrder.ts) tells a maximum from a saddle: a symmetric arrangement is
// often a saddle among all arrangements, and the loop steps off it along the ascent direction (at most
// MAX_ESCAPES times) and climbs on.
import { InputError } from '../model/errors.js';
import { departureResidual, ringOrbits, symmetrize, trivialOrbits, type RingOrbits } from '../model/symmetry.js';
import type { Ring, Symmetry } from '../model/types.js';
import { linkingMatrix } from '../topology/index.js';
import { buildChart, posedAt, ringsOf, type Chart, type GaugeGroup, type Posed } from './chart.js';
import { activeSet, collectConstraints } from './collect.js';
import { certify, CURVATURE_TOL } from './certificate.js';
import type { Constraint, DepartureSpec } from './constraints.js';
import { localStep, readySolvers, type InnerAlgorithm } from './localStep.js';
import { perturbRings } from './perturb.js';
import { polish, restoreContacts, ringKktModel } from './polish.js';
import { criticalCurvature } from './secondOrder.js';
import type { InflateProblem, SolveOptions, SolveOutcome } from './problem.js';
import { maxViolation, radiusLimit, representativePairs, scanPairs, trueTube, type PairScan } from './scan.js';
import {
  ACCEPT_RATIO, ACTIVE_TOLS, BOX_MAX_REL, DELTA_MAX_REL, DELTA_MIN_REL, DELTA_START_REL, GROW_RATIO, MARGIN_BOXES, MAX_STEP_FAILURES,
  PERTURB_RETRIES, POLISH_LOSS_REL, POLISH_TRIGGER_START, copyRing, noCertificate, withTubes,
} from './trustRegion.js';

/** Saddles stepped off at most, and the size of that step (relative to the smallest core radius). */
const MAX_ESCAPES = 3;
const ESCAPE_STEPS_REL = [1e-2, 3e-2, 1e-1];
/** Balance residual up to which a near-critical point is searched for a way off a saddle. */
const ESCAPE_BALANCE_TOL = 1e-3;
/** Relative rounding allowed on the departure bound. */
const DEPARTURE_ROUNDING_REL = 1e-12;

export async function solveInflate(problem: InflateProblem, options: SolveOptions): Promise<SolveOutcome> {
  validate(problem);
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
  const dep: DepartureSpec | null = departure ? { orbits: ringOrbits(start, departure.symmetry), epsilon: departure.epsilon } : null;
  const pairs = representativePairs(orbits, n);
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

  const state: LoopState = { rings: start, scans: [], t: 0, iterations: 0, history: [] };
  state.scans = scanPairs(posedOf(start, orbits), pairs, w);
  state.t = trueTube(state.scans, radii(start), w);
  state.history.push(state.t);
  const gauge: GaugeGroup = dep ? { elements: dep.orbits.elements, origin: dep.orbits.origin } : { elements: orbits.elements, origin: orbits.origin };
  const ctx: Context = { orbits, pairs, w, dep, gauge, linking: problem.linking, scale, finalTol: Math.max(options.tol, 1e-15) };
  const tMax = radiusLimit(radii(start), w);
  let delta = DELTA_START_REL * scale;
  let trigger = POLISH_TRIGGER_START;
  let best: Final | null = null;
  let escapes = 0;
  let failures = 0;
  let stopReason = 'iteration limit';
  const record = (): void => {
    state.history.push(state.t);
    options.onIteration?.(state.iterations, state.t);
  };

  while (state.iterations < options.maxIterations) {
    const chart = buildChart(state.rings, orbits, ctx.gauge);
    const posed = posedAt(chart, new Float64Array(chart.nFree));
    const box = Math.min(delta, BOX_MAX_REL * scale);
    const cons = collectConstraints(chart, posed, state.scans, { t: state.t, margin: MARGIN_BOXES * box, w, dep, samples: true });
    const step = await localStep(cons, chart.nFree, state.t, delta, box, tMax, algorithm, trigger * state.t);
    state.iterations++;
    if (!step.ok) {
      failures++;
      delta *= 0.25;
      record();
      if (failures > MAX_STEP_FAILURES || delta < DELTA_MIN_REL * scale) {
        stopReason = 'the local solver failed';
        break;
      }
      continue;
    }
    failures = 0;
    const predicted = step.tau;
    if (!(predicted > trigger * state.t) || delta < DELTA_MIN_REL * scale) {
      // The local model promises little more: finish by Newton, then check the second-order condition.
      const p = tryPolish(state, ctx);
      if (p) {
        state.rings = p.rings;
        state.scans = p.scans;
        state.t = p.t;
        record();
        const fin = assess(state, ctx, p);
        if (best === null || fin.t >= best.t) best = fin;
        const dir = fin.escape;
        if (dir === null || escapes >= MAX_ESCAPES) {
          stopReason = 'polished';
          break;
        }
        // A saddle: step off it along the ascent direction and climb again.
        escapes++;
        const off = escapeSaddle(state, ctx, fin);
        if (off === null) {
          stopReason = 'polished (saddle, no way off found)';
          break;
        }
        state.rings = off.rings;
        state.scans = off.scans;
        state.t = off.t;
        delta = ESCAPE_STEPS_REL[0]! * scale;
        trigger = POLISH_TRIGGER_START;
        continue;
      }
      // No polish: perhaps a saddle the first-order model cannot leave (its gain there is second order).
      if (escapes < MAX_ESCAPES) {
        const here = assess(state, ctx, null);
        const off = here.escape ? escapeSaddle(state, ctx, here) : null;
        if (off) {
          escapes++;
          state.rings = off.rings;
          state.scans = off.scans;
          state.t = off.t;
          delta = ESCAPE_STEPS_REL[0]! * scale;
          trigger = POLISH_TRIGGER_START;
          record();
          continue;
        }
      }
      // Tighten the trigger and keep stepping while the model still promises a gain.
      while (!(predicted > trigger * state.t) && trigger > ctx.finalTol) trigger = Math.max(trigger * 0.01, ctx.finalTol);
      if (!(predicted > trigger * state.t) || delta < DELTA_MIN_REL * scale) {
        stopReason = delta < DELTA_MIN_REL * scale ? 'trust region collapsed' : 'converged without a polish';
        break;
      }
    }
    const trial = ringsOf(chart, posedAt(chart, step.z));
    const trialScans = scanPairs(posedOf(trial, orbits), pairs, w);
    const tTrial = trueTube(trialScans, radii(trial), w);
    const ratio = (tTrial - state.t) / predicted;
    if (tTrial > 0 && ratio >= ACCEPT_RATIO && withinDeparture(trial, dep) && sameLinking(trial, problem.linking)) {
      state.rings = trial;
      state.scans = trialScans;
      state.t = tTrial;
      if (ratio >= GROW_RATIO) delta = Math.min(2 * delta, DELTA_MAX_REL * scale);
    } else {
      delta *= 0.25;
    }
    record();
  }
  // The best polished point unless the loop ended higher without one.
  let fin = best;
  if (fin === null || state.t > fin.t * (1 + ctx.finalTol)) fin = assess(state, ctx, null);
  const status = fin.cert.certificate.certified
    ? 'optimal'
    : stopReason === 'the local solver failed' && state.iterations <= MAX_STEP_FAILURES + 1
      ? 'failed'
      : 'stalled';
  const message =
    `${status === 'optimal' ? 'certified Kuhn-Tucker point' : status} after ${state.iterations} outer iterations` +
    ` (${stopReason}${fin.polishMessage ? `: ${fin.polishMessage}` : ''}${escapes > 0 ? `; left ${escapes} saddle(s)` : ''}); ` +
    `tube ${fin.t} (layout units)`;
  return {
    status, tube: fin.t, rings: withTubes(fin.rings, fin.t, w), iterations: state.iterations, history: state.history,
    contacts: fin.cert.contacts, certificate: fin.cert.certificate, message,
  };
}

// --- helpers ---

interface LoopState {
  rings: Ring[];
  scans: PairScan[];
  t: number;
  iterations: number;
  history: number[];
}

interface Polished {
  rings: Ring[];
  scans: PairScan[];
  t: number;
  activeTol: number;
  message: string;
}

interface Context {
  orbits: RingOrbits;
  gauge: GaugeGroup;
  pairs: [number, number][];
  w: number[];
  dep: DepartureSpec | null;
  linking: number[][];
  scale: number;
  finalTol: number;
}

interface Final {
  rings: Ring[];
  t: number;
  cert: ReturnType<typeof certify>;
  /** Ascent direction (chart coordinates of a chart at `rings`) when the point is a saddle. */
  escape: Float64Array | null;
  /** Contacts with positive force, which the escape keeps touching. */
  binding: Constraint[];
  polishMessage: string | null;
}

/** Newton on the active set, for each candidate threshold in turn; accepted only if the kernel agrees. */
function tryPolish(state: LoopState, ctx: Context): Polished | null {
  const chart = buildChart(state.rings, ctx.orbits, ctx.gauge);
  const posed = posedAt(chart, new Float64Array(chart.nFree));
  const all = collectConstraints(chart, posed, state.scans, { t: state.t, margin: ACTIVE_TOLS.at(-1)! * state.t, w: ctx.w, dep: ctx.dep, samples: true });
  let lastSet = '';
  for (const tol of ACTIVE_TOLS) {
    const active = activeSet(all, state.t, tol * state.t);
    const key = active.map((k) => `${k.kind}${k.a}/${k.b}/${k.tb.toFixed(6)}`).join(',');
    if (active.length === 0 || key === lastSet) continue;
    lastSet = key;
    const lambda0 = certify({ active, nFree: chart.nFree, maxViolation: 0, activeTol: 0, activeTolLimit: 1, polished: false }).lambda;
    const r = polish(chart, active, state.t, lambda0, ctx.scale, ctx.dep);
    if (!r.ok) continue;
    const rings = ringsOf(chart, posedAt(chart, r.z));
    const scans = scanPairs(posedOf(rings, ctx.orbits), ctx.pairs, ctx.w);
    const t = trueTube(scans, radii(rings), ctx.w);
    if (!(t >= state.t * (1 - POLISH_LOSS_REL)) || !(t >= r.t * (1 - 1e-9))) continue;
    if (!sameLinking(rings, ctx.linking) || !withinDeparture(rings, ctx.dep)) continue;
    return { rings, scans, t, activeTol: tol, message: r.message };
  }
  return null;
}

/** Certificate (first and second order) at the current poses. */
function assess(state: LoopState, ctx: Context, polished: Polished | null): Final {
  const chart = buildChart(state.rings, ctx.orbits, ctx.gauge);
  const posed = posedAt(chart, new Float64Array(chart.nFree));
  const t = state.t;
  const all = collectConstraints(chart, posed, state.scans, { t, margin: ACTIVE_TOLS.at(-1)! * t, w: ctx.w, dep: ctx.dep, samples: true });
  const limit = Math.max(10 * ctx.finalTol, ACTIVE_TOLS[1]!);
  const violation = maxViolation(state.scans, t);
  const base = { nFree: chart.nFree, maxViolation: violation, activeTolLimit: limit, polished: polished !== null };
  let out: Final | null = null;
  for (const tol of polished ? [polished.activeTol, ...ACTIVE_TOLS] : ACTIVE_TOLS) {
    const active = activeSet(all, t, tol * t);
    if (active.length === 0) continue;
    const first = certify({ ...base, active, activeTol: tol });
    // Near a saddle the balance is only approximate; the curvature still shows the way out.
    if (!first.certificate.certified && !(first.certificate.balanceResidual <= ESCAPE_BALANCE_TOL)) {
      out ??= { rings: state.rings, t, cert: first, escape: null, binding: [], polishMessage: polished?.message ?? null };
      continue;
    }
    // Samples bound a contact arc from above, so curvature computed with them can be spurious: skip it there.
    const curv = active.some((k) => k.kind === 'sample') ? null : criticalCurvature(ringKktModel(chart, ctx.dep), active, first.lambda, ctx.scale);
    const cert = certify({ ...base, active, activeTol: tol, curvature: curv?.maxCurvature ?? null });
    const escape = curv !== null && curv.maxCurvature > CURVATURE_TOL ? curv.direction : null;
    const lmax = Math.max(0, ...first.lambda);
    const binding = active.filter((_, k) => first.lambda[k]! > 1e-9 * lmax);
    const candidate: Final = { rings: state.rings, t, cert, escape, binding, polishMessage: polished?.message ?? null };
    if (cert.certificate.certified || escape !== null) {
      out = candidate;
      break;
    }
    out ??= candidate;
  }
  return out ?? {
    rings: state.rings, t,
    cert: certify({ ...base, active: [], activeTol: 1 }),
    escape: null, binding: [], polishMessage: polished?.message ?? null,
  };
}

/**
 * Step off a saddle: move along the ascent direction, return to the binding contacts by Gauss–Newton (so
 * the tube is no longer lost to first order), and keep the first move whose true tube beats the saddle's.
 * The outer loop only accepts gains, so it cannot slide back.
 */
function escapeSaddle(state: LoopState, ctx: Context, fin: Final): { rings: Ring[]; scans: PairScan[]; t: number } | null {
  const chart = buildChart(state.rings, ctx.orbits, ctx.gauge);
  const dir = fin.escape!;
  // Under a departure bound ε a step of s moves the departure by at most s: try steps that fit first.
  const sizes = ctx.dep ? [0.25 * ctx.dep.epsilon / ctx.scale, ...ESCAPE_STEPS_REL] : ESCAPE_STEPS_REL;
  for (const size of sizes) {
    let best: { rings: Ring[]; scans: PairScan[]; t: number } | null = null;
    for (const sign of [1, -1]) {
      const z0 = Float64Array.from(dir, (v) => sign * v * size * ctx.scale);
      const back = restoreContacts(chart, fin.binding, z0, state.t, ctx.scale, ctx.dep);
      if (back === null) continue;
      const rings = ringsOf(chart, posedAt(chart, back.z));
      const scans = scanPairs(posedOf(rings, ctx.orbits), ctx.pairs, ctx.w);
      const t = trueTube(scans, radii(rings), ctx.w);
      if (!(t > state.t) || !withinDeparture(rings, ctx.dep) || !sameLinking(rings, ctx.linking)) continue;
      if (best === null || t > best.t) best = { rings, scans, t };
    }
    if (best) return best;
  }
  return null;
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
  const all: [number, number][] = [];
  for (let i = 0; i < rings.length; i++) for (let j = i + 1; j < rings.length; j++) all.push([i, j]);
  return trueTube(scanPairs(posedOf(rings, orbits), all, w), radii(rings), w) > 0;
}

function sameLinking(rings: Ring[], linking: number[][]): boolean {
  const L = linkingMatrix(rings);
  for (let i = 0; i < rings.length; i++) {
    for (let j = 0; j < rings.length; j++) if (i !== j && (L[i]![j] ?? 0) !== (linking[i]?.[j] ?? 0)) return false;
  }
  return true;
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
}

export type { Constraint };
