// Symmetry groups of ring arrangements: cyclic C_N (rotations by 2πk/N about `axis` through `origin`)
// and dihedral D_N (C_N plus N half-turns about axes perpendicular to `axis`). Convention for D_N: the
// first half-turn axis is planeBasis(axis)[0] (the x axis when `axis` is z); the others follow at π/N.
// Only proper rotations occur, so an infinitesimal ring rotation ω transforms like a vector (M ω).
//
// A ring maps to a ring as an unoriented circle: g·(c, n) = (c', s n') with a sign s = ±1 so the stored
// normals (and hence the signs of linking numbers) are kept. A ring may be mapped to itself (a centre
// ring on the axis): its stabiliser then restricts how it may move.
import { InputError } from './errors.js';
import type { Ring, Symmetry, Vec3 } from './types.js';
import { planeBasis } from './vec.js';

/** 3×3 matrix, row-major. */
export type Mat3 = [number, number, number, number, number, number, number, number, number];

/** The ring map of a group, detected on (or imposed on) a ring arrangement. */
export interface RingOrbits {
  /** Rotation matrices of the group elements about `origin`; index 0 is the identity. */
  elements: Mat3[];
  origin: Vec3;
  /** perms[g][i]: the ring onto which element g maps ring i. */
  perms: number[][];
  /** signs[g][i]: g·normal_i = signs[g][i] · normal_{perms[g][i]} (±1). */
  signs: number[][];
  /** Ring indices of each orbit; the first is the orbit's representative. */
  orbits: number[][];
  /** Orbit index of every ring. */
  orbitOf: number[];
  /** For every ring j, an element g with perms[g][rep(j)] = j. */
  fromRep: number[];
}

/**
 * Largest symmetry order accepted, from a layout file or --symmetry: the group is built element by element
 * (2N rotation matrices and ring maps), and the catalogue's largest link has 64 rings.
 */
export const MAX_SYMMETRY_ORDER = 64;

/** A normal this far (relative) from the invariant direction after averaging means no consistent symmetric pose. */
const MIN_AVERAGED_NORMAL = 0.5;
/** Two radii closer than this (relative) may be images of one another. */
const RADIUS_REL_TOL = 1e-9;

/**
 * Parse `--symmetry none|cyclic:N|dihedral:N`. The axis is z through the origin. N must divide the ring
 * count, or the count less one (one ring on the axis, such as the centre ring of a star).
 */
export function parseSymmetryOption(text: string, ringCount: number): Symmetry | null {
  const value = text.trim().toLowerCase();
  if (value === 'none') return null;
  const m = /^(cyclic|dihedral):(\d+)$/.exec(value);
  if (!m) {
    throw new InputError(`--symmetry: '${text}' is not a symmetry; expected none, cyclic:N or dihedral:N (for example cyclic:3)`);
  }
  const type = m[1] as 'cyclic' | 'dihedral';
  const order = Number(m[2]);
  if (!Number.isSafeInteger(order) || order < 1 || order > MAX_SYMMETRY_ORDER) {
    throw new InputError(`--symmetry: order ${m[2]} must be a whole number from 1 to ${MAX_SYMMETRY_ORDER} (for example ${type}:3)`);
  }
  if (ringCount % order !== 0 && (ringCount - 1) % order !== 0) {
    throw new InputError(
      `--symmetry ${type}:${order}: ${order} does not divide the ring count ${ringCount} (nor ${ringCount - 1}, ` +
        `with one ring on the axis); use a divisor of the ring count or --symmetry none`,
    );
  }
  return { type, order, axis: [0, 0, 1], origin: [0, 0, 0] };
}

/** Rotation matrices of the group, identity first: C_N as r^k; D_N as r^k then r^k f. */
export function symmetryElements(symmetry: Symmetry): Mat3[] {
  const axis = unit(symmetry.axis);
  const n = Math.max(1, Math.round(symmetry.order));
  const out: Mat3[] = [];
  if (symmetry.type === 'none') return [identity()];
  for (let k = 0; k < n; k++) out.push(rotationMatrix(axis, (2 * Math.PI * k) / n));
  if (symmetry.type === 'dihedral') {
    const f = rotationMatrix(planeBasis(axis)[0], Math.PI);
    for (let k = 0; k < n; k++) out.push(mulMat(out[k]!, f));
  }
  return out;
}

/**
 * Detect which ring each group element maps each ring onto (nearest image, rings of equal radius only),
 * and group the rings into orbits. The arrangement need not be exactly symmetric; the map must however be
 * a consistent group action, else the arrangement cannot carry this symmetry and InputError is thrown.
 */
