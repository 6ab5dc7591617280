// Rigid motions of rings spinning about their own axes, and the relative motion of one ring seen
// from another's body frame as a screw (Chasles; twist algebra as in Ball, "A Treatise on the Theory
// of Screws", 1900, and Litvin & Fuentes, "Gear Geometry and Applied Theory", 2004, ch. 2-3).
import type { Vec3 } from '../model/types.js';
import { cross, dot, norm, normalize, planeBasis, rotate, sub } from '../model/vec.js';

/** A ring's body frame: origin at its centre, (e1, e2) = planeBasis(normal), axis = e1 x e2. */
export interface BodyFrame {
  origin: Vec3;
  e1: Vec3;
  e2: Vec3;
  axis: Vec3;
}

/** A body spinning at angular speed omega (radians per unit time, right-handed about axis) about a fixed line. */
export interface Spin {
  center: Vec3;
  axis: Vec3;
  omega: number;
}

export type MotionKind = 'identity' | 'rotation' | 'screw' | 'translation';

export interface RelativeMotion {
  /**
   * identity: no relative motion; rotation: pitch 0; screw: rotation plus slide along the axis;
   * translation: equal angular velocities, the neighbour only translates (circular translation).
   */
  kind: MotionKind;
  /** |omega_other axis_other - omega_self axis_self| (radians per unit time). */
  angularSpeed: number;
  /** Instantaneous screw axis at t = 0, in the self body frame (unit), or null. */
  axisDirection: Vec3 | null;
  /** Point of that axis closest to the self ring's centre, in the self body frame, or null. */
  axisPoint: Vec3 | null;
  /** Slide along the axis per radian of turn (length units per radian); null for identity/translation. */
  pitch: number | null;
  /** Velocity of every point when kind is translation (self body frame, at t = 0), else null. */
  translationVelocity: Vec3 | null;
  /** The screw axis stays put in the self body frame over time (it coincides with the self axis). */
  axisFixed: boolean;
  /** A plain rotation about a fixed axis: pitch 0 and axis fixed. */
  plainRotation: boolean;
  /** Angle between the two spin axes, in [0, pi] (radians). */
  shaftAngle: number;
  /** Shortest distance between the two spin axes (length units). */
  axisOffset: number;
}

/** Relative tolerances: angular speeds against the larger speed, lengths against the length scale. */
const ANGULAR_TOL = 1e-12;
const LENGTH_TOL = 1e-9;
/** Axes whose angle has a sine below this are treated as parallel. */
const PARALLEL_SIN = 1e-9;

export function bodyFrame(center: ArrayLike<number>, normal: ArrayLike<number>): BodyFrame {
  const n = normalize(normal);
  const [e1, e2] = planeBasis(n);
  return { origin: [center[0]!, center[1]!, center[2]!], e1, e2, axis: cross(e1, e2) };
}

export function toBody(f: BodyFrame, p: ArrayLike<number>): Vec3 {
  const d = sub(p, f.origin);
  return [dot(d, f.e1), dot(d, f.e2), dot(d, f.axis)];
}

export function toWorld(f: BodyFrame, x: ArrayLike<number>): Vec3 {
  const o = f.origin;
  return [
    o[0] + x[0]! * f.e1[0] + x[1]! * f.e2[0] + x[2]! * f.axis[0],
    o[1] + x[0]! * f.e1[1] + x[1]! * f.e2[1] + x[2]! * f.axis[1],
    o[2] + x[0]! * f.e1[2] + x[1]! * f.e2[2] + x[2]! * f.axis[2],
  ];
}

/** Direction vector expressed in a body frame. */
export function dirToBody(f: BodyFrame, v: ArrayLike<number>): Vec3 {
  return [dot(v, f.e1), dot(v, f.e2), dot(v, f.axis)];
}

/** Position at time t of the point that was at p when t = 0. */
export function spinPoint(s: Spin, p: ArrayLike<number>, t: number): Vec3 {
  const d = rotate(sub(p, s.center), s.axis, s.omega * t);
  return [d[0] + s.center[0], d[1] + s.center[1], d[2] + s.center[2]];
}

