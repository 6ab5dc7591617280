// Independent invariant checker run on every result. It trusts nothing from the solver or the kernel:
// core-circle distances come from a dense grid over both angles refined by damped Newton on the plain
// parametrisation, and linking numbers from a trapezoid-rule Gauss linking integral (Gauss 1833), whose
// periodic analytic integrand makes the rule converge geometrically.
import type { Verification } from '../model/result.js';
import type { Vec3 } from '../model/types.js';

/** A core circle as the checker reads it (normal need not be unit length). */
export interface CheckRing {
  name: string;
  center: ArrayLike<number>;
  normal: ArrayLike<number>;
  radius: number;
}

export interface VerifyInput {
  rings: CheckRing[];
  /** Common tube radius (layout units); ring i has tube radius tube * tubeRatios[i]. */
  tube: number;
  tubeRatios?: number[];
  /** Linking numbers the configuration must keep (compared up to reversing single rings). */
  linking: number[][];
}

export interface VerifyOptions {
  /** Allowed overlap of two tubes relative to the tube radius (dimensionless). */
  clearanceTolerance?: number;
}

/** Allowed tube overlap relative to the tube radius: far above round-off, far below anything printable. */
export const CLEARANCE_TOLERANCE = 1e-7;
/** Relative slack on r <= R, so a tube polished exactly to its core radius still passes. */
const RADIUS_SLACK = 1e-12;
/** Grid resolution of the brute-force distance (points per circle). */
const DISTANCE_GRID = 360;
/** How many grid local minima are refined (a circle pair has at most 4 isolated local minima, Neff 1990). */
const REFINE_CANDIDATES = 12;
/** A Gauss integral farther than this from an integer is reported as undetermined. */
const LINKING_ROUNDING = 0.1;

/** Check a configuration: tubes disjoint, tubes embedded (r <= R), linking as intended. */
export function verifyConfiguration(input: VerifyInput, options: VerifyOptions = {}): Verification {
  const tolerance = options.clearanceTolerance ?? CLEARANCE_TOLERANCE;
  const { rings, tube } = input;
  const n = rings.length;
  const ratios = input.tubeRatios ?? rings.map(() => 1);
  const messages: string[] = [];
  const scale = Math.max(...rings.map((r) => r.radius));
  const unit = tube > 0 ? tube : scale;

  let tubeWithinRadius = true;
  if (!(tube >= 0) || !Number.isFinite(tube)) {
    tubeWithinRadius = false;
    messages.push(`tube radius ${tube} is not a finite number >= 0`);
  }
  for (let i = 0; i < n; i++) {
    const r = tube * (ratios[i] ?? 1);
    if (r > rings[i]!.radius * (1 + RADIUS_SLACK)) {
      tubeWithinRadius = false;
      messages.push(`ring ${rings[i]!.name}: tube radius ${fmt(r)} exceeds its core radius ${fmt(rings[i]!.radius)} (layout units), so the tube is not embedded`);
    }
  }

  // Distances: only pairs whose bounding spheres (core radius plus tube) meet can overlap; among those, skip
  // pairs whose spheres already prove a clearance above the best found so far. If every near pair is clear,
  // look again with the sweep widened by that clearance, so minClearance is the least over all pairs.
  let minClearance = Infinity;
  const distance = new Map<number, number>();
  const tubeOf = (i: number): number => Math.max(0, tube) * (ratios[i] ?? 1);
  const reach = rings.map((r, i) => r.radius + tubeOf(i));
  const checkPairs = (margin: number): void => {
    const pairs: [number, number, number][] = [];
    for (const [i, j] of nearSpheres(rings, reach, margin)) {
      const a = rings[i]!, b = rings[j]!;
      const gap = dist3(a.center, b.center) - a.radius - b.radius;
      pairs.push([i, j, gap - tube * ((ratios[i] ?? 1) + (ratios[j] ?? 1))]);
    }
    pairs.sort((p, q) => p[2] - q[2]);
    for (const [i, j, lower] of pairs) {
      if (distance.has(i * n + j)) continue;
      if (lower / unit > minClearance && lower > 0) continue;
      const d = coreDistance(rings[i]!, rings[j]!).distance;
      distance.set(i * n + j, d);
      const clearance = (d - tube * ((ratios[i] ?? 1) + (ratios[j] ?? 1))) / unit;
      if (clearance < -tolerance) {
        messages.push(
          `rings ${rings[i]!.name} and ${rings[j]!.name}: core distance ${fmt(d)} is less than the sum of tube radii ${fmt(tube * ((ratios[i] ?? 1) + (ratios[j] ?? 1)))}: the tubes overlap by ${fmt(-clearance * unit)} (layout units)`,
        );
      }
      minClearance = Math.min(minClearance, clearance);
    }
  };
  checkPairs(0);
  if (n >= 2 && !(minClearance <= 0)) {
    // No near pair touches: the least clearance may be a pair farther apart (or, with no near pair, any pair).
    checkPairs(Number.isFinite(minClearance) ? minClearance * unit : Infinity);
  }
  if (n < 2) minClearance = Infinity;

  // Linking: pairs whose bounding spheres (core radius) meet, by the Gauss integral; compare up to reversing
  // single rings. Disjoint bounding spheres are separated by a plane, so those rings are unlinked.
  const linking = rings.map(() => rings.map(() => 0));
  let linkingDetermined = true;
  for (const [i, j] of nearSpheres(rings, rings.map((r) => r.radius), 0)) {
    const d = distance.get(i * n + j) ?? coreDistance(rings[i]!, rings[j]!).distance;
    const g = gaussLinking(rings[i]!, rings[j]!, d);
    if (g.linking === null) {
      linkingDetermined = false;
      messages.push(`rings ${rings[i]!.name} and ${rings[j]!.name}: linking number undetermined (Gauss integral ${g.value.toFixed(3)}; the cores nearly touch)`);
    }
    linking[i]![j] = linking[j]![i] = g.linking ?? 0;
  }
  const linkingPreserved = linkingDetermined && sameLinkUpToReversal(input.linking, linking, rings.map((r) => r.name), messages);

  const clearanceOk = minClearance >= -tolerance;
  return {
    ok: clearanceOk && linkingPreserved && tubeWithinRadius,
    minClearance: Number.isFinite(minClearance) ? minClearance : 0,
    linkingPreserved,
    tubeWithinRadius,
    messages,
  };
}

