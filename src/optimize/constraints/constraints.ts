// The constraints of the local models, on either chart: h = g(poses) - c·t >= 0.
//  strut     a local closest pair of two core circles (both points minimised): g = |pA - pB|, c = w_a + w_b.
//            On the periodic chart ring b may be an image of a cell ring, displaced by Σ s_k L_k (`shift`).
//  sample    a point fixed on ring b and its nearest point on ring a: g >= the pair's true distance, so
//            adding it never excludes a feasible arrangement; samples let the model see a continuum of
//            contacts (tight Hopf: a whole circle touches) that a few struts would misrepresent.
//  radius    t·w_i <= R_i:  g = R_i / w_i, c = 1.
//  departure symmetryDeparture <= ε: g = (ε² - D²) / (2ε), c = 0 (smooth even where D = 0).
// Struts are tracked through small pose changes by Newton in the two angles (strutTrack.ts), on both charts.
// Gradients come from the envelope theorem: a rigid motion of ring a (velocity v, angular velocity ω about
// its centre) changes g by u·(v + ω × (pA - cA)) with u = (pA - pB)/|pA - pB|, and the same with the
// opposite sign for ring b — whether a point is minimised or fixed on its ring. The charts differ only in
// where that motion goes: the ring chart (chart.ts addRingGradient) or, for an image, also the lattice
// vectors L_k with weight s_k (periodicChart.ts addImageGradient).
import type { Vec3 } from '../../model/types.js';
import { closestPointOnCircle } from '../../kernel/index.js';
import { departureResidual, type RingOrbits } from '../../model/symmetry.js';
import { addRingGradient, ringsOf, type Chart, type Posed } from '../chart/chart.js';
import { addImageGradient, latticeVectors, toFree, type PeriodicChart, type PeriodicPosed } from '../chart/periodicChart.js';
import { latticeOffset } from '../../model/periodic.js';
import { trackStrut } from './strutTrack.js';

export type ConstraintKind = 'strut' | 'sample' | 'radius' | 'departure';

export interface Constraint {
  kind: ConstraintKind;
  a: number;
  b: number;
  /** Material angles (in the chart's base frames) of the points on a and b. */
  ta: number;
  tb: number;
  /** Coefficient of t. */
  c: number;
  /** g at the pose it was last evaluated at. */
  g: number;
  grad: Float64Array;
  /**
   * Free coordinates where `grad` can be nonzero (ascending), when the chart knows them (a strut or sample
   * of the ring chart moves only its two rings' blocks); none: any. Lets the step read a row in time
   * proportional to its own length, not the chart's.
   */
  support?: Int32Array;
  pa: Vec3;
  pb: Vec3;
  continuum: boolean;
}

/** A constraint of the periodic chart; `b` is the cell index of the imaged ring, at lattice shift `shift`. */
export interface PeriodicConstraint extends Constraint {
  shift: number[];
}

export interface DepartureSpec {
  orbits: RingOrbits;
  epsilon: number;
}

/** Re-evaluate a constraint at `posed` (value returned, gradient into con.grad when `withGrad`). NaN if lost. */
export function evaluate(
  con: Constraint, chart: Chart, posed: Posed, withGrad: boolean, dep: DepartureSpec | null, keepAngles = true,
): number {
  const grad = con.grad;
  if (withGrad) grad.fill(0);
  switch (con.kind) {
    case 'radius':
      return con.g;
    case 'departure':
      return departureValue(con, chart, posed, withGrad, dep!);
    case 'sample':
      return pairValue(con, chart, posed, withGrad, false, keepAngles);
    case 'strut':
      return pairValue(con, chart, posed, withGrad, true, keepAngles);
  }
}

/** Point at material angle θ on ring j. */
export function pointOn(posed: Posed, j: number, th: number, out: Float64Array | number[]): void {
  pointAt(posed.c, 3 * j, posed.e1, posed.e2, 3 * j, posed.R[j]!, th, out);
}

/**
 * Material angle of a point on ring j (its projection onto the ring's plane), or on the image of ring j
 * displaced by `off` (periodic arrangements).
 */
