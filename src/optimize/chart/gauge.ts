// Gauge fixing of a chart: rigid motions of the whole arrangement that change no distance (those that
// commute with the imposed group; for a periodic pattern all six, the rotations turning the lattice too)
// are written as variable vectors, and one variable per independent motion is fixed, chosen by complete
// pivoting so that the motion moves it most. Shared by the ring chart (chart.ts) and the periodic one
// (periodicChart.ts).
import type { Vec3 } from '../../model/types.js';
import type { RepBlock } from './chart.js';

/** Gauge pivots below this fraction of the largest generator entry are rank deficiency, not a gauge. */
const GAUGE_PIVOT_TOL = 1e-9;

/** Free-variable numbering of a chart once the gauge variables `fixed` are removed. */
export function freeVariables(nFull: number, fixed: readonly number[]): { free: Int32Array; freeOf: Int32Array; nFree: number } {
  const freeOf = new Int32Array(nFull).fill(-1);
  const free: number[] = [];
  for (let k = 0; k < nFull; k++) {
    if (fixed.includes(k)) continue;
    freeOf[k] = free.length;
    free.push(k);
  }
  return { free: Int32Array.from(free), freeOf, nFree: free.length };
}

/**
 * Variables to fix, one per independent generator (rows of length nFull), in pivot order: Gaussian
 * elimination with complete pivoting; the rows are consumed (eliminated in place).
 */
export function gaugePivotColumns(gens: Float64Array[], nFull: number): number[] {
  let scale = 0;
  for (const g of gens) for (const x of g) scale = Math.max(scale, Math.abs(x));
  const fixed: number[] = [];
  const rows = gens.slice();
  while (rows.length > 0) {
    let bi = -1, bj = -1, best = GAUGE_PIVOT_TOL * scale;
    rows.forEach((row, i) => {
      for (let j = 0; j < nFull; j++) {
        if (!fixed.includes(j) && Math.abs(row[j]!) > best) {
          best = Math.abs(row[j]!);
          bi = i;
          bj = j;
        }
      }
    });
    if (bi < 0) break;
    const pivot = rows[bi]!;
    rows.splice(bi, 1);
    for (const row of rows) {
      const f = row[bj]! / pivot[bj]!;
      for (let j = 0; j < nFull; j++) row[j] = row[j]! - f * pivot[j]!;
    }
    fixed.push(bj);
  }
  return fixed;
}

/**
 * The ring variables (first entries of a vector of length nFull) of a rigid motion of every representative:
 * a translation along f, or a rotation about the axis f through o (which also turns each normal).
 */
export function rigidMotionGenerator(
  reps: readonly RepBlock[], f: Vec3, o: Vec3, kind: 'translate' | 'rotate', nFull: number,
): Float64Array {
  const v = new Float64Array(nFull);
  for (const rep of reps) {
    const rc: Vec3 = [rep.c0[0] - o[0], rep.c0[1] - o[1], rep.c0[2] - o[2]];
    const dc: Vec3 = kind === 'translate' ? f : cross(f, rc);
    const dn: Vec3 = kind === 'translate' ? [0, 0, 0] : cross(f, rep.n0);
    rep.bc.forEach((b, k) => (v[rep.offset + k] = dot(dc, b)));
    rep.bn.forEach((b, k) => (v[rep.offset + rep.bc.length + k] = rep.radius * dot(dn, b)));
  }
  return v;
}

// ---- helpers -------------------------------------------------------------------------------------

function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  return a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
}

function cross(a: ArrayLike<number>, b: ArrayLike<number>): Vec3 {
  return [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
}
