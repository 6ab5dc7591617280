// The parts of one solve that the charts share: the outer loop's polish hook (Newton on the KKT system of the
// active set, accepted only if the kernel agrees) and its assessment (first-order certificate, then the
// curvature of the Lagrangian along the contacts to tell a maximum from a saddle, with the way off at a
// saddle). The ring solve (solve.ts) and the weave solve (periodicSolve.ts) set up their problem and their
// chart and hand it here as a ChartSolve: what differs between the charts is data and hooks, not code.
import { certify, CURVATURE_TOL } from '../certify/certificate.js';
import { polishKkt, type KktModel, type KktSettings } from '../certify/kktNewton.js';
import { criticalCurvature } from '../certify/secondOrder.js';
import { activeSet } from '../constraints/collect.js';
import type { Constraint } from '../constraints/constraints.js';
import { bindingContacts, type Assessed, type LoopChart, type Polished, type StepForces } from '../step/outerLoop.js';
import { carryMultipliers } from '../step/sqpStep.js';
import { ACTIVE_TOLS, ESCAPE_BALANCE_TOL, POLISH_LOSS_REL } from '../step/trustRegion.js';

/** The chart at an arrangement, with its constraints typed as the chart's own. */
export interface SolveChart<S extends { t: number }, C extends Constraint, P> extends LoopChart<S, C, P> {
  constraints(margin: number): C[];
}

/** What the polish and the assessment need of a chart, and how the charts differ there. */
export interface ChartSolve<S extends { t: number }, C extends Constraint, P, A extends Assessed<S, C>> {
  /** Length scale (the smallest core radius, layout units). */
  scale: number;
  finalTol: number;
  chart(state: S): SolveChart<S, C, P>;
  /** Beyond a positive tube: the linking (and any departure bound) hold. */
  admissible(state: S): boolean;
  /** Worst exact violation relative to the tube, from the kernel scan of `state`. */
  maxViolation(state: S): number;
  /** Newton settings of the polish (polish.ts RING_POLISH or PERIODIC_POLISH). */
  polishSettings: KktSettings;
  /** Free variables above which the dense Newton polish is skipped (Infinity: never). */
  maxPolishFree: number;
  /** The curvature is computed on copies of the active constraints, leaving the balanced ones as they are. */
  curvatureOnCopies: boolean;
  /** Passed to the second-order certify: a point whose test did not run is not certified; a saddle's advice. */
  secondOrder: { requireSecondOrder?: boolean; saddleAdvice?: string };
  /**
   * An escape direction ends the search only where the forces balance; elsewhere it is kept as the way off
   * and the search goes on to the next threshold (false: any escape direction ends it).
   */
  escapeNeedsBalance: boolean;
  /** The chart's own assessment from the shared one (e.g. the lattice shift of every contact). */
  extend(assessed: Assessed<S, C>, active: readonly C[]): A;
}

/** Balance residual (relative) of the active set's non-negative forces above which no polish is tried from it. */
const POLISH_START_BALANCE = 0.05;

/** Newton on the active set, for each candidate threshold in turn; accepted only if the kernel agrees. */
export function polishOnChart<S extends { t: number }, C extends Constraint, P, A extends Assessed<S, C>>(
  state: S, cs: ChartSolve<S, C, P, A>,
): Polished<S> | null {
  const chart = cs.chart(state);
  if (chart.nFree > cs.maxPolishFree) return null;
  const all = chart.constraints(ACTIVE_TOLS.at(-1)! * state.t);
  let lastSet = '';
  for (const tol of ACTIVE_TOLS) {
    const active = activeSet(all, state.t, tol * state.t);
    const key = active.map((k) => `${k.kind}${k.a}/${k.b}/${shiftKey(k)}/${k.tb.toFixed(6)}`).join(';');
    if (active.length === 0 || key === lastSet) continue;
    lastSet = key;
    const start = certify({ active, nFree: chart.nFree, maxViolation: 0, activeTol: 0, activeTolLimit: 1, polished: false });
    // Newton converges from a good start only: forces that miss the balance by percents mean a wrong active set
    // (on necklace:32 every such try stalled, at 0.1 s each; successes start at 1e-9 … 2e-3).
    if (!(start.certificate.balanceResidual <= POLISH_START_BALANCE)) continue;
    const lambda0 = start.lambda;
    const r = polishKkt(chart.model, cs.polishSettings, active, state.t, lambda0, cs.scale);
    if (!r.ok) continue;
    const next = chart.at(r.z);
    if (!(next.t >= state.t * (1 - POLISH_LOSS_REL)) || !(next.t >= r.t * (1 - 1e-9))) continue;
    if (!cs.admissible(next)) continue;
    return { state: next, activeTol: tol, message: r.message };
  }
  return null;
}