export function angleOf(posed: Posed, j: number, p: ArrayLike<number>, off: ArrayLike<number> | null = null): number {
  const o = 3 * j;
  let x = 0, y = 0;
  for (let k = 0; k < 3; k++) {
    const d = p[k]! - posed.c[o + k]! - (off ? off[k]! : 0);
    x += d * posed.e1[o + k]!;
    y += d * posed.e2[o + k]!;
  }
  return Math.atan2(y, x);
}

export function newConstraint(
  kind: ConstraintKind, a: number, b: number, ta: number, tb: number, c: number, nFree: number, continuum = false,
): Constraint {
  return { kind, a, b, ta, tb, c, g: NaN, grad: new Float64Array(nFree), pa: [0, 0, 0], pb: [0, 0, 0], continuum };
}

export function newPeriodicConstraint(
  kind: 'strut' | 'radius', a: number, b: number, shift: number[], ta: number, tb: number, c: number, nFree: number, continuum = false,
): PeriodicConstraint {
  return { kind, a, b, shift, ta, tb, c, g: NaN, grad: new Float64Array(nFree), pa: [0, 0, 0], pb: [0, 0, 0], continuum };
}

/**
 * Re-evaluate a constraint of the periodic chart at `pp` (value returned; gradient in free coordinates into
 * con.grad when `withGrad`; tracked angles and points stored when `keep`). NaN when the strut was lost.
 */
export function evaluatePeriodic(con: PeriodicConstraint, pc: PeriodicChart, pp: PeriodicPosed, withGrad: boolean, keep = true): number {
  if (withGrad) con.grad.fill(0);
  if (con.kind !== 'strut') return con.g;
  const { posed } = pp;
  const a = con.a, b = con.b;
  const off = latticeOffset(latticeVectors(pp), con.shift);
  const cb: Vec3 = [posed.c[3 * b]! + off[0], posed.c[3 * b + 1]! + off[1], posed.c[3 * b + 2]! + off[2]];
  const ca: Vec3 = [posed.c[3 * a]!, posed.c[3 * a + 1]!, posed.c[3 * a + 2]!];
  const d = trackedStrut(con, posed.e1, posed.e2, posed.R, ca, 0, cb, 0, keep);
  if (withGrad && d > 0) {
    contactMoments(ca, 0, cb, 0, d);
    const full = new Float64Array(pc.nFull);
    addImageGradient(pc, pp, a, null, U, WA, 1, full);
    addImageGradient(pc, pp, b, con.shift, U, WB, -1, full);
    toFree(pc, full, con.grad);
  }
  return d;
}

// --- helpers ---

/** The points of the last strut or sample evaluated, and its direction u and moments (ra × u, rb × u). */
const PA = new Float64Array(3), PB = new Float64Array(3);
const U = new Float64Array(3), WA = new Float64Array(3), WB = new Float64Array(3);

function pairValue(con: Constraint, chart: Chart, posed: Posed, withGrad: boolean, strut: boolean, keep: boolean): number {
  const a = con.a, b = con.b;
  const d = strut
    ? trackedStrut(con, posed.e1, posed.e2, posed.R, posed.c, 3 * a, posed.c, 3 * b, keep)
    : sampleValue(con, posed, keep);
  if (withGrad && d > 0) {
    contactMoments(posed.c, 3 * a, posed.c, 3 * b, d);
    addRingGradient(chart, posed, a, U, WA, 1, con.grad);
    addRingGradient(chart, posed, b, U, WB, -1, con.grad);
  }
  return d;
}

/**
 * A strut tracked from its stored angles to the poses, ring a centred at ca[oa..], ring b (or its image) at
 * cb[ob..], both with their frames in e1, e2; its points into PA, PB. NaN when the strut was lost.
 */
