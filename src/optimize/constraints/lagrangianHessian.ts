// The Lagrangian Hessian W = Σ λ_k ∇²g_k in free chart coordinates, assembled from the exact strut
// curvatures (strutHessian.ts) instead of differencing gradients, for the ring chart (chart.ts, with or
// without an imposed symmetry) and the periodic chart (periodicChart.ts: cell rings and lattice vectors).
//
// A strut depends on the chart only through the rigid motions of its two rings, x = (v_a, ω_a, v_b, ω_b), so
//     ∇²_z g = Dᵀ H D + Σ_i (∂g/∂x_i) ∇²_z x_i,      D = ∂x/∂z,  H = strutHessian (12 × 12).
// First term: each chart column moves one end by a translation or a rotation (its 3-vector in D):
//   - ring chart: a centre variable translates ring j by M b (b its basis vector, M the group element
//     mapping the representative onto ring j); a normal variable turns it by M J(ω) a_k, with ω the
//     representative's rotation vector, J the left Jacobian (rotation.ts) and a_k = n0 × bn_k / R;
//   - periodic chart: the image of ring b at shift s sits at c_b + Σ s_k L_k with ring b's orientation, so
//     it moves with every column of ring b and, through the offset, lattice variable (k, d) translates it by
//     s_k e_d. The offset is linear in the lattice variables (L_k = L0_k + z), so it adds no second-order
//     term: the lattice columns enter D only.
// Second term (the chart's own curvature): the centre and the offset are linear in z; the rotation is not.
// With ĝ the end's gradient in its ω (pulled back by Mᵀ), ∂g/∂z_p = (J(ω) a_p)·ĝ, so differentiating the
// direction gives (DJ(ω)[a_q] a_p)·ĝ; its symmetric part is the term (the antisymmetric part cancels the
// Lie bracket of the left-trivialised rotations, Maurer–Cartan). It vanishes at z = 0 and is O(|ω|) elsewhere.
// With J(ω) = I + α [ω]× + β [ω]×², α = (1 - cos θ)/θ², β = (θ - sin θ)/θ³, and α̃ = α'/θ, β̃ = β'/θ:
//     sym (DJ[a_q] a_p)·ĝ = ½ { β (2 (ω·ĝ)(a_p·a_q) - (a_p·ĝ)(ω·a_q) - (a_q·ĝ)(ω·a_p))
//                            + α̃ ((ω·a_q) ĝ·(ω × a_p) + (ω·a_p) ĝ·(ω × a_q))
//                            + β̃ (2 (ω·ĝ)(ω·a_p)(ω·a_q) - θ² ((ω·a_q)(ĝ·a_p) + (ω·a_p)(ĝ·a_q))) }.
// A strut couples only its two rings (and the lattice), so W is sparse on the ring-contact graph; the
// assembly visits each constraint once (cost linear in the constraints) and hands out entries, upper
// triangle only, of the symmetrised W. Radius rows have no curvature. Departure rows (a function of all
// rings) are not covered: the caller then falls back to differences.
import { closestPointOnCircle } from '../../kernel/index.js';
import type { Chart, Posed } from '../chart/chart.js';
import { pointOn, type Constraint, type PeriodicConstraint } from './constraints.js';
import type { PeriodicChart, PeriodicPosed } from '../chart/periodicChart.js';
import { strutHessian } from './strutHessian.js';
import { trackStrut } from './strutTrack.js';

/**
 * Receives one contribution v to entry (i, j) of W, free indices with i <= j: the upper triangle of the
 * symmetrised W (an off-diagonal entry stands for both (i, j) and (j, i)). Entries repeat: sum them.
 */
export type AddEntry = (i: number, j: number, v: number) => void;

/** The exact strut curvatures replace differenced gradients in both polishes; off only for comparisons. */
let exactHessian = true;
export function useExactHessian(on: boolean): void {
  exactHessian = on;
}
export function exactHessianOn(): boolean {
  return exactHessian;
}

/** Below this angle (radians) the derivative coefficients α̃, β̃ use their series (cancellation above 1e-11). */
const SERIES_ANGLE = 1e-2;
/** Chart columns per strut: 5 per ring end (3 centre, 2 normal) and 3 per lattice vector (at most 2). */
const MAX_COLUMNS = 16;

