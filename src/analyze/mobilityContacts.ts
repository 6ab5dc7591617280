// Active contacts of a ring set, recomputed with the exact kernel (never taken from a result's contact
// list), and their first-order gradients in the reduced motion coordinates of mobilityMotion.
// A pair that touches along a whole circle (the tight Hopf link, coaxial rings) is sampled densely so that
// every direction of the continuum constrains the motion.
import { closestPointOnCircle, pointCircleDistance, ringDistance, strutGradient } from '../kernel/index.js';
import type { Vec3 } from '../model/types.js';
import { planeBasis } from '../model/vec.js';
import { COORDS_PER_RING, type MotionFrame, type RingPose } from './mobilityMotion.js';
import { shifted, type ImagePair } from './mobilityPairs.js';

/** One closest pair between rings a and b that is (nearly) touching. */
export interface Strut {
  a: number;
  /** Ring b, or its copy translated by `offset` (a lattice); pB lies on that copy. */
  b: number;
  offset: Vec3;
  pA: Vec3;
  pB: Vec3;
  /** Core-to-core distance of the pair (layout units). */
  distance: number;
  /** distance - r_a - r_b (layout units); <= activeTol for an active strut. */
  gap: number;
  /** 'strut': a local minimum found by the kernel; 'continuum': one sample of a touching circle. */
  kind: 'strut' | 'continuum';
  /** For a continuum sample: which end (pA on ring a, or pB on ring b's copy) was sampled. */
  sampleOn?: 'a' | 'b';
}

export interface ContinuumPair {
  a: number;
  b: number;
  offset: Vec3;
  /** 'coaxial' | 'on-tube' from the kernel, or 'near-continuum' when the kernel saw isolated minima
   * but the whole circle is within the active tolerance. */
  kind: string;
  /** Index of the ring whose points were sampled (each sample paired with its closest point on the other). */
  sampled: number;
  samples: number;
}

export interface ActiveSet {
  struts: Strut[];
  continua: ContinuumPair[];
  /** Smallest gap over all pairs (layout units): negative means the tubes overlap. */
  minGap: number;
}

/** Samples around a touching circle; 64 keeps neighbouring contact normals within 6 degrees. */
export const CONTINUUM_SAMPLES = 64;

/** Every pair closer than r_a + r_b + activeTol contributes its closest pairs. */
export function activeStruts(rings: readonly RingPose[], activeTol: number, pairs: readonly ImagePair[]): ActiveSet {
  const struts: Strut[] = [];
  const continua: ContinuumPair[] = [];
  let minGap = Infinity;
  for (const { a, b, offset } of pairs) {
    const A = rings[a]!, B = shifted(rings[b]!, offset);
    const sum = A.tube + B.tube;
    const rd = ringDistance(A, B);
    minGap = Math.min(minGap, rd.distance - sum);
    if (rd.distance - sum > activeTol) continue;
    // A continuum reported by the kernel, or one hidden by rounding in an optimizer's output. Both rings
    // may lie on each other's tube (the tight Hopf link): each such side gives its own family of pairs.
    const sides = flatSides(A, B, activeTol, rd.continuum !== null);
    if (sides.length > 0) {
      for (const side of sides) {
        const flat = side === 'A' ? a : b;
        const X = side === 'A' ? A : B;
        const Y = side === 'A' ? B : A;
        const q = new Float64Array(3);
        for (let k = 0; k < CONTINUUM_SAMPLES; k++) {
          const p = circlePoint(X, (2 * Math.PI * k) / CONTINUUM_SAMPLES);
          const d = closestPointOnCircle(p, Y.center, Y.normal, Y.radius, q);
          const onY: Vec3 = [q[0]!, q[1]!, q[2]!];
          struts.push({
            a, b, offset,
            pA: side === 'A' ? p : onY,
            pB: side === 'A' ? onY : p,
            distance: d,
            gap: d - sum,
            kind: 'continuum',
            sampleOn: side === 'A' ? 'a' : 'b',
          });
        }
        continua.push({
          a, b, offset,
          kind: rd.continuum !== null ? rd.continuum.kind : 'near-continuum',
          sampled: flat,
          samples: CONTINUUM_SAMPLES,
        });
      }
      continue;
    }
    for (const c of rd.contacts) {
      if (c.distance - sum > activeTol) continue;
      struts.push({ a, b, offset, pA: c.onA, pB: c.onB, distance: c.distance, gap: c.distance - sum, kind: 'strut' });
    }
  }
  return { struts, continua, minGap };
}

