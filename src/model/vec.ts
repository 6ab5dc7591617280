// Small 3-vector helpers for non-hot paths (hot kernels work on plain numbers).
import type { Vec3 } from './types.js';

export const dot = (a: ArrayLike<number>, b: ArrayLike<number>): number =>
  a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
export const sub = (a: ArrayLike<number>, b: ArrayLike<number>): Vec3 => [a[0]! - b[0]!, a[1]! - b[1]!, a[2]! - b[2]!];
export const add = (a: ArrayLike<number>, b: ArrayLike<number>): Vec3 => [a[0]! + b[0]!, a[1]! + b[1]!, a[2]! + b[2]!];
export const scale = (a: ArrayLike<number>, s: number): Vec3 => [a[0]! * s, a[1]! * s, a[2]! * s];
export const cross = (a: ArrayLike<number>, b: ArrayLike<number>): Vec3 => [
  a[1]! * b[2]! - a[2]! * b[1]!,
  a[2]! * b[0]! - a[0]! * b[2]!,
  a[0]! * b[1]! - a[1]! * b[0]!,
];
export const norm = (a: ArrayLike<number>): number => Math.hypot(a[0]!, a[1]!, a[2]!);
export const normalize = (a: ArrayLike<number>): Vec3 => {
  const l = norm(a);
  return [a[0]! / l, a[1]! / l, a[2]! / l];
};

/**
 * Orthonormal basis (e1, e2) of the plane perpendicular to unit n, continuous except at n = (0,0,-1).
 * Duff et al., "Building an Orthonormal Basis, Revisited", JCGT 6(1), 2017.
 */
export function planeBasis(n: ArrayLike<number>): [Vec3, Vec3] {
  const nx = n[0]!, ny = n[1]!, nz = n[2]!;
  const sign = nz >= 0 ? 1 : -1;
  const a = -1 / (sign + nz);
  const b = nx * ny * a;
  return [
    [1 + sign * nx * nx * a, sign * b, -sign * nx],
    [b, sign + ny * ny * a, -ny],
  ];
}

/** Rodrigues rotation of v about unit axis k by angle theta. */
export function rotate(v: ArrayLike<number>, k: ArrayLike<number>, theta: number): Vec3 {
  const c = Math.cos(theta), s = Math.sin(theta);
  const kxv = cross(k, v);
  const kdv = dot(k, v) * (1 - c);
  return [
    v[0]! * c + kxv[0] * s + k[0]! * kdv,
    v[1]! * c + kxv[1] * s + k[1]! * kdv,
    v[2]! * c + kxv[2] * s + k[2]! * kdv,
  ];
}
