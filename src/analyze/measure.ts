// `thickring measure`: what a layout allows as it stands, without moving any ring. Per pair the
// core distance, closest pairs and linking number; overall the largest common tube radius
//   t = min( min_i R_i / ρ_i , min_pairs d_ij / (ρ_i + ρ_j) )
// where ρ_i are the rings' tube ratios (all 1 unless the layout gives per-ring tubes). A tube of
// radius r_i stays embedded iff r_i <= R_i, and tubes i, j are disjoint iff d_ij >= r_i + r_j
// (thickness in the sense of Gonzalez–Maddocks 1999 and Cantarella–Kusner–Sullivan 2002).
import { tightestRing } from '../model/orbit.js';
import { ringDistance, type Contact, type ContinuumKind } from '../kernel/index.js';
import { displayName } from '../model/displayName.js';
import { nearRingPairs, ringPairs } from '../model/ringPairs.js';
import type { Layout, Vec3 } from '../model/types.js';
import { connectednessOf, linkingNumber, type LinkingNumber } from '../topology/index.js';

/**
 * Up to this many rings every pair is listed (and the full linking matrix given); above it only the pairs
 * whose bounding spheres come within 2 max R (the only ones that can set the tube or be linked).
 */
export const MEASURE_ALL_PAIRS_MAX = 64;
/** Up to this many rings `linking` is the full N x N matrix; above it null, and `links` lists the linked pairs. */
export const MEASURE_DENSE_LINKING_MAX = 256;

/** Limits within this fraction of the tube radius count as ties (kernel distances carry ~1e-8 relative noise). */
export const LIMIT_REL_TOL = 1e-7;

export interface MeasureRing {
  name: string;
  center: Vec3;
  normal: Vec3;
  /** Core radius R (layout units). */
  radius: number;
  /** This ring's tube radius at the common tube: r_i = tube * tubeRatio (layout units). */
  tube: number;
  tubeRatio: number;
  /** (R - r) / r: inner diameter over wire diameter (dimensionless). */
  aspectRatio: number;
  /** Largest common tube this ring alone allows: R / tubeRatio (layout units). */
  tubeLimit: number;
}

export interface MeasurePair {
  /** Ring indices; b is translated by `shift` lattice vectors when shift is present and non-zero. */
  a: number;
  b: number;
  nameA: string;
  nameB: string;
  shift?: number[];
  /** Minimum core-to-core distance (layout units). */
  distance: number;
  /** Every local closest pair (struts); for a continuum, evenly spaced representatives. */
  contacts: Contact[];
  linking: LinkingNumber;
  continuum: { kind: ContinuumKind; description: string } | null;
  /** Largest common tube this pair alone allows: distance / (ρ_a + ρ_b) (layout units). */
  tubeLimit: number;
}

export interface MeasureLimit {
  /** Names of rings whose own core radius sets the tube (r_i = R_i). */
  rings: string[];
  /** Pairs whose core distance sets the tube (r_a + r_b = d). */
  pairs: { a: string; b: string; shift?: number[] }[];
}

export interface MeasureResult {
  command: 'measure';
  status: 'ok';
  units: string | null;
  /** Largest common tube radius the layout allows as it stands (layout units). */
  tube: number;
  /** tube / smallest core radius (dimensionless). */
  tubeOverCore: number;
  /** Smallest (R - r) / r over the rings: inner diameter / wire diameter of the tightest ring, named in aspectRatioRing. */
  aspectRatio: number;
  aspectRatioRing: string;
  tubeRatios: number[];
  /** True when the ratios come from per-ring `tube` values in the layout. */
  ratiosFromLayout: boolean;
  /** The layout's own largest `tube` value and whether it fits (null when no ring gives a tube). */
  given: { tube: number; fits: boolean } | null;
  rings: MeasureRing[];
  pairs: MeasurePair[];
  limitedBy: MeasureLimit;
  /**
   * Pairwise linking numbers of the rings in the layout (cell), diagonal 0; null above
   * MEASURE_DENSE_LINKING_MAX rings (see `links`).
   */
  linking: number[][] | null;
  /** The linked pairs of the cell (a < b, ring indices): the sparse form of `linking`. */
  links: { a: number; b: number; linking: LinkingNumber }[];
  /** Groups of ring names held together by linking (lattice links included). */
  components: string[][];
  /** Rings linked to no other ring. */
  unheld: string[];
  notes: string[];
  cautions: string[];
}

