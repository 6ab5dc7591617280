// Sparse LDLᵀ for symmetric quasi-definite matrices (the KKT systems of the interior-point step).
// A quasi-definite matrix [[H + D1, Aᵀ], [A, -D2]] has an LDLᵀ with diagonal D under ANY symmetric
// permutation (R. J. Vanderbei, "Symmetric quasi-definite matrices", SIAM J. Optim. 5(1), 1995), so there
// is no pivoting: a fill-reducing ordering (ordering.ts), the elimination tree and column counts once per
// pattern, then an up-looking numeric factorisation per set of values. Notation and algorithm follow
// T. A. Davis, "Direct Methods for Sparse Linear Systems", SIAM 2006, ch. 4 (etree, column counts, LDL).
// The pivot signs give the inertia (Sylvester's law of inertia), which the interior-point method uses to
// detect a Hessian that is not positive definite on the constraints' null space.
import { minimumDegreeOrder } from './ordering.js';

/** Symmetric n × n matrix by its upper triangle (diagonal included) in compressed sparse columns; row indices ascending in each column; every diagonal entry present (possibly 0). */
export interface SymCsc { n: number; colPtr: Int32Array; rowIdx: Int32Array; values: Float64Array }

/** Entries of a symmetric matrix (i, j in either triangle; duplicates summed). */
export class SymTriplets {
  readonly n: number;
  private count = 0;
  private rows: Int32Array;
  private cols: Int32Array;
  private vals: Float64Array;

  constructor(n: number) {
    if (!Number.isInteger(n) || n < 0) throw new RangeError(`SymTriplets: size ${n} must be an integer >= 0`);
    this.n = n;
    const cap = Math.max(16, 2 * n);
    this.rows = new Int32Array(cap);
    this.cols = new Int32Array(cap);
    this.vals = new Float64Array(cap);
  }

  /** Number of entries added so far. */
  get length(): number {
    return this.count;
  }

  add(i: number, j: number, v: number): void {
    const n = this.n;
    if (!(i >= 0 && i < n && j >= 0 && j < n) || !Number.isInteger(i) || !Number.isInteger(j)) {
      throw new RangeError(`SymTriplets.add: entry (${i}, ${j}) must lie in 0..${n - 1}; check the index map`);
    }
    if (this.count === this.rows.length) this.grow();
    const k = this.count++;
    // Store in the upper triangle: row <= column.
    this.rows[k] = i < j ? i : j;
    this.cols[k] = i < j ? j : i;
    this.vals[k] = v;
  }

  /** The entries added so far, in order (views, valid until the next add). */
  entries(): { i: Int32Array; j: Int32Array; v: Float64Array } {
    return { i: this.rows.subarray(0, this.count), j: this.cols.subarray(0, this.count), v: this.vals.subarray(0, this.count) };
  }

  /** The matrix, and for each added entry in order its index into values (so values can be re-summed for new numbers with the same pattern: values.fill(0); values[slot[k]] += v_k). Diagonal entries are always present. */
  toCsc(): { matrix: SymCsc; slot: Int32Array } {
    const n = this.n, m = this.count, total = m + n;
    // Entries 0..m-1 are the added ones, m..m+n-1 the implicit zero diagonal.
    const row = (k: number): number => (k < m ? this.rows[k]! : k - m);
    const col = (k: number): number => (k < m ? this.cols[k]! : k - m);
    // Two stable counting sorts (by row, then by column) give column-major order with ascending rows.
    const byRow = countingSort(total, n, row, null);
    const byCol = countingSort(total, n, col, byRow);
    const colPtr = new Int32Array(n + 1);
    const rowIdxAll = new Int32Array(total);
    const valuesAll = new Float64Array(total);
    const slot = new Int32Array(m);
    let nz = -1, lastR = -1, lastC = -1;
    for (let t = 0; t < total; t++) {
      const k = byCol[t]!, r = row(k), c = col(k);
      if (r !== lastR || c !== lastC) {
        nz++;
        rowIdxAll[nz] = r;
        colPtr[c + 1] = nz + 1;
        lastR = r;
        lastC = c;
      }
      if (k < m) {
        valuesAll[nz] += this.vals[k]!;
        slot[k] = nz;
      }
    }
    // Every column holds at least its diagonal, so colPtr[c + 1] was set for each c.
    const nnz = nz + 1;
    return {
      matrix: { n, colPtr, rowIdx: rowIdxAll.slice(0, nnz), values: valuesAll.slice(0, nnz) },
      slot,
    };
  }

