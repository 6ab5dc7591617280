// What the page holds and checks, with no DOM: opening catalogue entries and layout/result files (the
// library's own parsers, so bad files get the CLI's one-line messages) and the live check of a pose
// (least clearance from the exact kernel, linking matrix from src/topology).
import { ringDistance } from '../src/kernel/index.js';
import { catalogLayout, naturalSymmetry, parseCatalogSpec, knownOptimum } from '../src/model/catalog.js';
import { InputError } from '../src/model/errors.js';
import { INTERSECT_REL_TOL, parseLayout } from '../src/model/layout.js';
import { RESULT_FORMAT, type SolveResult } from '../src/model/result.js';
import { parseResult } from '../src/model/resultFile.js';
import { checkHeld } from '../src/model/spec.js';
import type { Ring, Symmetry } from '../src/model/types.js';
import { linkingMatrix } from '../src/topology/index.js';

/** An arrangement open in the page. */
export interface Design {
  /** Catalogue text or file name. */
  spec: string;
  units: string | null;
  rings: Ring[];
  /** The link the rings must keep (signed linking numbers of the arrangement as opened). */
  linking: number[][];
  tubeRatios: number[];
  /** The symmetry to impose when Symmetry is on (the layout's, else the catalogue entry's natural one). */
  symmetry: Symmetry | null;
  /** Known optimum tube / core of the catalogue entry, when there is one. */
  known: { tubeOverCore: number; formula: string; source: string } | null;
  /** A loaded or computed result for these rings (cleared by any edit). */
  result: SolveResult | null;
}

export function openCatalog(text: string): Design {
  const spec = parseCatalogSpec(text.trim());
  const layout = catalogLayout(spec.text);
  const known = knownOptimum(spec);
  return {
    spec: spec.text, units: null, rings: layout.rings.map(stripTube), linking: linkingMatrix(layout.rings),
    tubeRatios: layout.rings.map(() => 1), symmetry: naturalSymmetry(spec),
    known: known ? { tubeOverCore: known.tubeOverCore, formula: known.formula, source: known.source } : null, result: null,
  };
}

/** A layout or result file's text; throws InputError with the same one-line message the CLI prints. */
export function openFile(name: string, text: string): Design {
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    throw new InputError(`file '${name}' is not valid JSON (${msg}): fix the syntax`);
  }
  if (data !== null && typeof data === 'object' && (data as { format?: unknown }).format === RESULT_FORMAT) {
    const result = parseResult(data, name);
    if (result.lattice) throw new InputError(`result file '${name}' is a periodic weave, which the page does not edit: use thickring report for it`);
    const rings = result.rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius }));
    return {
      spec: result.spec, units: result.units, rings, linking: result.linking.map((row) => row.slice()),
      tubeRatios: result.tubeRatios.slice(), symmetry: result.symmetry, known: null, result,
    };
  }
  const layout = parseLayout(data, name);
  if (layout.lattice) {
    throw new InputError(`layout file '${name}' has a lattice (a periodic weave), which only thickring inflate and compare read: remove "lattice" and list the rings`);
  }
  const linking = linkingMatrix(layout.rings);
  checkHeld(linking, layout, name);
  const given = layout.rings.map((r) => r.tube);
  const maxT = Math.max(0, ...given.filter((t): t is number => t !== undefined));
  const tubeRatios = given.map((t) => (t === undefined || maxT === 0 ? 1 : t / maxT));
  return {
    spec: name, units: layout.units ?? null, rings: layout.rings.map(stripTube), linking, tubeRatios,
    symmetry: layout.symmetry ?? null, known: null, result: null,
  };
}

export interface PoseCheck {
  /** min over pairs of core distance - r_i - r_j (layout units). */
  leastClearance: number;
  /** The pair that gives it. */
  pair: [number, number];
  linking: number[][];
  /** Pairs whose linking differs from the design's (orientation ignored: a flipped normal is the same ring). */
  changed: [number, number][];
  /** Pairs whose core circles meet. */
  intersecting: [number, number][];
  ok: boolean;
}

export function checkPose(rings: readonly Ring[], tubes: readonly number[], intended: readonly (readonly number[])[]): PoseCheck {
  const n = rings.length;
  const linking = linkingMatrix(rings);
  let least = Infinity;
  let pair: [number, number] = [0, 1];
  const changed: [number, number][] = [];
  const intersecting: [number, number][] = [];
  const scale = Math.max(...rings.map((r) => r.radius));
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const d = ringDistance(rings[i]!, rings[j]!).distance;
      const c = d - (tubes[i] ?? 0) - (tubes[j] ?? 0);
      if (c < least) { least = c; pair = [i, j]; }
      if (d <= INTERSECT_REL_TOL * scale) intersecting.push([i, j]);
      if (Math.abs(linking[i]![j]!) !== Math.abs(intended[i]![j]!)) changed.push([i, j]);
    }
  }
  return { leastClearance: least, pair, linking, changed, intersecting, ok: changed.length === 0 && intersecting.length === 0 };
}

function stripTube(r: Ring): Ring {
  return { name: r.name, center: [...r.center], normal: [...r.normal], radius: r.radius };
}