// Scratch (no allocation per strut). Column p: free index, block of x it moves (0 v_a, 3 ω_a, 6 v_b,
// 9 ω_b), its 3-vector, and for rotation columns the end (0, 1; -1 otherwise) and a_p.
const H12 = new Float64Array(144);
const PA = new Float64Array(3), PB = new Float64Array(3), CB = new Float64Array(3);
const COL_FREE = new Int32Array(MAX_COLUMNS);
const COL_BLOCK = new Int32Array(MAX_COLUMNS);
const COL_END = new Int32Array(MAX_COLUMNS);
const COL_DIR = new Float64Array(3 * MAX_COLUMNS);
const COL_A = new Float64Array(3 * MAX_COLUMNS);
/** Per end: its representative's ω and the pulled-back ω-gradient ĝ of the strut length. */
const END_OMEGA = new Float64Array(6);
const END_G = new Float64Array(6);
let nColumns = 0;

/**
 * Hand the entries of W (free ring-chart coordinates at `posed`) for the constraints `cons` with
 * multipliers `lambda` to `add` (upper triangle, see AddEntry). False when a constraint is not a strut,
 * sample or radius row, or a strut is lost or degenerate (a continuum of closest pairs); `add` may then
 * have been called already, so discard what it gathered.
 */
export function addRingLagrangianHessian(
  chart: Chart, posed: Posed, cons: readonly Constraint[], lambda: ArrayLike<number>, add: AddEntry,
): boolean {
  for (let k = 0; k < cons.length; k++) {
    const con = cons[k]!;
    if (con.kind === 'radius') continue;
    if (con.kind !== 'strut' && con.kind !== 'sample') return false;
    const l = lambda[k]!;
    if (l === 0) continue;
    const a = con.a, b = con.b;
    if (con.kind === 'strut') {
      const r = trackStrut(posed.e1, posed.e2, posed.c, 3 * a, 3 * a, posed.R[a]!, posed.c, 3 * b, 3 * b, posed.R[b]!, con.ta, con.tb);
      if (r === null) return false;
      pointOn(posed, a, r[0], PA);
      pointOn(posed, b, r[1], PB);
    } else {
      pointOn(posed, b, con.tb, PB);
      closestPointOnCircle(PB, posed.c.subarray(3 * a, 3 * a + 3), posed.n.subarray(3 * a, 3 * a + 3), posed.R[a]!, PA);
    }
    for (let i = 0; i < 3; i++) CB[i] = posed.c[3 * b + i]!;
    const d = strutHessian(
      PA, posed.c.subarray(3 * a, 3 * a + 3), posed.n.subarray(3 * a, 3 * a + 3),
      PB, CB, posed.n.subarray(3 * b, 3 * b + 3), H12, con.kind === 'sample',
    );
    if (!Number.isFinite(d)) return false;
    nColumns = 0;
    ringColumns(chart, posed, a, chart.freeOf, 0, posed.c, 3 * a, PA, d, 1);
    ringColumns(chart, posed, b, chart.freeOf, 1, CB, 0, PB, d, -1);
    emitStrut(l, add);
  }
  return true;
}

/** W dense (n × n row-major, both triangles), or null where addRingLagrangianHessian returns false. */
export function ringLagrangianHessian(
  chart: Chart, posed: Posed, cons: readonly Constraint[], lambda: ArrayLike<number>,
): Float64Array | null {
  const n = chart.nFree;
  const W = new Float64Array(n * n);
  return addRingLagrangianHessian(chart, posed, cons, lambda, denseAdder(W, n)) ? W : null;
}

/**
 * The same for the periodic chart at `pp`: free coordinates of the cell's ring poses and the lattice
 * vectors. Struts join a cell ring a to the image of cell ring b at `shift` (b may be a itself).
 */
