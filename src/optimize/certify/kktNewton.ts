// Newton's method on the KKT system of the identified active constraints, to full precision; shared by the
// free-ring polish and the periodic one (both in polish.ts), which differ only in the chart
// (how poses follow from z, how a constraint is evaluated there) and in the step solvers.
//
// Unknowns: chart coordinates z, tube t, multipliers λ. With h_k = g_k(z) - c_k t and L = t + Σ λ_k h_k:
//   Σ λ_k ∇g_k(z) = 0,    1 - Σ λ_k c_k = 0,    g_k(z) - c_k t = 0   for every active k.
// The Hessian of the Lagrangian, Σ λ_k ∇²g_k, is taken by central differences of the exact (envelope)
// gradients. Steps are minimum-norm least-squares solutions: the system is singular at degenerate optima
// (a continuum of contacts gives non-unique forces; some optima are not isolated, e.g. the twist of a
// 2-in-1 chain), where plain Newton would fail. Forces are not unique there either, so at the converged
// point non-negative ones are asked for (NNLS); a constraint with a negative force is not binding and is
// dropped before solving again.
import { Matrix } from 'ml-matrix';
import type { Constraint } from '../constraints/constraints.js';
import { nnls } from './nnls.js';

/** KKT residual (scaled to the length scale) at which the polish stops. */
export const KKT_RESIDUAL_TOL = 1e-13;
/** Central-difference step for the Lagrangian Hessian, relative to the length scale. */
const HESSIAN_STEP_REL = 1e-6;
/** Balance residual of the non-negative forces (relative) accepted at the end of the polish. */
const FORCE_BALANCE_TOL = 1e-9;
/** Rounds of dropping a constraint with a negative force. */
const DROP_ROUNDS = 4;

/** What the Newton core needs of a chart: the poses at z, and each constraint's value and gradient there. */
export interface KktModel<C extends Constraint, P> {
  nFree: number;
  posedAt(z: Float64Array): P;
  /**
   * g_k at `posed`, its gradient (free coordinates) into con.grad; the tracked angles and points are
   * stored when `keep`. NaN when a strut was lost.
   */
  evaluate(con: C, posed: P, keep: boolean): number;
  /** A working copy with its own gradient and points (tracking moves the stored angles). */
  copy(con: C): C;
  /**
   * The exact Lagrangian Hessian Σ λ_k ∇²g_k at `posed` (n × n row-major, free coordinates), or null where
   * the chart cannot give it; then it is taken by central differences of the gradients.
   */
  hessian?(cons: readonly C[], posed: P, lambda: Float64Array): Float64Array | null;
  /**
   * The same W as sparse entries (upper triangle of the symmetrised W, repeats summed) handed to `add`;
   * false where the chart cannot give it (what was handed out is then to be discarded).
   */
  hessianEntries?(cons: readonly C[], posed: P, lambda: Float64Array, add: (i: number, j: number, v: number) => void): boolean;
}

export interface KktSettings {
  /** Newton converges quadratically from a good start; more steps than this mean a wrong active set. */
  maxIterations: number;
  /** Least-squares solvers tried in turn for the Newton step until one lowers the residual. */
  solvers: readonly ((J: Matrix, b: number[]) => Float64Array)[];
  /** Step fractions tried along each Newton step. */
  fractions: readonly number[];
}

export interface KktResult<C extends Constraint> {
  ok: boolean;
  z: Float64Array;
  t: number;
  lambda: Float64Array;
  active: C[];
  iterations: number;
  residual: number;
  message: string;
}

