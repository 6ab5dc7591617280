// Newton's method on the KKT system of the identified active constraints, to full precision.
//
// Unknowns: chart coordinates z, tube t, multipliers λ. With h_k = g_k(z) - c_k t and L = t + Σ λ_k h_k:
//   Σ λ_k ∇g_k(z) = 0,    1 - Σ λ_k c_k = 0,    g_k(z) - c_k t = 0   for every active k.
// The Hessian of the Lagrangian, Σ λ_k ∇²g_k, is taken by central differences of the exact (envelope)
// gradients, which the left Jacobian of the chart makes consistent away from z = 0. Steps are minimum-norm
// least-squares solutions (SVD): the system is singular at degenerate optima (a continuum of contacts gives
// non-unique forces; some optima are not isolated), where plain Newton would fail.
import { Matrix } from 'ml-matrix';
import { posedAt, type Chart } from './chart.js';
import { evaluate, type Constraint, type DepartureSpec } from './constraints.js';
import { leastSquares, leastSquaresRegularized } from './linalg.js';
import { nnls } from './nnls.js';

/** KKT residual (scaled to the length scale) at which the polish stops. */
export const POLISH_RESIDUAL_TOL = 1e-13;
/** Newton converges quadratically from a good start; more steps than this mean a wrong active set. */
const POLISH_MAX_ITERATIONS = 12;
/** Central-difference step for the Lagrangian Hessian, relative to the length scale. */
const HESSIAN_STEP_REL = 1e-6;
/** Step fractions tried along the Newton step. */
const HALVINGS = Array.from({ length: 12 }, (_, k) => 2 ** -k);
/** Balance residual of the non-negative forces (relative) accepted at the end of the polish. */
const FORCE_BALANCE_TOL = 1e-9;

export interface PolishResult {
  ok: boolean;
  z: Float64Array;
  t: number;
  lambda: Float64Array;
  active: Constraint[];
  iterations: number;
  residual: number;
  message: string;
}

/** `scale` is the length scale (the smallest core radius). */
export function polish(
  chart: Chart, active0: readonly Constraint[], t0: number, lambda0: Float64Array, scale: number, dep: DepartureSpec | null,
): PolishResult {
  let active = active0.slice();
  let lambda0x = Float64Array.from(lambda0);
  let iterations = 0;
  for (let round = 0; round < 4; round++) {
    const r = newton(chart, active, t0, lambda0x, scale, dep);
    iterations += r.iterations;
    if (!r.ok) return { ...r, iterations };
    // Forces are not unique at degenerate optima: ask for non-negative ones at the converged point.
    const forces = nonNegativeForces(chart, r.active, r.z, dep);
    if (forces !== null) return { ...r, lambda: forces, iterations };
    let worst = -1, worstVal = 0;
    r.lambda.forEach((l, k) => {
      if (l < worstVal) {
        worstVal = l;
        worst = k;
      }
    });
    if (worst < 0) return { ...r, ok: false, iterations, message: 'no non-negative forces balance the active set' };
    // A negative force: that constraint is not binding; drop it and solve again from the start.
    active = active.filter((_, k) => k !== worst);
    lambda0x = Float64Array.from(r.lambda.filter((_, k) => k !== worst).map((l) => Math.max(l, 0)));
  }
  return { ok: false, z: new Float64Array(chart.nFree), t: t0, lambda: lambda0x, active, iterations, residual: Infinity, message: 'active set did not settle' };
}

function newton(
  chart: Chart, active: Constraint[], t0: number, lambda0: Float64Array, L: number, dep: DepartureSpec | null,
): PolishResult {
  const n = chart.nFree, m = active.length;
  // Work on copies: tracking moves the stored angles.
  const cons = active.map((k) => ({ ...k, grad: new Float64Array(n), pa: [...k.pa], pb: [...k.pb] }) as Constraint);
  let z = new Float64Array(n);
  let t = t0;
  let lambda = Float64Array.from(lambda0);
  let F = kktResidual(chart, cons, z, t, lambda, L, dep, true);
  if (F === null) return failed('a strut was lost at the start', cons, z, t, lambda);
  let norm = vecNorm(F);
  let it = 0;
  for (; it < POLISH_MAX_ITERATIONS && norm > POLISH_RESIDUAL_TOL; it++) {
    const J = kktJacobian(chart, cons, z, lambda, L, dep);
    if (J === null) return failed('a strut was lost while differencing', cons, z, t, lambda);
    const minusF = F.map((v) => -v);
    // Newton (near minimum norm, by cheap regularised normal equations; by the SVD when that step does
    // not help, as happens near the end at degenerate optima), damped by halving until the residual drops.
    let accepted = false;
    for (const solver of [leastSquaresRegularized, leastSquares]) {
      const step = solver(J, minusF);
      const alphas = HALVINGS;
      for (const alpha of alphas) {
        const zTry = new Float64Array(n), lTry = new Float64Array(m);
        for (let i = 0; i < n; i++) zTry[i] = z[i]! + alpha * step[i]! * L;
        const tTry = t + alpha * step[n]! * L;
        for (let k = 0; k < m; k++) lTry[k] = lambda[k]! + alpha * step[n + 1 + k]!;
        const snapshot = cons.map((k) => [k.ta, k.tb] as const);
        const FTry = kktResidual(chart, cons, zTry, tTry, lTry, L, dep, true);
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
      }
      if (accepted) break;
    }
    if (!accepted) break;
  }
  const ok = norm <= POLISH_RESIDUAL_TOL * 1e3;
  return {
    ok, z, t, lambda, active: cons, iterations: it, residual: norm,
    message: ok ? `KKT residual ${norm.toExponential(2)} after ${it} Newton steps` : `Newton stalled at KKT residual ${norm.toExponential(2)}`,
  };
}

