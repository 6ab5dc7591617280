/**
 * Exact distance between two circles in 3D, with every local closest pair ("strut").
 *
 * Method. Parametrise A by s: A(s) = cA + RA (e1 cos s + e2 sin s). By Eberly's point–circle formula
 * ("Distance to Circles in 3D", Geometric Tools 2015/2021) the nearest point of B to A(s) is unique unless
 * A(s) lies on B's axis, so the local minima of the pair distance |A(s) - B(t)| are exactly the local
 * minima of f(s) = dist(A(s), B)^2 = p(s) - 2 RB rho(s) + RB^2, where p = |A(s) - cB|^2, z = nB.(A(s) - cB),
 * w = rho^2 = p - z^2. Then f' = h / rho with h = p' rho - RB w', and
 *     g = h (p' rho + RB w') = p'^2 w - RB^2 w'^2
 * is a trigonometric polynomial of degree 4 — Neff's (1990) degree-8 polynomial in tan(s/2).
 *
 * Why this cannot miss a local minimum: every local minimum of f is a root of h, hence of g. All real roots
 * of g on [0, 2π) are isolated by interval subdivision with certified bounds (a fourth-order Taylor bound with
 * |g''''| <= sum k^4 |c_k| excludes an interval; the same bound on g' or g'' proves g monotone, or convex with
 * a sign change, so exactly one root lies inside). Nothing is sampled, so a minimum is never skipped between
 * samples; only double roots (a minimum being born) are resolved at the subdivision floor. Minima are the
 * roots where h changes sign from - to + across their interval. The root with the smallest f is always
 * reported, since the global minimum is a stationary point of f.
 *
 * Speed (bench/kernel): no allocation per query (doubles for non-inlined helpers travel in a typed array, since
 * V8 boxes them in calls), h read from linear forms fixed per query, Halley's iteration started from the
 * interval's own Taylor data with cos and sin carried by rotation.
 *
 * Continua of closest pairs (f constant): coaxial circles, and a circle lying on a constant-radius tube around
 * the other (the tight Hopf link). Those return evenly spaced representatives and set lastContinuum().
 * Parallel planes and coplanar circles are not special: they have isolated minima unless coaxial.
 *
 * This file: the set-up of g, the certified isolation and the Halley polish. The query's geometry and the
 * exact f, h and contact points live in queryGeometry.ts; the regimes that work on f and h directly (near a
 * continuum, flat minima, the global fallback) in exactFallbacks.ts.
 */
import { mulTrig22, evalTrig4 } from './trigPoly.js';
import { basisInto, wrapAngle } from './frame.js';
import {
  CONTINUUM_REL_TOL, CONTINUUM_SAMPLES, GEO, Geo, H_NOISE, HSCALE, MAX_CONTACTS, ROOT_ANGLE_TOL, rootAt, setRoot, writeContact, writeContinuum, writeRoot,
} from './queryGeometry.js';
import { alreadyListed, flatMinimum, FLAT_WINDOW, globalFallback, goldenOnF, isConstantF, refineH, sampleMinima, windowMinimum } from './exactFallbacks.js';
import { addAxisFamilyToContinuum, axisTolerance, expandAxisContacts } from './axisContinuum.js';

export { CONTACT_STRIDE, CONTINUUM_REL_TOL, CONTINUUM_SAMPLES, MAX_CONTACTS } from './queryGeometry.js';

/** Relative size of g below which the continuum test is run (cheap pre-filter). */
const G_SMALL_REL = 1e-6;
const INITIAL_INTERVALS = 16;
const EPS = 2.220446049250313e-16;
/** Below this size of g relative to its terms, g is formed by heavy cancellation: use the sampled regime. */
const NEAR_CONTINUUM_REL = 1e-6;
/** Below this, Newton on g is not precise enough for the root: polish on the exact h instead. */
const WELL_CONDITIONED_REL = 1e-4;
const MAX_INTERVAL_VISITS = 3000;

