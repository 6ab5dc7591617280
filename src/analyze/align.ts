// Best rigid alignment of one ring arrangement onto another, for comparing two optima of the same
// link: Horn's closed-form absolute orientation with unit quaternions (B. K. P. Horn, "Closed-form
// solution of absolute orientation using unit quaternions", J. Opt. Soc. Am. A 4(4), 1987), applied
// to the ring centres (weight 1) and the ring normals (weight R², so a tilt by θ counts like moving
// the rim by about Rθ). Quaternions give proper rotations only: a mirror image is never "aligned".
// Rings are matched by index (both arrangements come from the same spec); a normal's sign is matched
// to the target's, because a ring and its flipped normal are the same physical ring.
import { EVD, Matrix } from 'ml-matrix';
import type { Vec3 } from '../model/types.js';

export interface PoseLike {
  name: string;
  center: ArrayLike<number>;
  normal: ArrayLike<number>;
  radius: number;
}

export interface Alignment {
  /** Rotation (row-major 3×3) and translation taking `moving` onto `target`: x ↦ R x + t. */
  rotation: number[];
  translation: Vec3;
  /** Per ring: centre distance after alignment (layout units) and angle between normals (degrees, sign ignored). */
  rings: { name: string; displacement: number; tiltDegrees: number }[];
  /** Root mean square of the weighted residual (layout units). */
  rms: number;
}

/** Sign-matching passes: the first pass assumes normals agree, later ones flip those that point away. */
const SIGN_PASSES = 3;

export function alignRings(moving: readonly PoseLike[], target: readonly PoseLike[]): Alignment {
  if (moving.length !== target.length) {
    throw new RangeError(`alignRings: ${moving.length} rings cannot be matched to ${target.length}`);
  }
  const n = moving.length;
  const ca = centroid(moving), cb = centroid(target);
  const na = moving.map((r) => unit(r.normal)), nb = target.map((r) => unit(r.normal));
  const signs = new Array<number>(n).fill(1);
  let R = identity();
  for (let pass = 0; pass < SIGN_PASSES; pass++) {
    R = hornRotation(moving, target, ca, cb, na, nb, signs);
    let changed = false;
    for (let i = 0; i < n; i++) {
      const s = dot(apply(R, na[i]!), nb[i]!) >= 0 ? 1 : -1;
      if (s !== signs[i]) { signs[i] = s; changed = true; }
    }
    if (!changed) break;
  }
  const Rc = apply(R, ca);
  const t: Vec3 = [cb[0] - Rc[0], cb[1] - Rc[1], cb[2] - Rc[2]];
  let sum = 0, weight = 0;
  const rings = moving.map((r, i) => {
    const c = apply(R, r.center);
    const d: Vec3 = [c[0] + t[0] - target[i]!.center[0]!, c[1] + t[1] - target[i]!.center[1]!, c[2] + t[2] - target[i]!.center[2]!];
    const displacement = Math.hypot(d[0], d[1], d[2]);
    const m = apply(R, na[i]!);
    const cos = Math.min(1, Math.abs(dot(m, nb[i]!)));
    const w2 = target[i]!.radius * target[i]!.radius;
    const dn = [signs[i]! * m[0] - nb[i]![0], signs[i]! * m[1] - nb[i]![1], signs[i]! * m[2] - nb[i]![2]];
    sum += displacement * displacement + w2 * (dn[0]! * dn[0]! + dn[1]! * dn[1]! + dn[2]! * dn[2]!);
    weight += 1;
    return { name: r.name, displacement, tiltDegrees: (Math.acos(cos) * 180) / Math.PI };
  });
  return { rotation: R, translation: t, rings, rms: weight > 0 ? Math.sqrt(sum / weight) : 0 };
}

/** Apply an alignment to a pose: rotate the centre and normal, then translate the centre. */
export function applyAlignment<T extends PoseLike>(a: Alignment, ring: T): T {
  const c = apply(a.rotation, ring.center);
  return {
    ...ring,
    center: [c[0] + a.translation[0], c[1] + a.translation[1], c[2] + a.translation[2]] as Vec3,
    normal: apply(a.rotation, ring.normal),
  };
}

// ---- helpers -------------------------------------------------------------------------------------

/** Maximise Σ w (R a)·b: the top eigenvector of Horn's 4×4 matrix N(S) is the optimal quaternion. */
function hornRotation(
  moving: readonly PoseLike[], target: readonly PoseLike[], ca: Vec3, cb: Vec3, na: Vec3[], nb: Vec3[], signs: number[],
): number[] {
  const S = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  const add = (a: ArrayLike<number>, b: ArrayLike<number>, w: number): void => {
    for (let p = 0; p < 3; p++) for (let q = 0; q < 3; q++) S[3 * p + q]! += w * a[p]! * b[q]!;
  };
  for (let i = 0; i < moving.length; i++) {
    const a = moving[i]!, b = target[i]!;
    add([a.center[0]! - ca[0], a.center[1]! - ca[1], a.center[2]! - ca[2]],
      [b.center[0]! - cb[0], b.center[1]! - cb[1], b.center[2]! - cb[2]], 1);
    add(na[i]!, nb[i]!, signs[i]! * b.radius * b.radius);
  }
  const [xx, xy, xz, yx, yy, yz, zx, zy, zz] = S as [number, number, number, number, number, number, number, number, number];
  const N = new Matrix([
    [xx + yy + zz, yz - zy, zx - xz, xy - yx],
    [yz - zy, xx - yy - zz, xy + yx, zx + xz],
    [zx - xz, xy + yx, -xx + yy - zz, yz + zy],
    [xy - yx, zx + xz, yz + zy, -xx - yy + zz],
  ]);
  const evd = new EVD(N, { assumeSymmetric: true });
  const values = evd.realEigenvalues;
  let k = 0;
  for (let j = 1; j < values.length; j++) if (values[j]! > values[k]!) k = j;
  const V = evd.eigenvectorMatrix;
  let w = V.get(0, k), x = V.get(1, k), y = V.get(2, k), z = V.get(3, k);
  const l = Math.hypot(w, x, y, z);
  w /= l; x /= l; y /= l; z /= l;
  return [
    1 - 2 * (y * y + z * z), 2 * (x * y - w * z), 2 * (x * z + w * y),
    2 * (x * y + w * z), 1 - 2 * (x * x + z * z), 2 * (y * z - w * x),
    2 * (x * z - w * y), 2 * (y * z + w * x), 1 - 2 * (x * x + y * y),
  ];
}

function centroid(rings: readonly PoseLike[]): Vec3 {
  const c: Vec3 = [0, 0, 0];
  for (const r of rings) for (let k = 0; k < 3; k++) c[k] += r.center[k]! / rings.length;
  return c;
}

function apply(R: number[], v: ArrayLike<number>): Vec3 {
  return [
    R[0]! * v[0]! + R[1]! * v[1]! + R[2]! * v[2]!,
    R[3]! * v[0]! + R[4]! * v[1]! + R[5]! * v[2]!,
    R[6]! * v[0]! + R[7]! * v[1]! + R[8]! * v[2]!,
  ];
}

function identity(): number[] {
  return [1, 0, 0, 0, 1, 0, 0, 0, 1];
}

function unit(v: ArrayLike<number>): Vec3 {
  const l = Math.hypot(v[0]!, v[1]!, v[2]!);
  return [v[0]! / l, v[1]! / l, v[2]! / l];
}

function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  return a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
}
