// Struts of a periodic arrangement: every local closest pair between a cell ring and an image of a cell
// ring, found by the kernel (scan.ts pairContacts), then tracked through small pose changes by Newton in
// the two angles (strutTrack.ts, shared with the free-ring model).
// Gradients by the envelope theorem, as in constraints.ts: with u = (pA - pB)/|pA - pB|, ring a moves
// the strut by u·(v + ω × (pA - cA)) and the image of ring b by the opposite; the image sits at
// c_b + Σ s_k L_k, so the lattice vector L_k gets -s_k u (periodicChart.addImageGradient chains both).
import { latticeOffset } from '../../model/periodic.js';
import type { Vec3 } from '../../model/types.js';
import type { Constraint } from './constraints.js';
import { addImageGradient, toFree, type PeriodicChart, type PeriodicPosed } from '../chart/periodicChart.js';
import { pairContacts, type PairScan } from './scan.js';
import { trackStrut } from './strutTrack.js';

/** A constraint of the periodic model; `b` is the cell index of the imaged ring. */
export interface PeriodicConstraint extends Constraint {
  shift: number[];
}

export interface PeriodicPair {
  a: number;
  b: number;
  shift: number[];
}

export interface PeriodicScan extends PairScan {
  shift: number[];
}

/** Every strut of every listed pair, by the kernel. */
export function scanPeriodic(pp: PeriodicPosed, pairs: readonly PeriodicPair[], w: readonly number[]): PeriodicScan[] {
  const { posed } = pp;
  const vectors = latticeVectors(pp);
  return pairs.map((p) => ({
    a: p.a, b: p.b, shift: p.shift.slice(), c: w[p.a]! + w[p.b]!, ...pairContacts(posed, p.a, p.b, latticeOffset(vectors, p.shift)),
  }));
}

export function newPeriodicConstraint(
  kind: 'strut' | 'radius', a: number, b: number, shift: number[], ta: number, tb: number, c: number, nFree: number, continuum = false,
): PeriodicConstraint {
  return { kind, a, b, shift, ta, tb, c, g: NaN, grad: new Float64Array(nFree), pa: [0, 0, 0], pb: [0, 0, 0], continuum };
}

/**
 * Re-evaluate a constraint at `pp` (value returned; gradient in free coordinates into con.grad when
 * `withGrad`; tracked angles and points stored when `keep`). NaN when the strut was lost.
 */
export function evaluatePeriodic(con: PeriodicConstraint, pc: PeriodicChart, pp: PeriodicPosed, withGrad: boolean, keep = true): number {
  if (withGrad) con.grad.fill(0);
  if (con.kind !== 'strut') return con.g;
  const { posed } = pp;
  const a = con.a, b = con.b;
  const off = latticeOffset(latticeVectors(pp), con.shift);
  const cb: Vec3 = [posed.c[3 * b]! + off[0], posed.c[3 * b + 1]! + off[1], posed.c[3 * b + 2]! + off[2]];
  const ca: Vec3 = [posed.c[3 * a]!, posed.c[3 * a + 1]!, posed.c[3 * a + 2]!];
  const tracked = trackStrut(posed.e1, posed.e2, ca, 0, 3 * a, posed.R[a]!, cb, 0, 3 * b, posed.R[b]!, con.ta, con.tb);
  if (tracked === null) return NaN;
  const [ta, tb] = tracked;
  const pa = pointOn(ca, posed.e1, posed.e2, 3 * a, posed.R[a]!, ta);
  const pb = pointOn(cb, posed.e1, posed.e2, 3 * b, posed.R[b]!, tb);
  const ux = pa[0] - pb[0], uy = pa[1] - pb[1], uz = pa[2] - pb[2];
  const d = Math.hypot(ux, uy, uz);
  if (keep) {
    con.ta = ta;
    con.tb = tb;
    con.g = d;
    con.pa = pa;
    con.pb = pb;
  }
  if (withGrad && d > 0) {
    const u: Vec3 = [ux / d, uy / d, uz / d];
    const ra: Vec3 = [pa[0] - ca[0], pa[1] - ca[1], pa[2] - ca[2]];
    const rb: Vec3 = [pb[0] - cb[0], pb[1] - cb[1], pb[2] - cb[2]];
    const full = new Float64Array(pc.nFull);
    addImageGradient(pc, pp, a, null, u, cross(ra, u), 1, full);
    addImageGradient(pc, pp, b, con.shift, u, cross(rb, u), -1, full);
    toFree(pc, full, con.grad);
  }
  return d;
}

export function latticeVectors(pp: PeriodicPosed): Vec3[] {
  const out: Vec3[] = [];
  for (let k = 0; k < pp.L.length / 3; k++) out.push([pp.L[3 * k]!, pp.L[3 * k + 1]!, pp.L[3 * k + 2]!]);
  return out;
}

// ---- helpers -------------------------------------------------------------------------------------

function pointOn(c: Vec3, e1: Float64Array, e2: Float64Array, o: number, R: number, th: number): Vec3 {
  const cs = Math.cos(th), sn = Math.sin(th);
  return [
    c[0] + R * (cs * e1[o]! + sn * e2[o]!),
    c[1] + R * (cs * e1[o + 1]! + sn * e2[o + 1]!),
    c[2] + R * (cs * e1[o + 2]! + sn * e2[o + 2]!),
  ];
}

function cross(a: ArrayLike<number>, b: ArrayLike<number>): Vec3 {
  return [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
}
