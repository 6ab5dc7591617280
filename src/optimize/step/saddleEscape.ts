// Stepping off a saddle, on any chart (KktModel): at a Kuhn–Tucker point whose second-order test found an
// ascent direction (secondOrder.ts), move along it, return to the binding contacts by Gauss–Newton (so the
// tube is no longer lost to first order), and keep the first move whose true tube beats the saddle's.
// Shared by the ring solver (solve.ts) and the weave solver (periodicSolve.ts) through outerLoop.ts.
import { Matrix } from 'ml-matrix';
import type { Constraint } from '../constraints/constraints.js';
import { KKT_RESIDUAL_TOL, type KktModel } from '../certify/kktNewton.js';
import { leastSquares } from '../certify/linalg.js';

/** Gauss–Newton steps back onto the contacts at most. */
const RESTORE_ITERATIONS = 20;

/** The chart at an arrangement as the escape sees it. */
export interface EscapeChart<S extends { t: number }, C extends Constraint, P> {
  model: KktModel<C, P>;
  /** The arrangement at chart coordinates z, scanned by the kernel (its true tube t). */
  at(z: Float64Array): S;
}

/**
 * From the saddle (chart origin, tube t0) try each step size (relative to the length scale L) both ways
 * along `direction`; per size the better admissible sign wins, and the first size that gains is taken.
 * Null when no move beats t0. The outer loop only accepts gains afterwards, so it cannot slide back.
 */
export function escapeSaddle<S extends { t: number }, C extends Constraint, P>(
  chart: EscapeChart<S, C, P>, binding: readonly C[], direction: Float64Array, t0: number, L: number,
  sizes: readonly number[], admissible: (s: S) => boolean,
): S | null {
  for (const size of sizes) {
    let best: S | null = null;
    for (const sign of [1, -1]) {
      const z0 = Float64Array.from(direction, (v) => sign * v * size * L);
      const back = restoreContacts(chart.model, binding, z0, t0, L);
      if (back === null) continue;
      const s = chart.at(back.z);
      if (!(s.t > t0) || !admissible(s)) continue;
      if (best === null || s.t > best.t) best = s;
    }
    if (best) return best;
  }
  return null;
}

/**
 * Gauss–Newton back onto the surface g_k(z) = c_k t of the given constraints, from (z0, t0), with
 * minimum-norm corrections; null when a strut is lost or the residual does not fall to KKT_RESIDUAL_TOL.
 */
export function restoreContacts<C extends Constraint, P>(
  model: KktModel<C, P>, cons: readonly C[], z0: Float64Array, t0: number, L: number,
): { z: Float64Array; t: number } | null {
  const n = model.nFree, m = cons.length;
  const work = cons.map((k) => model.copy(k));
  const z = Float64Array.from(z0);
  let t = t0;
  for (let it = 0; it < RESTORE_ITERATIONS; it++) {
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
