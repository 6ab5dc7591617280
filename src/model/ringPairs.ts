// Which ring pairs can touch: every pair in the cell, and for a lattice (weave) also each ring
// against the translated copies of every ring in neighbouring cells.
import { nearPairs } from '../kernel/broadphase.js';
import type { Layout, Vec3 } from './types.js';

/** Largest lattice coefficient enumerated; a lattice needing more is rejected at parse time. */
export const MAX_LATTICE_REACH = 12;

export interface RingPair {
  /** Index of the first ring (in the base cell). */
  i: number;
  /** Index of the second ring; it is translated by `offset`. */
  j: number;
  /** Lattice coefficients of the copy of ring j ([] without a lattice, all zero in the same cell). */
  shift: number[];
  /** Translation of ring j: sum of shift[k] * lattice.vectors[k] (layout units). */
  offset: Vec3;
}

/**
 * All pairs that can come within `margin` of each other (bounding spheres: |ci - cj'| <= Ri + Rj + margin),
 * plus every base-cell pair i < j. A pair and its mirror (j, i, -shift) are listed once; a ring meets
 * its own translate once per ± shift.
 */
export function ringPairs(layout: Pick<Layout, 'rings' | 'lattice'>, margin = 0): RingPair[] {
  const rings = layout.rings;
  const vectors = layout.lattice?.vectors ?? [];
  const n = rings.length;
  const pairs: RingPair[] = [];
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) pairs.push({ i, j, shift: vectors.map(() => 0), offset: [0, 0, 0] });
  shiftedPairs(layout, margin, pairs);
  return pairs;
}

/**
 * Like ringPairs, but base-cell pairs too only when their bounding spheres come within `margin`
 * (|ci - cj| <= Ri + Rj + margin), found by the broad phase in O(N + pairs) rather than all N(N-1)/2.
 * Pairs farther apart can neither touch within the margin nor link.
 */
export function nearRingPairs(layout: Pick<Layout, 'rings' | 'lattice'>, margin = 0): RingPair[] {
  const rings = layout.rings;
  const n = rings.length;
  const centers = new Float64Array(3 * n), reach = new Float64Array(n);
  rings.forEach((r, i) => {
    centers[3 * i] = r.center[0]; centers[3 * i + 1] = r.center[1]; centers[3 * i + 2] = r.center[2];
    reach[i] = r.radius;
  });
  const near = nearPairs(centers, reach, margin);
  const zero = (layout.lattice?.vectors ?? []).map(() => 0);
  const pairs: RingPair[] = [];
  for (let k = 0; k < near.length; k += 2) pairs.push({ i: near[k]!, j: near[k + 1]!, shift: zero.slice(), offset: [0, 0, 0] });
  shiftedPairs(layout, margin, pairs);
  return pairs;
}

/** Append each ring against the lattice copies of every ring that come within `margin`. */
function shiftedPairs(layout: Pick<Layout, 'rings' | 'lattice'>, margin: number, pairs: RingPair[]): void {
  const rings = layout.rings;
  const vectors = layout.lattice?.vectors ?? [];
  const n = rings.length;
  if (vectors.length === 0) return;
  const reach = latticeReach(layout, margin);
  for (const shift of latticeShifts(reach)) {
    const offset = combine(vectors, shift);
    const mirrorFirst = shift.find((s) => s !== 0)! > 0;
    for (let i = 0; i < n; i++) {
      for (let j = i; j < n; j++) {
        // (i, i, s) and (i, i, -s) are the same pair; keep the one whose first non-zero coefficient is positive.
        if (i === j && !mirrorFirst) continue;
        const a = rings[i]!, b = rings[j]!;
        const dx = b.center[0] + offset[0] - a.center[0];
        const dy = b.center[1] + offset[1] - a.center[1];
        const dz = b.center[2] + offset[2] - a.center[2];
        const lim = a.radius + b.radius + margin;
        if (dx * dx + dy * dy + dz * dz <= lim * lim) pairs.push({ i, j, shift, offset });
        // (j, i, s) for j > i is the mirror of (i, j, -s), which the loop visits with -s.
      }
    }
  }
}

/**
 * Per lattice vector, the largest |coefficient| a copy can have and still come within reach:
 * |sum s_k v_k| >= |s_k| * (distance of v_k from the span of the other vectors).
 */
export function latticeReach(layout: Pick<Layout, 'rings' | 'lattice'>, margin = 0): number[] {
  const vectors = layout.lattice?.vectors ?? [];
  const rings = layout.rings;
  let maxR = 0;
  let spread = 0;
  for (const r of rings) maxR = Math.max(maxR, r.radius);
  for (const a of rings) for (const b of rings) spread = Math.max(spread, Math.hypot(a.center[0] - b.center[0], a.center[1] - b.center[1], a.center[2] - b.center[2]));
  const reach = spread + 2 * maxR + margin;
  return vectors.map((v, k) => {
    const h = vectors.length === 1 ? Math.hypot(v[0], v[1], v[2]) : heightOver(v, vectors[1 - k]!);
    return Math.floor(reach / h);
  });
}

function heightOver(v: Vec3, w: Vec3): number {
  const cx = v[1] * w[2] - v[2] * w[1], cy = v[2] * w[0] - v[0] * w[2], cz = v[0] * w[1] - v[1] * w[0];
  return Math.hypot(cx, cy, cz) / Math.hypot(w[0], w[1], w[2]);
}

export function combine(vectors: Vec3[], shift: number[]): Vec3 {
  const o: Vec3 = [0, 0, 0];
  vectors.forEach((v, k) => {
    o[0] += shift[k]! * v[0];
    o[1] += shift[k]! * v[1];
    o[2] += shift[k]! * v[2];
  });
  return o;
}

/** Every non-zero coefficient vector with |s_k| <= reach[k] (the lattice copies a pair search visits). */
export function latticeShifts(reach: readonly number[]): number[][] {
  let out: number[][] = [[]];
  for (const m of reach) {
    const next: number[][] = [];
    for (const s of out) for (let c = -m; c <= m; c++) next.push([...s, c]);
    out = next;
  }
  return out.filter((s) => s.some((c) => c !== 0));
}