export type ContinuumKind = 'coaxial' | 'on-tube';

let lastKind: ContinuumKind | null = null;
let lastCertified = true;
let lastSides = 0;
/**
 * Which whole circles the last circleContacts call's continuum runs along: 1 = along A (A on a tube around B,
 * or coaxial), 2 = around B (A passes through B's centre along B's axis, so B lies on a tube around A), 3 = both
 * (the tight Hopf link); 0 for isolated minima.
 */
export function lastContinuumSides(): number {
  return lastSides;
}
/** Whether the last circleContacts call isolated its minima with certified bounds (see RingDistance). */
export function lastCertifiedResult(): boolean {
  return lastCertified;
}
/** Continuum kind found by the last circleContacts call, or null for isolated minima. */
export function lastContinuum(): ContinuumKind | null {
  return lastKind;
}

// Scratch buffers, created once per module copy (each worker thread has its own).
const FR = new Float64Array(6);
const W = new Float64Array(5);
const WP = new Float64Array(5);
const PP2 = new Float64Array(5);
const T1 = new Float64Array(9);
const T2 = new Float64Array(9);
const G = new Float64Array(9);
const EV = new Float64Array(4);
const GLO = new Float64Array(INITIAL_INTERVALS + 1);
const STACK = new Float64Array(6 * 512);
const H0 = Math.PI / INITIAL_INTERVALS;
/** Subdivision levels: the switch half-width SWITCH_WIDTH = H0 / 2^MAX_LEVEL is about 1e-6 rad. */
const MAX_LEVEL = 17;
const HALF_WIDTH = new Float64Array(MAX_LEVEL + 1);
/** Taylor factors r^2/2, r^3/6, r^4/24 of each level's half-width r (multiplications, no divisions, in the loop). */
const TAY2 = new Float64Array(MAX_LEVEL + 1);
const TAY3 = new Float64Array(MAX_LEVEL + 1);
const TAY4 = new Float64Array(MAX_LEVEL + 1);
const HALF_C = new Float64Array(MAX_LEVEL + 1);
const HALF_S = new Float64Array(MAX_LEVEL + 1);
const FULL_C = new Float64Array(MAX_LEVEL + 1);
const FULL_S = new Float64Array(MAX_LEVEL + 1);
for (let l = 0; l <= MAX_LEVEL; l++) {
  FULL_C[l] = Math.cos(H0 / 2 ** l);
  FULL_S[l] = Math.sin(H0 / 2 ** l);
  HALF_WIDTH[l] = H0 / 2 ** l;
  TAY2[l] = HALF_WIDTH[l]! ** 2 / 2;
  TAY3[l] = HALF_WIDTH[l]! ** 3 / 6;
  TAY4[l] = HALF_WIDTH[l]! ** 4 / 24;
  HALF_C[l] = Math.cos(H0 / 2 ** (l + 1));
  HALF_S[l] = Math.sin(H0 / 2 ** (l + 1));
}
const GRID_C = new Float64Array(2 * INITIAL_INTERVALS + 1);
const GRID_S = new Float64Array(2 * INITIAL_INTERVALS + 1);
/** cos ks, sin ks (k = 1..4) at every grid point: level-0 work needs no recurrences. */
const GRID_TAB = new Float64Array(8 * (2 * INITIAL_INTERVALS + 1));
for (let i = 0; i <= 2 * INITIAL_INTERVALS; i++) {
  const s = (i * Math.PI) / INITIAL_INTERVALS;
  GRID_C[i] = Math.cos(s);
  GRID_S[i] = Math.sin(s);
  for (let k = 1; k <= 4; k++) {
    GRID_TAB[8 * i + 2 * k - 2] = Math.cos(k * s);
    GRID_TAB[8 * i + 2 * k - 1] = Math.sin(k * s);
  }
}


