// Exact pair scan with the kernel: every strut of every constrained pair, and the true tube of a pose
// (the largest t it allows: min over pairs of distance / (w_a + w_b) and over rings of R_i / w_i).
//
// Only pairs whose bounding spheres come near are scanned (broad phase, src/kernel/broadphase.ts), so a pass
// costs O(N + candidates), not O(N²). A pair skipped is farther apart than R_a + R_b + margin with
// margin = 2 t_max max w + SCAN_MARGIN_REL min R: its distance exceeds any feasible t (w_a + w_b) by more than
// every margin the local model, polish and certificate look within (trustRegion.ts: at most MARGIN_BOXES step
// boxes of BOX_MAX_REL min R, i.e. 2 min R), so it can neither bind the tube nor enter a constraint set.
import { CONTACT_STRIDE, MAX_CONTACTS, circleContacts, lastContinuum, nearPairs, type ContinuumKind } from '../../kernel/index.js';
import { combine, latticeReach, latticeShifts } from '../../model/ringPairs.js';
import type { RingOrbits } from '../../model/symmetry.js';
import type { Lattice, Ring, Vec3 } from '../../model/types.js';
import { linkingNumberRaw } from '../../topology/linking.js';
import type { Posed } from '../chart/chart.js';
import { latticeVectors, type PeriodicPosed } from '../chart/periodicChart.js';
import { latticeOffset } from '../../model/periodic.js';
import { angleOf } from './constraints.js';

/** Pairs whose bounding spheres are this many smallest core radii beyond touching distance are not scanned. */
export const SCAN_MARGIN_REL = 2;

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

/** A pair of the periodic chart: cell ring a and the image of cell ring b at lattice shift `shift`. */
export interface PeriodicPair {
  a: number;
  b: number;
  shift: number[];
}

export interface PeriodicScan extends PairScan {
  shift: number[];
}

const OUT = new Float64Array(MAX_CONTACTS * CONTACT_STRIDE);

/** The pairs a ring solve scans: one per orbit of pairs under the group, of those whose spheres come near. */
export interface PairPlan {
  n: number;
  /** perms[g][i]: the ring onto which group element g maps ring i (the identity alone without symmetry). */
  perms: readonly (readonly number[])[];
}

/** The scan plan of a ring solve: one pair per orbit of pairs under the group, near pairs only (see scanPairs). */
export function pairPlan(orbits: RingOrbits, n: number): PairPlan {
  return { n, perms: orbits.perms };
}

/**
 * Scan the pairs: an explicit list, or a plan, of which only the representatives whose bounding spheres come
 * within the scan margin are scanned (ascending (a, b) order either way).
 */
export function scanPairs(posed: Posed, pairs: PairPlan | readonly [number, number][], w: readonly number[]): PairScan[] {
  const list = isPlan(pairs) ? nearRepresentatives(posed, pairs, w) : pairs;
  return list.map(([a, b]) => ({ a, b, c: w[a]! + w[b]!, ...pairContacts(posed, a, b, null) }));
}

/** Representative pairs (a < b) whose bounding spheres are within R_a + R_b + scanMargin of each other. */
export function nearRepresentatives(posed: Posed, plan: PairPlan, w: readonly number[]): [number, number][] {
  const n = plan.n;
  const found = nearPairs(posed.c.subarray(0, 3 * n), posed.R.subarray(0, n), scanMargin(posed.R, w));
  const out: [number, number][] = [];
  for (let k = 0; k < found.length; k += 2) {
    const a = found[k]!, b = found[k + 1]!;
    // Distances are invariant under the group, so a representative is near exactly when its whole orbit is.
    if (isRepresentative(plan.perms, a, b)) out.push([a, b]);
  }
  return out;
}

/** 2 t_max max w + SCAN_MARGIN_REL min R (layout units): see the top of the file. */
export function scanMargin(R: ArrayLike<number>, w: readonly number[]): number {
  let tMax = Infinity, wMax = 0, rMin = Infinity;
  for (let i = 0; i < w.length; i++) {
    tMax = Math.min(tMax, R[i]! / w[i]!);
    wMax = Math.max(wMax, w[i]!);
    rMin = Math.min(rMin, R[i]!);
  }
  return 2 * wMax * tMax + SCAN_MARGIN_REL * rMin;
}

/**
 * The signed linking numbers of the rings match `linking` (both ways round). Two round circles link only if
 * each meets the other's disk, which lies in its bounding sphere: pairs whose spheres are apart are unlinked,
 * so only pairs whose spheres meet are computed, plus a check that no intended link lies among the others.
 */
