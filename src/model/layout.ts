// The layout file (format 'thickring-layout/1'): parse and validate untrusted JSON into a Layout.
// Every failure is an InputError whose one line names the ring, the field, the value and the fix.
import { ringDistance } from '../kernel/index.js';
import { InputError } from './errors.js';
import { MAX_LATTICE_REACH, latticeReach, nearRingPairs } from './ringPairs.js';
import type { Lattice, Layout, Ring, Symmetry, SymmetryType, Vec3 } from './types.js';
import { displayName } from './displayName.js';
import { MAX_SYMMETRY_ORDER } from './symmetry.js';
import {
  MIN_RADIUS_REL, fail, isPlainObject, readDirection, readFinite, readName, readObject, readPositive, readVec3,
  readPlainText, rejectUnknownKeys, show, type Where,
} from './validate.js';

export const LAYOUT_FORMAT = 'thickring-layout/1';

/**
 * Core circles closer than this times the larger radius of the pair count as intersecting: no tube
 * can fit, and below it the kernel's distance is rounding noise.
 */
export const INTERSECT_REL_TOL = 1e-7;

/** Two lattice vectors whose sine of angle is below this are parallel (dimensionless). */
export const PARALLEL_SIN_TOL = 1e-9;

/**
 * Most rings a layout file may hold. measure takes ~1.2 s and ~190 MB peak RSS at this size (bench/memory.ts);
 * the broad phase keeps its work near-linear, but output and parsing grow with the count.
 */
export const MAX_LAYOUT_RINGS = 10000;
/**
 * Most rings that inflate and compare take from a layout file, as many as the largest catalogue link
 * (chain:256): the SQP step is sparse (chain:128 takes about 8 s), but the certificate is still dense.
 */
export const MAX_SOLVE_RINGS = 256;
/** Most rings in one repeating cell of a weave: its pair search over lattice images grows with the square of the cell. */
export const MAX_CELL_RINGS = 64;

const TOP_KEYS = ['format', 'units', 'rings', 'symmetry', 'lattice', 'description', '$schema'] as const;
const RING_KEYS = ['name', 'center', 'normal', 'radius', 'tube'] as const;
const SYMMETRY_KEYS = ['type', 'order', 'axis', 'origin'] as const;
const SYMMETRY_TYPES: readonly SymmetryType[] = ['none', 'cyclic', 'dihedral'];

/**
 * Validate `data` (parsed JSON) as a layout. `source` names the file in messages.
 * Normals, the symmetry axis are returned with unit length; optional keys absent stay absent.
 */
export function parseLayout(data: unknown, source: string): Layout {
  const top: Where = { owner: 'layout', source };
  if (!isPlainObject(data)) {
    fail(top, `must be a JSON object (got ${Array.isArray(data) ? 'an array' : show(data)})`,
      `write { "format": "${LAYOUT_FORMAT}", "rings": [ ... ] }`);
  }
  if (data.format !== LAYOUT_FORMAT) {
    const got = data.format === undefined ? 'it is missing' : `got ${show(data.format)}`;
    fail(top, `format must be "${LAYOUT_FORMAT}" (${got})`, `add "format": "${LAYOUT_FORMAT}" at the top level`);
  }
  rejectUnknownKeys(data, TOP_KEYS, top);
  if (data.$schema !== undefined && typeof data.$schema !== 'string') {
    fail(top, `$schema must be a string such as a schema URL (got ${show(data.$schema)})`, 'write "$schema" as text or leave it out');
  }
  const layout: Layout = { format: LAYOUT_FORMAT, rings: parseRings(data.rings, source) };
  if (data.units !== undefined) {
    if (typeof data.units !== 'string' || data.units.trim() === '') {
      fail(top, `units must be a non-empty string such as "mm" (got ${show(data.units)})`, 'write "units": "mm" or leave units out');
    }
    readPlainText(data.units, top, 'units', 'write "units": "mm" or leave units out');
    layout.units = data.units;
  }
  if (data.description !== undefined && typeof data.description !== 'string') {
    fail(top, `description must be a string (got ${show(data.description)})`, 'write it as text or leave it out');
  }
  if (data.symmetry !== undefined) layout.symmetry = parseSymmetry(data.symmetry, source);
  if (data.lattice !== undefined) layout.lattice = parseLattice(data.lattice, source);
  // A weave cell meets the copies of every ring in the cells around it: that work grows with the square of the cell.
  if (layout.lattice && layout.rings.length > MAX_CELL_RINGS) {
    fail(top, `a layout with a lattice has ${layout.rings.length} rings in its cell, more than ${MAX_CELL_RINGS}`, 'give one repeating cell of the weave');
  }
  checkRadiusScale(layout, source);
  checkLatticeReach(layout, source);
  checkNoIntersections(layout, source);
  return layout;
}