export function ringOrbits(rings: readonly Ring[], symmetry: Symmetry | null): RingOrbits {
  const n = rings.length;
  if (symmetry === null || symmetry.type === 'none') return trivialOrbits(n);
  const origin: Vec3 = [symmetry.origin[0], symmetry.origin[1], symmetry.origin[2]];
  const order = Math.round(symmetry.order);
  const label = `${symmetry.type}:${order}`;
  const elements = symmetryElements(symmetry);
  // Generators: r (element 1, or identity for order 1) and, for D_N, f (element N).
  const r = elements[order > 1 ? 1 : 0]!;
  const rMap = matchRings(rings, r, origin, label);
  const perms: number[][] = [];
  const signs: number[][] = [];
  let pk = range(n), sk = new Array<number>(n).fill(1);
  for (let k = 0; k < order; k++) {
    perms.push(pk);
    signs.push(sk);
    const next = compose(rMap.perm, rMap.sign, pk, sk);
    pk = next.perm;
    sk = next.sign;
  }
  if (!isIdentity(pk)) throw notSymmetric(rings, label, 'rotating the rings by the group order does not bring every ring back');
  if (symmetry.type === 'dihedral') {
    const f = matchRings(rings, elements[order]!, origin, label);
    const ff = compose(f.perm, f.sign, f.perm, f.sign);
    if (!isIdentity(ff.perm)) throw notSymmetric(rings, label, 'the half-turn does not pair the rings');
    for (let k = 0; k < order; k++) {
      const g = compose(perms[k]!, signs[k]!, f.perm, f.sign);
      perms.push(g.perm);
      signs.push(g.sign);
    }
    const fr = compose(f.perm, f.sign, rMap.perm, rMap.sign);
    const frfr = compose(fr.perm, fr.sign, fr.perm, fr.sign);
    if (!isIdentity(frfr.perm)) throw notSymmetric(rings, label, 'the half-turns and rotations do not fit together');
  }
  const orbitOf = new Array<number>(n).fill(-1);
  const fromRep = new Array<number>(n).fill(0);
  const orbits: number[][] = [];
  for (let i = 0; i < n; i++) {
    if (orbitOf[i] !== -1) continue;
    const orbit = [i];
    orbitOf[i] = orbits.length;
    fromRep[i] = 0;
    for (let g = 1; g < perms.length; g++) {
      const j = perms[g]![i]!;
      if (orbitOf[j] === -1) {
        orbitOf[j] = orbits.length;
        fromRep[j] = g;
        orbit.push(j);
      }
    }
    orbits.push(orbit);
  }
  return { elements, origin, perms, signs, orbits, orbitOf, fromRep };
}

/** The identity action: every ring is its own orbit. */
export function trivialOrbits(n: number): RingOrbits {
  const perm = range(n);
  return {
    elements: [identity()],
    origin: [0, 0, 0],
    perms: [perm],
    signs: [new Array<number>(n).fill(1)],
    orbits: perm.map((i) => [i]),
    orbitOf: perm.slice(),
    fromRep: new Array<number>(n).fill(0),
  };
}

/** The nearest symmetric arrangement: group average of the poses, normals re-normalised. */
export function symmetrize(rings: readonly Ring[], symmetry: Symmetry | null, orbits?: RingOrbits): Ring[] {
  if (symmetry === null || symmetry.type === 'none') return rings.map(copyRing);
  const act = orbits ?? ringOrbits(rings, symmetry);
  const proj = projectPoses(rings, act);
  return rings.map((ring, i) => {
    const nx = proj.normals[3 * i]!, ny = proj.normals[3 * i + 1]!, nz = proj.normals[3 * i + 2]!;
    const l = Math.hypot(nx, ny, nz);
    if (!(l >= MIN_AVERAGED_NORMAL)) {
      throw new InputError(
        `ring ${ring.name}: cannot be made ${symmetry.type}:${symmetry.order} symmetric (its images point in ` +
          `opposing directions); move it or use --symmetry none`,
      );
    }
    const out: Ring = {
      name: ring.name,
      center: [proj.centers[3 * i]!, proj.centers[3 * i + 1]!, proj.centers[3 * i + 2]!],
      normal: [nx / l, ny / l, nz / l],
      radius: ring.radius,
    };
    if (ring.tube !== undefined) out.tube = ring.tube;
    return out;
  });
}

/**
 * Departure from symmetry (layout units; 0 iff symmetric): root mean square over rings of the distance
 * of each pose to its group average, sqrt(mean |c - c̄|² + R² |n - n̄|²), with n̄ the unnormalised average.
 * The average is an orthogonal projection, so the square of this is smooth in the poses.
 */