/** Re-verify a result file's rings (per-ring tube radii are read from the rings). */
export function verifyRings(
  rings: (CheckRing & { tube: number })[],
  tube: number,
  linking: number[][],
  options: VerifyOptions = {},
): Verification {
  const ratios = rings.map((r) => (tube > 0 ? r.tube / tube : 1));
  return verifyConfiguration({ rings, tube, tubeRatios: ratios, linking }, options);
}

export interface CoreDistance {
  distance: number;
  /** Closest points on the two core circles. */
  onA: Vec3;
  onB: Vec3;
}

/** Global minimum distance between two core circles by grid search plus damped Newton refinement. */
export function coreDistance(a: CheckRing, b: CheckRing): CoreDistance {
  const fa = frame(a), fb = frame(b);
  const m = DISTANCE_GRID;
  const pa = samplePoints(fa, m), pb = samplePoints(fb, m);
  const grid = new Float64Array(m * m);
  for (let i = 0; i < m; i++) {
    const ax = pa[3 * i]!, ay = pa[3 * i + 1]!, az = pa[3 * i + 2]!;
    for (let j = 0; j < m; j++) {
      const dx = ax - pb[3 * j]!, dy = ay - pb[3 * j + 1]!, dz = az - pb[3 * j + 2]!;
      grid[i * m + j] = dx * dx + dy * dy + dz * dz;
    }
  }
  // Local minima of the grid (periodic in both angles), best first.
  const candidates: [number, number, number][] = [];
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) {
      const v = grid[i * m + j]!;
      let isMin = true;
      for (let di = -1; di <= 1 && isMin; di++) {
        for (let dj = -1; dj <= 1; dj++) {
          if (di === 0 && dj === 0) continue;
          const w = grid[((i + di + m) % m) * m + ((j + dj + m) % m)]!;
          if (w < v) { isMin = false; break; }
        }
      }
      if (isMin) candidates.push([v, i, j]);
    }
  }
  candidates.sort((p, q) => p[0] - q[0]);
  let best = { f: Infinity, s: 0, t: 0 };
  const step = (2 * Math.PI) / m;
  for (const [, i, j] of candidates.slice(0, REFINE_CANDIDATES)) {
    const r = refine(fa, fb, i * step, j * step);
    if (r.f < best.f) best = r;
  }
  return { distance: Math.sqrt(Math.max(0, best.f)), onA: point(fa, best.s), onB: point(fb, best.t) };
}

