/**
 * Broad phase for many rings: the pairs whose bounding spheres come within a margin.
 *
 * A ring (centre c, core radius R, tube r) lies inside the sphere of radius R + r about c, so two rings whose
 * centres are farther apart than reach_i + reach_j + margin can neither touch within the margin nor link
 * (two round circles link only if each meets the other's flat disk, which lies inside its sphere). Every
 * other pair is a candidate for the exact kernel.
 *
 * Method: uniform grid hashing (Teschner et al., "Optimized spatial hashing for collision detection of
 * deformable objects", VMV 2003) with the cell edge set to the largest sphere diameter plus the margin, so a
 * candidate pair always lies in the same or a neighbouring cell: O(N + candidates) for rings of similar size.
 * Hash collisions only add candidates, which the exact sphere test removes. Where the cell coordinates would
 * leave the exactly representable integers (rings spread over > 2^40 cells) it falls back to sort-and-sweep on
 * the axis of largest extent. The output is sorted, so it does not depend on hashing order.
 */

/** Beyond this many cells along an axis the grid keys are not exact integers any more: sweep instead. */
const MAX_CELLS_PER_AXIS = 2 ** 40;

/**
 * Candidate pairs (i < j, ascending lexicographic order) as a flat [i0, j0, i1, j1, ...] array: every pair with
 * |c_i - c_j| <= reach_i + reach_j + margin. centers holds 3 numbers per ring; reach[i] is R_i + r_i.
 */
export function nearPairs(centers: ArrayLike<number>, reach: ArrayLike<number>, margin: number): Uint32Array {
  const n = reach.length;
  if (centers.length < 3 * n) throw new RangeError(`nearPairs: ${n} rings need ${3 * n} centre coordinates, got ${centers.length}`);
  if (n < 2) return new Uint32Array(0);
  let maxReach = 0;
  let lo0 = Infinity, lo1 = Infinity, lo2 = Infinity, hi0 = -Infinity, hi1 = -Infinity, hi2 = -Infinity;
  for (let i = 0; i < n; i++) {
    maxReach = Math.max(maxReach, reach[i]!);
    const x = centers[3 * i]!, y = centers[3 * i + 1]!, z = centers[3 * i + 2]!;
    lo0 = Math.min(lo0, x); lo1 = Math.min(lo1, y); lo2 = Math.min(lo2, z);
    hi0 = Math.max(hi0, x); hi1 = Math.max(hi1, y); hi2 = Math.max(hi2, z);
  }
  const cell = 2 * maxReach + Math.max(0, margin);
  const extent = Math.max(hi0 - lo0, hi1 - lo1, hi2 - lo2);
  const found: number[] = [];
  if (!(cell > 0) || !(extent / cell < MAX_CELLS_PER_AXIS)) {
    sweep(centers, reach, margin, n, found);
  } else {
    grid(centers, reach, margin, n, cell, lo0, lo1, lo2, found);
  }
  return sortedPairs(found);
}

function within(centers: ArrayLike<number>, reach: ArrayLike<number>, margin: number, i: number, j: number): boolean {
  const dx = centers[3 * i]! - centers[3 * j]!, dy = centers[3 * i + 1]! - centers[3 * j + 1]!, dz = centers[3 * i + 2]! - centers[3 * j + 2]!;
  const lim = reach[i]! + reach[j]! + margin;
  return dx * dx + dy * dy + dz * dz <= lim * lim;
}

/** Spatial hash of integer cell coordinates (the three large primes of Teschner et al. 2003). */
function cellKey(ix: number, iy: number, iz: number): number {
  return (Math.imul(ix | 0, 73856093) ^ Math.imul(iy | 0, 19349663) ^ Math.imul(iz | 0, 83492791)) >>> 0;
}

function grid(
  centers: ArrayLike<number>, reach: ArrayLike<number>, margin: number, n: number, cell: number,
  lo0: number, lo1: number, lo2: number, found: number[],
): void {
  const ix = new Float64Array(n), iy = new Float64Array(n), iz = new Float64Array(n);
  const buckets = new Map<number, number[]>();
  for (let i = 0; i < n; i++) {
    ix[i] = Math.floor((centers[3 * i]! - lo0) / cell);
    iy[i] = Math.floor((centers[3 * i + 1]! - lo1) / cell);
    iz[i] = Math.floor((centers[3 * i + 2]! - lo2) / cell);
    const key = cellKey(ix[i]!, iy[i]!, iz[i]!);
    const b = buckets.get(key);
    if (b) b.push(i);
    else buckets.set(key, [i]);
  }
  // Each ring looks into the 27 cells around its own and keeps partners j > i: every pair once. Distinct
  // neighbour cells may share a hash key; a bucket is visited once per ring so no pair is reported twice.
  const seen = new Set<number>();
  for (let i = 0; i < n; i++) {
    seen.clear();
    for (let dx = -1; dx <= 1; dx++) {
      for (let dy = -1; dy <= 1; dy++) {
        for (let dz = -1; dz <= 1; dz++) {
          const key = cellKey(ix[i]! + dx, iy[i]! + dy, iz[i]! + dz);
          if (seen.has(key)) continue;
          seen.add(key);
          const b = buckets.get(key);
          if (!b) continue;
          for (const j of b) if (j > i && within(centers, reach, margin, i, j)) found.push(i, j);
        }
      }
    }
  }
}

function sweep(centers: ArrayLike<number>, reach: ArrayLike<number>, margin: number, n: number, found: number[]): void {
  // Sort by the lower end of each sphere's shadow on the axis of largest spread; pairs overlap in shadow first.
  let axis = 0, best = -1;
  for (let a = 0; a < 3; a++) {
    let lo = Infinity, hi = -Infinity;
    for (let i = 0; i < n; i++) { lo = Math.min(lo, centers[3 * i + a]!); hi = Math.max(hi, centers[3 * i + a]!); }
    if (hi - lo > best) { best = hi - lo; axis = a; }
  }
  const order = Array.from({ length: n }, (_, i) => i);
  const lower = (i: number): number => centers[3 * i + axis]! - reach[i]!;
  order.sort((a, b) => lower(a) - lower(b));
  for (let p = 0; p < n; p++) {
    const i = order[p]!;
    const top = centers[3 * i + axis]! + reach[i]! + margin;
    for (let q = p + 1; q < n; q++) {
      const j = order[q]!;
      if (lower(j) > top) break;
      if (within(centers, reach, margin, i, j)) found.push(Math.min(i, j), Math.max(i, j));
    }
  }
}

function sortedPairs(found: number[]): Uint32Array {
  const m = found.length / 2;
  const idx = Array.from({ length: m }, (_, k) => k);
  idx.sort((a, b) => found[2 * a]! - found[2 * b]! || found[2 * a + 1]! - found[2 * b + 1]!);
  const out = new Uint32Array(2 * m);
  for (let k = 0; k < m; k++) {
    out[2 * k] = found[2 * idx[k]!]!;
    out[2 * k + 1] = found[2 * idx[k]! + 1]!;
  }
  return out;
}
