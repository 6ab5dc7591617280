// The catalogue of weaves: `weave:NAME` specs, each a unit cell of round rings plus lattice vectors whose
// start pose has the weave's linking pattern (which ring passes through which, cell to cell). The
// optimiser moves rings and lattice freely from there, so the start only has to be the right weave.
// Trade figures are quoted as coarse rules of thumb (weavers' guild articles and supplier charts; they
// vary by source and by spring-back), never as references a result must meet.
import { InputError } from './errors.js';
import { layoutFromRings } from './layout.js';
import type { Lattice, Layout, Ring, Vec3 } from './types.js';

export type WeaveName = '2-in-1' | 'euro-4-in-1' | 'box' | 'japanese-6-in-1';

export interface TradeFigure {
  /** Quoted minimum (or typical tight) aspect ratio range, inner diameter / wire diameter (dimensionless). */
  low: number;
  high: number;
  what: string;
  source: string;
}

export interface KnownWeaveOptimum {
  /** Minimum aspect ratio (dimensionless) with equal rings. */
  aspectRatio: number;
  formula: string;
  source: string;
}

export interface WeaveEntry {
  spec: string;
  name: WeaveName;
  kind: 'chain' | 'sheet';
  description: string;
  /** Rings in the unit cell and how the pattern links them. */
  cell: string;
  /** Rings passing through each ring (the "N" of N-in-1), per ring of the cell. */
  through: number[];
  trade: TradeFigure | null;
  knownOptimum: KnownWeaveOptimum | null;
}

export interface WeaveStart {
  rings: Ring[];
  lattice: Lattice;
}

const TRADE_SOURCE = 'weavers\' guild articles and supplier charts (docs/references.md; figures vary by source and spring-back): a rule of thumb, not a measurement';

const ENTRIES: readonly WeaveEntry[] = [
  {
    spec: 'weave:2-in-1', name: '2-in-1', kind: 'chain',
    description: 'Plain chain: each ring linked to the one before and the one after, planes alternating.',
    cell: '2 rings (A flat, B upright); A links B in its cell and B of the cell before',
    through: [2, 2],
    trade: null,
    knownOptimum: {
      aspectRatio: 2,
      formula: 'AR = 2 (tube R/3)',
      source: 'circle-packing bound: k = 2 rings through each ring give tube <= R/3 (packing radius 1/2, Graham et al., Discrete Math. 181, 1998), attained by the flat alternating chain',
    },
  },
  {
    spec: 'weave:euro-4-in-1', name: 'euro-4-in-1', kind: 'sheet',
    description: 'European 4-in-1 sheet: columns of rings leaning alternately left and right, each ring through 2 rings of each neighbouring column.',
    cell: '2 rings (A leaning one way, B the other); each links 4 rings of the neighbouring columns',
    through: [4, 4],
    trade: { low: 3, high: 3.3, what: 'tight European 4-in-1 (3.8 to allow contraction)', source: TRADE_SOURCE },
    knownOptimum: null,
  },
  {
    spec: 'weave:box', name: 'box', kind: 'chain',
    description: 'Box chain: a 2-2 chain folded into boxes; side pairs nest one inside the next, top and bottom pairs fold back over them.',
    cell: '4 rings (side pair E, W; top and bottom pair N, S); N and S each link E and W of their own cell and of the cell before',
    through: [4, 4, 4, 4],
    trade: { low: 3.8, high: 3.8, what: 'box chain first possible', source: TRADE_SOURCE },
    knownOptimum: null,
  },
  {
    spec: 'weave:japanese-6-in-1', name: 'japanese-6-in-1', kind: 'sheet',
    description: 'Japanese 6-in-1 sheet (equal rings): flat rings on a triangular lattice, each joined to its 6 neighbours by upright connector rings.',
    cell: '4 rings (F flat; connectors C1, C2, C3 along the three lattice directions, each through 2 flat rings)',
    through: [6, 2, 2, 2],
    trade: null,
    knownOptimum: {
      aspectRatio: 3,
      formula: 'AR = 3 (tube R/4)',
      source: 'circle-packing bound for k = 6 rings through the flat ring (packing radius 1/3, Graham et al., Discrete Math. 181, 1998), attained with connectors upright and flat rings 3R apart (derived in docs/weaves.md)',
    },
  },
];

/** The weave catalogue as a table, for `thickring catalog`. */
export function weaveEntries(): WeaveEntry[] {
  return ENTRIES.map((e) => ({ ...e, through: e.through.slice() }));
}

/** True when the text is meant as a weave spec (possibly a bad one). */
export function looksLikeWeaveSpec(text: string): boolean {
  return /^\s*weave\s*:/i.test(text);
}

/** Parse `weave:NAME`; throws InputError naming the spec and the valid ones. */
export function parseWeaveSpec(text: string): WeaveEntry {
  const m = /^\s*weave\s*:\s*([a-z0-9-]+)\s*$/i.exec(text);
  const name = m?.[1]?.toLowerCase();
  const entry = ENTRIES.find((e) => e.name === name);
  if (!entry) {
    throw new InputError(`spec '${text}' is not a weave in the catalogue: use one of ${ENTRIES.map((e) => e.spec).join(', ')} (run thickring catalog)`);
  }
  return entry;
}

/**
 * Start layout of a weave with core radius R (one value for all rings, or one per ring of the cell).
 * Throws InputError for an unknown weave or bad radii.
 */
