// Newton's method on the KKT system of the active struts of a periodic arrangement (the periodic twin
// of polish.ts, on the periodic chart: ring poses and lattice vectors).
//
// Unknowns: chart coordinates z, tube t, multipliers λ. With h_k = g_k(z) - c_k t:
//   Σ λ_k ∇g_k(z) = 0,    1 - Σ λ_k c_k = 0,    g_k(z) - c_k t = 0   for every active k.
// The Hessian of the Lagrangian is taken by central differences of the exact (envelope) gradients; steps
// are minimum-norm least-squares solutions (SVD), since degenerate optima (a family of equally thick
// weaves, e.g. the twist of a 2-in-1 chain) make the system singular.
import { Matrix } from 'ml-matrix';
import { leastSquares } from './linalg.js';
import { nnls } from './nnls.js';
import type { PeriodicChart } from './periodicChart.js';
import { periodicPosedAt } from './periodicChart.js';
import { evaluatePeriodic, type PeriodicConstraint } from './periodicConstraints.js';

/** KKT residual (scaled to the length scale) at which the polish stops. */
export const PERIODIC_POLISH_TOL = 1e-13;
const MAX_NEWTON = 30;
/** Central-difference step for the Lagrangian Hessian, relative to the length scale. */
const HESSIAN_STEP_REL = 1e-6;
/**
 * Singular values of the KKT matrix below this fraction of the largest are dropped: the Hessian block comes
 * from differences with a 1e-6 step, so its rounding noise is ~1e-10 relative, and a family of optima (a
 * connector free to spin about its contact axis) leaves exact null directions that noise must not fill.
 */
const SVD_CUTOFF = 1e-9;
/** Balance residual of the non-negative forces (relative) accepted at the end of the polish. */
const FORCE_BALANCE_TOL = 1e-9;

export interface PeriodicPolishResult {
  ok: boolean;
  z: Float64Array;
  t: number;
  lambda: Float64Array;
  active: PeriodicConstraint[];
  message: string;
}

/** `L` is the length scale (the smallest core radius); `lambda0` starts the multipliers. */
export function polishPeriodic(
  pc: PeriodicChart, active0: readonly PeriodicConstraint[], t0: number, lambda0: Float64Array, L: number,
): PeriodicPolishResult {
  let active = active0.slice();
  let lam = Float64Array.from(lambda0);
  for (let round = 0; round < 4; round++) {
    const r = newton(pc, active, t0, lam, L);
    if (!r.ok) return r;
    const forces = nonNegativeForces(pc, r.active, r.z);
    if (forces !== null) return { ...r, lambda: forces };
    // A negative force: that constraint is not binding; drop it and solve again.
    let worst = -1, worstVal = 0;
    r.lambda.forEach((l, k) => {
      if (l < worstVal) {
        worstVal = l;
        worst = k;
      }
    });
    if (worst < 0) return { ...r, ok: false, message: 'no non-negative forces balance the active set' };
    active = active.filter((_, k) => k !== worst);
    lam = Float64Array.from(r.lambda.filter((_, k) => k !== worst).map((l) => Math.max(l, 0)));
  }
  return { ok: false, z: new Float64Array(pc.nFree), t: t0, lambda: lam, active, message: 'active set did not settle' };
}

// ---- helpers -------------------------------------------------------------------------------------

function copyCons(cons: readonly PeriodicConstraint[], n: number): PeriodicConstraint[] {
  return cons.map((k) => ({ ...k, shift: k.shift.slice(), grad: new Float64Array(n), pa: [...k.pa], pb: [...k.pb] }) as PeriodicConstraint);
}

function newton(pc: PeriodicChart, active: PeriodicConstraint[], t0: number, lambda0: Float64Array, L: number): PeriodicPolishResult {
  const n = pc.nFree, m = active.length;
  const cons = copyCons(active, n);
  let z = new Float64Array(n);
  let t = t0;
  let lambda = Float64Array.from(lambda0);
  let F = residual(pc, cons, z, t, lambda, L);
  if (F === null) return { ok: false, z, t, lambda, active: cons, message: 'a strut was lost at the start' };
  let norm = vecNorm(F);
  let it = 0;
  for (; it < MAX_NEWTON && norm > PERIODIC_POLISH_TOL; it++) {
    const J = jacobian(pc, cons, z, lambda, L);
    if (J === null) return { ok: false, z, t, lambda, active: cons, message: 'a strut was lost while differencing' };
    const step = leastSquares(J, F.map((v) => -v), SVD_CUTOFF);
    let alpha = 1, accepted = false;
    for (let ls = 0; ls < 30; ls++) {
      const zTry = new Float64Array(n), lTry = new Float64Array(m);
      for (let i = 0; i < n; i++) zTry[i] = z[i]! + alpha * step[i]! * L;
      const tTry = t + alpha * step[n]! * L;
      for (let k = 0; k < m; k++) lTry[k] = lambda[k]! + alpha * step[n + 1 + k]!;
      const snapshot = cons.map((k) => [k.ta, k.tb] as const);
      const FTry = residual(pc, cons, zTry, tTry, lTry, L);
      if (FTry !== null && vecNorm(FTry) < norm * (1 - 1e-4 * alpha)) {
        z = zTry;
        t = tTry;
        lambda = lTry;
        F = FTry;
        norm = vecNorm(F);
        accepted = true;
        break;
      }
      cons.forEach((k, i) => {
        k.ta = snapshot[i]![0];
        k.tb = snapshot[i]![1];
      });
      alpha *= 0.5;
    }
    if (!accepted) break;
  }
  const ok = norm <= PERIODIC_POLISH_TOL * 1e3;
  return {
    ok, z, t, lambda, active: cons,
    message: ok ? `KKT residual ${norm.toExponential(2)} after ${it} Newton steps` : `Newton stalled at KKT residual ${norm.toExponential(2)}`,
  };
}