export function addPeriodicLagrangianHessian(
  pc: PeriodicChart, pp: PeriodicPosed, cons: readonly PeriodicConstraint[], lambda: ArrayLike<number>, add: AddEntry,
): boolean {
  const { posed, L } = pp;
  const o = pc.ring.nFull;
  for (let k = 0; k < cons.length; k++) {
    const con = cons[k]!;
    if (con.kind === 'radius') continue;
    if (con.kind !== 'strut') return false;
    const l = lambda[k]!;
    if (l === 0) continue;
    const a = con.a, b = con.b;
    for (let i = 0; i < 3; i++) {
      let off = 0;
      for (let s = 0; s < pc.K; s++) off += (con.shift[s] ?? 0) * L[3 * s + i]!;
      CB[i] = posed.c[3 * b + i]! + off;
    }
    const r = trackStrut(posed.e1, posed.e2, posed.c, 3 * a, 3 * a, posed.R[a]!, CB, 0, 3 * b, posed.R[b]!, con.ta, con.tb);
    if (r === null) return false;
    pointOn(posed, a, r[0], PA);
    const cs = Math.cos(r[1]), sn = Math.sin(r[1]), Rb = posed.R[b]!;
    for (let i = 0; i < 3; i++) PB[i] = CB[i]! + Rb * (cs * posed.e1[3 * b + i]! + sn * posed.e2[3 * b + i]!);
    const d = strutHessian(
      PA, posed.c.subarray(3 * a, 3 * a + 3), posed.n.subarray(3 * a, 3 * a + 3),
      PB, CB, posed.n.subarray(3 * b, 3 * b + 3), H12,
    );
    if (!Number.isFinite(d)) return false;
    nColumns = 0;
    // The ring chart's full variables are the first ones of the periodic chart's.
    ringColumns(pc.ring, posed, a, pc.freeOf, 0, posed.c, 3 * a, PA, d, 1);
    ringColumns(pc.ring, posed, b, pc.freeOf, 1, CB, 0, PB, d, -1);
    for (let s = 0; s < pc.K; s++) {
      const sh = con.shift[s] ?? 0;
      if (sh === 0) continue;
      for (let e = 0; e < 3; e++) {
        const f = pc.freeOf[o + 3 * s + e]!;
        if (f < 0) continue;
        pushColumn(f, 6, -1, e === 0 ? sh : 0, e === 1 ? sh : 0, e === 2 ? sh : 0);
      }
    }
    emitStrut(l, add);
  }
  return true;
}

/** Dense W of the periodic chart (both triangles), or null where addPeriodicLagrangianHessian returns false. */
export function periodicLagrangianHessian(
  pc: PeriodicChart, pp: PeriodicPosed, cons: readonly PeriodicConstraint[], lambda: ArrayLike<number>,
): Float64Array | null {
  const n = pc.nFree;
  const W = new Float64Array(n * n);
  return addPeriodicLagrangianHessian(pc, pp, cons, lambda, denseAdder(W, n)) ? W : null;
}

// ---- helpers -------------------------------------------------------------------------------------

function denseAdder(W: Float64Array, n: number): AddEntry {
  return (i, j, v) => {
    W[i * n + j] = W[i * n + j]! + v;
    if (i !== j) W[j * n + i] = W[j * n + i]! + v;
  };
}

/**
 * Append the free columns that move ring j as end `end` of the strut (0: a, 1: b), and that end's ω and
 * pulled-back ω-gradient: the strut length d = |pA - pB| changes by sign·u·(ω × (p - c)), u = (pA - pB)/d,
 * for a turn ω of this end about its centre c (c[oc..oc+2]) carrying its point p.
 */
function ringColumns(
  chart: Chart, posed: Posed, j: number, freeOf: Int32Array, end: 0 | 1,
  c: ArrayLike<number>, oc: number, p: ArrayLike<number>, d: number, sign: number,
): void {
  const r = chart.repOfRing[j]!;
  const rep = chart.reps[r]!;
  const M = chart.matOfRing[j]!;
  const blk = 6 * end;
  for (let k = 0; k < rep.bc.length; k++) {
    const f = freeOf[rep.offset + k]!;
    if (f < 0) continue;
    const v = rep.bc[k]!;
    pushColumn(f, blk, -1, M[0] * v[0] + M[1] * v[1] + M[2] * v[2], M[3] * v[0] + M[4] * v[1] + M[5] * v[2], M[6] * v[0] + M[7] * v[1] + M[8] * v[2]);
  }
  const dirs = posed.dirs[r]!, n0 = rep.n0, R = rep.radius;
  for (let k = 0; k < rep.bn.length; k++) {
    const f = freeOf[rep.offset + rep.bc.length + k]!;
    if (f < 0) continue;
    const w = dirs[k]!, bn = rep.bn[k]!;
    const q = nColumns;
    pushColumn(f, blk + 3, end, M[0] * w[0]! + M[1] * w[1]! + M[2] * w[2]!, M[3] * w[0]! + M[4] * w[1]! + M[5] * w[2]!, M[6] * w[0]! + M[7] * w[1]! + M[8] * w[2]!);
    COL_A[3 * q] = (n0[1] * bn[2] - n0[2] * bn[1]) / R;
    COL_A[3 * q + 1] = (n0[2] * bn[0] - n0[0] * bn[2]) / R;
    COL_A[3 * q + 2] = (n0[0] * bn[1] - n0[1] * bn[0]) / R;
  }
  // ĝ = Mᵀ (sign · (p - c) × u).
  const ux = (PA[0]! - PB[0]!) / d, uy = (PA[1]! - PB[1]!) / d, uz = (PA[2]! - PB[2]!) / d;
  const rx = p[0]! - c[oc]!, ry = p[1]! - c[oc + 1]!, rz = p[2]! - c[oc + 2]!;
  const gx = sign * (ry * uz - rz * uy), gy = sign * (rz * ux - rx * uz), gz = sign * (rx * uy - ry * ux);
  END_G[3 * end] = M[0] * gx + M[3] * gy + M[6] * gz;
  END_G[3 * end + 1] = M[1] * gx + M[4] * gy + M[7] * gz;
  END_G[3 * end + 2] = M[2] * gx + M[5] * gy + M[8] * gz;
  for (let i = 0; i < 3; i++) END_OMEGA[3 * end + i] = posed.omega[3 * r + i]!;
}