  private grow(): void {
    const cap = this.rows.length * 2;
    const r = new Int32Array(cap), c = new Int32Array(cap), v = new Float64Array(cap);
    r.set(this.rows);
    c.set(this.cols);
    v.set(this.vals);
    this.rows = r;
    this.cols = c;
    this.vals = v;
  }
}

/** Ordering and symbolic analysis of one sparsity pattern, reused for every numeric factorisation with that pattern. */
export interface LdlPattern {
  readonly n: number;
  /** perm[k] = original index of the k-th pivot. */
  readonly perm: Int32Array;
  /** Elimination tree of the permuted matrix (-1 at a root). */
  readonly parent: Int32Array;
  /** Column pointers of the strictly lower factor L (column counts summed). */
  readonly Lp: Int32Array;
  /** Row indices of L, ascending in each column (fixed by the pattern). */
  readonly Li: Int32Array;
  readonly nnzL: number;
  /** The analysed pattern of A (its arrays, kept to check later calls). */
  readonly colPtr: Int32Array;
  readonly rowIdx: Int32Array;
  /** Permuted upper pattern C = (P A Pᵀ) upper, and for each value of A its index into C's values. */
  readonly Cp: Int32Array;
  readonly Ci: Int32Array;
  readonly toC: Int32Array;
  /** Scratch for the numeric factorisation (one factorisation at a time per pattern). */
  readonly work: { y: Float64Array; pattern: Int32Array; flag: Int32Array; fill: Int32Array; cx: Float64Array };
}

export function analyseLdl(A: SymCsc, ordering: 'min-degree' | 'natural' = 'min-degree'): LdlPattern {
  checkCsc(A);
  const n = A.n, { colPtr, rowIdx } = A;
  const perm = ordering === 'natural' ? naturalOrder(n) : minimumDegreeOrder(n, colPtr, rowIdx);
  const pinv = new Int32Array(n);
  for (let k = 0; k < n; k++) pinv[perm[k]!] = k;
  // Permuted upper triangle: entry (i, j) of A goes to column max(pinv i, pinv j) of C.
  const nnzA = colPtr[n]!;
  const Cp = new Int32Array(n + 1);
  for (let j = 0; j < n; j++) {
    for (let q = colPtr[j]!; q < colPtr[j + 1]!; q++) {
      const a = pinv[rowIdx[q]!]!, b = pinv[j]!;
      Cp[(a > b ? a : b) + 1]!++;
    }
  }
  for (let k = 0; k < n; k++) Cp[k + 1]! += Cp[k]!;
  const next = Cp.slice(0, n), Ci = new Int32Array(nnzA), toC = new Int32Array(nnzA);
  for (let j = 0; j < n; j++) {
    for (let q = colPtr[j]!; q < colPtr[j + 1]!; q++) {
      const a = pinv[rowIdx[q]!]!, b = pinv[j]!;
      const at = next[a > b ? a : b]!++;
      Ci[at] = a > b ? b : a;
      toC[q] = at;
    }
  }
  // Elimination tree and column counts (Davis 2006, §4.1 and the LDL package's symbolic pass): row k of L
  // is the reach of column k's entries up the tree, stopping at nodes already flagged k.
  const parent = new Int32Array(n), flag = new Int32Array(n), count = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    parent[k] = -1;
    flag[k] = k;
    for (let q = Cp[k]!; q < Cp[k + 1]!; q++) {
      for (let i = Ci[q]!; i < k && flag[i] !== k; i = parent[i]!) {
        if (parent[i] === -1) parent[i] = k;
        count[i]!++;
        flag[i] = k;
      }
    }
  }
  const Lp = new Int32Array(n + 1);
  for (let k = 0; k < n; k++) Lp[k + 1] = Lp[k]! + count[k]!;
  const nnzL = Lp[n]!;
  // Row indices of L: the same traversal with k ascending fills each column in ascending row order.
  // (flag[i] < k for all i < k holds again: step i set flag[i] = i and later steps only raised it below k.)
  const Li = new Int32Array(nnzL), fill = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    flag[k] = k;
    for (let q = Cp[k]!; q < Cp[k + 1]!; q++) {
      for (let i = Ci[q]!; i < k && flag[i] !== k; i = parent[i]!) {
        Li[Lp[i]! + fill[i]!++] = k;
        flag[i] = k;
      }
    }
  }
  const work = {
    y: new Float64Array(n), pattern: new Int32Array(n), flag, fill, cx: new Float64Array(nnzA),
  };
  return { n, perm, parent, Lp, Li, nnzL, colPtr, rowIdx, Cp, Ci, toC, work };
}