/** Polish from (z = 0, t0, λ0); `L` is the length scale (the smallest core radius). */
export function polishKkt<C extends Constraint, P>(
  model: KktModel<C, P>, settings: KktSettings, active0: readonly C[], t0: number, lambda0: Float64Array, L: number,
): KktResult<C> {
  let active = active0.slice();
  let lambda0x = Float64Array.from(lambda0);
  let iterations = 0;
  for (let round = 0; round < DROP_ROUNDS; round++) {
    const r = newton(model, settings, active, t0, lambda0x, L);
    iterations += r.iterations;
    if (!r.ok) return { ...r, iterations };
    // Forces are not unique at degenerate optima: ask for non-negative ones at the converged point.
    const forces = nonNegativeForces(model, r.active, r.z);
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
  return {
    ok: false, z: new Float64Array(model.nFree), t: t0, lambda: lambda0x, active, iterations, residual: Infinity,
    message: 'active set did not settle',
  };
}

/** [Σ λ ∇g ; 1 - Σ λ c ; (g - c t)/L], or null when a strut cannot be tracked. */
export function kktResidualOf<C extends Constraint, P>(
  model: KktModel<C, P>, cons: C[], z: Float64Array, t: number, lambda: Float64Array, L: number, keep: boolean,
): number[] | null {
  const n = model.nFree, m = cons.length;
  const posed = model.posedAt(z);
  const F = new Array<number>(n + 1 + m).fill(0);
  let lc = 0;
  for (let k = 0; k < m; k++) {
    const con = cons[k]!;
    const g = model.evaluate(con, posed, keep);
    if (!Number.isFinite(g)) return null;
    for (let i = 0; i < n; i++) F[i] = F[i]! + lambda[k]! * con.grad[i]!;
    lc += lambda[k]! * con.c;
    F[n + 1 + k] = (g - con.c * t) / L;
  }
  F[n] = 1 - lc;
  return F;
}

/** KKT Jacobian in the scaled unknowns (z/L, t/L, λ); the constraints' stored gradients are left at z. */
export function kktJacobianOf<C extends Constraint, P>(
  model: KktModel<C, P>, cons: C[], z: Float64Array, lambda: Float64Array, L: number,
): Matrix | null {
  const n = model.nFree, m = cons.length;
  const N = n + 1 + m;
  const J = new Matrix(N, N);
  const posed = model.posedAt(z);
  const A: Float64Array[] = [];
  for (const con of cons) {
    if (!Number.isFinite(model.evaluate(con, posed, false))) return null;
    A.push(Float64Array.from(con.grad));
  }
  // W = Σ λ ∇²g, exact where the chart gives it, else by central differences of gradients; times L for the scaled z.
  const h = HESSIAN_STEP_REL * L;
  const W = new Matrix(n, n);
  const exact = model.hessian?.(cons, posed, lambda) ?? null;
  if (exact) {
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) W.set(i, j, exact[i * n + j]! * L);
  }
  for (let j = 0; j < n && !exact; j++) {
    const col = new Float64Array(n);
    for (const sgn of [1, -1]) {
      const zz = Float64Array.from(z);
      zz[j] = zz[j]! + sgn * h;
      const p = model.posedAt(zz);
      for (let k = 0; k < m; k++) {
        const con = cons[k]!;
        if (!Number.isFinite(model.evaluate(con, p, false))) return null;
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

// ---- helpers -------------------------------------------------------------------------------------

function newton<C extends Constraint, P>(
  model: KktModel<C, P>, settings: KktSettings, active: C[], t0: number, lambda0: Float64Array, L: number,
): KktResult<C> {
  const n = model.nFree, m = active.length;
  // Work on copies: tracking moves the stored angles.
  const cons = active.map((k) => model.copy(k));
  let z = new Float64Array(n);
  let t = t0;
  let lambda = Float64Array.from(lambda0);
  let F = kktResidualOf(model, cons, z, t, lambda, L, true);
  if (F === null) return failed('a strut was lost at the start', cons, z, t, lambda);
  let norm = vecNorm(F);
  let it = 0;
  for (; it < settings.maxIterations && norm > KKT_RESIDUAL_TOL; it++) {
    const J = kktJacobianOf(model, cons, z, lambda, L);
    if (J === null) return failed('a strut was lost while differencing', cons, z, t, lambda);
    const minusF = F.map((v) => -v);
    // Damped by shortening the step until the residual drops; the next solver when no fraction helps.
    let accepted = false;
    for (const solver of settings.solvers) {
      const step = solver(J, minusF);
      for (const alpha of settings.fractions) {
        const zTry = new Float64Array(n), lTry = new Float64Array(m);
        for (let i = 0; i < n; i++) zTry[i] = z[i]! + alpha * step[i]! * L;
        const tTry = t + alpha * step[n]! * L;
        for (let k = 0; k < m; k++) lTry[k] = lambda[k]! + alpha * step[n + 1 + k]!;
        const snapshot = cons.map((k) => [k.ta, k.tb] as const);
        const FTry = kktResidualOf(model, cons, zTry, tTry, lTry, L, true);
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
  const ok = norm <= KKT_RESIDUAL_TOL * 1e3;
  return {
    ok, z, t, lambda, active: cons, iterations: it, residual: norm,
    message: ok ? `KKT residual ${norm.toExponential(2)} after ${it} Newton steps` : `Newton stalled at KKT residual ${norm.toExponential(2)}`,
  };
}

/** NNLS forces at z, or null when they do not balance to FORCE_BALANCE_TOL. */
function nonNegativeForces<C extends Constraint, P>(model: KktModel<C, P>, cons: C[], z: Float64Array): Float64Array | null {
  const n = model.nFree, m = cons.length;
  const posed = model.posedAt(z);
  const A = new Matrix(n + 1, m);
  const b = new Float64Array(n + 1);
  b[n] = 1;
  for (let k = 0; k < m; k++) {
    const con = cons[k]!;
    if (!Number.isFinite(model.evaluate(con, posed, true))) return null;
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

function failed<C extends Constraint>(message: string, active: C[], z: Float64Array, t: number, lambda: Float64Array): KktResult<C> {
  return { ok: false, z, t, lambda, active, iterations: 0, residual: Infinity, message };
}

function vecNorm(v: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i]! * v[i]!;
  return Math.sqrt(s);
}
