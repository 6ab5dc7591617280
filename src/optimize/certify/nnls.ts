// Non-negative least squares, min |A x - b| subject to x >= 0, by the active-set method of Lawson and
// Hanson ("Solving Least Squares Problems", 1974, ch. 23). Used for strut forces: a KKT certificate needs
// non-negative multipliers that balance the objective gradient (Ashton, Cantarella, Piatek, Rawdon 2011).
import { Matrix } from 'ml-matrix';
import { leastSquaresFullRank } from './linalg.js';

/** Dual feasibility test, relative to |A|·|b|: a column whose gradient is this small cannot help. */
const DUAL_REL_TOL = 1e-13;

export interface NnlsResult {
  x: Float64Array;
  /** |A x - b| */
  residual: number;
  iterations: number;
}

/** A is m × n (m equations, n non-negative unknowns), b has m entries. */
export function nnls(A: Matrix, b: ArrayLike<number>): NnlsResult {
  const m = A.rows, n = A.columns;
  const x = new Float64Array(n);
  const passive = new Array<boolean>(n).fill(false);
  let aNorm = 0;
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < m; i++) s += A.get(i, j) ** 2;
    aNorm = Math.max(aNorm, Math.sqrt(s));
  }
  let bNorm = 0;
  for (let i = 0; i < m; i++) bNorm += b[i]! ** 2;
  bNorm = Math.sqrt(bNorm);
  const tol = DUAL_REL_TOL * Math.max(1, aNorm) * Math.max(1, bNorm) * Math.max(m, n);
  const w = new Float64Array(n);
  let iterations = 0;
  const maxIterations = 3 * n + 10;
  for (; iterations < maxIterations; iterations++) {
    dualGradient(A, b, x, w);
    // Enter the column with the largest positive dual gradient.
    let enter = -1, best = tol;
    for (let j = 0; j < n; j++) {
      if (!passive[j] && w[j]! > best) {
        best = w[j]!;
        enter = j;
      }
    }
    if (enter === -1) break;
    passive[enter] = true;
    for (let inner = 0; inner < 3 * n + 10; inner++) {
      const s = solvePassive(A, b, passive);
      let alpha = 1, blocking = false;
      for (let j = 0; j < n; j++) {
        if (passive[j] && s[j]! <= 0) {
          blocking = true;
          const a = x[j]! / (x[j]! - s[j]!);
          if (a < alpha) alpha = a;
        }
      }
      if (!blocking) {
        x.set(s);
        break;
      }
      // Step towards s until the first passive variable reaches zero, then release it.
      for (let j = 0; j < n; j++) {
        if (!passive[j]) continue;
        x[j] = x[j]! + alpha * (s[j]! - x[j]!);
        if (x[j]! <= 0) {
          x[j] = 0;
          passive[j] = false;
        }
      }
      // The variable that set alpha sits at zero up to rounding: release it explicitly.
      for (let j = 0; j < n; j++) {
        if (passive[j] && s[j]! <= 0 && Math.abs(x[j]!) <= 1e-300 + Number.EPSILON * Math.abs(s[j]!)) {
          x[j] = 0;
          passive[j] = false;
        }
      }
    }
  }
  let res = 0;
  for (let i = 0; i < m; i++) {
    let r = -b[i]!;
    for (let j = 0; j < n; j++) r += A.get(i, j) * x[j]!;
    res += r * r;
  }
  return { x, residual: Math.sqrt(res), iterations };
}

/** w = Aᵀ (b - A x) */
function dualGradient(A: Matrix, b: ArrayLike<number>, x: Float64Array, w: Float64Array): void {
  const m = A.rows, n = A.columns;
  const r = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    let v = b[i]!;
    for (let j = 0; j < n; j++) v -= A.get(i, j) * x[j]!;
    r[i] = v;
  }
  for (let j = 0; j < n; j++) {
    let v = 0;
    for (let i = 0; i < m; i++) v += A.get(i, j) * r[i]!;
    w[j] = v;
  }
}

/** Unconstrained least squares on the passive columns; the others are zero. */
function solvePassive(A: Matrix, b: ArrayLike<number>, passive: boolean[]): Float64Array {
  const cols: number[] = [];
  for (let j = 0; j < passive.length; j++) if (passive[j]) cols.push(j);
  const sub = new Matrix(A.rows, cols.length);
  for (let i = 0; i < A.rows; i++) for (let k = 0; k < cols.length; k++) sub.set(i, k, A.get(i, cols[k]!));
  const sol = leastSquaresFullRank(sub, b);
  const s = new Float64Array(passive.length);
  for (let k = 0; k < cols.length; k++) s[cols[k]!] = sol[k]!;
  return s;
}
