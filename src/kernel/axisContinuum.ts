// The continuum around B: where A passes through B's axis, every point of B is at one distance from that point
// of A, so a local minimum of f there is a whole circle of closest pairs (A(s*), B(t)) for every t. Seen from B's
// side this is B lying on a constant-radius tube around A (B a meridian of A's tube, or the tight Hopf link), which
// circleContacts detects as a continuum along B; seen from A's side it must be found here, or the answer would
// depend on the order of the arguments. Cold path: runs only when a contact lies on B's axis.
import { basisInto } from './frame.js';
import { CONTACT_STRIDE, CONTINUUM_REL_TOL, CONTINUUM_SAMPLES, F_NOISE_REL, fAt, GEO, Geo, MAX_CONTACTS, TWO_PI } from './queryGeometry.js';

const FR = new Float64Array(6);

/**
 * Largest distance from B's axis of a point of A whose whole circle B counts as one continuum: the distance from
 * A(s*) to B(t) then varies over t by at most 2 rho, within the continuum test's CONTINUUM_REL_TOL * L.
 */
export function axisTolerance(L: number): number {
  return 0.5 * CONTINUUM_REL_TOL * L;
}

/**
 * Replace every contact of out[0 .. count) that lies on B's axis (rho <= axisTolerance) by CONTINUUM_SAMPLES pairs
 * (that point of A, B(t_k)), t_k = (k + 1/2) 2π / CONTINUUM_SAMPLES in B's own frame (basisInto(nB)), so B's side
 * of the query lists the same points. Returns the new count (unchanged when no contact is on the axis).
 */
export function expandAxisContacts(out: Float64Array, n: number, L: number): number {
  let count = n;
  const tol = axisTolerance(L);
  const fNoise = F_NOISE_REL * L * L;
  for (let k = 0; k < count; k++) {
    const o = k * CONTACT_STRIDE;
    if (rhoOf(out[o + 2]!, out[o + 3]!, out[o + 4]!) > tol || count - 1 + CONTINUUM_SAMPLES > MAX_CONTACTS) continue;
    let s = out[o]!, px = out[o + 2]!, py = out[o + 3]!, pz = out[o + 4]!;
    // Passing within rounding of B's axis where f has a smooth maximum leaves a crater of width ~sqrt(rho) and
    // depth ~RB rho at the top: a "minimum" below the kernel's resolution, not a circle of closest pairs. A genuine
    // minimum on the axis (B a meridian of A's tube) rises on both sides at a wider probe: drop the rest.
    const f0 = fAt(s);
    if (fAt(s - AXIS_PROBE) < f0 - fNoise || fAt(s + AXIS_PROBE) < f0 - fNoise) {
      out.copyWithin(o, o + CONTACT_STRIDE, count * CONTACT_STRIDE);
      count--;
      k--;
      continue;
    }
    // A minimum of f on B's axis is B's centre (f' = 0 there needs z = 0), but a flat minimum (A running along
    // B's axis) is located only to ~sqrt(eps) along the axis: take the point of A nearest B's centre instead.
    if (nearestToCentre() && Math.hypot(NP[1]! - px, NP[2]! - py, NP[3]! - pz) <= SNAP_REL * L) {
      s = NP[0]!; px = NP[1]!; py = NP[2]!; pz = NP[3]!;
    }
    // Drop contact k (the family replaces it), then append the family. At most one point of A is a minimum on
    // B's axis (it is B's centre).
    out.copyWithin(o, o + CONTACT_STRIDE, count * CONTACT_STRIDE);
    return writeAxisFamily(out, count - 1, s, px, py, pz);
  }
  return count;
}

/**
 * Continuum along A (f constant): if A also passes through B's centre, all of B is at the common distance from
 * that point (the tight Hopf link has both families). Appends the family around B; returns the new count.
 */
export function addAxisFamilyToContinuum(out: Float64Array, count: number, L: number): number {
  if (!nearestToCentre() || count + CONTINUUM_SAMPLES > MAX_CONTACTS) return count;
  const gx = NP[1]! - GEO[Geo.Bx]!, gy = NP[2]! - GEO[Geo.By]!, gz = NP[3]! - GEO[Geo.Bz]!;
  if (Math.sqrt(gx * gx + gy * gy + gz * gz) > axisTolerance(L)) return count;
  return writeAxisFamily(out, count, NP[0]!, NP[1]!, NP[2]!, NP[3]!);
}

