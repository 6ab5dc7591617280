// Minimum-norm least squares by the singular value decomposition: the polish and the certificate meet
// rank-deficient systems (gauge-like null directions, a continuum of contacts, duplicate struts).
import { CholeskyDecomposition, Matrix, QrDecomposition, SingularValueDecomposition } from 'ml-matrix';

/** Singular values below this fraction of the largest are treated as zero. */
export const SVD_REL_CUTOFF = 1e-12;

/** x minimising |A x - b| with the smallest |x|. */
export function leastSquares(A: Matrix, b: ArrayLike<number>, relCutoff = SVD_REL_CUTOFF): Float64Array {
  const m = A.rows, n = A.columns;
  const x = new Float64Array(n);
  if (m === 0 || n === 0) return x;
  const svd = new SingularValueDecomposition(A, { autoTranspose: true });
  const U = svd.leftSingularVectors, V = svd.rightSingularVectors, s = svd.diagonal;
  const smax = s.reduce((a, v) => Math.max(a, Math.abs(v)), 0);
  if (!(smax > 0)) return x;
  const cut = relCutoff * smax;
  for (let k = 0; k < s.length; k++) {
    const sk = s[k]!;
    if (!(Math.abs(sk) > cut)) continue;
    let ub = 0;
    for (let i = 0; i < m; i++) ub += U.get(i, k) * b[i]!;
    const coef = ub / sk;
    for (let j = 0; j < n; j++) x[j] = x[j]! + coef * V.get(j, k);
  }
  return x;
}

/**
 * Least squares for a tall matrix of independent columns by Householder QR (several times cheaper than the
 * SVD); falls back to leastSquares when the columns are dependent to within QR_RANK_REL.
 */
export function leastSquaresFullRank(A: Matrix, b: ArrayLike<number>): Float64Array {
  if (A.rows >= A.columns && A.columns > 0) {
    const qr = new QrDecomposition(A);
    const R = qr.upperTriangularMatrix;
    let rmax = 0, rmin = Infinity;
    for (let k = 0; k < A.columns; k++) {
      const v = Math.abs(R.get(k, k));
      rmax = Math.max(rmax, v);
      rmin = Math.min(rmin, v);
    }
    if (rmin > QR_RANK_REL * rmax) {
      const x = qr.solve(Matrix.columnVector(Array.from(b as ArrayLike<number>)));
      return Float64Array.from(x.getColumn(0));
    }
  }
  return leastSquares(A, b);
}

/** Diagonal of R below this fraction of its largest entry: treat the columns as dependent. */
const QR_RANK_REL = 1e-10;

/**
 * Near-minimum-norm least squares by regularised normal equations, (AᵀA + εI) x = Aᵀb with ε a tiny
 * fraction of the largest diagonal entry: a Newton step needs no more accuracy than this (the residual is
 * always recomputed exactly), and it is an order of magnitude cheaper than the SVD. Falls back to the SVD
 * when the Cholesky factorisation fails.
 */
export function leastSquaresRegularized(A: Matrix, b: ArrayLike<number>): Float64Array {
  const n = A.columns;
  const At = A.transpose();
  const M = At.mmul(A);
  let dmax = 0;
  for (let i = 0; i < n; i++) dmax = Math.max(dmax, M.get(i, i));
  if (!(dmax > 0)) return new Float64Array(n);
  for (let i = 0; i < n; i++) M.set(i, i, M.get(i, i) + NORMAL_EQ_REG * dmax);
  const chol = new CholeskyDecomposition(M);
  if (!chol.isPositiveDefinite()) return leastSquares(A, b);
  const x = chol.solve(At.mmul(Matrix.columnVector(Array.from(b as ArrayLike<number>))));
  return Float64Array.from(x.getColumn(0));
}

/** Tikhonov weight of the regularised normal equations, relative to the largest diagonal of AᵀA. */
const NORMAL_EQ_REG = 1e-14;