/**
 * Map a material point of `other` (world position at t = 0) to the body frame of `self` at time t:
 * spin it with other, then undo self's spin, then read it in self's frame.
 */
export function relativePoint(self: Spin, selfFrame: BodyFrame, other: Spin, p: ArrayLike<number>, t: number): Vec3 {
  const moved = spinPoint(other, p, t);
  const back = spinPoint({ center: self.center, axis: self.axis, omega: -self.omega }, moved, t);
  return toBody(selfFrame, back);
}

/**
 * Instantaneous relative twist of `other` in `self`'s body frame at t = 0, as a screw.
 * `lengthScale` (e.g. the larger core radius) scales the zero tests on lengths.
 */
export function relativeMotion(self: Spin, selfFrame: BodyFrame, other: Spin, lengthScale: number): RelativeMotion {
  const nSelf = normalize(self.axis);
  const nOther = dirToBody(selfFrame, normalize(other.axis));
  const cOther = toBody(selfFrame, other.center);
  const z: Vec3 = dirToBody(selfFrame, nSelf);
  const cSelf = toBody(selfFrame, self.center);
  // Spatial twist of a spin about the line (c, n) at speed w: angular w n, velocity at the origin c x (w n).
  const wO: Vec3 = [other.omega * nOther[0], other.omega * nOther[1], other.omega * nOther[2]];
  const wS: Vec3 = [self.omega * z[0], self.omega * z[1], self.omega * z[2]];
  const W = sub(wO, wS);
  const V = sub(cross(cOther, wO), cross(cSelf, wS));
  const speedScale = Math.max(Math.abs(self.omega), Math.abs(other.omega));
  const L = Math.max(lengthScale, norm(sub(cOther, cSelf)));
  const w = norm(W);
  const { shaftAngle, axisOffset } = axesRelation(cSelf, z, cOther, nOther);
  const base = { shaftAngle, axisOffset };
  if (w <= ANGULAR_TOL * speedScale) {
    if (norm(V) <= LENGTH_TOL * speedScale * L) {
      return { kind: 'identity', angularSpeed: 0, axisDirection: null, axisPoint: null, pitch: null, translationVelocity: null, axisFixed: true, plainRotation: false, ...base };
    }
    return { kind: 'translation', angularSpeed: 0, axisDirection: null, axisPoint: null, pitch: null, translationVelocity: V, axisFixed: false, plainRotation: false, ...base };
  }
  const dir: Vec3 = [W[0] / w, W[1] / w, W[2] / w];
  const pitch = dot(W, V) / (w * w);
  const wxv = cross(W, V);
  const point: Vec3 = [wxv[0] / (w * w), wxv[1] / (w * w), wxv[2] / (w * w)];
  const rotation = Math.abs(pitch) <= LENGTH_TOL * L;
  // Self's spin turns the frame about its own axis, so only an axis on that line stays put.
  const radial = Math.hypot(point[0] - cSelf[0], point[1] - cSelf[1]);
  const axisFixed = norm(cross(dir, z)) <= LENGTH_TOL && radial <= LENGTH_TOL * L;
  return {
    kind: rotation ? 'rotation' : 'screw',
    angularSpeed: w,
    axisDirection: dir,
    axisPoint: point,
    pitch: rotation ? 0 : pitch,
    translationVelocity: null,
    axisFixed,
    plainRotation: rotation && axisFixed,
    ...base,
  };
}

/** Angle and shortest distance between the lines (c1, n1) and (c2, n2). */
function axesRelation(c1: Vec3, n1: Vec3, c2: Vec3, n2: Vec3): { shaftAngle: number; axisOffset: number } {
  const shaftAngle = Math.atan2(norm(cross(n1, n2)), dot(n1, n2));
  const d = sub(c2, c1);
  const m = cross(n1, n2);
  const s = norm(m);
  // Parallel (or nearly) lines: the common perpendicular is not unique; use the distance from c2 to line 1.
  const axisOffset = s <= PARALLEL_SIN ? norm(cross(d, n1)) : Math.abs(dot(d, m)) / s;
  return { shaftAngle, axisOffset };
}