/** Offset (radians) at which a minimum on B's axis must rise on both sides; far beyond any rounding crater. */
const AXIS_PROBE = 1e-4;

/** Below this distance (relative to L) a contact on B's axis is snapped to the point of A nearest B's centre. */
const SNAP_REL = 1e-6;
/** Angle and point of A nearest B's centre: [s, x, y, z]. */
const NP = new Float64Array(4);

/** Point of A nearest B's centre (Eberly's point–circle formula in A's frame) into NP; false if B's centre is on A's axis. */
function nearestToCentre(): boolean {
  const Ax = GEO[Geo.Ax]!, Ay = GEO[Geo.Ay]!, Az = GEO[Geo.Az]!, rA = GEO[Geo.rA]!;
  const e1x = GEO[Geo.e1x]!, e1y = GEO[Geo.e1y]!, e1z = GEO[Geo.e1z]!, e2x = GEO[Geo.e2x]!, e2y = GEO[Geo.e2y]!, e2z = GEO[Geo.e2z]!;
  const dx = GEO[Geo.Bx]! - Ax, dy = GEO[Geo.By]! - Ay, dz = GEO[Geo.Bz]! - Az;
  const c = dx * e1x + dy * e1y + dz * e1z, sn = dx * e2x + dy * e2y + dz * e2z;
  const inPlane = Math.sqrt(c * c + sn * sn);
  if (!(inPlane > 0)) return false;
  const s = Math.atan2(sn, c);
  const cs = c / inPlane, ss = sn / inPlane;
  NP[0] = s < 0 ? s + TWO_PI : s;
  NP[1] = Ax + rA * (e1x * cs + e2x * ss); NP[2] = Ay + rA * (e1y * cs + e2y * ss); NP[3] = Az + rA * (e1z * cs + e2z * ss);
  return true;
}

function writeAxisFamily(out: Float64Array, count: number, s: number, px: number, py: number, pz: number): number {
  const Nx = GEO[Geo.Nx]!, Ny = GEO[Geo.Ny]!, Nz = GEO[Geo.Nz]!, Bx = GEO[Geo.Bx]!, By = GEO[Geo.By]!, Bz = GEO[Geo.Bz]!, rB = GEO[Geo.rB]!;
  basisInto(Nx, Ny, Nz, FR);
  let n = count;
  for (let k = 0; k < CONTINUUM_SAMPLES; k++) {
    const t = ((k + 0.5) * TWO_PI) / CONTINUUM_SAMPLES;
    const ct = Math.cos(t), st = Math.sin(t);
    const qx = Bx + rB * (FR[0]! * ct + FR[3]! * st), qy = By + rB * (FR[1]! * ct + FR[4]! * st), qz = Bz + rB * (FR[2]! * ct + FR[5]! * st);
    const o = n * CONTACT_STRIDE;
    out[o] = s;
    out[o + 1] = Math.sqrt((px - qx) ** 2 + (py - qy) ** 2 + (pz - qz) ** 2);
    out[o + 2] = px; out[o + 3] = py; out[o + 4] = pz;
    out[o + 5] = qx; out[o + 6] = qy; out[o + 7] = qz;
    n++;
  }
  return n;
}

/** Distance of point p from B's axis. */
function rhoOf(px: number, py: number, pz: number): number {
  const dx = px - GEO[Geo.Bx]!, dy = py - GEO[Geo.By]!, dz = pz - GEO[Geo.Bz]!;
  const z = dx * GEO[Geo.Nx]! + dy * GEO[Geo.Ny]! + dz * GEO[Geo.Nz]!;
  const qx = dx - z * GEO[Geo.Nx]!, qy = dy - z * GEO[Geo.Ny]!, qz = dz - z * GEO[Geo.Nz]!;
  return Math.sqrt(qx * qx + qy * qy + qz * qz);
}