export interface LdlFactor {
  /** Pivots > 0, < 0, and |pivot| <= zeroTol · (largest |diagonal of A|, at least tiny) */
  readonly positive: number; readonly negative: number; readonly zero: number;
  /** Solves A x = b (x overwrites out, or a new array). Only meaningful when zero === 0. */
  solve(b: Float64Array, out?: Float64Array): Float64Array;
}

/** Default relative size below which a pivot counts as zero: a few hundred rounding units of the largest diagonal, the error level of the elimination itself (common practice, no source). */
export const DEFAULT_ZERO_TOL = 1e-13;
/** Smallest scale for the zero test, so an all-zero diagonal still gives a positive threshold. */
const TINY_SCALE = 1e-300;

/** A must have exactly the analysed pattern (same colPtr/rowIdx), only values differ. Never throws on a zero pivot: counts it, replaces it by a tiny signed value, keeps going. */
export function factorLdl(p: LdlPattern, A: SymCsc, zeroTol: number = DEFAULT_ZERO_TOL): LdlFactor {
  checkSamePattern(p, A);
  if (!(zeroTol >= 0)) throw new RangeError(`factorLdl: zeroTol ${zeroTol} must be a number >= 0`);
  const n = p.n, { Cp, Ci, Lp, Li, parent, toC } = p, { y, pattern, flag, fill, cx } = p.work;
  // Scatter A's values into the permuted upper triangle; find the scale of the zero test.
  cx.fill(0);
  const av = A.values, nnzA = av.length;
  for (let q = 0; q < nnzA; q++) cx[toC[q]!]! += av[q]!;
  let scale = TINY_SCALE;
  for (let j = 0; j < n; j++) {
    const d = Math.abs(av[A.colPtr[j + 1]! - 1]!); // the diagonal is the last entry of its column (rows ascending)
    if (d > scale) scale = d;
  }
  const threshold = zeroTol * scale;
  // A zero pivot is replaced by this much, signed, so the elimination continues with finite numbers.
  const replacement = Math.max(threshold, scale * Number.EPSILON);
  const Lx = new Float64Array(p.nnzL), D = new Float64Array(n);
  let positive = 0, negative = 0, zero = 0;
  // Up-looking LDLᵀ (Davis 2006, §4.4 / the LDL package's numeric pass): solve L(0:k,0:k) D y = C(0:k, k)
  // along the nonzero pattern of row k (a reach in the etree), then row k of L is y ./ D.
  for (let k = 0; k < n; k++) {
    let top = n;
    flag[k] = k;
    fill[k] = 0;
    y[k] = 0;
    for (let q = Cp[k]!; q < Cp[k + 1]!; q++) {
      let i = Ci[q]!;
      y[i]! += cx[q]!;
      let len = 0;
      for (; flag[i] !== k; i = parent[i]!) {
        pattern[len++] = i;
        flag[i] = k;
      }
      while (len > 0) pattern[--top] = pattern[--len]!;
    }
    let dk = y[k]!;
    y[k] = 0;
    for (; top < n; top++) {
      const i = pattern[top]!, yi = y[i]!;
      y[i] = 0;
      const end = Lp[i]! + fill[i]!;
      for (let q = Lp[i]!; q < end; q++) y[Li[q]!]! -= Lx[q]! * yi;
      const lki = yi / D[i]!;
      dk -= lki * yi;
      Lx[end] = lki;
      fill[i]!++;
    }
    // Count the pivot's sign; a (near-)zero or non-finite pivot is counted as zero and replaced.
    if (Math.abs(dk) > threshold && Number.isFinite(dk)) {
      if (dk > 0) positive++;
      else negative++;
    } else {
      zero++;
      dk = dk < 0 ? -replacement : replacement;
    }
    D[k] = dk;
  }
  return new Factor(n, p.perm, Lp, Li, Lx, D, positive, negative, zero);
}