/**
 * Hot path. Unit normals required. Writes CONTACT_STRIDE floats per local minimum into out
 * ([angleA, distance, pA, pB]) and returns how many. out must hold MAX_CONTACTS * CONTACT_STRIDE floats.
 */
export function circleContacts(
  cA: ArrayLike<number>, nA: ArrayLike<number>, RA: number,
  cB: ArrayLike<number>, nB: ArrayLike<number>, RB: number,
  out: Float64Array,
): number {
  const Ax = cA[0]!, Ay = cA[1]!, Az = cA[2]!;
  const Bx = cB[0]!, By = cB[1]!, Bz = cB[2]!;
  const Nx = nB[0]!, Ny = nB[1]!, Nz = nB[2]!;
  const Dx = Ax - Bx, Dy = Ay - By, Dz = Az - Bz;
  basisInto(nA[0]!, nA[1]!, nA[2]!, FR);
  const e1x = FR[0]!, e1y = FR[1]!, e1z = FR[2]!, e2x = FR[3]!, e2y = FR[4]!, e2z = FR[5]!;
  GEO[Geo.Dx] = Dx; GEO[Geo.Dy] = Dy; GEO[Geo.Dz] = Dz;
  GEO[Geo.e1x] = e1x; GEO[Geo.e1y] = e1y; GEO[Geo.e1z] = e1z;
  GEO[Geo.e2x] = e2x; GEO[Geo.e2y] = e2y; GEO[Geo.e2z] = e2z;
  GEO[Geo.Bx] = Bx; GEO[Geo.By] = By; GEO[Geo.Bz] = Bz;
  GEO[Geo.Nx] = Nx; GEO[Geo.Ny] = Ny; GEO[Geo.Nz] = Nz;
  GEO[Geo.Ax] = Ax; GEO[Geo.Ay] = Ay; GEO[Geo.Az] = Az;
  GEO[Geo.rA] = RA; GEO[Geo.rB] = RB;
  GEO[Geo.minRho] = Infinity;
  const dd = Dx * Dx + Dy * Dy + Dz * Dz;
  const L = RA + RB + Math.sqrt(dd);

  // Coaxial: parallel normals and A's centre on B's axis — every point of A is a closest point.
  const zD = Nx * Dx + Ny * Dy + Nz * Dz;
  // Plain square roots: Math.hypot guards against overflow we cannot reach and is several times slower.
  const cx = nA[1]! * Nz - nA[2]! * Ny, cy = nA[2]! * Nx - nA[0]! * Nz, cz = nA[0]! * Ny - nA[1]! * Nx;
  const cxn = Math.sqrt(cx * cx + cy * cy + cz * cz);
  const ox = Dx - zD * Nx, oy = Dy - zD * Ny, oz = Dz - zD * Nz;
  const off = Math.sqrt(ox * ox + oy * oy + oz * oz);
  // Decided on quantities symmetric in A and B (the larger radius; both centres' offsets from the other's axis),
  // so swapping the rings cannot flip the verdict.
  const zA = nA[0]! * Dx + nA[1]! * Dy + nA[2]! * Dz;
  const oax = Dx - zA * nA[0]!, oay = Dy - zA * nA[1]!, oaz = Dz - zA * nA[2]!;
  const offA = Math.sqrt(oax * oax + oay * oay + oaz * oaz);
  if (cxn * (RA > RB ? RA : RB) <= CONTINUUM_REL_TOL * L && off <= CONTINUUM_REL_TOL * L && offA <= CONTINUUM_REL_TOL * L) {
    lastKind = 'coaxial';
    lastCertified = true;
    lastSides = 1;
    return writeContinuum(out);
  }

  // Trig-polynomial coefficients: z = nB.Delta, p = |Delta|^2 (degree 1), then w = p - z^2, w' and g.
  const e1n = Nx * e1x + Ny * e1y + Nz * e1z, e2n = Nx * e2x + Ny * e2y + Nz * e2z;
  const De1 = Dx * e1x + Dy * e1y + Dz * e1z, De2 = Dx * e2x + Dy * e2y + Dz * e2z;
  const za = RA * e1n, zb = RA * e2n;
  const pa = 2 * RA * De1, pb = 2 * RA * De2;
  GEO[Geo.U0x] = ox; GEO[Geo.U0y] = oy; GEO[Geo.U0z] = oz;
  GEO[Geo.U1x] = RA * (e1x - e1n * Nx); GEO[Geo.U1y] = RA * (e1y - e1n * Ny); GEO[Geo.U1z] = RA * (e1z - e1n * Nz);
  GEO[Geo.U2x] = RA * (e2x - e2n * Nx); GEO[Geo.U2y] = RA * (e2y - e2n * Ny); GEO[Geo.U2z] = RA * (e2z - e2n * Nz);
  GEO[Geo.zD] = zD; GEO[Geo.za] = za; GEO[Geo.zb] = zb; GEO[Geo.pa] = pa; GEO[Geo.pb] = pb;
  // Closed-form squares (product-to-sum) of z = zD + za c + zb s and z z' and p'^2, then w = p - z^2 and
  // w' = p' - 2 z z'; the degree-4 products p'^2 w and w'^2 by mulTrig22.
  W[0] = dd + RA * RA - zD * zD - 0.5 * (za * za + zb * zb); W[1] = pa - 2 * zD * za; W[2] = pb - 2 * zD * zb;
  W[3] = -0.5 * (za * za - zb * zb); W[4] = -za * zb;
  WP[0] = 0; WP[1] = pb - 2 * zD * zb; WP[2] = -pa + 2 * zD * za; WP[3] = -2 * za * zb; WP[4] = za * za - zb * zb;
  PP2[0] = 0.5 * (pa * pa + pb * pb); PP2[1] = 0; PP2[2] = 0; PP2[3] = 0.5 * (pb * pb - pa * pa); PP2[4] = -pa * pb;
  mulTrig22(PP2, W, T1);
  mulTrig22(WP, WP, T2);
  let gNorm = 0, gScale = 0;
  const RB2 = RB * RB;
  for (let i = 0; i < 9; i++) {
    const v = T1[i]! - RB2 * T2[i]!;
    G[i] = v;
    gNorm += Math.abs(v);
    gScale += Math.abs(T1[i]!) + RB2 * Math.abs(T2[i]!);
  }

  if (gNorm <= G_SMALL_REL * gScale && isConstantF(L)) {
    lastKind = 'on-tube';
    lastCertified = true;
    const n = addAxisFamilyToContinuum(out, writeContinuum(out), L);
    lastSides = n > CONTINUUM_SAMPLES ? 3 : 1;
    return n;
  }
  lastKind = null;
  lastSides = 0;
  HSCALE[0] = L * L * L;
  GEO[Geo.hNoise] = H_NOISE * HSCALE[0]!;
  if (gNorm === 0) {
    // g vanishes identically: A lies on the quartic surface of a torus around B, partly on the true tube (f
    // constant there, the highest f takes) and partly on its inner sheet; read the minima from the exact h.
    lastCertified = false;
    return finish(sampleMinima(out), out, L);
  }

  // Normalise g so tolerances are relative.
  const inv = 1 / gNorm;
  let L4 = 0;
  for (let i = 0; i < 9; i++) G[i]! *= inv;
  for (let k = 1; k <= 4; k++) {
    const ca = G[2 * k - 1]!, cb = G[2 * k]!;
    L4 += k * k * k * k * Math.sqrt(ca * ca + cb * cb);
  }
  // Grid values of g (shared endpoints of the initial intervals).
  const g0 = G[0]!, g1 = G[1]!, g2 = G[2]!, g3 = G[3]!, g4 = G[4]!, g5 = G[5]!, g6 = G[6]!, g7 = G[7]!, g8 = G[8]!;
  for (let i = 0; i <= INITIAL_INTERVALS; i++) {
    const t = 16 * i;
    GLO[i] = g0 + g1 * GRID_TAB[t]! + g2 * GRID_TAB[t + 1]! + g3 * GRID_TAB[t + 2]! + g4 * GRID_TAB[t + 3]!
      + g5 * GRID_TAB[t + 4]! + g6 * GRID_TAB[t + 5]! + g7 * GRID_TAB[t + 6]! + g8 * GRID_TAB[t + 7]!;
  }
  const relative = gNorm / gScale;
  // Near a continuum g is formed by cancellation and its coefficients are mostly rounding: read the exact h.
  lastCertified = true;
  GEO[Geo.L4] = L4; GEO[Geo.noise] = (2 * EPS) / relative;
  let count = relative < NEAR_CONTINUUM_REL ? -1 : isolateMinima(relative < WELL_CONDITIONED_REL, out);
  if (count < 0) {
    lastCertified = false;
    count = sampleMinima(out);
  }
  return finish(count, out, L);
}

