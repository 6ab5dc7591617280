// The catalogue of named links of round rings: `hopf`, `chain:N`, `necklace:N`, `star:K`, `torus:N`.
// Each spec generates a feasible starting pose (rings apart, linked as intended, centred on the
// origin) arranged so that its natural rotation group fixes the z axis through the origin, which is
// the axis `--symmetry cyclic:N|dihedral:N` refers to. Where a group is dihedral, its 2-fold axes
// perpendicular to z include the x axis.
import { linkingMatrix } from '../topology/index.js';
import { InputError } from './errors.js';
import { layoutFromRings } from './layout.js';
import type { Layout, Ring, Symmetry, Vec3 } from './types.js';

export type CatalogFamily = 'hopf' | 'chain' | 'necklace' | 'star' | 'torus';

export interface KnownOptimum {
  /** Common tube radius over the core radius at the optimum (dimensionless), equal radii. */
  tubeOverCore: number;
  formula: string;
  source: string;
}

export interface CatalogEntry {
  family: CatalogFamily;
  /** Spec pattern as typed on the command line, e.g. "chain:N". */
  spec: string;
  example: string;
  description: string;
  /** Number of rings, e.g. "2", "N", "K + 1". */
  rings: string;
  /** Which pairs are linked (each linked pair once, |linking number| = 1). */
  linking: string;
  /** Natural rotation group of the generated layout (equal radii), about the z axis. */
  symmetry: string;
  knownOptimum: KnownOptimum | null;
}

export interface CatalogSpec {
  family: CatalogFamily;
  /** N or K; 2 for hopf. */
  n: number;
  /** Canonical text, e.g. "chain:3". */
  text: string;
}

/**
 * Largest count accepted (chains and necklaces): the pair scan and the independent check cost O(N) per pass
 * for such sparse links (bench/scan.ts), and the result file and the dense linking matrix of 256 rings stay
 * small (a 256 x 256 matrix is 64 k entries). Stars and torus links, whose rings all meet one ring or each
 * other, stay at MAX_DENSE_RINGS: their linked pairs grow like N or N².
 */
export const MAX_CATALOG_RINGS = 256;
/** Largest K of star:K and N of torus:N. */
export const MAX_DENSE_RINGS = 64;

const HOPF: KnownOptimum = {
  tubeOverCore: 1 / 2,
  formula: 'R/2',
  source: 'Cantarella, Kusner, Sullivan, Invent. Math. 150 (2002): the tight Hopf link is two round circles, each through the other\'s centre',
};
const CHAIN: KnownOptimum = {
  tubeOverCore: 1 / 3,
  formula: 'R/3',
  source: 'circle-packing bound for k = 2 rings through one ring (packing radius 1/2, Graham et al., Discrete Math. 181, 1998), attained by the flat alternating chain',
};

/** The catalogue as a table, for `thickring catalog`. */
export function catalogEntries(): CatalogEntry[] {
  return [
    {
      family: 'hopf', spec: 'hopf', example: 'hopf',
      description: 'Two linked rings (the Hopf link).',
      rings: '2', linking: 'A–B',
      symmetry: 'dihedral:2 (2-fold axis z swaps the rings; 2-fold axis x maps each ring to itself)',
      knownOptimum: HOPF,
    },
    {
      family: 'chain', spec: 'chain:N', example: 'chain:3',
      description: 'Open chain of N >= 2 rings, each linked to the next; planes alternate (2-in-1 chain).',
      rings: 'N', linking: 'ring i with ring i+1',
      symmetry: 'dihedral:2 (2-fold axis z reverses the chain; 2-fold axis x is the chain axis)',
      knownOptimum: { ...CHAIN, formula: 'R/3 (R/2 for N = 2)' },
    },
    {
      family: 'necklace', spec: 'necklace:N', example: 'necklace:6',
      description: 'Closed chain of N >= 3 rings, each linked to its two neighbours; necklace:3 is the (3,3) torus link.',
      rings: 'N', linking: 'ring i with ring i+1 and ring N with ring 1',
      symmetry: 'even N: dihedral:N/2 about z (flat and upright rings alternate; 2-fold axis x through ring A); ' +
        'N = 3: dihedral:3; odd N >= 5: cyclic:2 about z (z through ring A\'s centre and the necklace centre)',
      knownOptimum: null,
    },
    {
      family: 'star', spec: 'star:K', example: 'star:3',
      description: 'One ring with K >= 2 rings through it that are not linked to each other; star:2 is chain:3.',
      rings: 'K + 1', linking: 'ring A with each other ring',
      symmetry: 'dihedral:K about z (ring A flat in the xy plane; 2-fold axis x through ring B)',
      knownOptimum: null,
    },
    {
      family: 'torus', spec: 'torus:N', example: 'torus:3',
      description: 'N >= 2 pairwise-linked rings: N Hopf fibres projected stereographically, the (N,N) torus link.',
      rings: 'N', linking: 'every pair',
      symmetry: 'dihedral:N about z (2-fold axis x through ring A)',
      knownOptimum: null,
    },
  ];
}