function trackedStrut(
  con: Constraint, e1: Float64Array, e2: Float64Array, R: Float64Array, ca: ArrayLike<number>, oa: number,
  cb: ArrayLike<number>, ob: number, keep: boolean,
): number {
  const a = con.a, b = con.b;
  const r = trackStrut(e1, e2, ca, oa, 3 * a, R[a]!, cb, ob, 3 * b, R[b]!, con.ta, con.tb);
  if (r === null) return NaN;
  pointAt(ca, oa, e1, e2, 3 * a, R[a]!, r[0], PA);
  pointAt(cb, ob, e1, e2, 3 * b, R[b]!, r[1], PB);
  return stored(con, r[0], r[1], keep);
}

/** A sample: the point at con.tb on ring b and its nearest point on ring a; the points into PA, PB. */
function sampleValue(con: Constraint, posed: Posed, keep: boolean): number {
  const a = con.a, o = 3 * a;
  pointOn(posed, con.b, con.tb, PB);
  closestPointOnCircle(PB, posed.c.subarray(o, o + 3), posed.n.subarray(o, o + 3), posed.R[a]!, PA);
  return stored(con, angleOf(posed, a, PA), con.tb, keep);
}

/** |PA - PB|, with the angles and points stored in `con` when `keep`. */
function stored(con: Constraint, ta: number, tb: number, keep: boolean): number {
  const d = Math.hypot(PA[0]! - PB[0]!, PA[1]! - PB[1]!, PA[2]! - PB[2]!);
  if (keep) {
    con.ta = ta;
    con.tb = tb;
    con.g = d;
    con.pa = [PA[0]!, PA[1]!, PA[2]!];
    con.pb = [PB[0]!, PB[1]!, PB[2]!];
  }
  return d;
}

/** u = (PA - PB)/d into U, and the moments (PA - cA) × u into WA, (PB - cB) × u into WB. */
function contactMoments(ca: ArrayLike<number>, oa: number, cb: ArrayLike<number>, ob: number, d: number): void {
  for (let k = 0; k < 3; k++) U[k] = (PA[k]! - PB[k]!) / d;
  momentInto(PA, ca, oa, WA);
  momentInto(PB, cb, ob, WB);
}

function momentInto(p: Float64Array, c: ArrayLike<number>, o: number, out: Float64Array): void {
  const rx = p[0]! - c[o]!, ry = p[1]! - c[o + 1]!, rz = p[2]! - c[o + 2]!;
  out[0] = ry * U[2]! - rz * U[1]!;
  out[1] = rz * U[0]! - rx * U[2]!;
  out[2] = rx * U[1]! - ry * U[0]!;
}

/** Point at material angle θ on a ring centred at c[oc..] with its frame at e1[o..], e2[o..]. */
function pointAt(
  c: ArrayLike<number>, oc: number, e1: Float64Array, e2: Float64Array, o: number, R: number, th: number, out: Float64Array | number[],
): void {
  const cs = Math.cos(th), sn = Math.sin(th);
  for (let k = 0; k < 3; k++) out[k] = c[oc + k]! + R * (cs * e1[o + k]! + sn * e2[o + k]!);
}

function departureValue(con: Constraint, chart: Chart, posed: Posed, withGrad: boolean, dep: DepartureSpec): number {
  const rings = ringsOf(chart, posed);
  const res = departureResidual(rings, dep.orbits);
  const eps = dep.epsilon;
  const g = (eps * eps - res.squared) / (2 * eps);
  con.g = g;
  if (withGrad) {
    // dD²/dc_i = 2/N (c_i - c̄_i); dD²/dn_i = 2/N R²(n_i - n̄_i), and δn = ω × n gives dD²/dω_i = n_i × dD²/dn_i.
    const N = rings.length;
    const s = -(2 / N) / (2 * eps);
    for (let i = 0; i < N; i++) {
      const gc = res.centers.subarray(3 * i, 3 * i + 3);
      const gn = res.normals.subarray(3 * i, 3 * i + 3);
      addRingGradient(chart, posed, i, gc, cross(rings[i]!.normal, gn), s, con.grad);
    }
  }
  return g;
}

function cross(a: ArrayLike<number>, b: ArrayLike<number>): Vec3 {
  return [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
}
