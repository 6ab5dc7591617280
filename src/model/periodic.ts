// Periodic layouts (weaves): a unit cell of rings and one (chain) or two (sheet) lattice vectors.
// Ring j of the cell shifted by s·L = Σ s_k L_k is "the image of j at shift s"; the pattern of a weave
// is the list of image pairs that are linked. A pair (i, j, s) and its mirror (j, i, -s) are the same
// pair; `canonicalPair` picks one, as ringPairs (src/model/ringPairs.ts) does.
import { linkingNumber } from '../topology/index.js';
import { ringPairs } from './ringPairs.js';
import type { Lattice, Ring, Vec3 } from './types.js';

export type PeriodicKind = 'chain' | 'sheet';

/** One linked pair of the pattern: ring i of the cell and the image of ring j at `shift`. */
export interface PeriodicLink {
  i: number;
  j: number;
  shift: number[];
  /** Signed linking number (topology convention: each ring counter-clockwise about its normal). */
  linking: -1 | 1;
}

export function periodicKind(lattice: Lattice): PeriodicKind {
  return lattice.vectors.length === 1 ? 'chain' : 'sheet';
}

/** Σ shift[k] · vectors[k] (layout units). */
export function latticeOffset(vectors: readonly ArrayLike<number>[], shift: readonly number[]): Vec3 {
  const o: Vec3 = [0, 0, 0];
  vectors.forEach((v, k) => {
    const s = shift[k] ?? 0;
    o[0] += s * v[0]!;
    o[1] += s * v[1]!;
    o[2] += s * v[2]!;
  });
  return o;
}

/** The same pair written once: i < j, or i = j with the first non-zero shift coefficient positive. */
export function canonicalPair(i: number, j: number, shift: readonly number[]): { i: number; j: number; shift: number[] } {
  const neg = shift.map((s) => (s === 0 ? 0 : -s));
  if (i > j) return { i: j, j: i, shift: neg };
  if (i === j && (shift.find((s) => s !== 0) ?? 0) < 0) return { i, j, shift: neg };
  return { i, j, shift: shift.slice() };
}

export function pairKey(i: number, j: number, shift: readonly number[]): string {
  const c = canonicalPair(i, j, shift);
  return `${c.i}:${c.j}:${c.shift.join(',')}`;
}

/**
 * Every linked image pair of a periodic arrangement (each once, canonical). Linked circles pass through
 * each other's disks, so their bounding spheres overlap: ringPairs with no margin lists all candidates.
 */
export function periodicLinks(rings: readonly Ring[], lattice: Lattice): PeriodicLink[] {
  const out: PeriodicLink[] = [];
  for (const p of ringPairs({ rings: rings as Ring[], lattice }, 0)) {
    const a = rings[p.i]!, b = rings[p.j]!;
    const lk = linkingNumber(a, { center: add(b.center, p.offset), normal: b.normal, radius: b.radius });
    if (lk !== 0) out.push({ i: p.i, j: p.j, shift: p.shift.slice(), linking: lk });
  }
  return out;
}

/** True when `got` has exactly the linked pairs and signs of `want`. */
export function sameLinks(want: readonly PeriodicLink[], got: readonly PeriodicLink[]): boolean {
  if (want.length !== got.length) return false;
  const map = new Map<string, number>();
  for (const l of want) map.set(pairKey(l.i, l.j, l.shift), l.linking);
  for (const l of got) if (map.get(pairKey(l.i, l.j, l.shift)) !== l.linking) return false;
  return true;
}

/** The image of a ring at a shift, named "A[1]" (chain) or "A[1,0]" (sheet). */
export function imageRing(ring: Ring, lattice: Lattice, shift: readonly number[]): Ring {
  const out: Ring = {
    name: `${ring.name}[${shift.join(',')}]`,
    center: add(ring.center, latticeOffset(lattice.vectors, shift)),
    normal: [ring.normal[0], ring.normal[1], ring.normal[2]],
    radius: ring.radius,
  };
  if (ring.tube !== undefined) out.tube = ring.tube;
  return out;
}

/**
 * A block of counts[0] (× counts[1]) cells: ring i of cell s is entry `cellIndex(s) * m + i`, cells in
 * row-major order of their shifts (0 .. counts[k]-1).
 */
export function blockShifts(counts: readonly number[]): number[][] {
  let out: number[][] = [[]];
  for (const n of counts) {
    const next: number[][] = [];
    for (const s of out) for (let c = 0; c < n; c++) next.push([...s, c]);
    out = next;
  }
  return out;
}

export function expandCells(rings: readonly Ring[], lattice: Lattice, counts: readonly number[]): Ring[] {
  return blockShifts(counts).flatMap((s) => rings.map((r) => imageRing(r, lattice, s)));
}

/**
 * Linking matrix of a block of cells as the pattern intends it: ring i of cell a and ring j of cell b
 * carry the linking number of the pattern pair (i, j, b - a).
 */
export function blockLinking(m: number, links: readonly PeriodicLink[], counts: readonly number[]): number[][] {
  const map = new Map<string, number>();
  for (const l of links) {
    const c = canonicalPair(l.i, l.j, l.shift);
    map.set(`${c.i}:${c.j}:${c.shift.join(',')}`, l.linking);
  }
  const cells = blockShifts(counts);
  const n = cells.length * m;
  const out = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  cells.forEach((sa, ca) => {
    cells.forEach((sb, cb) => {
      const shift = sb.map((x, k) => x - sa[k]!);
      for (let i = 0; i < m; i++) {
        for (let j = 0; j < m; j++) {
          const a = ca * m + i, b = cb * m + j;
          if (a === b) continue;
          out[a]![b] = map.get(pairKey(i, j, shift)) ?? 0;
        }
      }
    });
  });
  return out;
}

/** Length of the period (chain) or area of the cell (sheet), in layout units or layout units². */
export function cellMeasure(lattice: Lattice): number {
  const [a, b] = lattice.vectors;
  if (b === undefined) return Math.hypot(a![0], a![1], a![2]);
  const c = cross(a!, b);
  return Math.hypot(c[0], c[1], c[2]);
}

// ---- helpers -------------------------------------------------------------------------------------

function add(a: ArrayLike<number>, b: ArrayLike<number>): Vec3 {
  return [a[0]! + b[0]!, a[1]! + b[1]!, a[2]! + b[2]!];
}

function cross(a: ArrayLike<number>, b: ArrayLike<number>): Vec3 {
  return [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
}