/** Known optimum of a parsed spec with equal radii, or null when none is published. */
export function knownOptimum(spec: CatalogSpec): KnownOptimum | null {
  if (spec.family === 'hopf') return HOPF;
  if (spec.family === 'chain') return spec.n === 2 ? HOPF : CHAIN;
  if (spec.family === 'torus' && spec.n === 2) return HOPF;
  // star:2 is the 3-ring chain.
  if (spec.family === 'star' && spec.n === 2) return CHAIN;
  return null;
}

/**
 * Rotation group of the generated start with equal radii, about the z axis through the origin (for
 * dihedral groups the first 2-fold axis is x, as in src/model/symmetry.ts).
 */
export function naturalSymmetry(spec: CatalogSpec): Symmetry {
  const z = (type: 'cyclic' | 'dihedral', order: number): Symmetry => ({ type, order, axis: [0, 0, 1], origin: [0, 0, 0] });
  switch (spec.family) {
    case 'hopf':
    case 'chain':
      return z('dihedral', 2);
    case 'necklace':
      if (spec.n === 3) return z('dihedral', 3);
      return spec.n % 2 === 0 ? z('dihedral', spec.n / 2) : z('cyclic', 2);
    case 'star':
    case 'torus':
      return z('dihedral', spec.n);
  }
}

const FAMILIES: Record<CatalogFamily, { min: number; max: number; takesN: boolean }> = {
  hopf: { min: 2, max: 2, takesN: false },
  chain: { min: 2, max: MAX_CATALOG_RINGS, takesN: true },
  necklace: { min: 3, max: MAX_CATALOG_RINGS, takesN: true },
  star: { min: 2, max: MAX_DENSE_RINGS, takesN: true },
  torus: { min: 2, max: MAX_DENSE_RINGS, takesN: true },
};

const VALID = 'hopf, chain:N (N >= 2), necklace:N (N >= 3), star:K (K >= 2), torus:N (N >= 2), weave:NAME (weaves, see thickring catalog)';

/** True when the text names a catalogue family (possibly with a bad N), so it is not a file path. */
export function looksLikeCatalogSpec(text: string): boolean {
  const family = text.split(':')[0]!.trim().toLowerCase();
  return family in FAMILIES && !/[\\/.]/.test(text);
}

/** Parse a catalogue spec; throws InputError naming the spec and the valid ones. */
export function parseCatalogSpec(text: string): CatalogSpec {
  const m = /^\s*([a-z]+)(?::\s*([^\s]*))?\s*$/i.exec(text);
  const family = m?.[1]?.toLowerCase();
  if (family === 'borromean' || family === 'borromean-rings') {
    throw new InputError(
      `spec '${text}': round rings cannot form the Borromean rings (Freedman & Skora 1987; Lindström & Zetterström 1991); ` +
        `use one of ${VALID}`,
    );
  }
  if (!m || family === undefined || !(family in FAMILIES)) {
    throw new InputError(`spec '${text}' is not in the catalogue: use one of ${VALID}, or give a layout file`);
  }
  const f = family as CatalogFamily;
  const info = FAMILIES[f];
  if (!info.takesN) {
    if (m[2] !== undefined) throw new InputError(`spec '${text}': ${f} takes no count; write '${f}' (valid specs: ${VALID})`);
    return { family: f, n: 2, text: f };
  }
  const raw = m[2];
  if (raw === undefined || raw === '') {
    throw new InputError(`spec '${text}': ${f} needs a count, e.g. '${f}:${info.min + 1}' (valid specs: ${VALID})`);
  }
  const n = Number(raw);
  if (!/^\d+$/.test(raw) || !Number.isInteger(n) || n < info.min || n > info.max) {
    throw new InputError(
      `spec '${text}': count '${raw}' must be a whole number from ${info.min} to ${info.max} for ${f} (valid specs: ${VALID})`,
    );
  }
  return { family: f, n, text: `${f}:${n}` };
}

