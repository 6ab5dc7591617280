// Rigid-body motion coordinates for a set of round rings, with spins and whole-set motions quotiented out.
// Each ring gets 5 reduced coordinates: translation v (3) and the two in-plane components of its
// rotation ω about its own centre, scaled by a length L so every coordinate is a length. A ring's spin
// (ω along its own normal) never changes the tube, so it has no coordinate at all.
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { cross, dot, norm, planeBasis, rotate } from '../model/vec.js';
import type { Lattice, Vec3 } from '../model/types.js';

/** A ring as the mobility analysis sees it: core circle plus its own tube radius. */
export interface RingPose {
  name: string;
  center: Vec3;
  normal: Vec3;
  radius: number;
  tube: number;
}

/** Reduced coordinates of the ring set and the split into trivial (whole-set) and free directions. */
export interface MotionFrame {
  rings: number;
  /** 5 per ring. */
  dim: number;
  /** Length that turns a rotation (radians) into a coordinate (layout units): the mean core radius. */
  length: number;
  e1: Vec3[];
  e2: Vec3[];
  /** Centroid of the ring centres; whole-set rotations turn about it. */
  centroid: Vec3;
  /** Orthonormal basis (each of length dim) of the whole-set rigid motions after spins are dropped. */
  trivial: number[][];
  /** Orthonormal basis of the complement of `trivial`: the coordinates z of every analysis (x = Σ z_a free[a]). */
  free: number[][];
}

/** Eigenvalues of the trivial Gram matrix below this (relative to the largest) count as zero. */
const TRIVIAL_RANK_TOL = 1e-10;

export const COORDS_PER_RING = 5;

/**
 * Reduced coordinates of the rings. With a lattice the whole-set motions are the translations and the
 * turns that map every lattice vector to itself (about the chain axis for one vector, none for two):
 * any other turn would move the copies in neighbouring cells differently from their rings.
 */
export function motionFrame(rings: readonly RingPose[], lattice: Lattice | null = null): MotionFrame {
  const n = rings.length;
  const dim = COORDS_PER_RING * n;
  const length = n === 0 ? 1 : rings.reduce((s, r) => s + r.radius, 0) / n;
  const e1: Vec3[] = [];
  const e2: Vec3[] = [];
  const centroid: Vec3 = [0, 0, 0];
  for (const r of rings) {
    const [a, b] = planeBasis(r.normal);
    e1.push(a);
    e2.push(b);
    for (let k = 0; k < 3; k++) centroid[k]! += r.center[k]! / Math.max(n, 1);
  }
  const frame0 = { rings: n, dim, length, e1, e2, centroid };
  const raw: number[][] = [];
  for (let k = 0; k < 3; k++) {
    const axis: Vec3 = [0, 0, 0];
    axis[k] = 1;
    raw.push(fromRigid(frame0, rings, axis, [0, 0, 0]));
  }
  for (const axis of wholeSetTurns(lattice)) raw.push(fromRigid(frame0, rings, [0, 0, 0], axis));
  const { range, kernel } = splitSpan(raw, dim);
  return { ...frame0, trivial: range, free: kernel };
}

function wholeSetTurns(lattice: Lattice | null): Vec3[] {
  const vectors = lattice?.vectors ?? [];
  if (vectors.length === 0) return [[1, 0, 0], [0, 1, 0], [0, 0, 1]];
  if (vectors.length === 1) {
    const v = vectors[0]!;
    const l = norm(v);
    return [[v[0] / l, v[1] / l, v[2] / l]];
  }
  return [];
}

/** Reduced coordinates of the whole-set motion: translation t plus rotation Ω about the centroid. */
export function fromRigid(
  frame: Pick<MotionFrame, 'rings' | 'length' | 'e1' | 'e2' | 'centroid'>,
  rings: readonly RingPose[],
  t: Vec3,
  omega: Vec3,
): number[] {
  const x = new Array<number>(COORDS_PER_RING * frame.rings).fill(0);
  for (let i = 0; i < frame.rings; i++) {
    const c = rings[i]!.center;
    const arm: Vec3 = [c[0] - frame.centroid[0], c[1] - frame.centroid[1], c[2] - frame.centroid[2]];
    const w = cross(omega, arm);
    const o = COORDS_PER_RING * i;
    x[o] = t[0] + w[0];
    x[o + 1] = t[1] + w[1];
    x[o + 2] = t[2] + w[2];
    x[o + 3] = frame.length * dot(omega, frame.e1[i]!);
    x[o + 4] = frame.length * dot(omega, frame.e2[i]!);
  }
  return x;
}

