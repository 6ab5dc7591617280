// The outer trust-region loop on the max–min problem, shared by the ring solver (solve.ts) and the weave
// solver (periodicSolve.ts), which hand it their chart through the hooks of OuterLoop.
//
// At the current arrangement the constraints near touching are linearised in the chart and the SQP step
// (sqpStep.ts: the Lagrangian Hessian from the exact strut curvatures, multipliers carried from the last
// step, a sparse interior-point QP; with a second-order correction when the model misjudged the step)
// proposes a step — or, as the bench baseline, the first-order proximal QP (localStep.ts) — judged on the
// exact kernel: the true tube of the new arrangement against
// the predicted gain, with the caller's admissibility (linking, departure bound) re-checked; the radius
// shrinks on rejection and grows on success, so the tube never decreases (settings in trustRegion.ts). Once
// the predicted gain is small, the caller's Newton polish finishes, and its assessment (first-order
// certificate and second-order test, secondOrder.ts) tells a maximum from a saddle. At a saddle the loop
// steps off along the ascent direction keeping the binding contacts (saddleEscape.ts) and climbs again, at
// most maxEscapes times; a symmetric arrangement is often a maximum among symmetric ones but a saddle among
// all (the loop looks for a saddle only once the SQP model promises no more gain). The best polished point
// is reported unless the loop ended higher without one. A tube equal to a proven upper bound (the packing
// bound) ends the loop at once and is certified by the bound; the last step's multipliers are handed to the
// assessment as candidate forces (checked there, never trusted).
import type { CertifyOutput } from '../certify/certificate.js';
import type { Constraint } from '../constraints/constraints.js';
import { localStep, type InnerAlgorithm } from './localStep.js';
import { carryMultipliers, QP_TOL, sqpStep, type SqpStepInput } from './sqpStep.js';
import { escapeSaddle, type EscapeChart } from './saddleEscape.js';
import { maxAbs } from './interiorQp.js';
import { SymTriplets } from './sparseLdl.js';
import { BOUND_METHOD, boundAttained, boundCertificate } from '../certify/bound.js';
import type { SolveOutcome } from '../run/problem.js';
import {
  ACCEPT_RATIO, BOX_MAX_REL, BOX_REGROW_USE, DELTA_MAX_REL, DELTA_MIN_REL, DELTA_START_REL, ESCAPE_STEPS_REL, GROW_RATIO,
  MARGIN_BOXES, MAX_STEP_FAILURES, POLISH_TRIGGER_START, REJECT_BOX_FRACTION, REJECT_DELTA_FACTOR,
} from './trustRegion.js';

/**
 * QP accuracy relative to the polish trigger (the relative gain the loop is still resolving), capped: while
 * the gains are large an accurate QP buys nothing, and the interior-point iterations grow with the digits.
 */
const QP_TOL_PER_TRIGGER = 1e-4;
const QP_TOL_MAX = 1e-9;

/** The SQP step stops for lack of gain only below this fraction of the final tolerance. */
const SQP_FINAL_GAIN_REL = 1e-3;

/** Creep test (creepingNearBound): gap to the bound (relative) below which it applies, window in iterations. */
const CREEP_GAP_REL = 1e-3;
const CREEP_WINDOW = 10;
/** Gaps within this many final tolerances of the bound are left to the polish (necklaces end ~8 tolerances short). */
const CREEP_MIN_GAP_TOLS = 1e3;

/** Forces below this fraction of the largest do not count as binding (the escape may open those contacts). */
const BINDING_FORCE_REL = 1e-9;

/** The chart at the current arrangement (coordinates z, origin at the arrangement). */
export interface LoopChart<S extends { t: number }, C extends Constraint, P> extends EscapeChart<S, C, P> {
  nFree: number;
  /** Constraints within `margin` (layout units) of touching, with their gradients at z = 0. */
  constraints(margin: number): Constraint[];
}

export interface Polished<S> {
  state: S;
  /** Slack threshold (relative to the tube) of the active set that polished. */
  activeTol: number;
  message: string;
}

