// The interior-point QP of the SQP step (src/optimize/step/interiorQp.ts) against HiGHS, a general-purpose
// LP/QP solver (the `highs` package, an independent reference library), on seeded random sparse convex QPs
// of the step's shape; and its nonconvex behaviour against closed forms.
import { describe, expect, it } from 'vitest';
import { seededRandom } from '../src/model/random.js';
import type { Highs } from 'highs';
import { prepareQp, solveQpInterior, type SparseQp } from '../src/optimize/step/interiorQp.js';


/** A random QP like a step's: a banded PD Hessian, sparse rows through x = 0 with h >= 0, a box. */
function randomQp(seed: number, n: number, m: number): SparseQp {
  const r = seededRandom(seed);
  const pI: number[] = [], pJ: number[] = [], pV: number[] = [];
  for (let i = 0; i < n; i++) {
    pI.push(i); pJ.push(i); pV.push(1 + 2 * r());
    if (i + 1 < n) { pI.push(i); pJ.push(i + 1); pV.push(0.4 * (r() - 0.5)); }
  }
  const q = Float64Array.from({ length: n }, () => 2 * r() - 1);
  const rowPtr = new Int32Array(m + 1);
  const cols: number[] = [], vals: number[] = [];
  const h = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const used = new Set<number>();
    const nnz = 1 + Math.floor(r() * Math.min(12, n));
    for (let e = 0; e < nnz; e++) used.add(Math.floor(r() * n));
    for (const c of [...used].sort((a, b) => a - b)) { cols.push(c); vals.push(2 * r() - 1); }
    rowPtr[k + 1] = cols.length;
    // A third of the rows pass through the start (h = 0), like touching struts.
    h[k] = r() < 0.33 ? 0 : 0.5 * r();
  }
  const lower = new Float64Array(n).fill(-0.5), upper = new Float64Array(n).fill(0.5);
  return { n, pI, pJ, pV, q, rowPtr, colIdx: Int32Array.from(cols), rowVal: Float64Array.from(vals), h, lower, upper };
}

async function highsSolve(qp: SparseQp): Promise<{ x: Float64Array; obj: number }> {
  const highs = ((await import('highs')) as unknown as { default: () => Promise<Highs> }).default;
  const H = await highs();
  const n = qp.n;
  // HiGHS takes the lower triangle by columns: column j holds rows i >= j; our entries are i <= j, so swap.
  const byCol: [number, number, number][][] = Array.from({ length: n }, () => []);
  for (let k = 0; k < qp.pV.length; k++) byCol[qp.pI[k]!]!.push([qp.pJ[k]!, qp.pI[k]!, qp.pV[k]!]);
  const hStarts = new Int32Array(n + 1), hIdx: number[] = [], hVal: number[] = [];
  byCol.forEach((col, j) => {
    col.sort((a, b) => a[0] - b[0]);
    for (const [i, , v] of col) { hIdx.push(i); hVal.push(v); }
    hStarts[j + 1] = hIdx.length;
  });
  const m = qp.h.length;
  return H.withModel(
    {
      numCols: n, numRows: m, colCost: qp.q, colLower: qp.lower, colUpper: qp.upper,
      rowLower: new Float64Array(m).fill(-H.infinity), rowUpper: qp.h,
      matrix: { format: 'csr', numRows: m, numCols: n, starts: qp.rowPtr, indices: qp.colIdx, values: qp.rowVal },
      hessian: { format: 'triangular', dimension: n, starts: hStarts, indices: Int32Array.from(hIdx), values: Float64Array.from(hVal) },
    },
    (model) => {
      model.options.set({ output_flag: false });
      model.run();
      const x = Float64Array.from(model.getSolution().colValue);
      return { x, obj: objective(qp, x) };
    },
  );
}

function objective(qp: SparseQp, x: ArrayLike<number>): number {
  let f = 0;
  for (let i = 0; i < qp.n; i++) f += qp.q[i]! * x[i]!;
  for (let k = 0; k < qp.pV.length; k++) {
    const i = qp.pI[k]!, j = qp.pJ[k]!;
    f += (i === j ? 0.5 : 1) * qp.pV[k]! * x[i]! * x[j]!;
  }
  return f;
}

function worstViolation(qp: SparseQp, x: ArrayLike<number>): number {
  let w = 0;
  for (let r = 0; r < qp.h.length; r++) {
    let v = -qp.h[r]!;
    for (let p = qp.rowPtr[r]!; p < qp.rowPtr[r + 1]!; p++) v += qp.rowVal[p]! * x[qp.colIdx[p]!]!;
    w = Math.max(w, v);
  }
  for (let i = 0; i < qp.n; i++) w = Math.max(w, qp.lower[i]! - x[i]!, x[i]! - qp.upper[i]!);
  return w;
}

