// Struts of a periodic arrangement: every local closest pair between a cell ring and an image of a cell
// ring, found by the kernel, then tracked through small pose changes by Newton in the two angles.
// Gradients by the envelope theorem, as in constraints.ts: with u = (pA - pB)/|pA - pB|, ring a moves
// the strut by u·(v + ω × (pA - cA)) and the image of ring b by the opposite; the image sits at
// c_b + Σ s_k L_k, so the lattice vector L_k gets -s_k u (periodicChart.addImageGradient chains both).
import { CONTACT_STRIDE, MAX_CONTACTS, circleContacts, lastContinuum, type ContinuumKind } from '../kernel/index.js';
import { latticeOffset } from '../model/periodic.js';
import type { Vec3 } from '../model/types.js';
import type { Constraint } from './constraints.js';
import { addImageGradient, toFree, type PeriodicChart, type PeriodicPosed } from './periodicChart.js';

/** A constraint of the periodic model; `b` is the cell index of the imaged ring. */
export interface PeriodicConstraint extends Constraint {
  shift: number[];
}

export interface PeriodicPair {
  a: number;
  b: number;
  shift: number[];
}

export interface PeriodicScan extends PeriodicPair {
  /** w_a + w_b */
  c: number;
  distance: number;
  contacts: { ta: number; tb: number; d: number; pa: Vec3; pb: Vec3 }[];
  continuum: ContinuumKind | null;
}

/** Newton on the pair angles stops when the step is below this (radians). */
const ANGLE_STEP_TOL = 1e-15;
const TRACK_MAX_STEPS = 40;
/** A tracked strut that wanders further than this (radians) has vanished or jumped to another minimum. */
const LOST_ANGLE = 0.5;

const OUT = new Float64Array(MAX_CONTACTS * CONTACT_STRIDE);

/** Every strut of every listed pair, by the kernel. */
export function scanPeriodic(pp: PeriodicPosed, pairs: readonly PeriodicPair[], w: readonly number[]): PeriodicScan[] {
  const { posed } = pp;
  const vectors = latticeVectors(pp);
  return pairs.map((p) => {
    const oa = 3 * p.a, ob = 3 * p.b;
    const off = latticeOffset(vectors, p.shift);
    const cb = Float64Array.of(posed.c[ob]! + off[0], posed.c[ob + 1]! + off[1], posed.c[ob + 2]! + off[2]);
    const count = circleContacts(
      posed.c.subarray(oa, oa + 3), posed.n.subarray(oa, oa + 3), posed.R[p.a]!,
      cb, posed.n.subarray(ob, ob + 3), posed.R[p.b]!, OUT,
    );
    const continuum = lastContinuum();
    const contacts: PeriodicScan['contacts'] = [];
    let distance = Infinity;
    for (let k = 0; k < count; k++) {
      const o = k * CONTACT_STRIDE;
      const pa: Vec3 = [OUT[o + 2]!, OUT[o + 3]!, OUT[o + 4]!];
      const pb: Vec3 = [OUT[o + 5]!, OUT[o + 6]!, OUT[o + 7]!];
      const d = OUT[o + 1]!;
      distance = Math.min(distance, d);
      contacts.push({ ta: angleAt(pp, p.a, null, pa), tb: angleAt(pp, p.b, off, pb), d, pa, pb });
    }
    return { a: p.a, b: p.b, shift: p.shift.slice(), c: w[p.a]! + w[p.b]!, distance, contacts, continuum };
  });
}