/** The assessment of an arrangement: its certificate and, at a saddle, the way off. */
export interface Assessed<S extends { t: number }, C extends Constraint> {
  state: S;
  cert: CertifyOutput;
  /** Ascent direction (chart coordinates at `state`) when the point is a saddle. */
  escape: Float64Array | null;
  /** Contacts with positive force, which the escape keeps touching. */
  binding: C[];
  polishMessage: string | null;
}

/** What differs between the charts: how to linearise, polish, assess and judge an arrangement. */
export interface OuterLoop<S extends { t: number }, C extends Constraint, P, A extends Assessed<S, C>> {
  /** Length scale (the smallest core radius, layout units). */
  scale: number;
  /** Largest tube the radius limit allows (layout units). */
  tMax: number;
  finalTol: number;
  algorithm: InnerAlgorithm;
  /** 'sqp': the second-order step (step/sqpStep.ts); 'proximal': the first-order proximal QP (localStep.ts). */
  stepMethod: StepMethod;
  maxIterations: number;
  maxEscapes: number;
  /** Escape step sizes tried in turn (relative to `scale`). */
  escapeSizes: readonly number[];
  onIteration?: ((iteration: number, tube: number) => void) | undefined;
  /** Date.now() milliseconds at which to stop (SolveOptions.deadline). */
  deadline?: number | undefined;
  /**
   * A proven upper bound on the tube (layout units; the packing bound), or none. A tube equal to it to
   * finalTol ends the loop and is certified by it (certify/bound.ts boundCertificate).
   */
  bound?: number | undefined;
  /** Stop when creeping near the bound (CREEP_STOP), for a caller that restarts from there. */
  creepStop?: boolean;
  chart(state: S): LoopChart<S, C, P>;
  /** Beyond a positive tube: the linking and any departure bound hold. */
  admissible(state: S): boolean;
  polish(state: S): Polished<S> | null;
  /** `forces`: the last SQP step's constraints and multipliers, a candidate certificate to check first. */
  assess(state: S, polished: Polished<S> | null, forces?: StepForces | null): A;
}

export type StepMethod = 'sqp' | 'proximal';

/** The constraints of an SQP step and their multipliers (the QP's row duals). */
export interface StepForces {
  cons: Constraint[];
  lambda: Float64Array;
}

export interface LoopRun<A> {
  /** The reported point (the best polished one unless the loop ended higher without one). */
  fin: A;
  status: SolveOutcome['status'];
  message: string;
  iterations: number;
  /** Tube after each outer iteration, starting with the start's. */
  history: number[];
  escapes: number;
  stopReason: string;
}