/** Ring i's part of a reduced motion: translation (layout units) and rotation vector (radians), spin-free. */
export function ringMotion(frame: MotionFrame, x: ArrayLike<number>, i: number): { v: Vec3; omega: Vec3 } {
  const o = COORDS_PER_RING * i;
  const w1 = x[o + 3]! / frame.length;
  const w2 = x[o + 4]! / frame.length;
  const a = frame.e1[i]!, b = frame.e2[i]!;
  return {
    v: [x[o]!, x[o + 1]!, x[o + 2]!],
    omega: [w1 * a[0] + w2 * b[0], w1 * a[1] + w2 * b[1], w1 * a[2] + w2 * b[2]],
  };
}

/** Expand z (coordinates in the free basis) to a reduced motion x. */
export function expandFree(frame: MotionFrame, z: ArrayLike<number>): number[] {
  const x = new Array<number>(frame.dim).fill(0);
  for (let a = 0; a < frame.free.length; a++) {
    const za = z[a]!;
    if (za === 0) continue;
    const f = frame.free[a]!;
    for (let k = 0; k < frame.dim; k++) x[k]! += za * f[k]!;
  }
  return x;
}

/** Project a reduced-coordinate row vector (e.g. a gradient) onto the free basis. */
export function restrictToFree(frame: MotionFrame, g: ArrayLike<number>): number[] {
  return frame.free.map((f) => {
    let s = 0;
    for (let k = 0; k < frame.dim; k++) s += f[k]! * g[k]!;
    return s;
  });
}

/**
 * Move every ring by the displacement s*x (reduced coordinates) through the exponential map:
 * centre c + s v, and the ring turned about its own centre by the rotation vector s ω.
 */
export function moveRings(rings: readonly RingPose[], frame: MotionFrame, x: ArrayLike<number>, s: number): RingPose[] {
  return rings.map((r, i) => {
    const { v, omega } = ringMotion(frame, x, i);
    return moveRing(r, [s * v[0], s * v[1], s * v[2]], [s * omega[0], s * omega[1], s * omega[2]]);
  });
}

/** One ring translated by d and turned about its own centre by the rotation vector w (radians). */
export function moveRing(r: RingPose, d: ArrayLike<number>, w: ArrayLike<number>): RingPose {
  const angle = norm(w);
  const normal = angle > 0 ? rotate(r.normal, [w[0]! / angle, w[1]! / angle, w[2]! / angle], angle) : r.normal;
  return {
    name: r.name,
    center: [r.center[0] + d[0]!, r.center[1] + d[1]!, r.center[2] + d[2]!],
    normal,
    radius: r.radius,
    tube: r.tube,
  };
}

/** Where a material point p of ring r goes under the same motion as moveRing. */
export function movePoint(r: RingPose, p: ArrayLike<number>, d: ArrayLike<number>, w: ArrayLike<number>): Vec3 {
  const arm: Vec3 = [p[0]! - r.center[0], p[1]! - r.center[1], p[2]! - r.center[2]];
  const angle = norm(w);
  const turned = angle > 0 ? rotate(arm, [w[0]! / angle, w[1]! / angle, w[2]! / angle], angle) : arm;
  return [r.center[0] + d[0]! + turned[0], r.center[1] + d[1]! + turned[1], r.center[2] + d[2]! + turned[2]];
}

/**
 * Orthonormal bases of span(vectors) and of its orthogonal complement in R^dim, from the eigenvectors
 * of Σ v vᵀ (a symmetric eigenproblem is stable and needs no pivoting decisions of ours).
 */
export function splitSpan(
  vectors: readonly (readonly number[])[],
  dim: number,
  relTol = TRIVIAL_RANK_TOL,
  absTol = 0,
): { range: number[][]; kernel: number[][] } {
  if (dim === 0) return { range: [], kernel: [] };
  const gram = Matrix.zeros(dim, dim);
  for (const v of vectors) {
    for (let i = 0; i < dim; i++) {
      const vi = v[i]!;
      if (vi === 0) continue;
      for (let j = 0; j < dim; j++) gram.set(i, j, gram.get(i, j) + vi * v[j]!);
    }
  }
  const evd = new EigenvalueDecomposition(gram, { assumeSymmetric: true });
  const values = evd.realEigenvalues;
  const vecs = evd.eigenvectorMatrix;
  const top = Math.max(0, ...values);
  const range: number[][] = [];
  const kernel: number[][] = [];
  for (let k = 0; k < dim; k++) {
    const col = vecs.getColumn(k);
    if (top > 0 && values[k]! > Math.max(relTol * top, absTol)) range.push(col);
    else kernel.push(col);
  }
  return { range, kernel };
}