export const MEASURE_CAUTIONS = [
  'The tube radius is a geometric limit with zero clearance: printed or wire rings need clearance (see thickring fabricate).',
  'Geometry says nothing about strength: do not use these figures for load-bearing, lifting or climbing chain.',
  'Small rings are a choking hazard for children; for skin contact use skin-safe (e.g. nickel-free) materials.',
];

/** Expects a layout from parseLayout (finite numbers, unit normals, no intersecting circles). */
export function measureLayout(layout: Layout): MeasureResult {
  const rings = layout.rings;
  const notes: string[] = [];
  const { ratios, fromLayout } = tubeRatios(layout, notes);
  let maxR = 0, minR = Infinity;
  for (const r of rings) {
    maxR = Math.max(maxR, r.radius);
    minR = Math.min(minR, r.radius);
  }

  // Every tube limit in one list; the smallest is the common tube.
  const ringLimits = rings.map((r, i) => r.radius / ratios[i]!);
  const pairs: MeasurePair[] = [];
  // Copies whose bounding spheres are more than 2 max R apart cannot limit t (r_i + r_j <= R_i + R_j), nor
  // link (a linked circle meets the other's disk, inside its sphere): many rings need only the near pairs.
  const allPairs = rings.length <= MEASURE_ALL_PAIRS_MAX;
  for (const p of allPairs ? ringPairs(layout, 2 * maxR) : nearRingPairs(layout, 2 * maxR)) {
    const a = rings[p.i]!, b = rings[p.j]!;
    const shifted = p.shift.some((s) => s !== 0);
    const bc: Vec3 = [b.center[0] + p.offset[0], b.center[1] + p.offset[1], b.center[2] + p.offset[2]];
    const ca = { center: a.center, normal: a.normal, radius: a.radius };
    const cb = { center: bc, normal: b.normal, radius: b.radius };
    const d = ringDistance(ca, cb);
    const pair: MeasurePair = {
      a: p.i, b: p.j, nameA: a.name, nameB: b.name,
      distance: d.distance, contacts: d.contacts, linking: linkingNumber(ca, cb), continuum: d.continuum,
      tubeLimit: d.distance / (ratios[p.i]! + ratios[p.j]!),
    };
    if (shifted) pair.shift = p.shift;
    pairs.push(pair);
  }
  // Loops, not Math.min(...list): spreading a list of thousands of pairs overflows the call stack.
  let tube = Infinity;
  for (const t of ringLimits) tube = Math.min(tube, t);
  for (const p of pairs) tube = Math.min(tube, p.tubeLimit);

  const tieAt = tube * (1 + LIMIT_REL_TOL);
  const limitedBy: MeasureLimit = {
    rings: rings.filter((_, i) => ringLimits[i]! <= tieAt).map((r) => r.name),
    pairs: pairs.filter((p) => p.tubeLimit <= tieAt).map((p) => (p.shift ? { a: p.nameA, b: p.nameB, shift: p.shift } : { a: p.nameA, b: p.nameB })),
  };
  const measured: MeasureRing[] = rings.map((r, i) => {
    const ri = tube * ratios[i]!;
    return {
      name: r.name, center: r.center, normal: r.normal, radius: r.radius,
      tube: ri, tubeRatio: ratios[i]!, aspectRatio: (r.radius - ri) / ri, tubeLimit: ringLimits[i]!,
    };
  });

  // Linked pairs are among the listed ones (bounding spheres meet); every other pair has linking number 0.
  const links = pairs.filter((p) => !p.shift && p.linking !== 0).map((p) => ({ a: p.a, b: p.b, linking: p.linking }));
  const dense = rings.length <= MEASURE_DENSE_LINKING_MAX;
  const linking = dense ? rings.map(() => new Array<number>(rings.length).fill(0)) : null;
  if (linking) for (const l of links) linking[l.a]![l.b] = linking[l.b]![l.a] = l.linking;
  const linkEdges = pairs.filter((p) => p.linking !== 0).map((p): [number, number] => [p.a, p.b]);
  const conn = connectednessOf(rings.length, linkEdges);
  const names = (ix: number[]): string[] => ix.map((i) => rings[i]!.name);
  describePairs(pairs, rings.length, notes);
  if (!allPairs) {
    notes.push(`With ${rings.length} rings (more than ${MEASURE_ALL_PAIRS_MAX}), pairs lists only the pairs whose bounding spheres come within ` +
      `${fmtLen(2 * maxR)} (twice the largest core radius); every other pair is farther apart than any tube allowed here and unlinked.`);
  }
  if (!dense) notes.push(`With more than ${MEASURE_DENSE_LINKING_MAX} rings, linking is null: links lists the linked pairs (all others are 0).`);
  if (conn.unheld.length > 0 && rings.length > 1) {
    notes.push(`Not held by any link: ${names(conn.unheld).map(displayName).join(', ')} (linked to no other ring).`);
  }
  if (layout.symmetry && layout.symmetry.type !== 'none') {
    notes.push(`The layout names ${layout.symmetry.type} symmetry of order ${layout.symmetry.order}; measure takes the rings as given and does not check it.`);
  }

  const given = fromLayout || rings.some((r) => r.tube !== undefined) ? givenTube(layout, tube) : null;
  return {
    command: 'measure',
    status: 'ok',
    units: layout.units ?? null,
    tube,
    tubeOverCore: tube / minR,
    ...tightestRing(measured),
    tubeRatios: ratios,
    ratiosFromLayout: fromLayout,
    given,
    rings: measured,
    pairs,
    limitedBy,
    linking,
    links,
    components: conn.components.map(names),
    unheld: rings.length > 1 ? names(conn.unheld) : [],
    notes,
    cautions: [...MEASURE_CAUTIONS],
  };
}