class Factor implements LdlFactor {
  private readonly x: Float64Array;
  constructor(
    private readonly n: number, private readonly perm: Int32Array, private readonly Lp: Int32Array,
    private readonly Li: Int32Array, private readonly Lx: Float64Array, private readonly D: Float64Array,
    readonly positive: number, readonly negative: number, readonly zero: number,
  ) {
    this.x = new Float64Array(n);
  }

  solve(b: Float64Array, out?: Float64Array): Float64Array {
    const { n, perm, Lp, Li, Lx, D, x } = this;
    if (b.length !== n) throw new RangeError(`LdlFactor.solve: right-hand side has ${b.length} entries, expected ${n}`);
    const result = out ?? new Float64Array(n);
    if (result.length !== n) throw new RangeError(`LdlFactor.solve: out has ${result.length} entries, expected ${n}`);
    for (let k = 0; k < n; k++) x[k] = b[perm[k]!]!;
    // L z = P b, column-oriented forward substitution.
    for (let j = 0; j < n; j++) {
      const xj = x[j]!;
      if (xj !== 0) for (let q = Lp[j]!; q < Lp[j + 1]!; q++) x[Li[q]!]! -= Lx[q]! * xj;
    }
    for (let j = 0; j < n; j++) x[j]! /= D[j]!;
    // Lᵀ w = D⁻¹ z, row-oriented back substitution.
    for (let j = n - 1; j >= 0; j--) {
      let s = x[j]!;
      for (let q = Lp[j]!; q < Lp[j + 1]!; q++) s -= Lx[q]! * x[Li[q]!]!;
      x[j] = s;
    }
    for (let k = 0; k < n; k++) result[perm[k]!] = x[k]!;
    return result;
  }
}

function naturalOrder(n: number): Int32Array {
  const perm = new Int32Array(n);
  for (let k = 0; k < n; k++) perm[k] = k;
  return perm;
}

/** Stable counting sort of 0..total-1 (or of `order`) by key in 0..n-1. */
function countingSort(total: number, n: number, key: (k: number) => number, order: Int32Array | null): Int32Array {
  const start = new Int32Array(n + 1);
  for (let k = 0; k < total; k++) start[key(k) + 1]!++;
  for (let c = 0; c < n; c++) start[c + 1]! += start[c]!;
  const out = new Int32Array(total);
  for (let t = 0; t < total; t++) {
    const k = order ? order[t]! : t;
    out[start[key(k)]!++] = k;
  }
  return out;
}

/** The SymCsc contract: sizes agree, rows ascending and in the upper triangle, diagonal present (last). */
function checkCsc(A: SymCsc): void {
  const { n, colPtr, rowIdx, values } = A;
  if (colPtr.length !== n + 1 || colPtr[0] !== 0) throw new RangeError(`analyseLdl: colPtr must have n + 1 = ${n + 1} entries starting at 0`);
  const nnz = colPtr[n]!;
  if (rowIdx.length < nnz || values.length !== nnz) throw new RangeError(`analyseLdl: rowIdx and values must have colPtr[n] = ${nnz} entries`);
  for (let j = 0; j < n; j++) {
    const s = colPtr[j]!, e = colPtr[j + 1]!;
    if (e <= s || rowIdx[e - 1] !== j) throw new RangeError(`analyseLdl: column ${j} must end with its diagonal entry (upper triangle, rows ascending)`);
    for (let q = s + 1; q < e; q++) {
      if (!(rowIdx[q - 1]! < rowIdx[q]!) || rowIdx[q - 1]! < 0) throw new RangeError(`analyseLdl: column ${j} rows must be ascending and >= 0`);
    }
  }
}

function checkSamePattern(p: LdlPattern, A: SymCsc): void {
  if (A.n !== p.n) throw new RangeError(`factorLdl: matrix size ${A.n} differs from the analysed ${p.n}`);
  const nnz = p.colPtr[p.n]!;
  if (A.values.length !== nnz) throw new RangeError(`factorLdl: ${A.values.length} values, expected ${nnz} for the analysed pattern`);
  if (A.colPtr === p.colPtr && A.rowIdx === p.rowIdx) return;
  let same = A.colPtr.length === p.colPtr.length;
  for (let j = 0; same && j <= p.n; j++) same = A.colPtr[j] === p.colPtr[j];
  for (let q = 0; same && q < nnz; q++) same = A.rowIdx[q] === p.rowIdx[q];
  if (!same) throw new RangeError('factorLdl: matrix pattern differs from the analysed one; call analyseLdl for the new pattern');
}
