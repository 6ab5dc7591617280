// The current query's geometry (ring A parametrised by angle, ring B fixed) and the exact quantities read
// from it: f (squared distance from A(s) to B), h (f' times rho), rho^2, and the contact written at a root.
// One query at a time per module copy (each worker thread has its own); circleContacts fills GEO.
import { basisInto } from './frame.js';

/** Floats per contact in the raw output buffer: [angleA, distance, pA(3), pB(3)]. */
export const CONTACT_STRIDE = 8;
/** At most 4 isolated local minima exist (degree-8 stationary equation); continua use CONTINUUM_SAMPLES. */
export const CONTINUUM_SAMPLES = 12;
/**
 * Room for the worst case: the continuum along A (CONTINUUM_SAMPLES), the continuum around B where A passes
 * through B's centre along B's axis (CONTINUUM_SAMPLES more; the tight Hopf link has both), a few isolated minima.
 */
export const MAX_CONTACTS = 2 * CONTINUUM_SAMPLES + 8;
/** Relative size (to the length scale) of the spread of f below which f is taken as constant (a continuum). */
export const CONTINUUM_REL_TOL = 1e-12;
export const TWO_PI = 2 * Math.PI;

/** Root angles are resolved to this many radians (distance error is quadratic in it, so far below 1e-16). */
export const ROOT_ANGLE_TOL = 1e-13;
/** Rounding level of f relative to L^2 (f has units of length^2). */
export const F_NOISE_REL = 8 * 2.220446049250313e-16;
/** Rounding level of h (units of length^3, times L^3). */
export const H_NOISE = 64 * 2.220446049250313e-16;
/** L^3 of the current query (scale of h's rounding level). */
export const HSCALE = new Float64Array(1);
const FR = new Float64Array(6);

// Geometry of the current query (module scope so helpers need no arguments).
// Held in a typed array, not module-level `let`s: doubles stored in closure slots are boxed on every write.
export const GEO = new Float64Array(64);
export const enum Geo {
  Dx, Dy, Dz, e1x, e1y, e1z, e2x, e2y, e2z, Bx, By, Bz, Nx, Ny, Nz, Ax, Ay, Az, rA, rB,
  // Part of A(s) - cB normal to B's axis, u(s) = U0 + U1 cos s + U2 sin s, and the coefficients of
  // z(s) = zD + za cos s + zb sin s and p'(s) = pb cos s - pa sin s: h at any angle from these (see hAtCS).
  U0x, U0y, U0z, U1x, U1y, U1z, U2x, U2y, U2z, zD, za, zb, pa, pb,
  // Arguments and results of the hot helpers. V8 boxes every double passed to or returned from a function it
  // does not inline (isolateMinima, refine and writeRoot are too large to inline): one heap number each.
  L4, noise, hNoise, lo, hi, gLo, gHi, mid, cMid, sMid, gMid, dgMid, ddgMid, root, cRoot, sRoot,
  // Smallest distance from B's axis of a contact written by writeRoot in this query (an axis contact has all of
  // B at one distance: see circleContacts).
  minRho,
}

/**
 * h = p' rho - RB w' with w' = p' - 2 z z', from linear forms fixed per query: u = U0 + U1 c + U2 s (the
 * part of A(s) - cB normal to B's axis, so rho = |u| is read without the cancellation of p - z^2), z and p'.
 */
export function hAtCS(c: number, sn: number): number {
  const ux = GEO[Geo.U0x]! + GEO[Geo.U1x]! * c + GEO[Geo.U2x]! * sn;
  const uy = GEO[Geo.U0y]! + GEO[Geo.U1y]! * c + GEO[Geo.U2y]! * sn;
  const uz = GEO[Geo.U0z]! + GEO[Geo.U1z]! * c + GEO[Geo.U2z]! * sn;
  const za = GEO[Geo.za]!, zb = GEO[Geo.zb]!;
  const pp = GEO[Geo.pb]! * c - GEO[Geo.pa]! * sn;
  return pp * Math.sqrt(ux * ux + uy * uy + uz * uz) - GEO[Geo.rB]! * (pp - 2 * (GEO[Geo.zD]! + za * c + zb * sn) * (zb * c - za * sn));
}

/** h(s) = p' rho - RB w' (see hAtCS), read directly rather than through g's coefficients. */
export function hAt(s: number): number {
  return hAtCS(Math.cos(s), Math.sin(s));
}

/** f(s) = squared distance from A(s) to circle B, from the geometry (not the coefficients). */
export function fAt(s: number): number {
  const Dx = GEO[Geo.Dx]!, Dy = GEO[Geo.Dy]!, Dz = GEO[Geo.Dz]!, e1x = GEO[Geo.e1x]!, e1y = GEO[Geo.e1y]!, e1z = GEO[Geo.e1z]!, e2x = GEO[Geo.e2x]!, e2y = GEO[Geo.e2y]!, e2z = GEO[Geo.e2z]!, Nx = GEO[Geo.Nx]!, Ny = GEO[Geo.Ny]!, Nz = GEO[Geo.Nz]!, rA = GEO[Geo.rA]!, rB = GEO[Geo.rB]!;
  const c = Math.cos(s), sn = Math.sin(s);
  const dx = Dx + rA * (e1x * c + e2x * sn), dy = Dy + rA * (e1y * c + e2y * sn), dz = Dz + rA * (e1z * c + e2z * sn);
  const z = dx * Nx + dy * Ny + dz * Nz;
  const ux = dx - z * Nx, uy = dy - z * Ny, uz = dz - z * Nz;
  const rho = Math.sqrt(ux * ux + uy * uy + uz * uz);
  return z * z + (rho - rB) * (rho - rB);
}