/** ρ_i = tube_i / max tube; a ring without a tube takes ratio 1 (the thickest wire). */
function tubeRatios(layout: Layout, notes: string[]): { ratios: number[]; fromLayout: boolean } {
  const tubes = layout.rings.map((r) => r.tube);
  const given = tubes.filter((t): t is number => t !== undefined);
  const maxT = given.reduce((m, t) => Math.max(m, t), 0);
  const differ = given.some((t) => t !== maxT);
  if (!differ) return { ratios: layout.rings.map(() => 1), fromLayout: false };
  notes.push('Rings carry different tube values: they are read as ratios (r_i = tube * tube_i / largest tube_i), not as sizes.');
  const missing = layout.rings.filter((r) => r.tube === undefined).map((r) => r.name);
  if (missing.length > 0) notes.push(`No tube given for ${missing.map(displayName).join(', ')}: taken as ratio 1 (the thickest wire).`);
  return { ratios: tubes.map((t) => (t === undefined ? 1 : t / maxT)), fromLayout: true };
}

function fmtLen(x: number): string {
  return String(Number(x.toPrecision(6)));
}

function givenTube(layout: Layout, tube: number): { tube: number; fits: boolean } {
  const largest = layout.rings.reduce((m, r) => Math.max(m, r.tube ?? 0), 0);
  return { tube: largest, fits: largest <= tube };
}

function describePairs(pairs: MeasurePair[], n: number, notes: string[]): void {
  for (const p of pairs) {
    if (p.continuum) {
      const at = p.shift ? ` (shifted by lattice [${p.shift.join(', ')}])` : '';
      notes.push(`${displayName(p.nameA)}-${displayName(p.nameB)}${at}: closest points form a continuum (${p.continuum.kind}); contacts are evenly spaced representatives.`);
    }
  }
  if (n > 1 && pairs.every((p) => p.linking === 0)) {
    notes.push('No pair of rings is linked: round rings with no linked pair are not held together (Freedman–Skora 1987).');
  }
}