/**
 * Every periodic f has a minimum: none found means rounding hid the sign pattern, so take the global one. A
 * minimum on B's axis is a whole circle of closest pairs around B (see axisContinuum.ts; cold path).
 */
function finish(count: number, out: Float64Array, L: number): number {
  if (count <= 0) {
    lastCertified = false;
    count = globalFallback(out);
  }
  if (!(GEO[Geo.minRho]! <= axisTolerance(L))) return count;
  const n = expandAxisContacts(out, count, L);
  if (n > count) {
    lastKind = 'on-tube';
    lastSides = 2;
  }
  if (n > 0) return n;
  lastCertified = false;
  return globalFallback(out);
}

// ---------------------------------------------------------------------------------------------------

/**
 * Certified isolation of the roots of the normalised degree-4 trig polynomial G on [0, 2π), keeping only
 * those that are local minima of f. Fourth-order Taylor bounds about each interval's midpoint m (half-width r),
 * with L4 = sum k^4 |c_k| >= max |g''''| and the rounding level `noise` of G:
 *   exclusion   |g(m)| - |g'(m)| r - |g''(m)| r^2/2 - |g'''(m)| r^3/6 - L4 r^4/24 > noise  (no root),
 *   uniqueness  |g'(m)| - |g''(m)| r - |g'''(m)| r^2/2 - L4 r^3/6 > 0   (g monotone: root iff sign change).
 * h is continuous and vanishes only at roots of g (including A's crossings of B's axis, where rho = w' = 0),
 * so across an interval holding exactly one root, h going from - to + means that root is a local minimum of f;
 * + to - is a maximum (or an axis cusp) and no sign change is a root of the spurious factor. Symmetric
 * arrangements make h and the spurious factor vanish together (double roots of g, never "unique"): those are
 * subdivided down to SWITCH_WIDTH and decided by the sign of h itself, then bracketed on h. Two minima closer
 * than SWITCH_WIDTH would differ in depth by ~SWITCH_WIDTH^3 (relative) and are reported once.
 * Child midpoints are rotations of the parent's (cos, sin) from per-level tables: no trig calls.
 */
