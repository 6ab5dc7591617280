// The polish of the free-ring model: Newton on the KKT system of the identified active constraints
// (kktNewton.ts) on the ring chart (chart.ts), whose left Jacobian keeps the envelope gradients consistent
// away from z = 0, so their central differences give the Lagrangian Hessian. Also the Gauss–Newton return
// to a set of contacts used to step off a saddle.
import { Matrix } from 'ml-matrix';
import { posedAt, type Chart, type Posed } from './chart.js';
import { evaluate, type Constraint, type DepartureSpec } from './constraints.js';
import { KKT_RESIDUAL_TOL, polishKkt, type KktModel, type KktResult, type KktSettings } from './kktNewton.js';
import { leastSquares, leastSquaresRegularized } from './linalg.js';

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
  };
}

/**
 * Gauss–Newton back onto the surface g_k(z) = c_k t of the given constraints, from (z0, t0), with
 * minimum-norm corrections (used to step off a saddle along its ascent direction without falling back).
 */
export function restoreContacts(
  chart: Chart, cons: readonly Constraint[], z0: Float64Array, t0: number, L: number, dep: DepartureSpec | null,
): { z: Float64Array; t: number } | null {
  const n = chart.nFree, m = cons.length;
  const model = ringKktModel(chart, dep);
  const work = cons.map((k) => model.copy(k));
  const z = Float64Array.from(z0);
  let t = t0;
  for (let it = 0; it < 20; it++) {
    const posed = model.posedAt(z);
    const J = new Matrix(m, n + 1);
    const F = new Float64Array(m);
    let norm = 0;
    for (let k = 0; k < m; k++) {
      const con = work[k]!;
      const g = model.evaluate(con, posed, true);
      if (!Number.isFinite(g)) return null;
      F[k] = -(g - con.c * t) / L;
      norm = Math.max(norm, Math.abs(F[k]!));
      for (let i = 0; i < n; i++) J.set(k, i, con.grad[i]!);
      J.set(k, n, -con.c);
    }
    if (norm <= KKT_RESIDUAL_TOL) return { z, t };
    const d = leastSquares(J, F);
    for (let i = 0; i < n; i++) z[i] = z[i]! + d[i]! * L;
    t += d[n]! * L;
  }
  return null;
}
