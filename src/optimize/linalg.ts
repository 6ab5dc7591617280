// Minimum-norm least squares by the singular value decomposition: the polish and the certificate meet
// rank-deficient systems (gauge-like null directions, a continuum of contacts, duplicate struts).
import { Matrix, SingularValueDecomposition } from 'ml-matrix';

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

/** Matrix from a list of rows of equal length. */
export function fromRows(rows: ArrayLike<number>[], columns: number): Matrix {
  const M = new Matrix(rows.length, columns);
  for (let i = 0; i < rows.length; i++) for (let j = 0; j < columns; j++) M.set(i, j, rows[i]![j]!);
  return M;
}