export function symmetryDeparture(rings: readonly Ring[], symmetry: Symmetry | null, orbits?: RingOrbits): number {
  if (symmetry === null || symmetry.type === 'none' || rings.length === 0) return 0;
  return Math.sqrt(departureResidual(rings, orbits ?? ringOrbits(rings, symmetry)).squared);
}

export interface DepartureResidual {
  /** mean over rings of |c - c̄|² + R² |n - n̄|² (layout units²). */
  squared: number;
  /** Per ring (flat, 3 per ring): c - c̄ and R² (n - n̄); the gradient of `squared` is 2/N times these. */
  centers: Float64Array;
  normals: Float64Array;
}

/** Residual of the poses against their group average (for the departure constraint and its gradient). */
export function departureResidual(rings: readonly Ring[], orbits: RingOrbits): DepartureResidual {
  const n = rings.length;
  const proj = projectPoses(rings, orbits);
  const centers = new Float64Array(3 * n), normals = new Float64Array(3 * n);
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const ring = rings[i]!;
    const R2 = ring.radius * ring.radius;
    for (let k = 0; k < 3; k++) {
      const dc = ring.center[k]! - proj.centers[3 * i + k]!;
      const dn = ring.normal[k]! - proj.normals[3 * i + k]!;
      centers[3 * i + k] = dc;
      normals[3 * i + k] = R2 * dn;
      sum += dc * dc + R2 * dn * dn;
    }
  }
  return { squared: n > 0 ? sum / n : 0, centers, normals };
}

/** Group average of the poses: (P c)_j = mean over g of g applied to the ring that g maps onto j. */
export function projectPoses(rings: readonly Ring[], orbits: RingOrbits): { centers: Float64Array; normals: Float64Array } {
  const n = rings.length;
  const centers = new Float64Array(3 * n), normals = new Float64Array(3 * n);
  const o = orbits.origin;
  const G = orbits.elements.length;
  for (let g = 0; g < G; g++) {
    const M = orbits.elements[g]!;
    const perm = orbits.perms[g]!, sign = orbits.signs[g]!;
    for (let i = 0; i < n; i++) {
      const ring = rings[i]!;
      const j = perm[i]!;
      const c = mulVec(M, [ring.center[0] - o[0], ring.center[1] - o[1], ring.center[2] - o[2]]);
      const m = mulVec(M, ring.normal);
      const s = sign[i]!;
      for (let k = 0; k < 3; k++) {
        centers[3 * j + k]! += c[k]! / G;
        normals[3 * j + k]! += (s * m[k]!) / G;
      }
    }
  }
  for (let j = 0; j < n; j++) for (let k = 0; k < 3; k++) centers[3 * j + k]! += o[k]!;
  return { centers, normals };
}

/** Apply a group element to a ring: rotate about `origin`, flip the normal by `sign`. */
export function applyElement(ring: Ring, M: Mat3, origin: Vec3, sign = 1, name = ring.name): Ring {
  const c = mulVec(M, [ring.center[0] - origin[0], ring.center[1] - origin[1], ring.center[2] - origin[2]]);
  const m = mulVec(M, ring.normal);
  const out: Ring = {
    name,
    center: [c[0] + origin[0], c[1] + origin[1], c[2] + origin[2]],
    normal: [sign * m[0], sign * m[1], sign * m[2]],
    radius: ring.radius,
  };
  if (ring.tube !== undefined) out.tube = ring.tube;
  return out;
}

/** Regenerate every ring of each orbit from its representative (keeps names, radii and tubes). */
export function applySymmetry(rings: readonly Ring[], orbits: RingOrbits): Ring[] {
  const out = rings.map(copyRing);
  for (const orbit of orbits.orbits) {
    const rep = rings[orbit[0]!]!;
    for (const j of orbit) {
      const g = orbits.fromRep[j]!;
      const img = applyElement(rep, orbits.elements[g]!, orbits.origin, orbits.signs[g]![orbit[0]!]!, rings[j]!.name);
      img.radius = rings[j]!.radius;
      if (rings[j]!.tube !== undefined) img.tube = rings[j]!.tube!;
      out[j] = img;
    }
  }
  return out;
}

// --- small matrix helpers (exported for the optimiser, which works in the same frames) ---

export function identity(): Mat3 {
  return [1, 0, 0, 0, 1, 0, 0, 0, 1];
}