/** Number of rings a spec generates. */
export function ringCount(spec: CatalogSpec): number {
  return spec.family === 'star' ? spec.n + 1 : spec.n;
}

/** Intended |linking number| of every pair (1 = linked once, 0 = unlinked). */
export function linkingPattern(spec: CatalogSpec): number[][] {
  const n = ringCount(spec);
  const m = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const link = (i: number, j: number): void => { m[i]![j] = 1; m[j]![i] = 1; };
  switch (spec.family) {
    case 'hopf':
    case 'chain':
      for (let i = 0; i + 1 < n; i++) link(i, i + 1);
      break;
    case 'necklace':
      for (let i = 0; i < n; i++) link(i, (i + 1) % n);
      break;
    case 'star':
      for (let j = 1; j < n; j++) link(0, j);
      break;
    case 'torus':
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) link(i, j);
      break;
  }
  return m;
}

/**
 * Starting layout of a catalogue spec. `radii` gives core radii: one value for all rings or one per
 * ring (default 1). Throws InputError for an unknown spec, bad radii, or radii so unequal that the
 * generated pose would not be the intended link.
 */
export function catalogLayout(specText: string, radii?: number[]): Layout {
  const spec = parseCatalogSpec(specText);
  const n = ringCount(spec);
  const r = expandRadii(spec, radii);
  const centers: Vec3[] = [];
  const normals: Vec3[] = [];
  switch (spec.family) {
    case 'hopf':
    case 'chain':
      chainPose(r, centers, normals);
      break;
    case 'necklace':
      if (n === 3) torusPose(n, mean(r), centers, normals);
      else if (n % 2 === 0) alternatingNecklacePose(n, mean(r), centers, normals);
      else twistedNecklacePose(n, mean(r), centers, normals);
      break;
    case 'star':
      starPose(r, centers, normals);
      break;
    case 'torus':
      torusPose(n, mean(r), centers, normals);
      break;
  }
  const scale = Math.max(...r);
  const rings: Ring[] = centers.map((c, i) => ({
    name: ringName(i, n),
    center: c.map((x) => clean(x, scale)) as Vec3,
    normal: normals[i]!.map((x) => clean(x, 1)) as Vec3,
    radius: r[i]!,
  }));
  const source = `catalogue spec ${spec.text}`;
  let layout: Layout;
  try {
    layout = layoutFromRings(rings, {}, source);
  } catch (e) {
    throw radii ? new InputError(`--radii ${radii.join(',')}: too unequal for ${spec.text}, the generated rings would meet (${(e as Error).message}); use closer radii or a layout file`) : e;
  }
  checkIntendedLink(spec, layout, radii);
  return layout;
}

/** Ring names: A, B, ... Z for up to 26 rings, else R1, R2, ... */
export function ringName(i: number, n: number): string {
  return n <= 26 ? String.fromCharCode(65 + i) : `R${i + 1}`;
}

// ---- poses ---------------------------------------------------------------------------------------

/**
 * Open chain along x, neighbours 0.75 (R_i + R_{i+1}) apart (linked needs < R_i + R_{i+1}; rings two
 * apart share a plane and need > their radii's mean), planes alternating at right angles.
 * Odd N: normals z and y with the middle ring flat, so the 2-fold axis z maps ring i to ring N-1-i.
 * Even N: normals (0, ±1, 1)/√2, for the same reason.
 */
