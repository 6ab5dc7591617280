// The polish of the free-ring model: Newton on the KKT system of the identified active constraints
// (kktNewton.ts) on the ring chart (chart.ts), whose left Jacobian keeps the envelope gradients consistent
// away from z = 0, so their central differences give the Lagrangian Hessian.
import { posedAt, type Chart, type Posed } from '../chart/chart.js';
import { evaluate, type Constraint, type DepartureSpec } from '../constraints/constraints.js';
import { polishKkt, type KktModel, type KktResult, type KktSettings } from './kktNewton.js';
import { addRingLagrangianHessian, exactHessianOn, ringLagrangianHessian } from '../constraints/lagrangianHessian.js';
import { leastSquares, leastSquaresRegularized } from './linalg.js';

/** The exact strut curvatures (lagrangianHessian.ts) replace differenced gradients, in this polish and the weaves'. */
export { useExactHessian } from '../constraints/lagrangianHessian.js';

/**
 * Newton steps near minimum norm by cheap regularised normal equations, by the SVD when that step does not
 * help (as happens near the end at degenerate optima); 12 steps and 12 halvings of each.
 */
const SETTINGS: KktSettings = {
  maxIterations: 12,
  solvers: [leastSquaresRegularized, (J, b) => leastSquares(J, b)],
  fractions: Array.from({ length: 12 }, (_, k) => 2 ** -k),
};

export type PolishResult = KktResult<Constraint>;

/** `scale` is the length scale (the smallest core radius). */
export function polish(
  chart: Chart, active0: readonly Constraint[], t0: number, lambda0: Float64Array, scale: number, dep: DepartureSpec | null,
): PolishResult {
  return polishKkt(ringKktModel(chart, dep), SETTINGS, active0, t0, lambda0, scale);
}

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
