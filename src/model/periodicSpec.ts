// The SPEC|LAYOUT argument when it names a weave: a `weave:NAME` spec or a layout file with a "lattice"
// section. The result is the cell, the lattice and the pattern of linked image pairs the solve must keep,
// after checking that the pattern holds together (every ring linked to something, and cells linked to
// their neighbours along every lattice vector, else the weave falls apart).
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { InputError } from './errors.js';
import { isFile } from './jsonFile.js';
import { checkSolveSize, layoutFromRings, parseLayout } from './layout.js';
import { periodicKind, periodicLinks, sameLinks, type PeriodicKind, type PeriodicLink } from './periodic.js';
import type { Lattice, Layout, Ring } from './types.js';
import { looksLikeWeaveSpec, parseWeaveSpec, weaveLayout, type WeaveEntry } from './weaves.js';

export interface PeriodicLayout extends Layout {
  lattice: Lattice;
}

export interface ResolvedPeriodic {
  /** Canonical weave spec ("weave:box") or the layout path as given. */
  spec: string;
  source: 'catalog' | 'file';
  kind: PeriodicKind;
  layout: PeriodicLayout;
  links: PeriodicLink[];
  /** Ring i's tube is tube · tubeRatios[i]. */
  tubeRatios: number[];
  notes: string[];
  weave: WeaveEntry | null;
}

/** True when SPEC|LAYOUT is a weave spec or a readable layout file with a lattice section. */
export function isPeriodicArg(arg: string): boolean {
  const text = arg.trim();
  if (looksLikeWeaveSpec(text) && !isFile(text)) return true;
  if (!isFile(text)) return false;
  try {
    const data: unknown = JSON.parse(readFileSync(text, 'utf8'));
    return typeof data === 'object' && data !== null && !Array.isArray(data) && 'lattice' in data;
  } catch {
    // Unreadable or not JSON: the finite path reports it with its usual message.
    return false;
  }
}

export function resolvePeriodicSpec(arg: string, options: { radii?: number[] } = {}): ResolvedPeriodic {
  const text = arg.trim();
  if (looksLikeWeaveSpec(text) && !isFile(text)) {
    const weave = parseWeaveSpec(text);
    const layout = weaveLayout(weave.spec, options.radii) as PeriodicLayout;
    const links = periodicLinks(layout.rings, layout.lattice);
    checkHolds(layout, links, weave.spec);
    return { spec: weave.spec, source: 'catalog', kind: weave.kind, layout, links, tubeRatios: layout.rings.map(() => 1), notes: [], weave };
  }
  const source = basename(text);
  let layout = readPeriodicLayout(text);
  const links = periodicLinks(layout.rings, layout.lattice);
  checkHolds(layout, links, source);
  const notes: string[] = [];
  const tubeRatios = ratiosOf(layout.rings.map((r) => r.tube), notes);
  if (options.radii !== undefined && options.radii.length > 0) {
    layout = withRadii(layout, options.radii, source);
    if (!sameLinks(links, periodicLinks(layout.rings, layout.lattice))) {
      throw new InputError(`--radii ${options.radii.join(',')}: with these radii the rings of ${source} no longer link as in the layout; choose radii that keep the weave or edit the layout`);
    }
  }
  return { spec: text, source: 'file', kind: periodicKind(layout.lattice), layout, links, tubeRatios, notes, weave: null };
}

// ---- helpers -------------------------------------------------------------------------------------

function readPeriodicLayout(path: string): PeriodicLayout {
  let data: unknown;
  try {
    data = JSON.parse(readFileSync(path, 'utf8'));
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    throw new InputError(`layout file '${path}' cannot be read as JSON (${msg}): check the path and fix the syntax`);
  }
  const layout = parseLayout(data, basename(path));
  checkSolveSize(layout, basename(path));
  if (!layout.lattice) throw new InputError(`layout file '${path}' has no lattice section: add "lattice": { "vectors": [[dx,dy,dz]] } for a weave`);
  return layout as PeriodicLayout;
}

/**
 * Every ring must be linked to some ring or image, and the links must reach the next cell along every
 * lattice vector (their shifts span the lattice), or the pattern falls apart into separate pieces.
 */
function checkHolds(layout: PeriodicLayout, links: readonly PeriodicLink[], source: string): void {
  const held = new Set<number>();
  for (const l of links) {
    held.add(l.i);
    held.add(l.j);
  }
  const loose = layout.rings.filter((_, i) => !held.has(i)).map((r) => r.name);
  if (loose.length > 0) {
    throw new InputError(
      `${source}: ring${loose.length > 1 ? 's' : ''} ${loose.join(', ')} ${loose.length > 1 ? 'are' : 'is'} linked to no ring or copy of a ring, ` +
        'so nothing holds it in the weave; pass it through a neighbouring ring or remove it',
    );
  }
  const K = layout.lattice.vectors.length;
  if (spanRank(links.map((l) => l.shift), K) < K) {
    throw new InputError(
      `${source}: the links do not join each cell to its neighbours along ${K === 1 ? 'the lattice vector' : 'both lattice vectors'}, ` +
        'so the weave would fall apart into separate pieces; move rings so that some pass through rings of the next cell, or shorten the lattice vectors',
    );
  }
}

/** Rank of a set of integer shift vectors (0, 1 or 2). */
function spanRank(shifts: number[][], K: number): number {
  const nz = shifts.filter((s) => s.some((x) => x !== 0));
  if (nz.length === 0) return 0;
  if (K === 1) return 1;
  const a = nz[0]!;
  return nz.some((b) => a[0]! * b[1]! - a[1]! * b[0]! !== 0) ? 2 : 1;
}

/** Layout tubes, when they differ, are ratios r_i = tube · tube_i / largest tube_i (as in spec.ts). */
function ratiosOf(tubes: (number | undefined)[], notes: string[]): number[] {
  const given = tubes.filter((t): t is number => t !== undefined);
  const maxT = given.length > 0 ? Math.max(...given) : 0;
  if (!given.some((t) => t !== maxT)) return tubes.map(() => 1);
  notes.push('Rings carry different tube values: they are used as ratios (r_i = tube * tube_i / largest tube_i), not as sizes.');
  return tubes.map((t) => (t === undefined ? 1 : t / maxT));
}

function withRadii(layout: PeriodicLayout, radii: number[], source: string): PeriodicLayout {
  const n = layout.rings.length;
  radii.forEach((x) => {
    if (!(Number.isFinite(x) && x > 0)) throw new InputError(`--radii: ${x} must be a number > 0; give core radii like 1 or 1,1.5,1`);
  });
  if (radii.length !== 1 && radii.length !== n) {
    throw new InputError(`--radii: got ${radii.length} values but ${source} has ${n} rings in its cell; give one value for all rings or ${n} values`);
  }
  const rings: Ring[] = layout.rings.map((r, i) => {
    const { tube: _tube, ...rest } = r;
    return { ...rest, radius: radii.length === 1 ? radii[0]! : radii[i]! };
  });
  const extras: { units?: string; lattice: Lattice } = { lattice: layout.lattice };
  if (layout.units !== undefined) extras.units = layout.units;
  return layoutFromRings(rings, extras, `${source} with --radii ${radii.join(',')}`) as PeriodicLayout;
}