function chainPose(r: number[], centers: Vec3[], normals: Vec3[]): void {
  const n = r.length;
  const x = [0];
  for (let i = 0; i + 1 < n; i++) x.push(x[i]! + 0.75 * (r[i]! + r[i + 1]!));
  const shift = (x[0]! + x[n - 1]!) / 2;
  const mid = (n - 1) / 2;
  const h = Math.SQRT1_2;
  for (let i = 0; i < n; i++) {
    centers.push([x[i]! - shift, 0, 0]);
    if (n % 2 === 1) normals.push((i - mid) % 2 === 0 ? [0, 0, 1] : [0, 1, 0]);
    else normals.push(i % 2 === 0 ? [0, h, h] : [0, -h, h]);
  }
}

/**
 * Even necklace: flat rings (normal z) at even positions on a circle of radius ρ_h, upright rings
 * (normal radial) at odd positions on radius ρ_v. Consecutive flat rings are 2L = 2.5R apart (gap
 * R/2); each upright ring crosses the plane z = 0 at depth R/2 inside its flat neighbours' disks.
 */
function alternatingNecklacePose(n: number, R: number, centers: Vec3[], normals: Vec3[]): void {
  const g = (2 * Math.PI) / n;
  const L = 1.25 * R;
  const depthOffset = (Math.sqrt(3) / 4) * R;
  const rhoFlat = L / Math.sin(g);
  const rhoUpright = rhoFlat * Math.cos(g) + depthOffset;
  for (let k = 0; k < n; k++) {
    const th = g * k, c = Math.cos(th), s = Math.sin(th);
    const rho = k % 2 === 0 ? rhoFlat : rhoUpright;
    centers.push([rho * c, rho * s, 0]);
    normals.push(k % 2 === 0 ? [0, 0, 1] : [c, s, 0]);
  }
}

/**
 * Odd necklace (N >= 5): rings on a circle, each plane containing the tangent and turned about it by
 * k·ψ with ψ = π(N-1)/(2N), so neighbours meet at nearly right angles and the turn closes up after
 * N rings (Nψ is a multiple of π). The 2-fold rotation about ring A's radial axis maps ring k to
 * ring N-k; the pose is rotated so that axis is z. Neighbour spacing 1.0R (N = 5) or 1.3R gave
 * the largest clearances in a scan of spacings 1.0R..1.4R for N = 5..21.
 */
function twistedNecklacePose(n: number, R: number, centers: Vec3[], normals: Vec3[]): void {
  const psi = (Math.PI * (n - 1)) / (2 * n);
  const chord = (n === 5 ? 1.0 : 1.3) * R;
  const rho = chord / (2 * Math.sin(Math.PI / n));
  // (x, y, z) -> (y, z, x) is a proper rotation taking the x axis to z.
  const turn = (v: Vec3): Vec3 => [v[1], v[2], v[0]];
  for (let k = 0; k < n; k++) {
    const th = (2 * Math.PI * k) / n, c = Math.cos(th), s = Math.sin(th);
    const ph = k * psi;
    centers.push(turn([rho * c, rho * s, 0]));
    normals.push(turn([Math.sin(ph) * c, Math.sin(ph) * s, Math.cos(ph)]));
  }
}

/**
 * Star: ring A flat at the origin; ring j+1 upright in the plane through z at angle 2πj/K, crossing
 * A's disk at distance R_A/2 from A's centre and leaving through the outside of A.
 */
function starPose(r: number[], centers: Vec3[], normals: Vec3[]): void {
  const k = r.length - 1;
  const a = r[0]! / 2;
  centers.push([0, 0, 0]);
  normals.push([0, 0, 1]);
  for (let j = 0; j < k; j++) {
    const th = (2 * Math.PI * j) / k, c = Math.cos(th), s = Math.sin(th);
    const rho = a + r[j + 1]!;
    centers.push([rho * c, rho * s, 0]);
    normals.push([-s, c, 0]);
  }
}

/** Latitude of the Hopf fibres on S³ (|z1| = cos η); 0.55 rad maximised the clearance for N = 2..8. */
const FIBRE_ETA = 0.55;

/**
 * N fibres of the Hopf fibration S³ → S² over equally spaced points of one latitude, projected
 * stereographically from (0,0,0,1): round, pairwise linked circles. Fibre k is
 * (cos η e^{it}, sin η e^{i(t+β_k)}) with β_k = π/2 − 2πk/N; multiplying z1 by a phase rotates
 * R³ about z and shifts β, so fibre k is fibre 0 turned by 2πk/N about z, and (x1,x2,x3) →
 * (x1,−x2,−x3) sends β to π − β, a 2-fold axis x through fibre 0.
 */