/**
 * First-order change of the strut's distance per unit of each reduced coordinate (a row of length
 * frame.dim). Uses the kernel's envelope-theorem gradient: at a closest pair the pair's own sliding
 * does not change the distance, so only the rigid motions of the two rings count. A lattice copy moves
 * with its ring, so its part adds to that ring's coordinates (both parts, for a ring against its own copy).
 */
export function strutRow(s: Strut, rings: readonly RingPose[], frame: MotionFrame): number[] {
  const A = rings[s.a]!, B = shifted(rings[s.b]!, s.offset);
  const g = new Float64Array(14);
  strutGradient(s.pA, s.pB, A.center, A.radius, B.center, B.radius, g);
  const row = new Array<number>(frame.dim).fill(0);
  const put = (ring: number, off: number): void => {
    const o = COORDS_PER_RING * ring;
    row[o]! += g[off]!;
    row[o + 1]! += g[off + 1]!;
    row[o + 2]! += g[off + 2]!;
    const e1 = frame.e1[ring]!, e2 = frame.e2[ring]!;
    row[o + 3]! += (g[off + 3]! * e1[0] + g[off + 4]! * e1[1] + g[off + 5]! * e1[2]) / frame.length;
    row[o + 4]! += (g[off + 3]! * e2[0] + g[off + 4]! * e2[1] + g[off + 5]! * e2[2]) / frame.length;
  };
  put(s.a, 0);
  put(s.b, 7);
  return row;
}

/** Point of the core circle at angle θ in the ring's planeBasis frame. */
export function circlePoint(r: RingPose, theta: number): Vec3 {
  const n = r.normal;
  const l = Math.hypot(n[0], n[1], n[2]);
  const [e1, e2] = planeBasis([n[0] / l, n[1] / l, n[2] / l]);
  const c = Math.cos(theta) * r.radius, s = Math.sin(theta) * r.radius;
  return [r.center[0] + c * e1[0] + s * e2[0], r.center[1] + c * e1[1] + s * e2[1], r.center[2] + c * e1[2] + s * e2[2]];
}

/**
 * The rings of the pair that lie within `tol` of a constant distance from the other's core all the way
 * round (they touch along a whole circle). When the kernel already reported a continuum and rounding
 * hides it from both spreads, the flatter side is taken.
 */
function flatSides(A: RingPose, B: RingPose, tol: number, kernelSaysContinuum: boolean): ('A' | 'B')[] {
  const spreadA = spread(A, B);
  const spreadB = spread(B, A);
  const out: ('A' | 'B')[] = [];
  if (spreadA <= tol) out.push('A');
  if (spreadB <= tol) out.push('B');
  if (out.length === 0 && kernelSaysContinuum) out.push(spreadA <= spreadB ? 'A' : 'B');
  return out;
}

/** max - min over samples of X of the distance from X's points to Y's core. */
function spread(X: RingPose, Y: RingPose): number {
  let lo = Infinity, hi = -Infinity;
  for (let k = 0; k < CONTINUUM_SAMPLES; k++) {
    const p = circlePoint(X, (2 * Math.PI * k) / CONTINUUM_SAMPLES);
    const d = pointCircleDistance(p, Y.center, Y.normal, Y.radius);
    lo = Math.min(lo, d);
    hi = Math.max(hi, d);
  }
  return hi - lo;
}