/** Largest common tube the arrangement allows: min over pairs of distance / (w_a + w_b) and over rings of R / w. */
export function periodicTube(scans: readonly PeriodicScan[], R: ArrayLike<number>, w: readonly number[]): number {
  let t = Infinity;
  for (let i = 0; i < w.length; i++) t = Math.min(t, R[i]! / w[i]!);
  for (const s of scans) t = Math.min(t, s.distance / s.c);
  return t;
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
  const tracked = track(ca, posed.e1.subarray(3 * a, 3 * a + 3), posed.e2.subarray(3 * a, 3 * a + 3), posed.R[a]!,
    cb, posed.e1.subarray(3 * b, 3 * b + 3), posed.e2.subarray(3 * b, 3 * b + 3), posed.R[b]!, con.ta, con.tb);
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

/** Material angle of point p on ring j (or its image at offset `off`): its projection on the ring's plane. */
function angleAt(pp: PeriodicPosed, j: number, off: Vec3 | null, p: ArrayLike<number>): number {
  const o = 3 * j;
  let x = 0, y = 0;
  for (let k = 0; k < 3; k++) {
    const d = p[k]! - pp.posed.c[o + k]! - (off ? off[k]! : 0);
    x += d * pp.posed.e1[o + k]!;
    y += d * pp.posed.e2[o + k]!;
  }
  return Math.atan2(y, x);
}

function pointOn(c: Vec3, e1: Float64Array, e2: Float64Array, o: number, R: number, th: number): Vec3 {
  const cs = Math.cos(th), sn = Math.sin(th);
  return [
    c[0] + R * (cs * e1[o]! + sn * e2[o]!),
    c[1] + R * (cs * e1[o + 1]! + sn * e2[o + 1]!),
    c[2] + R * (cs * e1[o + 2]! + sn * e2[o + 2]!),
  ];
}

/**
 * Local minimum of |pA(θ) - pB(φ)|² near (θ0, φ0) by damped Newton in the two angles (the Hessian when
 * positive definite, a scaled gradient step otherwise). Null when the minimum is lost.
 */
function track(
  ca: Vec3, e1a: Float64Array, e2a: Float64Array, Ra: number,
  cb: Vec3, e1b: Float64Array, e2b: Float64Array, Rb: number, th0: number, ph0: number,
): [number, number] | null {
  let th = th0, ph = ph0;
  for (let it = 0; it < TRACK_MAX_STEPS; it++) {
    const cA = Math.cos(th), sA = Math.sin(th), cB = Math.cos(ph), sB = Math.sin(ph);
    let gA = 0, gB = 0, aa = 0, bb = 0, ab = 0, dA2 = 0, dB2 = 0;
    for (let k = 0; k < 3; k++) {
      const ea = cA * e1a[k]! + sA * e2a[k]!, ta = -sA * e1a[k]! + cA * e2a[k]!;
      const eb = cB * e1b[k]! + sB * e2b[k]!, tb = -sB * e1b[k]! + cB * e2b[k]!;
      const D = ca[k]! + Ra * ea - cb[k]! - Rb * eb;
      gA += D * Ra * ta;
      gB -= D * Rb * tb;
      aa += Ra * Ra * ta * ta;
      bb += Rb * Rb * tb * tb;
      ab -= Ra * Rb * ta * tb;
      dA2 += D * Ra * ea;
      dB2 += D * Rb * eb;
    }
    // Hessian of ½|D|²: pA'' = -(pA - cA), pB'' = -(pB - cB).
    const h11 = aa - dA2, h22 = bb + dB2, h12 = ab;
    const det = h11 * h22 - h12 * h12;
    let dth: number, dph: number;
    if (h11 > 0 && det > 0) {
      dth = -(h22 * gA - h12 * gB) / det;
      dph = -(h11 * gB - h12 * gA) / det;
    } else {
      dth = -gA / Math.max(aa, 1e-300);
      dph = -gB / Math.max(bb, 1e-300);
    }
    const step = Math.hypot(dth, dph);
    if (step > 0.25) {
      dth *= 0.25 / step;
      dph *= 0.25 / step;
    }
    th += dth;
    ph += dph;
    if (step <= ANGLE_STEP_TOL) break;
  }
  if (Math.abs(th - th0) > LOST_ANGLE || Math.abs(ph - ph0) > LOST_ANGLE) return null;
  return [th, ph];
}

function cross(a: ArrayLike<number>, b: ArrayLike<number>): Vec3 {
  return [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
}