export interface GaussLinking {
  /** The Gauss integral (an integer up to quadrature error). */
  value: number;
  /** The rounded value, or null when the integral is not close to an integer. */
  linking: -1 | 0 | 1 | null;
}

/**
 * Gauss linking integral lk = (1/4π) ∮∮ (P − Q)·(P' × Q') / |P − Q|³ ds dt, both circles oriented
 * counter-clockwise about their normals. `distance` (the core distance) sets the quadrature size:
 * the integrand's strip of analyticity shrinks like distance / radius.
 */
export function gaussLinking(a: CheckRing, b: CheckRing, distance: number): GaussLinking {
  const scale = Math.max(a.radius, b.radius);
  const ratio = Math.max(distance, 1e-4 * scale) / scale;
  const m = Math.min(4096, Math.max(96, Math.ceil(30 / ratio)));
  const fa = frame(a), fb = frame(b);
  const pa = samplePoints(fa, m), pb = samplePoints(fb, m);
  const ta = sampleTangents(fa, m), tb = sampleTangents(fb, m);
  let sum = 0;
  for (let i = 0; i < m; i++) {
    const ax = pa[3 * i]!, ay = pa[3 * i + 1]!, az = pa[3 * i + 2]!;
    const ux = ta[3 * i]!, uy = ta[3 * i + 1]!, uz = ta[3 * i + 2]!;
    for (let j = 0; j < m; j++) {
      const dx = ax - pb[3 * j]!, dy = ay - pb[3 * j + 1]!, dz = az - pb[3 * j + 2]!;
      const vx = tb[3 * j]!, vy = tb[3 * j + 1]!, vz = tb[3 * j + 2]!;
      const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
      const d2 = dx * dx + dy * dy + dz * dz;
      sum += (dx * cx + dy * cy + dz * cz) / (d2 * Math.sqrt(d2));
    }
  }
  const h = (2 * Math.PI) / m;
  const value = (sum * h * h) / (4 * Math.PI);
  const rounded = Math.round(value);
  const ok = Math.abs(value - rounded) < LINKING_ROUNDING && Math.abs(rounded) <= 1;
  return { value, linking: ok ? (rounded === 0 ? 0 : (rounded as -1 | 1)) : null };
}

/** Linking matrix of a set of rings by the Gauss integral (null entries where undetermined). */
export function gaussLinkingMatrix(rings: CheckRing[]): (number | null)[][] {
  const out: (number | null)[][] = rings.map(() => rings.map(() => 0));
  for (const [i, j] of nearSpheres(rings, rings.map((r) => r.radius), 0)) {
    const d = coreDistance(rings[i]!, rings[j]!).distance;
    const g = gaussLinking(rings[i]!, rings[j]!, d).linking;
    out[i]![j] = out[j]![i] = g;
  }
  return out;
}

/**
 * Same link up to reversing the orientation of single rings (a ring and its flipped normal are one
 * physical ring): got_ij = s_i s_j expected_ij for some signs s. A mirror image fails on odd cycles.
 */
