// Second-order test at a Kuhn–Tucker point: the Hessian of the Lagrangian, W = Σ λ_k ∇²g_k, must be
// negative semidefinite on the critical cone (motions that keep the contacts with positive force and do
// not close the others; t does not change along them to first order) for a local maximum — the standard
// second-order necessary condition. Checked on the subspace that keeps every active contact (inside the
// cone), and on the one that keeps only the forced contacts when its best direction opens the rest. A
// positive eigenvalue means a saddle: a symmetric arrangement is often a maximum among symmetric ones but a
// saddle among all, and the eigenvector is the way out. W is the Hessian block of the KKT Jacobian of the
// Newton polish (kktNewton.ts), so any KktModel is tested alike: the free rings (polish.ts ringKktModel)
// and the weaves, whose chart adds the lattice vectors (polish.ts periodicKktModel).
import { EigenvalueDecomposition, Matrix, SingularValueDecomposition } from 'ml-matrix';
import type { Constraint } from '../constraints/constraints.js';
import { kktJacobianOf, type KktModel } from './kktNewton.js';
import { analyseLdl, factorLdl, SymTriplets } from '../step/sparseLdl.js';
import { CURVATURE_TOL, DENSE_SECOND_ORDER_MAX_FREE } from './certificate.js';
import { leastCurvatureOverForces } from './multiplierSet.js';

/** Multipliers below this fraction of the largest do not restrict the critical subspace. */
const POSITIVE_FORCE_REL = 1e-9;
/** Singular values of the active gradients below this fraction of the largest span the critical subspace. */
const NULL_REL = 1e-9;
/** Free variables above which the second-order test first tries the sparse inertia test (dense SVD is O(n³)). */
const SPARSE_TEST_MIN_FREE = 120;
/** Penalty ε of the inertia test (dimensionless: gradients are unit-sized): 1/ε dwarfs any curvature off the null space. */
const PENALTY_EPS = 1e-8;
/**
 * Shifts tried, smallest first; the first that passes is the reported bound. Rounding in M (entries up to 1/ε)
 * is about 1e-8, so no shift below 1e-7 is trusted; all lie below CURVATURE_TOL (certificate.ts).
 */
const INERTIA_SHIFTS: readonly number[] = [1e-7, 5e-7];
/** Pivots counted as zero (relative): M is positive definite when the test passes, so only a pivot lost altogether. */
const PIVOT_ZERO_REL = 1e-300;
/** First-order change (dimensionless) of an idle contact still counted as not closing it. */
const OPENING_TOL = 1e-9;

export interface Curvature {
  /** Largest eigenvalue of W on the critical subspace, times the length scale (dimensionless). */
  maxCurvature: number;
  /** Its eigenvector in chart coordinates (unit length), or null when the subspace is trivial. */
  direction: Float64Array | null;
}

/**
 * At the model's z = 0, with the active constraints and their non-negative forces `lambda` (Σ λ c = 1);
 * `L` is the length scale (the smallest core radius). Null when a strut was lost while differencing.
 * The constraints' stored gradients are left as re-evaluated at z = 0; pass copies to keep them.
 */
export function criticalCurvature<C extends Constraint, P>(
  model: KktModel<C, P>, active: C[], lambda: Float64Array, L: number,
): Curvature | null {
  const n = model.nFree, m = active.length;
  if (n === 0) return { maxCurvature: 0, direction: null };
  if (n > SPARSE_TEST_MIN_FREE) {
    const bound = curvatureBoundByInertia(model, active, lambda, L);
    if (bound !== null) return { maxCurvature: bound, direction: null };
  }
  // The dense test (an SVD, O(n³)) is not run on large problems: the condition is then left unchecked.
  if (n > DENSE_SECOND_ORDER_MAX_FREE) return null;
  const J = kktJacobianOf(model, active, new Float64Array(n), lambda, L);
  if (J === null) return null;
  const all = [...Array(m).keys()];
  const binding = bindingRows(lambda);
  // Keeping every active contact stays inside the critical cone: positive curvature there is a saddle.
  const strict = curvatureOn(J, n, all);
  if (strict.maxCurvature > CURVATURE_TOL && strict.basis !== null) {
    // Forces that are not unique (a degenerate maximiser): the condition holds if some forces in their
    // polytope make W negative semidefinite there (multiplierSet.ts); the critical cone is the subspace when
    // some forces are positive on every active contact.
    const least = leastCurvatureOverForces(model, active, lambda, strict.basis, L);
    if (least !== null && least.fullSupport && least.maxCurvature < strict.maxCurvature) {
      return { maxCurvature: least.maxCurvature, direction: least.direction };
    }
  }
  if (strict.maxCurvature > 0 || binding.length === all.length) return strict;
  // Only the binding contacts held: the cone also allows opening the others, so the direction counts
  // only if it (or its opposite) does not close an active contact to first order.
  const wide = curvatureOn(J, n, binding);
  if (wide.direction !== null && wide.maxCurvature > strict.maxCurvature) {
    const idle = all.filter((k) => !binding.includes(k));
    for (const sign of [1, -1]) {
      const ok = idle.every((k) => {
        let d = 0;
        for (let i = 0; i < n; i++) d += J.get(n + 1 + k, i) * sign * wide.direction![i]!;
        return d >= -OPENING_TOL;
      });
      if (ok) return { maxCurvature: wide.maxCurvature, direction: Float64Array.from(wide.direction, (v) => sign * v) };
    }
  }
  return strict;
}