/** Rotation by angle about unit axis k (Rodrigues). */
export function rotationMatrix(k: ArrayLike<number>, angle: number): Mat3 {
  const c = Math.cos(angle), s = Math.sin(angle), v = 1 - c;
  const x = k[0]!, y = k[1]!, z = k[2]!;
  return [
    c + x * x * v, x * y * v - z * s, x * z * v + y * s,
    y * x * v + z * s, c + y * y * v, y * z * v - x * s,
    z * x * v - y * s, z * y * v + x * s, c + z * z * v,
  ];
}

export function mulMat(a: Mat3, b: Mat3): Mat3 {
  const out = new Array<number>(9).fill(0) as Mat3;
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) out[3 * i + j] = a[3 * i]! * b[j]! + a[3 * i + 1]! * b[3 + j]! + a[3 * i + 2]! * b[6 + j]!;
  }
  return out;
}

export function mulVec(M: Mat3, v: ArrayLike<number>): Vec3 {
  const x = v[0]!, y = v[1]!, z = v[2]!;
  return [M[0] * x + M[1] * y + M[2] * z, M[3] * x + M[4] * y + M[5] * z, M[6] * x + M[7] * y + M[8] * z];
}

/** Mᵀ v (the inverse rotation). */
export function mulVecT(M: Mat3, v: ArrayLike<number>): Vec3 {
  const x = v[0]!, y = v[1]!, z = v[2]!;
  return [M[0] * x + M[3] * y + M[6] * z, M[1] * x + M[4] * y + M[7] * z, M[2] * x + M[5] * y + M[8] * z];
}

// --- helpers ---

/** Nearest-image assignment of g·ring_i to ring j, greedy on the global cost order (exact when near symmetric). */
function matchRings(rings: readonly Ring[], M: Mat3, origin: Vec3, label: string): { perm: number[]; sign: number[] } {
  const n = rings.length;
  const images = rings.map((ring) => applyElement(ring, M, origin));
  const costs: { i: number; j: number; cost: number; sign: number }[] = [];
  for (let i = 0; i < n; i++) {
    const a = images[i]!;
    for (let j = 0; j < n; j++) {
      const b = rings[j]!;
      const scale = Math.max(a.radius, b.radius);
      if (Math.abs(a.radius - b.radius) > RADIUS_REL_TOL * scale) continue;
      const dc2 = (a.center[0] - b.center[0]) ** 2 + (a.center[1] - b.center[1]) ** 2 + (a.center[2] - b.center[2]) ** 2;
      const dot = a.normal[0] * b.normal[0] + a.normal[1] * b.normal[1] + a.normal[2] * b.normal[2];
      costs.push({ i, j, cost: dc2 + b.radius * b.radius * 2 * (1 - Math.abs(dot)), sign: dot >= 0 ? 1 : -1 });
    }
  }
  costs.sort((x, y) => x.cost - y.cost);
  const perm = new Array<number>(n).fill(-1), sign = new Array<number>(n).fill(1);
  const taken = new Array<boolean>(n).fill(false);
  for (const { i, j, sign: s } of costs) {
    if (perm[i] !== -1 || taken[j]) continue;
    perm[i] = j;
    sign[i] = s;
    taken[j] = true;
  }
  const lost = perm.indexOf(-1);
  if (lost !== -1) throw notSymmetric(rings, label, `ring ${rings[lost]!.name} has no image of equal radius`);
  return { perm, sign };
}

/** (a ∘ b): first b, then a; signs multiply along the way. */
function compose(pa: number[], sa: number[], pb: number[], sb: number[]): { perm: number[]; sign: number[] } {
  const perm = pb.map((j) => pa[j]!);
  const sign = pb.map((j, i) => sa[j]! * sb[i]!);
  return { perm, sign };
}

function notSymmetric(rings: readonly Ring[], label: string, why: string): InputError {
  return new InputError(
    `symmetry ${label}: the ${rings.length} rings are not arranged with this symmetry (${why}); ` +
      `arrange them symmetrically about the axis or use --symmetry none`,
  );
}

function isIdentity(p: number[]): boolean {
  return p.every((j, i) => j === i);
}

function range(n: number): number[] {
  return Array.from({ length: n }, (_, i) => i);
}

function unit(v: ArrayLike<number>): Vec3 {
  const l = Math.hypot(v[0]!, v[1]!, v[2]!);
  return [v[0]! / l, v[1]! / l, v[2]! / l];
}

function copyRing(ring: Ring): Ring {
  const out: Ring = {
    name: ring.name,
    center: [ring.center[0], ring.center[1], ring.center[2]],
    normal: [ring.normal[0], ring.normal[1], ring.normal[2]],
    radius: ring.radius,
  };
  if (ring.tube !== undefined) out.tube = ring.tube;
  return out;
}
