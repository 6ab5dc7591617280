// The polish of a periodic arrangement: Newton on the KKT system of the active struts (kktNewton.ts, shared
// with polish.ts) on the periodic chart (ring poses and lattice vectors), with the exact Lagrangian Hessian
// (lagrangianHessian.ts; differences of the gradients where it cannot be given, or when switched off).
// Degenerate optima are common here (a family of equally thick weaves, e.g. the twist of a 2-in-1 chain), so
// every step is by the SVD with a cutoff above the noise of a differenced Hessian, and more steps and
// halvings are allowed.
import { leastSquares } from './linalg.js';
import { polishKkt, type KktModel, type KktResult, type KktSettings } from './kktNewton.js';
import { addPeriodicLagrangianHessian, exactHessianOn, periodicLagrangianHessian } from '../constraints/lagrangianHessian.js';
import { periodicPosedAt, type PeriodicChart, type PeriodicPosed } from '../chart/periodicChart.js';
import { evaluatePeriodic, type PeriodicConstraint } from '../constraints/periodicConstraints.js';

/**
 * Singular values of the KKT matrix below this fraction of the largest are dropped: when the Hessian block
 * comes from differences with a 1e-6 step, its rounding noise is ~1e-10 relative, and a family of optima (a
 * connector free to spin about its contact axis) leaves exact null directions that noise must not fill.
 */
const SVD_CUTOFF = 1e-9;

const SETTINGS: KktSettings = {
  maxIterations: 30,
  solvers: [(J, b) => leastSquares(J, b, SVD_CUTOFF)],
  fractions: Array.from({ length: 30 }, (_, k) => 2 ** -k),
};

export type PeriodicPolishResult = KktResult<PeriodicConstraint>;

/** `L` is the length scale (the smallest core radius); `lambda0` starts the multipliers. */
export function polishPeriodic(
  pc: PeriodicChart, active0: readonly PeriodicConstraint[], t0: number, lambda0: Float64Array, L: number,
): PeriodicPolishResult {
  return polishKkt(periodicKktModel(pc), SETTINGS, active0, t0, lambda0, L);
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