describe('interior-point QP of the SQP step', () => {
  // Reference: HiGHS's active-set QP solver on the same data (a strictly convex QP has one minimiser).
  it.each([
    [1, 3, 2], [2, 10, 6], [3, 25, 40], [4, 60, 30], [5, 120, 200], [6, 8, 30],
  ])('seed %i (n = %i, m = %i) matches HiGHS', async (seed, n, m) => {
    const qp = randomQp(seed, n, m);
    const ours = solveQpInterior(qp);
    expect(ours.ok, ours.message).toBe(true);
    const ref = await highsSolve(qp);
    expect(worstViolation(qp, ours.x)).toBeLessThan(1e-10);
    expect(Math.abs(objective(qp, ours.x) - ref.obj)).toBeLessThan(1e-9 * (1 + Math.abs(ref.obj)));
    let dx = 0;
    for (let i = 0; i < n; i++) dx = Math.max(dx, Math.abs(ours.x[i]! - ref.x[i]!));
    expect(dx).toBeLessThan(1e-6);
    // Multipliers are non-negative and satisfy complementarity (Kuhn–Tucker conditions, Nocedal & Wright §12.3).
    for (let r = 0; r < m; r++) expect(ours.y[r]!).toBeGreaterThanOrEqual(0);
  });

  it('rows sharing their columns, prepared once and re-solved with other slacks and bounds, match HiGHS each time', async () => {
    // Like a step's rows: a strut and several samples on the same pair of rings touch the same columns, so
    // the normal matrix is assembled per group of rows (prepareQp); a second-order correction re-solves the
    // same QP with shifted slacks. Reference: HiGHS on each QP as given.
    const base = randomQp(7, 20, 12);
    const r = seededRandom(77);
    const rowPtr = [0], cols: number[] = [], vals: number[] = [];
    for (let k = 0; k < 12; k++) {
      for (let copy = 0; copy < 3; copy++) {
        for (let p = base.rowPtr[k]!; p < base.rowPtr[k + 1]!; p++) { cols.push(base.colIdx[p]!); vals.push(2 * r() - 1); }
        rowPtr.push(cols.length);
      }
    }
    const qp: SparseQp = {
      ...base, rowPtr: Int32Array.from(rowPtr), colIdx: Int32Array.from(cols), rowVal: Float64Array.from(vals),
      h: Float64Array.from({ length: 36 }, () => (r() < 0.33 ? 0 : 0.5 * r())),
    };
    const prepared = prepareQp(qp);
    const shifted: SparseQp = {
      ...qp, h: qp.h.map((v) => v + 0.1 * r()), lower: qp.lower.map((v) => 0.6 * v), upper: qp.upper.map((v) => 0.8 * v),
    };
    for (const variant of [qp, shifted, qp]) {
      const ours = solveQpInterior(variant, {}, prepared);
      expect(ours.ok, ours.message).toBe(true);
      const fresh = solveQpInterior(variant);
      const ref = await highsSolve(variant);
      expect(worstViolation(variant, ours.x)).toBeLessThan(1e-10);
      expect(Math.abs(objective(variant, ours.x) - ref.obj)).toBeLessThan(1e-9 * (1 + Math.abs(ref.obj)));
      // Sharing the structure changes no arithmetic: the same iterates as a fresh solve.
      expect(Array.from(ours.x)).toEqual(Array.from(fresh.x));
    }
    // A structure belongs to its QP: other rows are refused.
    expect(() => solveQpInterior(base, {}, prepared)).toThrow(/prepared structure/);
  });

  it('a concave direction stopped only by the box goes to the box (closed form)', () => {
    // minimise -x0²/2 - x1 with x0 + x1 <= 1, |x| <= 2. The start x0 = 0 is a stationary point of the
    // nonconvex QP; with the inertia correction the method must still end at a Kuhn–Tucker point. By hand:
    // for x0 <= -1 the best x1 is 2 and f = -x0²/2 - 2 (least at x0 = -2: f = -4); for x0 >= -1 it is
    // x1 = 1 - x0 and f = -x0²/2 + x0 - 1, concave, least at the end x0 = 2 (f = -1). So the local minimisers
    // are (-2, 2) with f = -4 and (2, -1) with f = -1.
    const qp: SparseQp = {
      n: 2, pI: [0], pJ: [0], pV: [-1], q: Float64Array.of(0, -1),
      rowPtr: Int32Array.of(0, 2), colIdx: Int32Array.of(0, 1), rowVal: Float64Array.of(1, 1), h: Float64Array.of(1),
      lower: Float64Array.of(-2, -2), upper: Float64Array.of(2, 2),
    };
    const sol = solveQpInterior(qp);
    expect(sol.ok, sol.message).toBe(true);
    expect(worstViolation(qp, sol.x)).toBeLessThan(1e-10);
    const f = objective(qp, sol.x);
    expect(Math.min(Math.abs(f + 4), Math.abs(f + 1))).toBeLessThan(1e-8);
  });
});