export function weaveLayout(text: string, radii?: number[]): Layout {
  const entry = parseWeaveSpec(text);
  const start = weaveStart(entry.name);
  const n = start.rings.length;
  if (radii !== undefined && radii.length > 0) {
    radii.forEach((x) => {
      if (!(Number.isFinite(x) && x > 0)) throw new InputError(`--radii: ${x} must be a number > 0; give core radii like 1 or 1,1.5`);
    });
    if (radii.length !== 1 && radii.length !== n) {
      throw new InputError(`--radii: got ${radii.length} values but ${entry.spec} has ${n} rings in its cell; give one value for all rings or ${n} values`);
    }
  }
  // One radius scales the whole pattern; per-ring radii keep the start's positions at the mean radius.
  const s = radii && radii.length > 0 ? radii.reduce((a, b) => a + b, 0) / radii.length : 1;
  const rings = start.rings.map((r, i) => ({
    ...r,
    center: scaleV(r.center, s),
    radius: radii && radii.length === n ? radii[i]! : s,
  }));
  const lattice = { vectors: start.lattice.vectors.map((v) => scaleV(v, s)) };
  try {
    return layoutFromRings(rings, { lattice }, `weave ${entry.spec}`);
  } catch (e) {
    if (radii) throw new InputError(`--radii ${radii.join(',')}: too unequal for ${entry.spec}, the start rings would meet; use closer radii or a layout file`);
    throw e;
  }
}

/** Start poses for core radius 1. Each pose is checked for its linking pattern by the tests. */
export function weaveStart(name: WeaveName): WeaveStart {
  switch (name) {
    case '2-in-1':
      return twoInOne();
    case 'euro-4-in-1':
      return europeanFourInOne();
    case 'box':
      return boxChain();
    case 'japanese-6-in-1':
      return japaneseSixInOne();
  }
}

// ---- poses (core radius 1) -----------------------------------------------------------------------

/**
 * 2-in-1: A flat at the origin, B upright (normal y) 1.5 along x, period 3: B crosses A's disk 0.5 from
 * A's centre, and A's next copy is 1 clear of A (coplanar circles 3 apart).
 */
function twoInOne(): WeaveStart {
  return {
    rings: [ring('A', [0, 0, 0], [0, 0, 1]), ring('B', [1.5, 0, 0], [0, 1, 0])],
    lattice: { vectors: [[3, 0, 0]] },
  };
}

/**
 * European 4-in-1: columns along y (spacing a = 1), column pitch b = 1.3 along x. Column rings lean about
 * the x axis by ±45°. Both planes contain the x direction and meet in a line at distance a/(4 cos 45°) from
 * each centre; rings of neighbouring columns cross that line at x = ±√(1 - ρ²) about their centres, and
 * intervals offset by b = 1.3 < 2√(1 - ρ²) interleave, i.e. the rings are linked. Same-lean rings are
 * coplanar two columns apart (2b = 2.6 > 2) and parallel along a column.
 */
function europeanFourInOne(): WeaveStart {
  const s = Math.SQRT1_2;
  const a = 1, b = 1.3;
  return {
    rings: [ring('A', [0, 0, 0], [0, s, s]), ring('B', [b, a / 2, 0], [0, -s, s])],
    lattice: { vectors: [[0, a, 0], [2 * b, 0, 0]] },
  };
}

/**
 * Box chain along x, period p = 1.1 (4 rings). The side pair E, W (y = ±0.6) splays ±20° about z, so each
 * pair opens towards +x and the next pair's near end sits between its rings (the pairs nest, as when a
 * new pair is passed between the spread rings of the pair before). The top and bottom pair N, S
 * (z = ±0.8) is tilted ±40° about y, folded back over the side pairs, and links the side pair of its own
 * cell and of the cell before. A plain wall arrangement (no nesting, p > 2) unfolds into a loose 2-2
 * chain when inflated; the nested start keeps the fold (see docs/weaves.md).
 */
function boxChain(): WeaveStart {
  const h = 0.6, f = 0.8, p = 1.1;
  const g = (20 * Math.PI) / 180, d = (40 * Math.PI) / 180;
  const sg = Math.sin(g), cg = Math.cos(g), sd = Math.sin(d), cd = Math.cos(d);
  return {
    rings: [
      ring('E', [0, h, 0], [-sg, cg, 0]),
      ring('W', [0, -h, 0], [sg, cg, 0]),
      ring('N', [0, 0, f], [sd, 0, cd]),
      ring('S', [0, 0, -f], [-sd, 0, cd]),
    ],
    lattice: { vectors: [[p, 0, 0]] },
  };
}

/**
 * Japanese 6-in-1 with equal rings: flat ring F (normal z) on a triangular lattice of spacing D = 3.2;
 * connector C_k upright at the midpoint of lattice direction k, in the vertical plane through it, so it
 * crosses the two flat disks at D/2 - 1 = 0.6 from their centres.
 */
function japaneseSixInOne(): WeaveStart {
  const D = 3.2;
  const l1: Vec3 = [D, 0, 0];
  const l2: Vec3 = [D / 2, (D * Math.sqrt(3)) / 2, 0];
  const l3: Vec3 = [l2[0] - l1[0], l2[1] - l1[1], 0];
  const connector = (name: string, l: Vec3): Ring => {
    const len = Math.hypot(l[0], l[1]);
    return ring(name, [l[0] / 2, l[1] / 2, 0], [-l[1] / len, l[0] / len, 0]);
  };
  return {
    rings: [ring('F', [0, 0, 0], [0, 0, 1]), connector('C1', l1), connector('C2', l2), connector('C3', l3)],
    lattice: { vectors: [l1, l2] },
  };
}

// ---- helpers -------------------------------------------------------------------------------------

function ring(name: string, center: Vec3, normal: Vec3): Ring {
  return { name, center, normal, radius: 1 };
}

function scaleV(v: ArrayLike<number>, s: number): Vec3 {
  return [v[0]! * s, v[1]! * s, v[2]! * s];
}