function torusPose(n: number, R: number, centers: Vec3[], normals: Vec3[]): void {
  for (let k = 0; k < n; k++) {
    const beta = Math.PI / 2 - (2 * Math.PI * k) / n;
    const pts = [0, 1, 2].map((q) => {
      const t = (2 * Math.PI * q) / 3;
      const x1 = Math.cos(FIBRE_ETA) * Math.cos(t), x2 = Math.cos(FIBRE_ETA) * Math.sin(t);
      const x3 = Math.sin(FIBRE_ETA) * Math.cos(t + beta), x4 = Math.sin(FIBRE_ETA) * Math.sin(t + beta);
      return [x1 / (1 - x4), x2 / (1 - x4), x3 / (1 - x4)] as Vec3;
    });
    const circle = circleThrough(pts[0]!, pts[1]!, pts[2]!);
    const s = R / circle.radius;
    centers.push([circle.center[0] * s, circle.center[1] * s, circle.center[2] * s]);
    normals.push(circle.normal);
  }
}

// ---- helpers -------------------------------------------------------------------------------------

function expandRadii(spec: CatalogSpec, radii: number[] | undefined): number[] {
  const n = ringCount(spec);
  if (radii === undefined || radii.length === 0) return new Array<number>(n).fill(1);
  radii.forEach((x) => {
    if (!(Number.isFinite(x) && x > 0)) throw new InputError(`--radii: ${x} must be a number > 0; give core radii like 1 or 1,1.5,1`);
  });
  if (radii.length === 1) return new Array<number>(n).fill(radii[0]!);
  if (radii.length !== n) {
    throw new InputError(`--radii: got ${radii.length} values but ${spec.text} has ${n} rings; give one value for all rings or ${n} values`);
  }
  return radii.slice();
}

function checkIntendedLink(spec: CatalogSpec, layout: Layout, radii: number[] | undefined): void {
  const got = linkingMatrix(layout.rings);
  const want = linkingPattern(spec);
  for (let i = 0; i < got.length; i++) {
    for (let j = i + 1; j < got.length; j++) {
      if (Math.abs(got[i]![j]!) !== want[i]![j]) {
        const names = `${layout.rings[i]!.name} and ${layout.rings[j]!.name}`;
        const why = want[i]![j] ? 'are not linked' : 'are linked but should not be';
        const fix = radii ? `--radii ${radii.join(',')} is too unequal for ${spec.text}; use closer radii or a layout file` : 'please report this as a bug';
        throw new InputError(`${spec.text}: generated rings ${names} ${why}; ${fix}`);
      }
    }
  }
}

function circleThrough(p: Vec3, q: Vec3, r: Vec3): { center: Vec3; normal: Vec3; radius: number } {
  const a: Vec3 = [q[0] - p[0], q[1] - p[1], q[2] - p[2]];
  const b: Vec3 = [r[0] - p[0], r[1] - p[1], r[2] - p[2]];
  const n = cross(a, b);
  const nn = dot(n, n);
  // Circumcentre offset from p: (|b|² (n × a) + |a|² (b × n)) / (2 |n|²).
  const na = cross(n, a), bn = cross(b, n);
  const aa = dot(a, a), bb = dot(b, b);
  const off: Vec3 = [0, 1, 2].map((i) => (bb * na[i]! + aa * bn[i]!) / (2 * nn)) as Vec3;
  const l = Math.sqrt(nn);
  return {
    center: [p[0] + off[0], p[1] + off[1], p[2] + off[2]],
    normal: [n[0] / l, n[1] / l, n[2] / l],
    radius: Math.hypot(off[0], off[1], off[2]),
  };
}

const cross = (a: Vec3, b: Vec3): Vec3 => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
const dot = (a: Vec3, b: Vec3): number => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
const mean = (xs: number[]): number => xs.reduce((s, x) => s + x, 0) / xs.length;

/** Coordinates below this times the scale are round-off residue of an exact 0 (noise in files). */
const ROUNDOFF_REL = 1e-14;

function clean(x: number, scale: number): number {
  return Math.abs(x) < ROUNDOFF_REL * scale ? 0 : x;
}
