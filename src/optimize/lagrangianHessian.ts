// The Lagrangian Hessian W = Σ λ_k ∇²g_k of the ring chart, assembled from the exact strut curvatures
// (strutHessian.ts) instead of differencing gradients: one 12 × 12 block per strut, pulled back to the free
// chart coordinates through each ring's Jacobian (rep variables → the ring's translation and exponential
// rotation coordinates; linear, so the pull-back is exact at z = 0 and misses only the chart's own curvature
// elsewhere, which is of the order of |z| and leaves the polish's Newton convergence fast). A strut couples
// only its two rings, so W is block-sparse on the ring-contact graph; its cost is linear in the struts.
// Radius rows have no curvature. Departure rows (a symmetric function of all rings) are not covered: the
// caller then falls back to differences.
import { mulVec } from '../model/symmetry.js';
import { closestPointOnCircle } from '../kernel/index.js';
import type { Chart, Posed } from './chart.js';
import { pointOn, type Constraint } from './constraints.js';
import { strutHessian } from './strutHessian.js';
import { trackStrut } from './strutTrack.js';

const H12 = new Float64Array(144);
const PA = new Float64Array(3), PB = new Float64Array(3);

/** Free index and 6-vector (v, ω) of each chart variable that moves ring j. */
interface RingColumns {
  free: number[];
  /** 6 per column: ∂(v_j, ω_j)/∂z_f. */
  dir: number[];
}

/**
 * W (n × n, row-major, free chart coordinates at `posed`) for the constraints `cons` with multipliers
 * `lambda`, or null when a constraint is not a strut, sample or radius row, or a strut is lost or degenerate.
 */
export function ringLagrangianHessian(
  chart: Chart, posed: Posed, cons: readonly Constraint[], lambda: ArrayLike<number>,
): Float64Array | null {
  const n = chart.nFree;
  const W = new Float64Array(n * n);
  const cols = new Map<number, RingColumns>();
  const columnsOf = (j: number): RingColumns => {
    let c = cols.get(j);
    if (!c) {
      c = ringColumns(chart, posed, j);
      cols.set(j, c);
    }
    return c;
  };
  for (let k = 0; k < cons.length; k++) {
    const con = cons[k]!;
    if (con.kind === 'radius') continue;
    if (con.kind !== 'strut' && con.kind !== 'sample') return null;
    const l = lambda[k]!;
    if (l === 0) continue;
    const a = con.a, b = con.b;
    if (con.kind === 'strut') {
      const r = trackStrut(posed.e1, posed.e2, posed.c, 3 * a, 3 * a, posed.R[a]!, posed.c, 3 * b, 3 * b, posed.R[b]!, con.ta, con.tb);
      if (r === null) return null;
      pointOn(posed, a, r[0], PA);
      pointOn(posed, b, r[1], PB);
    } else {
      pointOn(posed, b, con.tb, PB);
      closestPointOnCircle(PB, posed.c.subarray(3 * a, 3 * a + 3), posed.n.subarray(3 * a, 3 * a + 3), posed.R[a]!, PA);
    }
    const d = strutHessian(
      PA, posed.c.subarray(3 * a, 3 * a + 3), posed.n.subarray(3 * a, 3 * a + 3),
      PB, posed.c.subarray(3 * b, 3 * b + 3), posed.n.subarray(3 * b, 3 * b + 3), H12, con.kind === 'sample',
    );
    if (!Number.isFinite(d)) return null;
    const ends: [RingColumns, number][] = [[columnsOf(a), 0], [columnsOf(b), 6]];
    for (const [ci, oi] of ends) {
      for (const [cj, oj] of ends) {
        for (let p = 0; p < ci.free.length; p++) {
          const row = ci.free[p]! * n;
          for (let q = 0; q < cj.free.length; q++) {
            let s = 0;
            for (let u = 0; u < 6; u++) {
              const du = ci.dir[6 * p + u]!;
              if (du === 0) continue;
              const hrow = (oi + u) * 12 + oj;
              for (let v = 0; v < 6; v++) s += du * H12[hrow + v]! * cj.dir[6 * q + v]!;
            }
            W[row + cj.free[q]!] = W[row + cj.free[q]!]! + l * s;
          }
        }
      }
    }
  }
  return W;
}

/** The chart variables that move ring j, and how (its translation and rotation per unit variable). */
function ringColumns(chart: Chart, posed: Posed, j: number): RingColumns {
  const r = chart.repOfRing[j]!;
  const rep = chart.reps[r]!;
  const M = chart.matOfRing[j]!;
  const free: number[] = [], dir: number[] = [];
  rep.bc.forEach((b, k) => {
    const f = chart.freeOf[rep.offset + k]!;
    if (f < 0) return;
    const v = mulVec(M, b);
    free.push(f);
    dir.push(v[0], v[1], v[2], 0, 0, 0);
  });
  const dirs = posed.dirs[r]!;
  rep.bn.forEach((_, k) => {
    const f = chart.freeOf[rep.offset + rep.bc.length + k]!;
    if (f < 0) return;
    const w = mulVec(M, dirs[k]!);
    free.push(f);
    dir.push(0, 0, 0, w[0], w[1], w[2]);
  });
  return { free, dir };
}