export function sameLinkUpToReversal(expected: number[][], got: number[][], names: string[], messages: string[] = []): boolean {
  const n = got.length;
  let ok = true;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const e = expected[i]?.[j] ?? 0, g = got[i]![j]!;
      if (Math.abs(e) !== Math.abs(g)) {
        ok = false;
        messages.push(`rings ${names[i]} and ${names[j]}: linking number ${g} but ${e} was intended: the rings passed through each other`);
      }
    }
  }
  if (!ok) return false;
  const sign: number[] = new Array(n).fill(0);
  for (let root = 0; root < n; root++) {
    if (sign[root] !== 0) continue;
    sign[root] = 1;
    const queue = [root];
    while (queue.length > 0) {
      const i = queue.shift()!;
      for (let j = 0; j < n; j++) {
        const e = expected[i]?.[j] ?? 0;
        if (j === i || e === 0) continue;
        const s = sign[i]! * e * got[i]![j]!;
        if (sign[j] === 0) {
          sign[j] = s;
          queue.push(j);
        } else if (sign[j] !== s) {
          messages.push(`rings ${names[i]} and ${names[j]}: linking signs do not match the intended link under any choice of ring orientations (a mirror image)`);
          return false;
        }
      }
    }
  }
  return true;
}

// ---- helpers -------------------------------------------------------------------------------------

interface Frame {
  c: Vec3;
  u: Vec3;
  v: Vec3;
  r: number;
}

/** Orthonormal frame (u, v, n̂) built by Gram–Schmidt from the axis least aligned with n. */
function frame(ring: CheckRing): Frame {
  const l = Math.hypot(ring.normal[0]!, ring.normal[1]!, ring.normal[2]!);
  const n: Vec3 = [ring.normal[0]! / l, ring.normal[1]! / l, ring.normal[2]! / l];
  const ax = Math.abs(n[0]), ay = Math.abs(n[1]), az = Math.abs(n[2]);
  const e: Vec3 = ax <= ay && ax <= az ? [1, 0, 0] : ay <= az ? [0, 1, 0] : [0, 0, 1];
  const k = e[0] * n[0] + e[1] * n[1] + e[2] * n[2];
  const w: Vec3 = [e[0] - k * n[0], e[1] - k * n[1], e[2] - k * n[2]];
  const lw = Math.hypot(w[0], w[1], w[2]);
  const u: Vec3 = [w[0] / lw, w[1] / lw, w[2] / lw];
  const v: Vec3 = [n[1] * u[2] - n[2] * u[1], n[2] * u[0] - n[0] * u[2], n[0] * u[1] - n[1] * u[0]];
  return { c: [ring.center[0]!, ring.center[1]!, ring.center[2]!], u, v, r: ring.radius };
}

function point(f: Frame, s: number): Vec3 {
  const cs = Math.cos(s) * f.r, sn = Math.sin(s) * f.r;
  return [f.c[0] + cs * f.u[0] + sn * f.v[0], f.c[1] + cs * f.u[1] + sn * f.v[1], f.c[2] + cs * f.u[2] + sn * f.v[2]];
}

function samplePoints(f: Frame, m: number): Float64Array {
  const out = new Float64Array(3 * m);
  for (let i = 0; i < m; i++) {
    const p = point(f, (2 * Math.PI * i) / m);
    out[3 * i] = p[0]; out[3 * i + 1] = p[1]; out[3 * i + 2] = p[2];
  }
  return out;
}

function sampleTangents(f: Frame, m: number): Float64Array {
  const out = new Float64Array(3 * m);
  for (let i = 0; i < m; i++) {
    const s = (2 * Math.PI * i) / m;
    const cs = Math.cos(s) * f.r, sn = Math.sin(s) * f.r;
    for (let k = 0; k < 3; k++) out[3 * i + k] = -sn * f.u[k]! + cs * f.v[k]!;
  }
  return out;
}

/**
 * Minimise f(s, t) = |P(s) − Q(t)|² from a grid point by Levenberg–Marquardt-damped Newton steps.
 * Damping keeps the step sane where the Hessian is singular (continua of closest pairs).
 */