function isolateMinima(polishOnH: boolean, out: Float64Array): number {
  const L4 = GEO[Geo.L4]!, noise = GEO[Geo.noise]!, hNoise = GEO[Geo.hNoise]!;
  let count = 0;
  let top = 0;
  const g0 = G[0]!, g1 = G[1]!, g2 = G[2]!, g3 = G[3]!, g4 = G[4]!, g5 = G[5]!, g6 = G[6]!, g7 = G[7]!, g8 = G[8]!;
  for (let i = INITIAL_INTERVALS - 1; i >= 0; i--) {
    STACK[top++] = (2 * i + 1) * H0; STACK[top++] = 0; STACK[top++] = GLO[i]!; STACK[top++] = GLO[i + 1]!;
    STACK[top++] = GRID_C[2 * i + 1]!; STACK[top++] = GRID_S[2 * i + 1]!;
  }
  let visits = 0;
  while (top > 0) {
    const sm = STACK[--top]!, cm = STACK[--top]!, ghi = STACK[--top]!, glo = STACK[--top]!;
    const level = STACK[--top]!, m = STACK[--top]!;
    const r = HALF_WIDTH[level]!, t2 = TAY2[level]!, t3 = TAY3[level]!, t4 = TAY4[level]!;
    // g and its first three derivatives at m (evalTrig4 inlined: this loop is the kernel's hot spot).
    const c2 = cm * cm - sm * sm, s2 = 2 * sm * cm;
    const c3 = c2 * cm - s2 * sm, s3 = s2 * cm + c2 * sm;
    const c4 = c2 * c2 - s2 * s2, s4 = 2 * s2 * c2;
    const a1 = g1 * cm + g2 * sm, a2 = g3 * c2 + g4 * s2, a3 = g5 * c3 + g6 * s3, a4 = g7 * c4 + g8 * s4;
    const b1 = g2 * cm - g1 * sm, b2 = g4 * c2 - g3 * s2, b3 = g6 * c3 - g5 * s3, b4 = g8 * c4 - g7 * s4;
    const gm = g0 + a1 + a2 + a3 + a4;
    const dgSigned = b1 + 2 * b2 + 3 * b3 + 4 * b4, ddgSigned = -(a1 + 4 * a2 + 9 * a3 + 16 * a4);
    const dgm = Math.abs(dgSigned);
    const ddgm = Math.abs(ddgSigned);
    const d3gm = Math.abs(b1 + 8 * b2 + 27 * b3 + 64 * b4);
    visits++;
    if (Math.abs(gm) - (r * dgm + t2 * ddgm + t3 * d3gm + t4 * L4) > noise) continue;
    // One root: g monotone (|g'| bounded away from 0), or g convex/concave (|g''| bounded away from 0) with a
    // sign change at the ends (a convex function crosses zero once between ends of opposite sign).
    const unique = dgm - (r * ddgm + t2 * d3gm + t3 * L4) > 0
      || (glo * ghi < 0 && ddgm - (r * d3gm + t2 * L4) > 0);
    // End values within the rounding level cannot prove the absence of a sign change: ask h.
    const clear = Math.abs(glo) > noise && Math.abs(ghi) > noise;
    if (unique && clear && glo * ghi > 0) continue;
    if (visits > MAX_INTERVAL_VISITS || top + 12 > STACK.length) return -1; // hand over to the sampled regime
    const floor = level + 1 >= MAX_LEVEL;
    if (unique || floor) {
      // One root here (or the switch width is reached): read h at the ends, from the linear forms of hAtCS
      // (inlined by hand: a call would box its doubles).
      const cr = FULL_C[level]!, sr = FULL_S[level]!;
      const cl = cm * cr + sm * sr, sl = sm * cr - cm * sr, ch = cm * cr - sm * sr, sh = sm * cr + cm * sr;
      const u0x = GEO[Geo.U0x]!, u0y = GEO[Geo.U0y]!, u0z = GEO[Geo.U0z]!;
      const u1x = GEO[Geo.U1x]!, u1y = GEO[Geo.U1y]!, u1z = GEO[Geo.U1z]!;
      const u2x = GEO[Geo.U2x]!, u2y = GEO[Geo.U2y]!, u2z = GEO[Geo.U2z]!;
      const zD = GEO[Geo.zD]!, za = GEO[Geo.za]!, zb = GEO[Geo.zb]!, pa = GEO[Geo.pa]!, pb = GEO[Geo.pb]!;
      const rB = GEO[Geo.rB]!;
      const lx = u0x + u1x * cl + u2x * sl, ly = u0y + u1y * cl + u2y * sl, lz = u0z + u1z * cl + u2z * sl;
      const ppl = pb * cl - pa * sl;
      const hLo = ppl * Math.sqrt(lx * lx + ly * ly + lz * lz)
        - rB * (ppl - 2 * (zD + za * cl + zb * sl) * (zb * cl - za * sl));
      // h > 0 at the lower end: every case below needs h <= 0 there, except the switch-width one.
      if (hLo > hNoise && !floor) continue;
      const hx = u0x + u1x * ch + u2x * sh, hy = u0y + u1y * ch + u2y * sh, hz = u0z + u1z * ch + u2z * sh;
      const pph = pb * ch - pa * sh;
      const hHi = pph * Math.sqrt(hx * hx + hy * hy + hz * hz)
        - rB * (pph - 2 * (zD + za * ch + zb * sh) * (zb * ch - za * sh));
      // Signs with a dead zone: a root on a shared end must be seen as zero from both sides (the two ends
      // are computed by different rotations), so exactly one of the two intervals claims it.
      const sLo = hLo < -hNoise ? -1 : hLo > hNoise ? 1 : 0;
      const sHi = hHi < -hNoise ? -1 : hHi > hNoise ? 1 : 0;
      if (sLo < 0 && sHi > 0 && count < MAX_CONTACTS) {
        if (unique && clear && glo * ghi < 0 && !polishOnH) {
          GEO[Geo.lo] = m - r; GEO[Geo.hi] = m + r; GEO[Geo.gLo] = glo; GEO[Geo.gHi] = ghi;
          GEO[Geo.mid] = m; GEO[Geo.cMid] = cm; GEO[Geo.sMid] = sm;
          GEO[Geo.gMid] = gm; GEO[Geo.dgMid] = dgSigned; GEO[Geo.ddgMid] = ddgSigned;
          refine();
        } else {
          rootAt(refineH(m - r, m + r, hLo, hHi));
        }
        GEO[Geo.root] = wrapAngle(GEO[Geo.root]!);
        writeRoot(out, count++);
      } else if (sLo < 0 && sHi === 0 && count < MAX_CONTACTS) {
        // h falls into its rounding level here: either a root on the shared end, or a flat high-order minimum
        // (A running along B's axis) somewhere inside the dead zone. Polish on f itself over a window.
        const root = windowMinimum(m + r - FLAT_WINDOW, m + r + FLAT_WINDOW);
        if (root === root && !alreadyListed(out, count, root, FLAT_WINDOW)) writeContact(out, count++, wrapAngle(root));
      } else if (sLo === 0 && sHi > 0 && count < MAX_CONTACTS) {
        // The mirror case: a minimum on the shared lower end whose g value came out beyond g's rounding level
        // on this side, so the lower interval saw no sign change of g and skipped it. Whichever side reaches it
        // first lists it (alreadyListed stops the other).
        const root = windowMinimum(m - r - FLAT_WINDOW, m - r + FLAT_WINDOW);
        if (root === root && !alreadyListed(out, count, root, FLAT_WINDOW)) writeContact(out, count++, wrapAngle(root));
      } else if (floor && (sLo === 0 || sHi === 0) && count < MAX_CONTACTS) {
        // h vanishes to high order here (A runs along B's axis, e.g. B a meridian of A's tube): f is smooth
        // but its slope is below rounding, so compare f itself and polish by golden section.
        const root = flatMinimum(m, r, out, count);
        if (root === root) writeContact(out, count++, wrapAngle(root));
      }
      continue;
    }
    // Children [m, m + r] and [m - r, m] with midpoints m ± r/2.
    const hc = HALF_C[level]!, hs = HALF_S[level]!;
    const rc = 0.5 * r;
    STACK[top++] = m + rc; STACK[top++] = level + 1; STACK[top++] = gm; STACK[top++] = ghi;
    STACK[top++] = cm * hc - sm * hs; STACK[top++] = sm * hc + cm * hs;
    STACK[top++] = m - rc; STACK[top++] = level + 1; STACK[top++] = glo; STACK[top++] = gm;
    STACK[top++] = cm * hc + sm * hs; STACK[top++] = sm * hc - cm * hs;
  }
  return count;
}