/** inflate and compare: refuse layouts above MAX_SOLVE_RINGS rings (measure takes up to MAX_LAYOUT_RINGS). */
export function checkSolveSize(layout: Layout, source: string): void {
  const n = layout.rings.length;
  if (n > MAX_SOLVE_RINGS) {
    fail({ owner: 'layout', source }, `has ${n} rings; inflate and compare solve at most ${MAX_SOLVE_RINGS}`,
      `solve a part of at most ${MAX_SOLVE_RINGS} rings (thickring measure takes up to ${MAX_LAYOUT_RINGS})`);
  }
}

/** Build and validate a layout from rings made in code (catalogue, tests); throws InputError like parseLayout. */
export function layoutFromRings(
  rings: readonly Ring[],
  extras: { units?: string; symmetry?: Symmetry; lattice?: Lattice } = {},
  source = 'generated layout',
): Layout {
  return parseLayout({ format: LAYOUT_FORMAT, ...extras, rings }, source);
}

/** Ring label for messages: its name when it has a usable one, else its position. */
function ringLabel(raw: unknown, index: number): string {
  if (isPlainObject(raw) && typeof raw.name === 'string' && raw.name.trim() !== '') return `ring ${displayName(raw.name.length > 40 ? `${raw.name.slice(0, 37)}...` : raw.name)}`;
  return `ring #${index + 1}`;
}

function parseRings(v: unknown, source: string): Ring[] {
  const top: Where = { owner: 'layout', source };
  if (!Array.isArray(v)) {
    fail(top, `rings must be an array of ring objects (got ${show(v)})`,
      'write "rings": [ { "name": "A", "center": [0,0,0], "normal": [0,0,1], "radius": 1 } ]');
  }
  if (v.length === 0) fail(top, 'rings is empty', 'list at least one ring');
  if (v.length > MAX_LAYOUT_RINGS) {
    fail(top, `rings has ${v.length} entries, more than the ${MAX_LAYOUT_RINGS} a layout may hold`, 'split the layout into parts');
  }
  const rings = v.map((raw, index) => parseRing(raw, index, source));
  const seen = new Map<string, number>();
  rings.forEach((r, index) => {
    const first = seen.get(r.name);
    if (first !== undefined) {
      fail({ owner: `ring ${displayName(r.name)}`, source }, `name ${show(r.name)} is used by rings #${first + 1} and #${index + 1}`,
        'give every ring a different name');
    }
    seen.set(r.name, index);
  });
  return rings;
}

function parseRing(raw: unknown, index: number, source: string): Ring {
  const at: Where = { owner: ringLabel(raw, index), source };
  const obj = readObject(raw, at, 'the ring', '{ "name": "A", "center": [0,0,0], "normal": [0,0,1], "radius": 1 }');
  rejectUnknownKeys(obj, RING_KEYS, at);
  const name = readName(obj.name, at, 'name');
  const center = readVec3(obj.center, at, 'center');
  const normal = readDirection(obj.normal, at, 'normal');
  const radius = readPositive(obj.radius, at, 'radius', 'core radius (centre of the wire to the ring centre)');
  const ring: Ring = { name, center, normal, radius };
  if (obj.tube !== undefined) {
    const tube = readPositive(obj.tube, at, 'tube', 'tube (wire) radius');
    // A tube wider than the core radius overlaps itself through the ring's centre (thickness <= R).
    if (tube > radius) {
      fail(at, `tube ${show(tube)} must be <= radius ${show(radius)}`, 'make the tube no thicker than the core radius, or leave tube out');
    }
    ring.tube = tube;
  }
  return ring;
}

function parseSymmetry(v: unknown, source: string): Symmetry {
  const at: Where = { owner: 'symmetry', source };
  const obj = readObject(v, at, 'symmetry', '{ "type": "cyclic", "order": 3, "axis": [0,0,1], "origin": [0,0,0] }');
  rejectUnknownKeys(obj, SYMMETRY_KEYS, at);
  if (typeof obj.type !== 'string' || !SYMMETRY_TYPES.includes(obj.type as SymmetryType)) {
    fail(at, `type must be one of ${SYMMETRY_TYPES.join(', ')} (got ${show(obj.type)})`, 'write "type": "cyclic" (or "dihedral", "none")');
  }
  const type = obj.type as SymmetryType;
  let order = 1;
  if (obj.order !== undefined || type !== 'none') {
    const o = readFinite(obj.order, at, 'order');
    if (!Number.isInteger(o) || o < 1) fail(at, `order ${show(o)} must be a whole number >= 1`, 'give the number of rotations, e.g. 3');
    // The group is built element by element: an order of 10^9 would exhaust memory.
    if (o > MAX_SYMMETRY_ORDER) fail(at, `order ${show(o)} is above ${MAX_SYMMETRY_ORDER}`, `give an order from 1 to ${MAX_SYMMETRY_ORDER}`);
    if (type === 'none' && o !== 1) fail(at, `order ${o} does not go with type "none"`, 'use order 1 or type "cyclic"');
    order = o;
  }
  const axis: Vec3 = obj.axis === undefined ? [0, 0, 1] : readDirection(obj.axis, at, 'axis');
  const origin: Vec3 = obj.origin === undefined ? [0, 0, 0] : readVec3(obj.origin, at, 'origin');
  return { type, order, axis, origin };
}