/** [Σ λ ∇g ; 1 - Σ λ c ; (g - c t)/L], or null when a strut cannot be tracked. */
function residual(pc: PeriodicChart, cons: PeriodicConstraint[], z: Float64Array, t: number, lambda: Float64Array, L: number): number[] | null {
  const n = pc.nFree, m = cons.length;
  const pp = periodicPosedAt(pc, z);
  const F = new Array<number>(n + 1 + m).fill(0);
  let lc = 0;
  for (let k = 0; k < m; k++) {
    const con = cons[k]!;
    const g = evaluatePeriodic(con, pc, pp, true, true);
    if (!Number.isFinite(g)) return null;
    for (let i = 0; i < n; i++) F[i] = F[i]! + lambda[k]! * con.grad[i]!;
    lc += lambda[k]! * con.c;
    F[n + 1 + k] = (g - con.c * t) / L;
  }
  F[n] = 1 - lc;
  return F;
}

/** KKT Jacobian in the scaled unknowns (z/L, t/L, λ). */
function jacobian(pc: PeriodicChart, cons: PeriodicConstraint[], z: Float64Array, lambda: Float64Array, L: number): Matrix | null {
  const n = pc.nFree, m = cons.length;
  const J = new Matrix(n + 1 + m, n + 1 + m);
  const pp = periodicPosedAt(pc, z);
  const A: Float64Array[] = [];
  for (const con of cons) {
    if (!Number.isFinite(evaluatePeriodic(con, pc, pp, true, false))) return null;
    A.push(Float64Array.from(con.grad));
  }
  const h = HESSIAN_STEP_REL * L;
  const W = new Matrix(n, n);
  for (let j = 0; j < n; j++) {
    const col = new Float64Array(n);
    for (const sgn of [1, -1]) {
      const zz = Float64Array.from(z);
      zz[j] = zz[j]! + sgn * h;
      const p = periodicPosedAt(pc, zz);
      for (let k = 0; k < m; k++) {
        const con = cons[k]!;
        if (!Number.isFinite(evaluatePeriodic(con, pc, p, true, false))) return null;
        for (let i = 0; i < n; i++) col[i] = col[i]! + (sgn * lambda[k]! * con.grad[i]!) / (2 * h);
      }
    }
    for (let i = 0; i < n; i++) W.set(i, j, col[i]! * L);
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) J.set(i, j, 0.5 * (W.get(i, j) + W.get(j, i)));
  for (let k = 0; k < m; k++) {
    const con = cons[k]!;
    for (let i = 0; i < n; i++) {
      J.set(i, n + 1 + k, A[k]![i]!);
      J.set(n + 1 + k, i, A[k]![i]!);
    }
    J.set(n, n + 1 + k, -con.c);
    J.set(n + 1 + k, n, -con.c);
  }
  for (let k = 0; k < m; k++) cons[k]!.grad.set(A[k]!);
  return J;
}

/** NNLS forces at z, or null when they do not balance to FORCE_BALANCE_TOL. */
function nonNegativeForces(pc: PeriodicChart, cons: PeriodicConstraint[], z: Float64Array): Float64Array | null {
  const n = pc.nFree, m = cons.length;
  const pp = periodicPosedAt(pc, z);
  const A = new Matrix(n + 1, m);
  const b = new Float64Array(n + 1);
  b[n] = 1;
  for (let k = 0; k < m; k++) {
    const con = cons[k]!;
    if (!Number.isFinite(evaluatePeriodic(con, pc, pp, true, true))) return null;
    for (let i = 0; i < n; i++) A.set(i, k, con.grad[i]!);
    A.set(n, k, con.c);
  }
  const sol = nnls(A, b);
  let largest = 1;
  for (let k = 0; k < m; k++) {
    let col = 0;
    for (let i = 0; i <= n; i++) col += A.get(i, k) ** 2;
    largest = Math.max(largest, sol.x[k]! * Math.sqrt(col));
  }
  return sol.residual / largest <= FORCE_BALANCE_TOL ? sol.x : null;
}

function vecNorm(v: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i]! * v[i]!;
  return Math.sqrt(s);
}