export function linkingHolds(rings: readonly Ring[], linking: readonly (readonly number[])[]): boolean {
  const n = rings.length;
  const centers = new Float64Array(3 * n), R = new Float64Array(n);
  rings.forEach((r, i) => { centers.set(r.center, 3 * i); R[i] = r.radius; });
  const near = nearPairs(centers, R, 0);
  let linkedNear = 0;
  for (let k = 0; k < near.length; k += 2) {
    const i = near[k]!, j = near[k + 1]!;
    const a = rings[i]!, b = rings[j]!;
    const lk = linkingNumberRaw(
      a.center[0], a.center[1], a.center[2], a.normal[0], a.normal[1], a.normal[2], a.radius,
      b.center[0], b.center[1], b.center[2], b.normal[0], b.normal[1], b.normal[2], b.radius,
    );
    if (lk !== (linking[i]?.[j] ?? 0) || lk !== (linking[j]?.[i] ?? 0)) return false;
    if (lk !== 0) linkedNear++;
  }
  // Every intended link must have been met among the near pairs.
  let linked = 0;
  for (let i = 0; i < n; i++) {
    const row = linking[i];
    if (!row) continue;
    for (let j = i + 1; j < n; j++) if ((row[j] ?? 0) !== 0) linked++;
  }
  return linked === linkedNear;
}

/**
 * The pairs a weave solve scans: every cell ring against every cell ring and every image of a cell ring whose
 * bounding spheres come within `margin` (|c_i - c_j'| <= R_i + R_j + margin), each unordered pair once in the
 * convention of src/model/ringPairs.ts ((i, j, s) with i < j, (i, i, s) with the first non-zero s positive),
 * in its order (the cell first, then by shift, ring, ring). Null when the lattice would need more than
 * `maxReach` copies along a vector.
 */
export function periodicNearPairs(
  rings: readonly Ring[], lattice: Lattice, margin: number, maxReach: number,
): PeriodicPair[] | null {
  const n = rings.length;
  const vectors = lattice.vectors;
  const reach = latticeReach({ rings: rings as Ring[], lattice }, margin);
  if (reach.some((k) => k > maxReach)) return null;
  const shifts = latticeShifts(reach);
  // Points: the cell's rings (block 0), then every ring translated by each shift (block 1 + index of the shift).
  const m = n * (1 + shifts.length);
  const centers = new Float64Array(3 * m), R = new Float64Array(m);
  for (let blk = 0; blk <= shifts.length; blk++) {
    const off: Vec3 = blk > 0 ? combine(vectors, shifts[blk - 1]!) : [0, 0, 0];
    for (let i = 0; i < n; i++) {
      const p = blk * n + i, r = rings[i]!;
      centers[3 * p] = r.center[0] + off[0];
      centers[3 * p + 1] = r.center[1] + off[1];
      centers[3 * p + 2] = r.center[2] + off[2];
      R[p] = r.radius;
    }
  }
  const found = nearPairs(centers, R, margin);
  const keys: number[] = [];
  for (let k = 0; k < found.length; k += 2) {
    const p = found[k]!, q = found[k + 1]!;
    // p < q: p is a cell ring unless both are images (pairs between images repeat pairs with the cell).
    if (p >= n) continue;
    const blk = Math.floor(q / n), j = q - blk * n;
    if (blk > 0) {
      // (p, j, s) with p > j is the mirror of (j, p, -s), found from ring j; (i, i, ±s) is one pair.
      if (p > j) continue;
      if (p === j && !(shifts[blk - 1]!.find((c) => c !== 0)! > 0)) continue;
    }
    keys.push((blk * n + p) * n + j);
  }
  keys.sort((x, y) => x - y);
  const zero = vectors.map(() => 0);
  return keys.map((key) => {
    const j = key % n, rest = (key - j) / n, p = rest % n, blk = (rest - p) / n;
    return { a: p, b: j, shift: blk === 0 ? zero.slice() : shifts[blk - 1]!.slice() };
  });
}

/** Every strut of every listed pair of the periodic chart, by the kernel. */
export function scanPeriodic(pp: PeriodicPosed, pairs: readonly PeriodicPair[], w: readonly number[]): PeriodicScan[] {
  const { posed } = pp;
  const vectors = latticeVectors(pp);
  return pairs.map((p) => ({
    a: p.a, b: p.b, shift: p.shift.slice(), c: w[p.a]! + w[p.b]!, ...pairContacts(posed, p.a, p.b, latticeOffset(vectors, p.shift)),
  }));
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

// ---- helpers -------------------------------------------------------------------------------------

function isPlan(p: PairPlan | readonly [number, number][]): p is PairPlan {
  return !Array.isArray(p);
}

/** (i, j) is the least pair of its orbit under the group. */
function isRepresentative(perms: readonly (readonly number[])[], i: number, j: number): boolean {
  for (const perm of perms) {
    const a = perm[i]!, b = perm[j]!;
    const lo = Math.min(a, b), hi = Math.max(a, b);
    if (lo < i || (lo === i && hi < j)) return false;
  }
  return true;
}