function parseLattice(v: unknown, source: string): Lattice {
  const at: Where = { owner: 'lattice', source };
  const obj = readObject(v, at, 'lattice', '{ "vectors": [[10,0,0]] }');
  rejectUnknownKeys(obj, ['vectors'], at);
  const raw = obj.vectors;
  if (!Array.isArray(raw) || raw.length < 1 || raw.length > 2) {
    fail(at, `vectors must hold 1 or 2 vectors (got ${Array.isArray(raw) ? raw.length : show(raw)})`,
      'write "vectors": [[dx,dy,dz]] for a chain or two vectors for a sheet');
  }
  const vectors = raw.map((x, k) => {
    const vec = readVec3(x, at, `vectors[${k}]`);
    if (Math.hypot(vec[0], vec[1], vec[2]) === 0) fail(at, `vectors[${k}] ${show(vec)} is the zero vector`, 'give the translation from one cell to the next');
    return vec;
  });
  if (vectors.length === 2) {
    const [a, b] = vectors as [Vec3, Vec3];
    const c = Math.hypot(a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]);
    if (c <= PARALLEL_SIN_TOL * Math.hypot(...a) * Math.hypot(...b)) {
      fail(at, `vectors ${show(a)} and ${show(b)} are parallel`, 'give two independent directions, or one vector for a chain');
    }
  }
  return { vectors };
}

/** A lattice much shorter than the rings would need thousands of neighbour copies: almost surely a mistake. */
function checkLatticeReach(layout: Layout, source: string): void {
  if (!layout.lattice) return;
  const reach = latticeReach(layout);
  reach.forEach((m, k) => {
    if (m > MAX_LATTICE_REACH) {
      fail({ owner: 'lattice', source }, `vectors[${k}] is so short that a ring overlaps ${m} cells along it`,
        'give the full cell-to-cell translation in layout units');
    }
  });
}

/** Every core radius must be at least MIN_RADIUS_REL times the largest |centre coordinate| (see validate.ts). */
function checkRadiusScale(layout: Layout, source: string): void {
  let far = 0;
  for (const r of layout.rings) far = Math.max(far, Math.abs(r.center[0]), Math.abs(r.center[1]), Math.abs(r.center[2]));
  const least = far * MIN_RADIUS_REL;
  layout.rings.forEach((r, index) => {
    if (r.radius < least) {
      fail({ owner: ringLabel(r, index), source }, `radius ${show(r.radius)} is below ${show(MIN_RADIUS_REL)} times the farthest centre coordinate ${show(far)}`,
        'move the layout nearer the origin (centres are stored to about 16 digits)');
    }
  });
}

function checkNoIntersections(layout: Layout, source: string): void {
  const rings = layout.rings;
  const unit = layout.units ? ` ${layout.units}` : ' layout units';
  let maxR = 0;
  for (const r of rings) maxR = Math.max(maxR, r.radius);
  // Only pairs whose bounding spheres come within the largest tolerance can intersect (broad phase).
  for (const p of nearRingPairs(layout, INTERSECT_REL_TOL * maxR)) {
    const a = rings[p.i]!, b = rings[p.j]!;
    const shifted = p.offset.some((x) => x !== 0) || p.shift.some((s) => s !== 0);
    const bCenter: Vec3 = [b.center[0] + p.offset[0], b.center[1] + p.offset[1], b.center[2] + p.offset[2]];
    // Bounding spheres apart: the circles cannot meet.
    const gap = Math.hypot(bCenter[0] - a.center[0], bCenter[1] - a.center[1], bCenter[2] - a.center[2]) - a.radius - b.radius;
    const tol = INTERSECT_REL_TOL * Math.max(a.radius, b.radius);
    if (gap > tol) continue;
    const d = ringDistance({ center: a.center, normal: a.normal, radius: a.radius }, { center: bCenter, normal: b.normal, radius: b.radius });
    // A kernel that finds no closest pair must not let an intersecting layout through.
    if (!Number.isFinite(d.distance)) throw new Error(`circle distance failed for rings ${displayName(a.name)} and ${displayName(b.name)}`);
    if (d.distance <= tol) {
      const other = shifted ? `ring ${displayName(b.name)} shifted by lattice [${p.shift.join(', ')}]` : `ring ${displayName(b.name)}`;
      const where = d.contacts[0] ? ` near [${d.contacts[0].onA.map((x) => round(x)).join(', ')}]` : '';
      throw new InputError(
        `ring ${displayName(a.name)} and ${other}: core circles intersect${where} (distance ${round(d.distance)}${unit}, ` +
        `must be > ${round(tol)}${unit}) (in ${source}); move or tilt one ring so the circles pass apart`,
      );
    }
  }
}

function round(x: number): string {
  return Number.isFinite(x) ? String(Number(x.toPrecision(6))) : String(x);
}