function refine(fa: Frame, fb: Frame, s0: number, t0: number): { f: number; s: number; t: number } {
  let s = s0, t = t0;
  let f = objective(fa, fb, s, t);
  let lambda = 1e-6 * Math.max(fa.r, fb.r) ** 2;
  for (let iter = 0; iter < 60; iter++) {
    const P = point(fa, s), Q = point(fb, t);
    const dP = tangent(fa, s), dQ = tangent(fb, t);
    const D: Vec3 = [P[0] - Q[0], P[1] - Q[1], P[2] - Q[2]];
    const ddP: Vec3 = [fa.c[0] - P[0], fa.c[1] - P[1], fa.c[2] - P[2]];
    const ddQ: Vec3 = [fb.c[0] - Q[0], fb.c[1] - Q[1], fb.c[2] - Q[2]];
    const gs = 2 * dot(D, dP), gt = -2 * dot(D, dQ);
    const hss = 2 * (dot(dP, dP) + dot(D, ddP));
    const htt = 2 * (dot(dQ, dQ) - dot(D, ddQ));
    const hst = -2 * dot(dP, dQ);
    let improved = false;
    for (let tries = 0; tries < 30; tries++) {
      const a = hss + lambda, c = htt + lambda;
      const det = a * c - hst * hst;
      if (!(det > 0) || a <= 0) { lambda = lambda * 10 + 1e-12; continue; }
      const ds = -(c * gs - hst * gt) / det;
      const dt = -(a * gt - hst * gs) / det;
      const fNew = objective(fa, fb, s + ds, t + dt);
      if (fNew <= f) {
        const small = Math.abs(ds) + Math.abs(dt) < 1e-15;
        s += ds; t += dt;
        f = fNew;
        lambda = Math.max(lambda / 10, 1e-300);
        improved = !small;
        break;
      }
      lambda *= 10;
    }
    if (!improved) break;
  }
  return { f, s, t };
}

function objective(fa: Frame, fb: Frame, s: number, t: number): number {
  const P = point(fa, s), Q = point(fb, t);
  const dx = P[0] - Q[0], dy = P[1] - Q[1], dz = P[2] - Q[2];
  return dx * dx + dy * dy + dz * dz;
}

function tangent(f: Frame, s: number): Vec3 {
  const cs = Math.cos(s) * f.r, sn = Math.sin(s) * f.r;
  return [-sn * f.u[0] + cs * f.v[0], -sn * f.u[1] + cs * f.v[1], -sn * f.u[2] + cs * f.v[2]];
}

const dot = (a: Vec3, b: Vec3): number => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];

/**
 * Pairs i < j of spheres (centre c_i, radius reach[i]) with |c_i - c_j| <= reach_i + reach_j + margin, by
 * sort and sweep on the axis of largest spread: O(N log N + pairs overlapping on that axis). The checker's
 * own prefilter, so it shares no code with the optimiser's broad phase.
 */
function nearSpheres(rings: readonly CheckRing[], reach: readonly number[], margin: number): [number, number][] {
  const n = rings.length;
  let axis = 0, spread = -1;
  for (let a = 0; a < 3; a++) {
    let lo = Infinity, hi = -Infinity;
    for (const r of rings) { lo = Math.min(lo, r.center[a]!); hi = Math.max(hi, r.center[a]!); }
    if (hi - lo > spread) { spread = hi - lo; axis = a; }
  }
  let maxReach = 0;
  for (const x of reach) maxReach = Math.max(maxReach, x);
  const order = Array.from({ length: n }, (_, i) => i).sort((p, q) => rings[p]!.center[axis]! - rings[q]!.center[axis]!);
  const out: [number, number][] = [];
  for (let p = 0; p < n; p++) {
    const i = order[p]!;
    const xi = rings[i]!.center[axis]!;
    for (let q = p + 1; q < n; q++) {
      const j = order[q]!;
      // Sorted by centre: once the axis gap alone exceeds the widest possible reach, no later sphere is near.
      if (rings[j]!.center[axis]! - xi > reach[i]! + maxReach + margin) break;
      if (dist3(rings[i]!.center, rings[j]!.center) <= reach[i]! + reach[j]! + margin) out.push(i < j ? [i, j] : [j, i]);
    }
  }
  return out;
}

function dist3(a: ArrayLike<number>, b: ArrayLike<number>): number {
  return Math.hypot(a[0]! - b[0]!, a[1]! - b[1]!, a[2]! - b[2]!);
}

function fmt(x: number): string {
  return Number.isFinite(x) ? Number(x.toPrecision(10)).toString() : String(x);
}