/**
 * Certificate (first and second order) at the arrangement: the first active set whose forces balance, with
 * the curvature of the Lagrangian there; a saddle ends the search with its ascent direction. Near a saddle
 * the balance is only approximate; the curvature still shows the way out.
 */
export function assessOnChart<S extends { t: number }, C extends Constraint, P, A extends Assessed<S, C>>(
  state: S, cs: ChartSolve<S, C, P, A>, polished: Polished<S> | null, forces: StepForces | null = null,
): A {
  const chart = cs.chart(state);
  const t = state.t;
  const all = chart.constraints(ACTIVE_TOLS.at(-1)! * t);
  const limit = Math.max(10 * cs.finalTol, ACTIVE_TOLS[1]!);
  const base = { nFree: chart.nFree, maxViolation: cs.maxViolation(state), activeTolLimit: limit, polished: polished !== null };
  const polishMessage = polished?.message ?? null;
  let first: A | null = null;
  // A near-balanced set with an ascent direction: the way off when no set balances (an unpolished saddle).
  let way: A | null = null;
  for (const tol of polished ? [polished.activeTol, ...ACTIVE_TOLS] : ACTIVE_TOLS) {
    const active = activeSet(all, t, tol * t);
    if (active.length === 0) continue;
    // The last step's multipliers, carried to these rows, are the first candidate forces (certificate.ts hint).
    const hint = forces ? carryMultipliers(forces.cons, forces.lambda, active) : null;
    const firstOrder = certify({ ...base, active, activeTol: tol, hint });
    if (!firstOrder.certificate.certified && !(firstOrder.certificate.balanceResidual <= ESCAPE_BALANCE_TOL)) {
      first ??= cs.extend({ state, cert: firstOrder, escape: null, binding: [], polishMessage }, active);
      continue;
    }
    // Samples bound a contact arc from above, so curvature computed with them can be spurious: skip it there.
    const curv = active.some((k) => k.kind === 'sample') ? null : curvatureOf(chart.model, active, firstOrder.lambda, cs);
    const cert = certify({ ...base, active, activeTol: tol, curvature: curv?.maxCurvature ?? null, hint: firstOrder.lambda, ...cs.secondOrder });
    const escape = curv !== null && curv.maxCurvature > CURVATURE_TOL ? curv.direction : null;
    const out = cs.extend({ state, cert, escape, binding: bindingContacts(active, firstOrder.lambda), polishMessage }, active);
    if (cert.certificate.certified || (escape !== null && (!cs.escapeNeedsBalance || firstOrder.certificate.certified))) return out;
    if (escape !== null) way ??= out;
    first ??= out;
  }
  return way ?? first ?? cs.extend({ state, cert: certify({ ...base, active: [], activeTol: 1 }), escape: null, binding: [], polishMessage }, []);
}

// ---- helpers -------------------------------------------------------------------------------------

function curvatureOf<S extends { t: number }, C extends Constraint, P, A extends Assessed<S, C>>(
  model: KktModel<C, P>, active: C[], lambda: Float64Array, cs: ChartSolve<S, C, P, A>,
): ReturnType<typeof criticalCurvature> {
  // On copies, differencing re-tracks the struts and the reported forces stay those of the balance above.
  return criticalCurvature(model, cs.curvatureOnCopies ? active.map((k) => model.copy(k)) : active, lambda, cs.scale);
}

/** The lattice shift of a constraint of the periodic chart ('' on the ring chart), for telling sets apart. */
function shiftKey(k: Constraint): string {
  const shift = (k as { shift?: readonly number[] }).shift;
  return shift ? shift.join(',') : '';
}
