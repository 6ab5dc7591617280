// Linking number of two round circles as the signed count of crossings of circle A through the flat
// disk bounded by circle B: that disk is a Seifert surface of B, and the intersection number of A
// with a Seifert surface of B is lk(A, B) (Rolfsen, "Knots and Links", 1976, ch. 5D). For round
// circles it is 0 or ±1, since a circle meets a plane at most twice and the two crossings have
// opposite directions.
//
// Orientation: each circle runs counter-clockwise about its own normal (right-hand rule), so its
// disk's positive side is the side the normal points to. A crossing counts +1 when A passes
// through B's disk in the direction of n_B. With this convention lk(A, B) = lk(B, A) and equals
// Gauss's integral (1/4π)∮∮ (a − b)·(da × db)/|a − b|³ (Gauss 1833), which tests/topology checks.
//
// Degenerate cases, decided:
// - parallel or coplanar planes: A never crosses B's disk transversally -> 0;
// - A tangent to B's plane: a single touching point is no crossing -> 0 (pushing A either way
//   gives no crossing or two opposite ones, both 0);
// - a crossing point on B's rim (within RIM_REL_TOL): the circles intersect and no linking
//   number exists -> 0. Callers reject intersecting circles before asking (parseLayout does).
import type { Circle } from '../model/types.js';

/** A crossing this close to B's rim, relative to the radii, means the circles meet. */
export const RIM_REL_TOL = 1e-12;
/** Normals whose cross product is shorter than this (sine of the angle) are parallel. */
export const PARALLEL_SIN_TOL = 1e-14;

export type LinkingNumber = -1 | 0 | 1;

export function linkingNumber(a: Circle, b: Circle): LinkingNumber {
  const ca = a.center, na = a.normal, cb = b.center, nb = b.normal;
  return linkingNumberRaw(
    ca[0]!, ca[1]!, ca[2]!, na[0]!, na[1]!, na[2]!, a.radius,
    cb[0]!, cb[1]!, cb[2]!, nb[0]!, nb[1]!, nb[2]!, b.radius,
  );
}

/** Plain-number form for hot loops; normals need not be unit length. */
export function linkingNumberRaw(
  ax: number, ay: number, az: number, nax: number, nay: number, naz: number, ra: number,
  bx: number, by: number, bz: number, nbx: number, nby: number, nbz: number, rb: number,
): LinkingNumber {
  let l = Math.hypot(nax, nay, naz);
  nax /= l; nay /= l; naz /= l;
  l = Math.hypot(nbx, nby, nbz);
  nbx /= l; nby /= l; nbz /= l;
  // Frame of A with e1 along the part of n_B in A's plane, so n_B·(p(θ) − c_B) = h + R_A ρ cos θ.
  const cosab = nax * nbx + nay * nby + naz * nbz;
  let e1x = nbx - cosab * nax, e1y = nby - cosab * nay, e1z = nbz - cosab * naz;
  const rho = Math.hypot(e1x, e1y, e1z);
  if (rho <= PARALLEL_SIN_TOL) return 0;
  e1x /= rho; e1y /= rho; e1z /= rho;
  const e2x = nay * e1z - naz * e1y, e2y = naz * e1x - nax * e1z, e2z = nax * e1y - nay * e1x;
  const h = nbx * (ax - bx) + nby * (ay - by) + nbz * (az - bz);
  const c = -h / (ra * rho);
  // |c| >= 1: A misses B's plane or only touches it.
  if (!(c > -1 && c < 1)) return 0;
  const s = Math.sqrt((1 - c) * (1 + c));
  // Crossings p± = c_A + R_A (c e1 ± s e2). The tangent n_A × (p − c_A) = R_A (c e2 ∓ s e1) has
  // n_B-component ∓ R_A s ρ, so p− crosses along n_B (+1) and p+ against it (−1).
  const mx = ax - bx + ra * c * e1x, my = ay - by + ra * c * e1y, mz = az - bz + ra * c * e1z;
  const tx = ra * s * e2x, ty = ra * s * e2y, tz = ra * s * e2z;
  const dPlus = Math.hypot(mx + tx, my + ty, mz + tz);
  const dMinus = Math.hypot(mx - tx, my - ty, mz - tz);
  const tol = RIM_REL_TOL * (ra + rb);
  if (Math.abs(dPlus - rb) <= tol || Math.abs(dMinus - rb) <= tol) return 0;
  return ((dMinus < rb ? 1 : 0) - (dPlus < rb ? 1 : 0)) as LinkingNumber;
}
