// The second-order test when the strut forces are not unique. At a degenerate maximiser (more contacts than
// the motions they pin down: the free torus:3 touches R/3 with 5 struts whose forces form a polygon of
// solutions, docs/free-torus3.md) the balance Σ λ_k ∇g_k = 0, Σ λ_k c_k = 1, λ >= 0 has a whole polytope Λ of
// solutions, and the Hessian of the Lagrangian W_λ = Σ λ_k ∇²g_k depends on which λ is taken. The
// second-order necessary condition then reads: for every critical direction d, some λ in Λ has
// dᵀ W_λ d <= 0 (Ben-Tal, Math. Programming 19, 1980; Bonnans & Shapiro, Perturbation Analysis of
// Optimization Problems, 2000, §5.2). One λ for which W_λ is negative semidefinite on the critical subspace
// satisfies it for every d at once; the NNLS forces of the certificate are just one vertex-or-not of Λ and
// showed the known global maximum of the free torus:3 as a "saddle" (curvature up to 0.3). So before a
// positive curvature is believed, the largest eigenvalue f(λ) of W_λ on the critical subspace — a convex
// function of λ — is minimised over Λ: at Λ's vertices, then by Frank–Wolfe steps with an exact line search.
import { EigenvalueDecomposition, Matrix, SingularValueDecomposition } from 'ml-matrix';
import type { Constraint } from '../constraints/constraints.js';
import { kktJacobianOf, type KktModel } from './kktNewton.js';

/** Singular values of the balance matrix below this fraction of the largest span the multipliers' freedom. */
const NULL_REL = 1e-9;
/** Relative rounding allowed on λ >= 0 at a vertex. */
const VERTEX_TOL = 1e-12;
/** Active constraints and vertex subsets above which the search is not tried (dense work grows fast). */
const MAX_ROWS = 40;
const MAX_SUBSETS = 5000;
/** Frank–Wolfe steps, and golden-section evaluations per line search. */
const FW_STEPS = 30;
const LINE_EVALS = 40;

export interface MultiplierCurvature {
  /** Smallest largest-eigenvalue of W_λ on the critical subspace found over Λ (dimensionless). */
  maxCurvature: number;
  /** The forces that give it (Σ λ c = 1). */
  lambda: Float64Array;
  /** Its top eigenvector in chart coordinates (unit), or null when the subspace is trivial. */
  direction: Float64Array | null;
  /** True when some forces in Λ are positive on every active constraint (the critical cone is then the subspace). */
  fullSupport: boolean;
}

/**
 * At the model's z = 0 with the active constraints and one solution `lambda` of the balance; `N` is an
 * orthonormal basis (n × p) of the critical subspace {d : ∇g_k·d = 0 for every active k}, and `L` the length
 * scale. Null when the forces are unique (or the problem is too large to search), so the caller's figure stands.
 */
