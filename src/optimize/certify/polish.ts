// The polish: Newton on the KKT system of the identified active constraints (kktNewton.ts), on either chart.
// What differs between the charts is data: the KktModel (how poses follow from z, how a constraint is
// evaluated there, the exact Lagrangian Hessian of lagrangianHessian.ts) and the step settings.
//  ring chart (chart.ts)        its left Jacobian keeps the envelope gradients consistent away from z = 0, so
//                               their central differences give the Lagrangian Hessian where it is not exact.
//  periodic chart               ring poses and lattice vectors. Degenerate optima are common there (a family of
//  (periodicChart.ts)           equally thick weaves, e.g. the twist of a 2-in-1 chain), so every step is by the
//                               SVD with a cutoff above the noise of a differenced Hessian, and more steps and
//                               halvings are allowed.
import { posedAt, type Chart, type Posed } from '../chart/chart.js';
import { periodicPosedAt, type PeriodicChart, type PeriodicPosed } from '../chart/periodicChart.js';
import { evaluate, evaluatePeriodic, type Constraint, type DepartureSpec, type PeriodicConstraint } from '../constraints/constraints.js';
import { polishKkt, type KktModel, type KktResult, type KktSettings } from './kktNewton.js';
import {
  addPeriodicLagrangianHessian, addRingLagrangianHessian, exactHessianOn, periodicLagrangianHessian, ringLagrangianHessian,
} from '../constraints/lagrangianHessian.js';
import { leastSquares, leastSquaresRegularized } from './linalg.js';

/** The exact strut curvatures (lagrangianHessian.ts) replace differenced gradients, on both charts. */
export { useExactHessian } from '../constraints/lagrangianHessian.js';

/**
 * Newton steps near minimum norm by cheap regularised normal equations, by the SVD when that step does not
 * help (as happens near the end at degenerate optima); 12 steps and 12 halvings of each.
 */
export const RING_POLISH: KktSettings = {
  maxIterations: 12,
  solvers: [leastSquaresRegularized, (J, b) => leastSquares(J, b)],
  fractions: Array.from({ length: 12 }, (_, k) => 2 ** -k),
};

/** The ring chart as the Newton core and the second-order test (secondOrder.ts) see it. */
export function ringKktModel(chart: Chart, dep: DepartureSpec | null): KktModel<Constraint, Posed> {
  const n = chart.nFree;
  return {
    nFree: n,
    posedAt: (z) => posedAt(chart, z),
    evaluate: (con, posed, keep) => evaluate(con, chart, posed, true, dep, keep),
    copy: (k) => ({ ...k, grad: new Float64Array(n), pa: [...k.pa], pb: [...k.pb] }),
    hessian: (cons, posed, lambda) => (exactHessianOn() ? ringLagrangianHessian(chart, posed, cons, lambda) : null),
    hessianEntries: (cons, posed, lambda, add) => addRingLagrangianHessian(chart, posed, cons, lambda, add),
  };
}

/**
 * Singular values of the KKT matrix below this fraction of the largest are dropped: when the Hessian block
 * comes from differences with a 1e-6 step, its rounding noise is ~1e-10 relative, and a family of optima (a
 * connector free to spin about its contact axis) leaves exact null directions that noise must not fill.
 */
const SVD_CUTOFF = 1e-9;

export const PERIODIC_POLISH: KktSettings = {
  maxIterations: 30,
  solvers: [(J, b) => leastSquares(J, b, SVD_CUTOFF)],
  fractions: Array.from({ length: 30 }, (_, k) => 2 ** -k),
};

export type PeriodicPolishResult = KktResult<PeriodicConstraint>;

/** `L` is the length scale (the smallest core radius); `lambda0` starts the multipliers. */
export function polishPeriodic(
  pc: PeriodicChart, active0: readonly PeriodicConstraint[], t0: number, lambda0: Float64Array, L: number,
): PeriodicPolishResult {
  return polishKkt(periodicKktModel(pc), PERIODIC_POLISH, active0, t0, lambda0, L);
}

/** The periodic chart as the Newton core and the second-order test (secondOrder.ts) see it. */
export function periodicKktModel(pc: PeriodicChart): KktModel<PeriodicConstraint, PeriodicPosed> {
  const n = pc.nFree;
  return {
    nFree: n,
    posedAt: (z) => periodicPosedAt(pc, z),
    evaluate: (con, pp, keep) => evaluatePeriodic(con, pc, pp, true, keep),
    copy: (k) => ({ ...k, shift: k.shift.slice(), grad: new Float64Array(n), pa: [...k.pa], pb: [...k.pb] }),
    hessian: (cons, pp, lambda) => (exactHessianOn() ? periodicLagrangianHessian(pc, pp, cons, lambda) : null),
    hessianEntries: (cons, pp, lambda, add) => addPeriodicLagrangianHessian(pc, pp, cons, lambda, add),
  };
}