/**
 * An upper bound on the largest curvature of W on the critical subspace without dense algebra, or null when
 * the test does not show it below CURVATURE_TOL (then the dense eigen-decomposition finds the value and the
 * way out). W - τI is negative definite on the null space of the binding rows A exactly when
 * M = τI - W + AᵀA/ε is positive definite for small enough ε (a penalty form of the second-order test;
 * Sylvester's law makes it a count of positive pivots of a sparse LDLᵀ, step/sparseLdl.ts). The null space of
 * the binding rows contains both subspaces the dense test looks at, so a pass bounds both.
 */
export function curvatureBoundByInertia<C extends Constraint, P>(
  model: KktModel<C, P>, active: C[], lambda: Float64Array, L: number,
): number | null {
  if (!model.hessianEntries) return null;
  const n = model.nFree;
  const posed = model.posedAt(new Float64Array(n));
  const trip = new SymTriplets(n);
  const ok = model.hessianEntries(active, posed, lambda, (i, j, v) => trip.add(i, j, -L * v));
  if (!ok) return null;
  for (const k of bindingRows(lambda)) {
    const con = active[k]!;
    if (!Number.isFinite(model.evaluate(con, posed, false))) return null;
    const g = Float64Array.from(con.grad);
    const nz: number[] = [];
    for (let i = 0; i < n; i++) if (g[i] !== 0) nz.push(i);
    for (let a = 0; a < nz.length; a++) for (let b = a; b < nz.length; b++) trip.add(nz[a]!, nz[b]!, g[nz[a]!]! * g[nz[b]!]! / PENALTY_EPS);
  }
  for (let i = 0; i < n; i++) trip.add(i, i, 0);
  const { matrix } = trip.toCsc();
  const base = Float64Array.from(matrix.values);
  const pattern = analyseLdl(matrix);
  const diag = new Int32Array(n);
  for (let j = 0; j < n; j++) diag[j] = matrix.colPtr[j + 1]! - 1;
  for (const tau of INERTIA_SHIFTS) {
    matrix.values.set(base);
    for (let i = 0; i < n; i++) matrix.values[diag[i]!] = matrix.values[diag[i]!]! + tau;
    const f = factorLdl(pattern, matrix, PIVOT_ZERO_REL);
    if (f.zero === 0 && f.positive === n) return tau;
  }
  return null;
}

/** Indices of the constraints whose force restricts the critical subspace. */
function bindingRows(lambda: Float64Array): number[] {
  let lmax = 0;
  for (const l of lambda) lmax = Math.max(lmax, l);
  const out: number[] = [];
  lambda.forEach((l, k) => {
    if (l > POSITIVE_FORCE_REL * lmax) out.push(k);
  });
  return out;
}

/** Largest eigenvalue of W on {dz : ∇g_k·dz = 0 for k in rows} (rows of the KKT Jacobian), with that subspace's basis. */
function curvatureOn(J: Matrix, n: number, rows: number[]): Curvature & { basis: Matrix | null } {
  let N: Matrix;
  if (rows.length === 0) {
    N = Matrix.eye(n, n);
  } else {
    const A = new Matrix(Math.max(rows.length, n), n);
    rows.forEach((k, r) => {
      for (let i = 0; i < n; i++) A.set(r, i, J.get(n + 1 + k, i));
    });
    const svd = new SingularValueDecomposition(A);
    const s = svd.diagonal;
    const smax = s.reduce((a, v) => Math.max(a, v), 0);
    const V = svd.rightSingularVectors;
    const cols: number[] = [];
    for (let j = 0; j < n; j++) if (!((s[j] ?? 0) > NULL_REL * smax)) cols.push(j);
    if (cols.length === 0) return { maxCurvature: -Infinity, direction: null, basis: null };
    N = new Matrix(n, cols.length);
    cols.forEach((j, c) => {
      for (let i = 0; i < n; i++) N.set(i, c, V.get(i, j));
    });
  }
  const W = J.subMatrix(0, n - 1, 0, n - 1);
  const H = N.transpose().mmul(W).mmul(N);
  const Hs = H.add(H.transpose()).mul(0.5);
  const evd = new EigenvalueDecomposition(Hs, { assumeSymmetric: true });
  const ev = evd.realEigenvalues;
  let best = 0;
  for (let k = 1; k < ev.length; k++) if (ev[k]! > ev[best]!) best = k;
  const dir = N.mmul(evd.eigenvectorMatrix.subMatrix(0, ev.length - 1, best, best)).getColumn(0);
  const norm = Math.hypot(...dir);
  // J's W block is already in the scaled coordinates (z / L), so its eigenvalues are dimensionless.
  return { maxCurvature: ev[best]!, direction: norm > 0 ? Float64Array.from(dir.map((v) => v / norm)) : null, basis: N };
}