/** rho(s)^2: squared distance of A(s) from B's axis. */
export function rho2At(sv: number): number {
  const Dx = GEO[Geo.Dx]!, Dy = GEO[Geo.Dy]!, Dz = GEO[Geo.Dz]!, e1x = GEO[Geo.e1x]!, e1y = GEO[Geo.e1y]!, e1z = GEO[Geo.e1z]!, e2x = GEO[Geo.e2x]!, e2y = GEO[Geo.e2y]!, e2z = GEO[Geo.e2z]!, Nx = GEO[Geo.Nx]!, Ny = GEO[Geo.Ny]!, Nz = GEO[Geo.Nz]!, rA = GEO[Geo.rA]!;
  const c = Math.cos(sv), sn = Math.sin(sv);
  const dx = Dx + rA * (e1x * c + e2x * sn), dy = Dy + rA * (e1y * c + e2y * sn), dz = Dz + rA * (e1z * c + e2z * sn);
  const z = dx * Nx + dy * Ny + dz * Nz;
  const qx = dx - z * Nx, qy = dy - z * Ny, qz = dz - z * Nz;
  return qx * qx + qy * qy + qz * qz;
}

export function setRoot(x: number, c: number, sn: number): void {
  GEO[Geo.root] = x; GEO[Geo.cRoot] = c; GEO[Geo.sRoot] = sn;
}

/** Root at angle s (cold paths): its cosine and sine from the angle. */
export function rootAt(s: number): void {
  setRoot(s, Math.cos(s), Math.sin(s));
}

/** Contact k at angle GEO[Geo.root] of A (cosine and sine in GEO too): its angle, distance and both points. */
export function writeRoot(out: Float64Array, k: number): void {
  const s = GEO[Geo.root]!, c = GEO[Geo.cRoot]!, sn = GEO[Geo.sRoot]!;
  const e1x = GEO[Geo.e1x]!, e1y = GEO[Geo.e1y]!, e1z = GEO[Geo.e1z]!, e2x = GEO[Geo.e2x]!, e2y = GEO[Geo.e2y]!, e2z = GEO[Geo.e2z]!, Bx = GEO[Geo.Bx]!, By = GEO[Geo.By]!, Bz = GEO[Geo.Bz]!, Nx = GEO[Geo.Nx]!, Ny = GEO[Geo.Ny]!, Nz = GEO[Geo.Nz]!, Ax = GEO[Geo.Ax]!, Ay = GEO[Geo.Ay]!, Az = GEO[Geo.Az]!, rA = GEO[Geo.rA]!, rB = GEO[Geo.rB]!;
  const px = Ax + rA * (e1x * c + e2x * sn), py = Ay + rA * (e1y * c + e2y * sn), pz = Az + rA * (e1z * c + e2z * sn);
  const dx = px - Bx, dy = py - By, dz = pz - Bz;
  const z = dx * Nx + dy * Ny + dz * Nz;
  let qx = dx - z * Nx, qy = dy - z * Ny, qz = dz - z * Nz;
  // Project out B's normal a second time: next to B's axis the first pass leaves a part along it of eps |z|,
  // which normalising by a small rho would turn into a foot point off B's plane.
  const z2 = qx * Nx + qy * Ny + qz * Nz;
  qx -= z2 * Nx; qy -= z2 * Ny; qz -= z2 * Nz;
  let rho = Math.sqrt(qx * qx + qy * qy + qz * qz);
  // On B's axis to rounding (rho at the rounding level of the projection, eps |z|) q has no direction, not even
  // one in B's plane: every point of B is equally near, take the frame's angle-0 point.
  if (rho > 8 * 2.220446049250313e-16 * Math.abs(z)) {
    qx /= rho; qy /= rho; qz /= rho;
  } else {
    rho = 0;
    basisInto(Nx, Ny, Nz, FR);
    qx = FR[0]!; qy = FR[1]!; qz = FR[2]!;
  }
  if (rho < GEO[Geo.minRho]!) GEO[Geo.minRho] = rho;
  const o = k * CONTACT_STRIDE;
  out[o] = s;
  out[o + 1] = Math.sqrt(z * z + (rho - rB) * (rho - rB));
  out[o + 2] = px; out[o + 3] = py; out[o + 4] = pz;
  out[o + 5] = Bx + rB * qx; out[o + 6] = By + rB * qy; out[o + 7] = Bz + rB * qz;
}

export function writeContact(out: Float64Array, k: number, s: number): void {
  rootAt(s);
  writeRoot(out, k);
}

/** Evenly spaced representatives of a continuum, offset by half a step to avoid the axis crossing at s = π. */
export function writeContinuum(out: Float64Array): number {
  let count = 0;
  for (let k = 0; k < CONTINUUM_SAMPLES; k++) {
    const s = ((k + 0.5) * TWO_PI) / CONTINUUM_SAMPLES;
    writeContact(out, count++, s);
  }
  return count;
}