function pushColumn(f: number, block: number, end: number, x: number, y: number, z: number): void {
  const q = nColumns++;
  COL_FREE[q] = f;
  COL_BLOCK[q] = block;
  COL_END[q] = end;
  COL_DIR[3 * q] = x;
  COL_DIR[3 * q + 1] = y;
  COL_DIR[3 * q + 2] = z;
}

/** Hand out λ (Dᵀ H D + chart curvature) for the gathered columns, upper triangle of the symmetrised sum. */
function emitStrut(l: number, add: AddEntry): void {
  for (let p = 0; p < nColumns; p++) {
    const bp = COL_BLOCK[p]!, fp = COL_FREE[p]!;
    for (let q = p; q < nColumns; q++) {
      const bq = COL_BLOCK[q]!, fq = COL_FREE[q]!;
      // H symmetrised, so the (p, q) and (q, p) contributions are equal and handed out once.
      let s = 0;
      for (let u = 0; u < 3; u++) {
        const du = COL_DIR[3 * p + u]!;
        if (du === 0) continue;
        const row = (bp + u) * 12, col = bp + u;
        for (let v = 0; v < 3; v++) s += du * 0.5 * (H12[row + bq + v]! + H12[(bq + v) * 12 + col]!) * COL_DIR[3 * q + v]!;
      }
      const e = COL_END[p]!;
      if (e >= 0 && COL_END[q] === e) s += chartCurvature(e, p, q);
      if (p === q) add(fp, fp, l * s);
      else if (fp === fq) add(fp, fp, 2 * l * s);
      else if (fp < fq) add(fp, fq, l * s);
      else add(fq, fp, l * s);
    }
  }
}

/** sym (DJ(ω)[a_q] a_p)·ĝ for two rotation columns of one end (formula at the top of the file). */
function chartCurvature(e: number, p: number, q: number): number {
  const wx = END_OMEGA[3 * e]!, wy = END_OMEGA[3 * e + 1]!, wz = END_OMEGA[3 * e + 2]!;
  const th2 = wx * wx + wy * wy + wz * wz;
  if (th2 === 0) return 0;
  const gx = END_G[3 * e]!, gy = END_G[3 * e + 1]!, gz = END_G[3 * e + 2]!;
  const px = COL_A[3 * p]!, py = COL_A[3 * p + 1]!, pz = COL_A[3 * p + 2]!;
  const qx = COL_A[3 * q]!, qy = COL_A[3 * q + 1]!, qz = COL_A[3 * q + 2]!;
  const th = Math.sqrt(th2);
  let beta: number, at: number, bt: number;
  if (th < SERIES_ANGLE) {
    beta = 1 / 6 - th2 / 120 + (th2 * th2) / 5040;
    at = -1 / 12 + th2 / 180 - (th2 * th2) / 6720;
    bt = -1 / 60 + th2 / 1260 - (th2 * th2) / 60480;
  } else {
    const c = Math.cos(th), sn = Math.sin(th);
    beta = (th - sn) / (th2 * th);
    at = (th * sn - 2 * (1 - c)) / (th2 * th2);
    bt = (th * (1 - c) - 3 * (th - sn)) / (th2 * th2 * th);
  }
  const wg = wx * gx + wy * gy + wz * gz;
  const wp = wx * px + wy * py + wz * pz, wq = wx * qx + wy * qy + wz * qz;
  const gp = gx * px + gy * py + gz * pz, gq = gx * qx + gy * qy + gz * qz;
  const pq = px * qx + py * qy + pz * qz;
  // ĝ·(ω × a) = a·(ĝ × ω).
  const cx = gy * wz - gz * wy, cy = gz * wx - gx * wz, cz = gx * wy - gy * wx;
  const xp = px * cx + py * cy + pz * cz, xq = qx * cx + qy * cy + qz * cz;
  return 0.5 * (
    beta * (2 * wg * pq - gp * wq - gq * wp)
    + at * (wq * xp + wp * xq)
    + bt * (2 * wg * wp * wq - th2 * (wq * gp + wp * gq))
  );
}