/** [Σ λ ∇g ; 1 - Σ λ c ; (g - c t)/L], or null when a strut cannot be tracked. */
export function kktResidual(
  chart: Chart, cons: Constraint[], z: Float64Array, t: number, lambda: Float64Array, L: number, dep: DepartureSpec | null, keep: boolean,
): number[] | null {
  const n = chart.nFree, m = cons.length;
  const posed = posedAt(chart, z);
  const F = new Array<number>(n + 1 + m).fill(0);
  let lc = 0;
  for (let k = 0; k < m; k++) {
    const con = cons[k]!;
    const g = evaluate(con, chart, posed, true, dep, keep);
    if (!Number.isFinite(g)) return null;
    for (let i = 0; i < n; i++) F[i] = F[i]! + lambda[k]! * con.grad[i]!;
    lc += lambda[k]! * con.c;
    F[n + 1 + k] = (g - con.c * t) / L;
  }
  F[n] = 1 - lc;
  return F;
}

/** KKT Jacobian in the scaled unknowns (z/L, t/L, λ). */
export function kktJacobian(chart: Chart, cons: Constraint[], z: Float64Array, lambda: Float64Array, L: number, dep: DepartureSpec | null): Matrix | null {
  const n = chart.nFree, m = cons.length;
  const N = n + 1 + m;
  const J = new Matrix(N, N);
  const posed = posedAt(chart, z);
  const A: Float64Array[] = [];
  for (const con of cons) {
    if (!Number.isFinite(evaluate(con, chart, posed, true, dep, false))) return null;
    A.push(Float64Array.from(con.grad));
  }
  // W = Σ λ ∇²g by central differences of gradients; times L for the scaled z.
  const h = HESSIAN_STEP_REL * L;
  const W = new Matrix(n, n);
  for (let j = 0; j < n; j++) {
    const col = new Float64Array(n);
    for (const sgn of [1, -1]) {
      const zz = Float64Array.from(z);
      zz[j] = zz[j]! + sgn * h;
      const p = posedAt(chart, zz);
      for (let k = 0; k < m; k++) {
        const con = cons[k]!;
        if (!Number.isFinite(evaluate(con, chart, p, true, dep, false))) return null;
        for (let i = 0; i < n; i++) col[i] = col[i]! + (sgn * lambda[k]! * con.grad[i]!) / (2 * h);
      }
    }
    for (let i = 0; i < n; i++) W.set(i, j, col[i]! * L);
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) J.set(i, j, 0.5 * (W.get(i, j) + W.get(j, i)));
  }
  for (let k = 0; k < m; k++) {
    const con = cons[k]!;
    for (let i = 0; i < n; i++) {
      J.set(i, n + 1 + k, A[k]![i]!);
      J.set(n + 1 + k, i, A[k]![i]!);
    }
    J.set(n, n + 1 + k, -con.c);
    J.set(n + 1 + k, n, -con.c);
  }
  // Restore the stored gradients at z (the differencing overwrote them).
  for (let k = 0; k < m; k++) cons[k]!.grad.set(A[k]!);
  return J;
}

/**
 * Gauss–Newton back onto the surface g_k(z) = c_k t of the given constraints, from (z0, t0), with
 * minimum-norm corrections (used to step off a saddle along its ascent direction without falling back).
 */
export function restoreContacts(
  chart: Chart, cons: readonly Constraint[], z0: Float64Array, t0: number, L: number, dep: DepartureSpec | null,
): { z: Float64Array; t: number } | null {
  const n = chart.nFree, m = cons.length;
  const work = cons.map((k) => ({ ...k, grad: new Float64Array(n), pa: [...k.pa], pb: [...k.pb] }) as Constraint);
  const z = Float64Array.from(z0);
  let t = t0;
  for (let it = 0; it < 20; it++) {
    const posed = posedAt(chart, z);
    const J = new Matrix(m, n + 1);
    const F = new Float64Array(m);
    let norm = 0;
    for (let k = 0; k < m; k++) {
      const con = work[k]!;
      const g = evaluate(con, chart, posed, true, dep, true);
      if (!Number.isFinite(g)) return null;
      F[k] = -(g - con.c * t) / L;
      norm = Math.max(norm, Math.abs(F[k]!));
      for (let i = 0; i < n; i++) J.set(k, i, con.grad[i]!);
      J.set(k, n, -con.c);
    }
    if (norm <= POLISH_RESIDUAL_TOL) return { z, t };
    const d = leastSquares(J, F);
    for (let i = 0; i < n; i++) z[i] = z[i]! + d[i]! * L;
    t += d[n]! * L;
  }
  return null;
}

/** NNLS forces at z, or null when they do not balance to FORCE_BALANCE_TOL. */
function nonNegativeForces(chart: Chart, cons: Constraint[], z: Float64Array, dep: DepartureSpec | null): Float64Array | null {
  const n = chart.nFree, m = cons.length;
  const posed = posedAt(chart, z);
  const A = new Matrix(n + 1, m);
  const b = new Float64Array(n + 1);
  b[n] = 1;
  for (let k = 0; k < m; k++) {
    const con = cons[k]!;
    if (!Number.isFinite(evaluate(con, chart, posed, true, dep, true))) return null;
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

function failed(message: string, active: Constraint[], z: Float64Array, t: number, lambda: Float64Array): PolishResult {
  return { ok: false, z, t, lambda, active, iterations: 0, residual: Infinity, message };
}

function vecNorm(v: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i]! * v[i]!;
  return Math.sqrt(s);
}