export async function runOuterLoop<S extends { t: number }, C extends Constraint, P, A extends Assessed<S, C>>(
  start: S, loop: OuterLoop<S, C, P, A>,
): Promise<LoopRun<A>> {
  const scale = loop.scale;
  let state = start;
  let iterations = 0;
  const history = [state.t];
  let delta = DELTA_START_REL * scale;
  let trigger = POLISH_TRIGGER_START;
  // Typed by assertion: `judge` sets it inside a closure, which control-flow narrowing does not follow.
  let best = null as A | null;
  let escapes = 0;
  let failures = 0;
  let stopReason = 'iteration limit';
  /** The last SQP step's constraints and multipliers, whose curvature the next step's model uses. */
  let carried: StepForces | null = null;
  /**
   * Cap on the step box (layout units), the SQP step's trust radius proper: Δ is a Levenberg–Marquardt
   * weight, which once far above the model's own curvature hardly shortens the step, so a rejected step
   * shrinks the cap to a fraction of its own length instead, and a good step that used much of it regrows it.
   */
  let cap = BOX_MAX_REL * scale;
  const record = (): void => {
    history.push(state.t);
    loop.onIteration?.(iterations, state.t);
  };
  /** Newton polish from here; the loop moves to the polished point when there is one. */
  const polishHere = (): Polished<S> | null => {
    const p = loop.polish(state);
    if (p) {
      state = p.state;
      record();
    }
    return p;
  };
  /** Assess the current point (the last step's forces as candidates) and keep it if it is the best so far. */
  const judge = (p: Polished<S> | null): A => {
    const fin = loop.assess(state, p, carried);
    if (best === null || fin.state.t >= best.state.t) best = fin;
    return fin;
  };
  const stepOff = (fin: A): S | null =>
    escapeSaddle(loop.chart(state), fin.binding, fin.escape!, state.t, scale, loop.escapeSizes, (s) => loop.admissible(s));
  /**
   * After an escape the trust region restarts at the escape's scale (the box cap at its largest) and the polish
   * trigger at its start.
   */
  const restart = (off: S): void => {
    state = off;
    delta = ESCAPE_STEPS_REL[0]! * scale;
    cap = BOX_MAX_REL * scale;
    trigger = POLISH_TRIGGER_START;
  };

  while (iterations < loop.maxIterations) {
    if (loop.deadline !== undefined && Date.now() >= loop.deadline) {
      stopReason = 'time limit';
      break;
    }
    // At the bound nothing can gain: polish once (for the Kuhn–Tucker figures) and stop. A maximiser there is
    // often degenerate (a family of arrangements), where saddle escapes and more steps only spend time.
    if (loop.bound !== undefined && boundAttained(state.t, loop.bound, loop.finalTol)) {
      judge(polishHere());
      stopReason = 'packing bound reached';
      break;
    }
    const chart = loop.chart(state);
    const box = Math.min(delta, cap);
    const cons = chart.constraints(MARGIN_BOXES * box);
    let step: { ok: boolean; z: Float64Array; tau: number; convexified?: boolean };
    let sqpInput: SqpStepInput | null = null;
    if (loop.stepMethod === 'sqp') {
      const lambda = carried ? carryMultipliers(carried.cons, carried.lambda, cons) : new Float64Array(cons.length);
      const W = lagrangianEntries(chart, cons, lambda);
      const accuracy = Math.max(QP_TOL, Math.min(QP_TOL_MAX, QP_TOL_PER_TRIGGER * trigger));
      sqpInput = { cons, nFree: chart.nFree, t: state.t, delta, box, tMax: loop.tMax, wI: W.i, wJ: W.j, wV: W.v, deadline: loop.deadline, accuracy };
      const s = sqpStep(sqpInput);
      if (s.ok) carried = { cons, lambda: s.lambda };
      // A second-order correction re-solves this QP with shifted slacks: same objective and rows.
      sqpInput.structure = s.structure;
      step = s;
    } else {
      step = await localStep(cons, chart.nFree, state.t, delta, box, loop.tMax, loop.algorithm, trigger * state.t);
    }
    iterations++;
    // With a model that is not concave, the QP's interior-point method (its inertia correction) finds a
    // Kuhn–Tucker point of the QP, not necessarily its maximum, and that point can promise less than staying
    // put: no ascent step, and no sign of convergence either. It fails like a failed solve, and the smaller Δ
    // makes P = −W + I/Δ convex. (Seen on the free torus:3: a gain of −1.2e-5 at 1e-3 below R/3 ended the
    // climb as "converged without a polish".)
    const noAscent = step.ok && step.convexified === true && step.tau < -SQP_FINAL_GAIN_REL * loop.finalTol * state.t;
    if (!step.ok || noAscent) {
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
    // A small gain under a small trust radius is no sign of stationarity (after an escape Δ restarts small,
    // and the Levenberg–Marquardt step's gain is then about Δ|∇|², tiny however far the optimum is): the SQP
    // step judges stationarity by the gain the model would promise at the length scale, and steps on while
    // that is large, letting Δ grow.
    const promised = loop.stepMethod === 'sqp' ? predicted * Math.max(1, scale / Math.min(delta, box)) : predicted;
    if (!(promised > trigger * state.t) || box < DELTA_MIN_REL * scale) {
      // The local model promises little more: finish by Newton, then check the second-order condition.
      const p = polishHere();
      if (p) {
        const fin = judge(p);
        if (fin.escape === null || escapes >= loop.maxEscapes) {
          stopReason = 'polished';
          break;
        }
        // A saddle: step off it along the ascent direction and climb again.
        escapes++;
        const off = stepOff(fin);
        if (off === null) {
          stopReason = 'polished (saddle, no way off found)';
          break;
        }
        restart(off);
        continue;
      }
      // Tighten the trigger and keep stepping while the model still promises a gain. The SQP step goes on to
      // a gain well below the tolerance: at a degenerate optimum the gain per step is about the square of the
      // distance left, so a gain of tol·t can still leave a gap many times tol (necklaces: 8e-9 left).
      const floor = loop.stepMethod === 'sqp' ? SQP_FINAL_GAIN_REL * loop.finalTol : loop.finalTol;
      const stalled = (): boolean => !(promised > trigger * state.t) || box < DELTA_MIN_REL * scale;
      // The SQP model carries the Lagrangian's curvature, so while it still promises a gain it is climbing,
      // not stuck at a saddle: the balance of an unconverged point is only approximate, and the curvature
      // the assessment reads there is no evidence of a way off. The first-order step cannot leave a saddle
      // (its gain there is second order), so it looks for one at once.
      if (loop.stepMethod === 'sqp') while (stalled() && trigger > floor) trigger = Math.max(trigger * 0.01, floor);
      if (stalled() && escapes < loop.maxEscapes) {
        // No polish: perhaps a saddle the model cannot leave.
        const here = loop.assess(state, null, carried);
        const off = here.escape ? stepOff(here) : null;
        if (off) {
          escapes++;
          restart(off);
          record();
          continue;
        }
      }
      while (stalled() && trigger > floor) trigger = Math.max(trigger * 0.01, floor);
      if (stalled()) {
        stopReason = box < DELTA_MIN_REL * scale ? 'trust region collapsed' : 'converged without a polish';
        break;
      }
    }
    let next = chart.at(step.z);
    let ratio = (next.t - state.t) / predicted;
    if (sqpInput !== null && ratio < GROW_RATIO) {
      // Second-order correction: the struts that limit the tube after the step are those whose own curvature
      // shortened them, which the force-weighted model averages away; shift each row by its curvature
      // at the step and solve again (Fletcher, Practical Methods of Optimization, 2nd ed., §14.4).
      const corrected = secondOrderCorrection(chart, sqpInput, step.z);
      if (corrected !== null) {
        const alt = chart.at(corrected);
        const altRatio = (alt.t - state.t) / predicted;
        if (altRatio > ratio) {
          next = alt;
          ratio = altRatio;
        }
      }
    }
    const used = maxAbs(step.z);
    if (next.t > 0 && ratio >= ACCEPT_RATIO && loop.admissible(next)) {
      state = next;
      if (ratio >= GROW_RATIO) {
        delta = Math.min(2 * delta, DELTA_MAX_REL * scale);
        if (sqpInput !== null && used >= BOX_REGROW_USE * cap) cap = Math.min(2 * cap, BOX_MAX_REL * scale);
      }
    } else if (sqpInput !== null) {
      cap = Math.min(cap, Math.max(REJECT_BOX_FRACTION * used, DELTA_MIN_REL * scale));
      delta *= REJECT_DELTA_FACTOR;
    } else {
      delta *= 0.25;
    }
    record();
    if (loop.creepStop === true && loop.bound !== undefined && creepingNearBound(history, loop.bound, loop.finalTol)) {
      stopReason = CREEP_STOP;
      break;
    }
  }

  let fin = best;
  if (fin === null || state.t > fin.state.t * (1 + loop.finalTol)) fin = loop.assess(state, null, carried);
  if (loop.bound !== undefined && !fin.cert.certificate.certified && boundAttained(fin.state.t, loop.bound, loop.finalTol)) {
    fin = { ...fin, cert: { ...fin.cert, certificate: boundCertificate(fin.cert.certificate, fin.state.t, loop.bound) } };
  }
  const status = fin.cert.certificate.certified
    ? 'optimal'
    : stopReason === 'the local solver failed' && iterations <= MAX_STEP_FAILURES + 1 ? 'failed' : 'stalled';
  const message =
    `${status !== 'optimal' ? status : fin.cert.certificate.method === BOUND_METHOD ? 'packing bound attained' : 'certified Kuhn-Tucker point'} after ${iterations} outer iterations` +
    ` (${stopReason}${fin.polishMessage ? `: ${fin.polishMessage}` : ''}${escapes > 0 ? `; left ${escapes} saddle(s)` : ''}); ` +
    `tube ${fin.state.t} (layout units)`;
  return { fin, status, message, iterations, history, escapes, stopReason };
}

/** Why the loop stops when it creeps near the bound (the caller may restart from a perturbation). */
export const CREEP_STOP = 'creeping near the packing bound';

/**
 * The tube is within CREEP_GAP_REL of the bound, the gap is still well above the tolerance, and the last
 * CREEP_WINDOW iterations gained less than the gap that remains: at that rate more than CREEP_WINDOW further
 * iterations would be needed, which a superlinear method near a regular maximum never does. Seen where the
 * maximiser is degenerate (the free torus:3 reaches R/3 on a family of arrangements whose corners touch along
 * a continuum; the ascent creeps into such a corner: docs/free-torus3.md).
 */
function creepingNearBound(history: readonly number[], bound: number, tol: number): boolean {
  const n = history.length;
  if (n <= CREEP_WINDOW) return false;
  const t = history[n - 1]!, gap = bound - t;
  if (!(gap < CREEP_GAP_REL * bound) || !(gap > CREEP_MIN_GAP_TOLS * tol * bound)) return false;
  return t - history[n - 1 - CREEP_WINDOW]! < gap;
}

/** The active constraints whose force (multiplier) is positive: those an escape keeps touching. */
export function bindingContacts<C extends Constraint>(active: readonly C[], lambda: Float64Array): C[] {
  const lmax = Math.max(0, ...lambda);
  return active.filter((_, k) => lambda[k]! > BINDING_FORCE_REL * lmax);
}

/** Upper-triangle entries of W = Σ λ_k ∇²g_k at the chart's origin (none where the chart cannot give it). */
function lagrangianEntries<C extends Constraint, P>(
  chart: LoopChart<{ t: number }, C, P>, cons: readonly Constraint[], lambda: Float64Array,
): { i: Int32Array; j: Int32Array; v: Float64Array } {
  const none = { i: new Int32Array(0), j: new Int32Array(0), v: new Float64Array(0) };
  const keep: Constraint[] = [], lam: number[] = [];
  cons.forEach((c, k) => {
    if (lambda[k]! > 0 && (c.kind === 'strut' || c.kind === 'sample')) {
      keep.push(c);
      lam.push(lambda[k]!);
    }
  });
  if (keep.length === 0 || !chart.model.hessianEntries) return none;
  const posed = chart.model.posedAt(new Float64Array(chart.nFree));
  const W = new SymTriplets(chart.nFree);
  const ok = chart.model.hessianEntries(keep as unknown as C[], posed, Float64Array.from(lam), (i, j, v) => W.add(i, j, v));
  return ok ? W.entries() : none;
}

/**
 * The step again with every row shifted by what the linearisation missed at z (g_k(z) - g_k - G_k·z), or
 * null when a strut was lost at z or the QP failed.
 */
function secondOrderCorrection<C extends Constraint, P>(
  chart: LoopChart<{ t: number }, C, P>, input: SqpStepInput, z: Float64Array,
): Float64Array | null {
  const n = chart.nFree;
  const posed = chart.model.posedAt(z);
  const shift = new Float64Array(input.cons.length);
  for (let k = 0; k < input.cons.length; k++) {
    const con = input.cons[k]!;
    if (con.kind !== 'strut' && con.kind !== 'sample') continue;
    const g = chart.model.evaluate(chart.model.copy(con as C), posed, false);
    if (!Number.isFinite(g)) return null;
    let lin = con.g;
    const sup = con.support;
    if (sup) for (const i of sup) lin += con.grad[i]! * z[i]!;
    else for (let i = 0; i < n; i++) lin += con.grad[i]! * z[i]!;
    shift[k] = g - lin;
  }
  const s = sqpStep({ ...input, shift });
  return s.ok ? s.z : null;
}



