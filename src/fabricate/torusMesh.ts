// Triangle meshes of tori with a chord tolerance: vertices lie on the exact surface, and segment
// counts around the core and around the tube keep every sagitta (chord height) <= the tolerance.
import { InputError } from '../model/errors.js';
import { cross, normalize, planeBasis } from '../model/vec.js';

export interface Torus {
  name: string;
  center: ArrayLike<number>;
  normal: ArrayLike<number>;
  /** Core radius R. */
  radius: number;
  /** Tube radius r (0 < r <= R). */
  tube: number;
}

/** One closed body: xyz per vertex, three vertex indices per triangle (counter-clockwise seen from outside). */
export interface MeshBody {
  name: string;
  positions: Float64Array;
  triangles: Uint32Array;
}

export interface Segments {
  /** Segments around the core circle (u direction). */
  core: number;
  /** Segments around the tube (v direction). */
  tube: number;
}

/** Fewer segments than this cannot close a polygon that encloses volume. */
const MIN_SEGMENTS = 3;
/**
 * Default largest mesh (triangles over all bodies) built in one run; --max-triangles raises it. Building and
 * checking 375,000 triangles took ~37 s and 1.1 million ~170 s on the 2-core test machine, so a tolerance
 * far below the default chord is refused up front with the estimate rather than left running.
 */
export const MAX_TRIANGLES = 500_000;
/**
 * Largest --max-triangles accepted: the mesh check keys every directed edge of a body in one Map, which
 * holds at most 2^24 entries (3 per triangle), so no body may pass ~5.5 million triangles.
 */
export const MAX_TRIANGLES_HARD = 5_000_000;

/**
 * Smallest segment count n with sagitta rho (1 - cos(pi / n)) <= chord for a circle of radius rho.
 */
export function segmentsForChord(rho: number, chord: number): number {
  if (chord >= rho) return MIN_SEGMENTS;
  const n = Math.ceil(Math.PI / Math.acos(1 - chord / rho));
  return Math.max(MIN_SEGMENTS, n);
}

/** Segment counts of one torus: the outer equator (radius R + r) is the widest circle around the core. */
export function torusSegments(radius: number, tube: number, chord: number): Segments {
  return { core: segmentsForChord(radius + tube, chord), tube: segmentsForChord(tube, chord) };
}

/** The text of --max-triangles as a whole number from 1 to MAX_TRIANGLES_HARD; InputError otherwise. */
export function parseMaxTriangles(text: string): number {
  const n = Number(text);
  if (!/^\s*\d+\s*$/.test(text) || !(n >= 1 && n <= MAX_TRIANGLES_HARD)) {
    throw new InputError(`--max-triangles '${text}' must be a whole number from 1 to ${MAX_TRIANGLES_HARD} (for example --max-triangles 2000000)`);
  }
  return n;
}

/** Triangles the meshes of `tori` at this chord would have, from the segment counts alone (nothing is built). */
export function estimateTriangles(tori: readonly Torus[], chord: number): number {
  let total = 0;
  for (const t of tori) {
    const s = torusSegments(t.radius, t.tube, chord);
    total += 2 * s.core * s.tube;
  }
  return total;
}

/** Check the total size before building anything; throws InputError naming the fix. */
export function checkMeshBudget(tori: readonly Torus[], chord: number, maxTriangles = MAX_TRIANGLES): number {
  if (!(Number.isFinite(chord) && chord > 0)) throw new InputError(`--chord ${chord} must be > 0 (mm)`);
  if (!(Number.isInteger(maxTriangles) && maxTriangles >= 1 && maxTriangles <= MAX_TRIANGLES_HARD)) {
    throw new InputError(`--max-triangles ${maxTriangles} must be a whole number from 1 to ${MAX_TRIANGLES_HARD}`);
  }
  const total = estimateTriangles(tori, chord);
  if (total > maxTriangles) {
    const need = Number.isFinite(total) ? String(total) : 'more than 1e300';
    const raise = maxTriangles < MAX_TRIANGLES_HARD && total <= MAX_TRIANGLES_HARD
      ? `, or allow it with --max-triangles ${total}` : ` (at most ${MAX_TRIANGLES_HARD} can be allowed)`;
    throw new InputError(`--chord ${chord} mm would need ${need} triangles, above the limit of ${maxTriangles}: use a larger chord tolerance${raise}`);
  }
  return total;
}

/**
 * Mesh a torus: P(u, v) = c + (R + r cos v)(cos u e1 + sin u e2) + r sin v n with (e1, e2) =
 * planeBasis(n), so u is the angle around the core used everywhere else in thickring.
 */
export function torusMesh(t: Torus, chord: number): MeshBody {
  const s = torusSegments(t.radius, t.tube, chord);
  return torusMeshWithSegments(t, s);
}

export function torusMeshWithSegments(t: Torus, s: Segments): MeshBody {
  const n = normalize(t.normal);
  const [e1, e2] = planeBasis(n);
  // Outward orientation needs (e1, e2, axis) right-handed; take the axis from the basis itself.
  const ax = cross(e1, e2);
  const nu = s.core, nv = s.tube;
  const positions = new Float64Array(nu * nv * 3);
  const cu = new Float64Array(nu), su = new Float64Array(nu);
  for (let i = 0; i < nu; i++) {
    cu[i] = Math.cos((2 * Math.PI * i) / nu);
    su[i] = Math.sin((2 * Math.PI * i) / nu);
  }
  const cx = t.center[0]!, cy = t.center[1]!, cz = t.center[2]!;
  for (let j = 0; j < nv; j++) {
    const v = (2 * Math.PI * j) / nv;
    const rho = t.radius + t.tube * Math.cos(v);
    const h = t.tube * Math.sin(v);
    for (let i = 0; i < nu; i++) {
      const k = 3 * (j * nu + i);
      const dx = cu[i]!, dy = su[i]!;
      positions[k] = cx + rho * (dx * e1[0] + dy * e2[0]) + h * ax[0];
      positions[k + 1] = cy + rho * (dx * e1[1] + dy * e2[1]) + h * ax[1];
      positions[k + 2] = cz + rho * (dx * e1[2] + dy * e2[2]) + h * ax[2];
    }
  }
  // Quad (i, j) -> (i+1, j) -> (i+1, j+1) -> (i, j+1) is counter-clockwise in (u, v), and
  // P_u x P_v points outward, so both triangles face out.
  const triangles = new Uint32Array(nu * nv * 6);
  let w = 0;
  for (let j = 0; j < nv; j++) {
    const j1 = (j + 1) % nv;
    for (let i = 0; i < nu; i++) {
      const i1 = (i + 1) % nu;
      const a = j * nu + i, b = j * nu + i1, c = j1 * nu + i1, d = j1 * nu + i;
      triangles[w++] = a; triangles[w++] = b; triangles[w++] = c;
      triangles[w++] = a; triangles[w++] = c; triangles[w++] = d;
    }
  }
  return { name: t.name, positions, triangles };
}
