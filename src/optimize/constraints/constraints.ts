// The constraints of the local models: h = g(poses) - c·t >= 0.
//  strut     a local closest pair of two core circles (both points minimised): g = |pA - pB|, c = w_a + w_b.
//  sample    a point fixed on ring b and its nearest point on ring a: g >= the pair's true distance, so
//            adding it never excludes a feasible arrangement; samples let the model see a continuum of
//            contacts (tight Hopf: a whole circle touches) that a few struts would misrepresent.
//  radius    t·w_i <= R_i:  g = R_i / w_i, c = 1.
//  departure symmetryDeparture <= ε: g = (ε² - D²) / (2ε), c = 0 (smooth even where D = 0).
// Gradients come from the envelope theorem: a rigid motion of ring a (velocity v, angular velocity ω about
// its centre) changes g by u·(v + ω × (pA - cA)) with u = (pA - pB)/|pA - pB|, and the same with the
// opposite sign for ring b — whether a point is minimised or fixed on its ring.
import type { Vec3 } from '../../model/types.js';
import { closestPointOnCircle } from '../../kernel/index.js';
import { departureResidual, type RingOrbits } from '../../model/symmetry.js';
import { addRingGradient, ringsOf, type Chart, type Posed } from '../chart/chart.js';
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
  const c = Math.cos(th), s = Math.sin(th), R = posed.R[j]!, o = 3 * j;
  for (let k = 0; k < 3; k++) out[k] = posed.c[o + k]! + R * (c * posed.e1[o + k]! + s * posed.e2[o + k]!);
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

// --- helpers ---

const PA = new Float64Array(3), PB = new Float64Array(3);

function pairValue(con: Constraint, chart: Chart, posed: Posed, withGrad: boolean, strut: boolean, keep: boolean): number {
  const a = con.a, b = con.b;
  let ta = con.ta, tb = con.tb;
  if (strut) {
    const r = trackStrut(posed.e1, posed.e2, posed.c, 3 * a, 3 * a, posed.R[a]!, posed.c, 3 * b, 3 * b, posed.R[b]!, ta, tb);
    if (r === null) return NaN;
    ta = r[0];
    tb = r[1];
    pointOn(posed, a, ta, PA);
    pointOn(posed, b, tb, PB);
  } else {
    pointOn(posed, b, tb, PB);
    const o = 3 * a;
    closestPointOnCircle(PB, posed.c.subarray(o, o + 3), posed.n.subarray(o, o + 3), posed.R[a]!, PA);
    ta = angleOf(posed, a, PA);
  }
  const ux0 = PA[0]! - PB[0]!, uy0 = PA[1]! - PB[1]!, uz0 = PA[2]! - PB[2]!;
  const d = Math.hypot(ux0, uy0, uz0);
  if (keep) {
    con.ta = ta;
    con.tb = tb;
    con.g = d;
    con.pa = [PA[0]!, PA[1]!, PA[2]!];
    con.pb = [PB[0]!, PB[1]!, PB[2]!];
  }
  if (withGrad && d > 0) {
    const u: Vec3 = [ux0 / d, uy0 / d, uz0 / d];
    const ra: Vec3 = [PA[0]! - posed.c[3 * a]!, PA[1]! - posed.c[3 * a + 1]!, PA[2]! - posed.c[3 * a + 2]!];
    const rb: Vec3 = [PB[0]! - posed.c[3 * b]!, PB[1]! - posed.c[3 * b + 1]!, PB[2]! - posed.c[3 * b + 2]!];
    addRingGradient(chart, posed, a, u, cross(ra, u), 1, con.grad);
    addRingGradient(chart, posed, b, u, cross(rb, u), -1, con.grad);
  }
  return d;
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
