// Exact pair scan with the kernel: every strut of every constrained pair, and the true tube of a pose
// (the largest t it allows: min over pairs of distance / (w_a + w_b) and over rings of R_i / w_i).
import { CONTACT_STRIDE, MAX_CONTACTS, circleContacts, lastContinuum, type ContinuumKind } from '../kernel/index.js';
import type { RingOrbits } from '../model/symmetry.js';
import type { Vec3 } from '../model/types.js';
import type { Posed } from './chart.js';
import { angleOf } from './constraints.js';

export interface PairContact {
  /** Material angles of the two points. */
  ta: number;
  tb: number;
  d: number;
  pa: Vec3;
  pb: Vec3;
}

export interface PairScan {
  a: number;
  b: number;
  /** w_a + w_b */
  c: number;
  distance: number;
  contacts: PairContact[];
  continuum: ContinuumKind | null;
}

const OUT = new Float64Array(MAX_CONTACTS * CONTACT_STRIDE);

/** One pair per orbit of pairs under the group (all pairs i < j without symmetry). */
export function representativePairs(orbits: RingOrbits, n: number): [number, number][] {
  const out: [number, number][] = [];
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      let canonical = true;
      for (const perm of orbits.perms) {
        const a = perm[i]!, b = perm[j]!;
        const lo = Math.min(a, b), hi = Math.max(a, b);
        if (lo < i || (lo === i && hi < j)) {
          canonical = false;
          break;
        }
      }
      if (canonical) out.push([i, j]);
    }
  }
  return out;
}

export function scanPairs(posed: Posed, pairs: readonly [number, number][], w: readonly number[]): PairScan[] {
  return pairs.map(([a, b]) => ({ a, b, c: w[a]! + w[b]!, ...pairContacts(posed, a, b, null) }));
}

/**
 * Every strut of ring a with ring b, or (periodic arrangements) with the image of ring b displaced by
 * `off`; the angles are material angles of ring a and of ring b (the image has b's frame).
 */
export function pairContacts(
  posed: Posed, a: number, b: number, off: ArrayLike<number> | null,
): { distance: number; contacts: PairContact[]; continuum: ContinuumKind | null } {
  const oa = 3 * a, ob = 3 * b;
  const cb = off === null
    ? posed.c.subarray(ob, ob + 3)
    : Float64Array.of(posed.c[ob]! + off[0]!, posed.c[ob + 1]! + off[1]!, posed.c[ob + 2]! + off[2]!);
  const count = circleContacts(
    posed.c.subarray(oa, oa + 3), posed.n.subarray(oa, oa + 3), posed.R[a]!,
    cb, posed.n.subarray(ob, ob + 3), posed.R[b]!, OUT,
  );
  const continuum = lastContinuum();
  const contacts: PairContact[] = [];
  let distance = Infinity;
  for (let k = 0; k < count; k++) {
    const o = k * CONTACT_STRIDE;
    const pa: Vec3 = [OUT[o + 2]!, OUT[o + 3]!, OUT[o + 4]!];
    const pb: Vec3 = [OUT[o + 5]!, OUT[o + 6]!, OUT[o + 7]!];
    const d = OUT[o + 1]!;
    distance = Math.min(distance, d);
    contacts.push({ ta: angleOf(posed, a, pa), tb: angleOf(posed, b, pb, off), d, pa, pb });
  }
  return { distance, contacts, continuum };
}

/** Largest common tube the pose allows. */
export function trueTube(scans: readonly PairScan[], R: ArrayLike<number>, w: readonly number[]): number {
  let t = Infinity;
  for (let i = 0; i < w.length; i++) t = Math.min(t, R[i]! / w[i]!);
  for (const s of scans) t = Math.min(t, s.distance / s.c);
  return t;
}

/** Worst exact violation relative to the tube (0 when every pair clears t (w_a + w_b)). */
export function maxViolation(scans: readonly PairScan[], t: number): number {
  let v = 0;
  for (const s of scans) v = Math.max(v, (t * s.c - s.distance) / t);
  return v;
}

/** Largest tube the ring radii alone allow. */
export function radiusLimit(R: ArrayLike<number>, w: readonly number[]): number {
  let t = Infinity;
  for (let i = 0; i < w.length; i++) t = Math.min(t, R[i]! / w[i]!);
  return t;
}