/** Rounding level of the normalised G (sum of |coefficients| = 1). */
const G_NOISE = 1e-15;
/** A noise-level g whose slope is below this (normalised g) is a flat, high-order root. */
const FLAT_SLOPE = 1e-6;

/**
 * Safeguarded Halley iteration on G in [lo, hi] (GEO slots) with a sign change, started at the midpoint
 * whose g, g', g'' the isolation already holds; the root and its cosine and sine go to GEO. Halley's step
 * uses g'' (computed with g' anyway) and converges cubically; the loop stops once the Newton error estimate
 * |g''/g'| step^2 of the next iterate (an upper bound for Halley's) is below ROOT_ANGLE_TOL. cos and sin of
 * each iterate are the previous ones rotated by the step (a Taylor series once the step is small): no trig
 * calls after the first step.
 */
function refine(): void {
  let a = GEO[Geo.lo]!, b = GEO[Geo.hi]!;
  const aNeg = GEO[Geo.gLo]! < 0;
  let x = GEO[Geo.mid]!, c = GEO[Geo.cMid]!, sn = GEO[Geo.sMid]!;
  let gx = GEO[Geo.gMid]!, dg = GEO[Geo.dgMid]!, ddg = GEO[Geo.ddgMid]!;
  for (let it = 0; it < 100; it++) {
    // G is normalised (sum of |coefficients| = 1): below this its sign is rounding noise. A root of high
    // order (A running along B's axis) reaches that level far from the root: finish on f itself.
    if (Math.abs(gx) <= G_NOISE) {
      if (Math.abs(dg) < FLAT_SLOPE) rootAt(goldenOnF(Math.max(a, x - FLAT_WINDOW), Math.min(b, x + FLAT_WINDOW)));
      else setRoot(x, c, sn);
      return;
    }
    if ((gx < 0) === aNeg) a = x;
    else b = x;
    const den = 2 * dg * dg - gx * ddg;
    let next = den !== 0 ? x - (2 * gx * dg) / den : 0.5 * (a + b);
    let bisected = false;
    if (!(next > a && next < b)) { next = 0.5 * (a + b); bisected = true; }
    const d = next - x;
    const step = Math.abs(d);
    // cos and sin of next: rotate (c, sn) by d.
    let cd: number, sd: number;
    if (step < 0.05) {
      // Taylor series of cos d and sin d; the first omitted terms are below 1e-22 for |d| < 0.05.
      const d2 = d * d;
      cd = 1 - d2 * (1 / 2 - d2 * (1 / 24 - d2 * (1 / 720 - d2 * (1 / 40320 - d2 * (1 / 3628800)))));
      sd = d * (1 - d2 * (1 / 6 - d2 * (1 / 120 - d2 * (1 / 5040 - d2 * (1 / 362880)))));
    } else {
      cd = Math.cos(d); sd = Math.sin(d);
    }
    const cn = c * cd - sn * sd;
    sn = sn * cd + c * sd;
    c = cn;
    if (step <= ROOT_ANGLE_TOL || b - a <= ROOT_ANGLE_TOL
      || (!bisected && Math.abs(ddg) * step * step <= ROOT_ANGLE_TOL * Math.abs(dg))) {
      setRoot(next, c, sn);
      return;
    }
    x = next;
    evalTrig4(G, c, sn, EV);
    gx = EV[0]!; dg = EV[1]!; ddg = EV[2]!;
  }
  setRoot(x, c, sn);
}