export function leastCurvatureOverForces<C extends Constraint, P>(
  model: KktModel<C, P>, active: C[], lambda: Float64Array, N: Matrix, L: number,
): MultiplierCurvature | null {
  const n = model.nFree, m = active.length;
  if (m < 2 || m > MAX_ROWS || N.columns === 0) return null;
  const J = kktJacobianOf(model, active, new Float64Array(n), lambda, L);
  if (J === null) return null;
  // Balance matrix B (n + 1 rows: gradients and c), and its null space V (m × q): Λ = {λ0 + Vα >= 0}.
  const rows = Math.max(n + 1, m);
  const B = new Matrix(rows, m);
  for (let k = 0; k < m; k++) {
    for (let i = 0; i < n; i++) B.set(i, k, J.get(n + 1 + k, i));
    B.set(n, k, -J.get(n + 1 + k, n));
  }
  const svd = new SingularValueDecomposition(B);
  const s = svd.diagonal;
  const smax = s.reduce((a, v) => Math.max(a, v), 0);
  const free: number[] = [];
  for (let j = 0; j < m; j++) if (!((s[j] ?? 0) > NULL_REL * smax)) free.push(j);
  const q = free.length;
  if (q === 0 || binomial(m, q) > MAX_SUBSETS) return null;
  const V = new Matrix(m, q);
  free.forEach((j, c) => {
    for (let k = 0; k < m; k++) V.set(k, c, svd.rightSingularVectors.get(k, j));
  });
  // Each constraint's curvature on the critical subspace: H_k = Nᵀ W_k N.
  const H: Matrix[] = [];
  for (let k = 0; k < m; k++) {
    const e = new Float64Array(m);
    e[k] = 1;
    const Jk = kktJacobianOf(model, active, new Float64Array(n), e, L);
    if (Jk === null) return null;
    H.push(N.transpose().mmul(Jk.subMatrix(0, n - 1, 0, n - 1)).mmul(N));
  }
  const top = (lam: Float64Array): { value: number; vector: Float64Array } => {
    const p = N.columns;
    const S = new Matrix(p, p);
    for (let k = 0; k < m; k++) if (lam[k] !== 0) S.add(H[k]!.clone().mul(lam[k]!));
    const evd = new EigenvalueDecomposition(S.add(S.transpose()).mul(0.5), { assumeSymmetric: true });
    const ev = evd.realEigenvalues;
    let b = 0;
    for (let k = 1; k < ev.length; k++) if (ev[k]! > ev[b]!) b = k;
    return { value: ev[b]!, vector: Float64Array.from(evd.eigenvectorMatrix.getColumn(b)) };
  };
  const vertices = polytopeVertices(lambda, V);
  if (vertices.length === 0) return null;
  // Start from the best vertex (or the given forces), then Frank–Wolfe over the vertices.
  let best: { lam: Float64Array; value: number; vector: Float64Array } = { lam: Float64Array.from(lambda), ...top(lambda) };
  for (const v of vertices) {
    const t = top(v);
    if (t.value < best.value) best = { lam: v, ...t };
  }
  for (let it = 0; it < FW_STEPS; it++) {
    const d = best.vector;
    let target: Float64Array | null = null, slope = Infinity;
    for (const v of vertices) {
      let g = 0;
      for (let k = 0; k < m; k++) g += v[k]! * quad(H[k]!, d);
      if (g < slope) {
        slope = g;
        target = v;
      }
    }
    if (target === null || !(slope < best.value)) break;
    const from = best.lam, to = target;
    const at = (x: number): Float64Array => Float64Array.from(from, (v, k) => v + x * (to[k]! - v));
    let a = 0, b = 1;
    const phi = (Math.sqrt(5) - 1) / 2;
    for (let e = 0; e < LINE_EVALS; e++) {
      const x1 = b - phi * (b - a), x2 = a + phi * (b - a);
      if (top(at(x1)).value <= top(at(x2)).value) b = x2;
      else a = x1;
    }
    const lam = at(0.5 * (a + b));
    const t = top(lam);
    if (!(t.value < best.value * (1 - 1e-12) - 1e-15)) break;
    best = { lam, ...t };
  }
  const dir = N.mmul(Matrix.columnVector(Array.from(best.vector))).getColumn(0);
  const norm = Math.hypot(...dir);
  const fullSupport = [...Array(m).keys()].every((k) => vertices.some((v) => v[k]! > 0));
  return {
    maxCurvature: best.value, lambda: best.lam, direction: norm > 0 ? Float64Array.from(dir, (v) => v / norm) : null, fullSupport,
  };
}

/** dᵀ H d. */
function quad(H: Matrix, d: Float64Array): number {
  let s = 0;
  for (let i = 0; i < d.length; i++) for (let j = 0; j < d.length; j++) s += d[i]! * H.get(i, j) * d[j]!;
  return s;
}

/** Vertices of {λ0 + Vα : λ >= 0}: q of the λ_k set to zero, the rest non-negative. */
function polytopeVertices(lambda0: Float64Array, V: Matrix): Float64Array[] {
  const m = V.rows, q = V.columns;
  const scale = lambda0.reduce((a, v) => Math.max(a, Math.abs(v)), 0);
  const out: Float64Array[] = [];
  const seen = new Set<string>();
  for (const subset of subsets(m, q)) {
    const A = new Matrix(q, q);
    const rhs = new Matrix(q, 1);
    subset.forEach((k, r) => {
      for (let c = 0; c < q; c++) A.set(r, c, V.get(k, c));
      rhs.set(r, 0, -lambda0[k]!);
    });
    const svd = new SingularValueDecomposition(A);
    const sv = svd.diagonal;
    if (!(Math.min(...sv) > NULL_REL * Math.max(...sv))) continue;
    const alpha = svd.solve(rhs);
    const lam = Float64Array.from(lambda0, (v, k) => {
      let x = v;
      for (let c = 0; c < q; c++) x += V.get(k, c) * alpha.get(c, 0);
      return x;
    });
    if (lam.some((v) => v < -VERTEX_TOL * scale)) continue;
    for (let k = 0; k < m; k++) lam[k] = Math.max(0, lam[k]!);
    const key = Array.from(lam, (v) => v.toExponential(8)).join(',');
    if (seen.has(key)) continue;
    seen.add(key);
    out.push(lam);
  }
  return out;
}

function* subsets(m: number, q: number): Generator<number[]> {
  const idx = [...Array(q).keys()];
  if (q > m) return;
  for (;;) {
    yield idx.slice();
    let i = q - 1;
    while (i >= 0 && idx[i] === m - q + i) i--;
    if (i < 0) return;
    idx[i]!++;
    for (let j = i + 1; j < q; j++) idx[j] = idx[j - 1]! + 1;
  }
}

function binomial(m: number, q: number): number {
  let r = 1;
  for (let i = 1; i <= q; i++) r = (r * (m - q + i)) / i;
  return r;
}
