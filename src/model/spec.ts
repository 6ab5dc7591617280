// The SPEC|LAYOUT argument of the solving commands: a catalogue spec (hopf, chain:3, ...) or the path
// of a layout file. Either way the result is a layout plus the signed linking matrix the solve must
// keep, after checking that the arrangement is a link that holds together at all.
import { basename } from 'node:path';
import { connectedness, linkingMatrix } from '../topology/index.js';
import { catalogLayout, looksLikeCatalogSpec, parseCatalogSpec, type CatalogSpec } from './catalog.js';
import { InputError } from './errors.js';
import { isFile, readJsonFile } from './jsonFile.js';
import { checkSolveSize, layoutFromRings, parseLayout } from './layout.js';
import type { Layout } from './types.js';

export interface ResolvedSpec {
  /** Canonical catalogue text ("chain:3") or the layout path as given. */
  spec: string;
  source: 'catalog' | 'file';
  layout: Layout;
  /** Signed linking numbers of the start (topology convention), to be kept by the solve. */
  linking: number[][];
  /** Ring i's tube is tube · tubeRatios[i]; all 1 unless a layout gives rings different tube values. */
  tubeRatios: number[];
  /** Things the user should know about how the input was read (one sentence each). */
  notes: string[];
  catalog: CatalogSpec | null;
}

export interface ResolveOptions {
  /** Core radii: one value for all rings or one per ring (overrides a layout file's radii). */
  radii?: number[];
}

/**
 * Resolve SPEC|LAYOUT. A name of a catalogue family is read as a spec; anything else must be a
 * readable layout file. Throws InputError for an unknown spec, an unreadable or invalid file, and
 * for arrangements that cannot be inflated: the unlink (nothing is linked) and any ring linked to no
 * other ring (nothing holds it).
 */
export function resolveSpec(arg: string, options: ResolveOptions = {}): ResolvedSpec {
  const text = arg.trim();
  if (text === '') throw new InputError('SPEC|LAYOUT is empty: give a catalogue spec such as hopf or chain:3, or a layout file');
  if (looksLikeCatalogSpec(text) && !isFile(text)) {
    const catalog = parseCatalogSpec(text);
    const layout = catalogLayout(catalog.text, options.radii);
    const tubeRatios = layout.rings.map(() => 1);
    return { spec: catalog.text, source: 'catalog', layout, linking: linkingMatrix(layout.rings), tubeRatios, notes: [], catalog };
  }
  if (!isFile(text)) {
    // Not a file: most likely a mistyped spec; say both.
    if (/^[a-z]+(:\S*)?$/i.test(text)) parseCatalogSpec(text);
    throw new InputError(`layout file '${text}' does not exist: give a layout file path or a catalogue spec (run thickring catalog)`);
  }
  let layout = readLayout(text);
  const source = basename(text);
  checkSolveSize(layout, source);
  const linking = linkingMatrix(layout.rings);
  checkHeld(linking, layout, source);
  const notes: string[] = [];
  const tubeRatios = ratiosOf(layout.rings.map((r) => r.tube), notes);
  if (options.radii !== undefined && options.radii.length > 0) {
    layout = withRadii(layout, options.radii, source);
    const after = linkingMatrix(layout.rings);
    for (let i = 0; i < after.length; i++) {
      for (let j = i + 1; j < after.length; j++) {
        if (after[i]![j] !== linking[i]![j]) {
          throw new InputError(
            `--radii ${options.radii.join(',')}: with these radii rings ${layout.rings[i]!.name} and ${layout.rings[j]!.name} ` +
              `of ${source} are ${after[i]![j] ? 'linked' : 'no longer linked'}; choose radii that keep the layout's link or edit the layout`,
          );
        }
      }
    }
  }
  return { spec: text, source: 'file', layout, linking, tubeRatios, notes, catalog: null };
}

/** Layout tubes, when they differ, are ratios r_i = tube · tube_i / largest tube_i (as in measure). */
function ratiosOf(tubes: (number | undefined)[], notes: string[]): number[] {
  const given = tubes.filter((t): t is number => t !== undefined);
  const maxT = given.length > 0 ? Math.max(...given) : 0;
  if (!given.some((t) => t !== maxT)) return tubes.map(() => 1);
  notes.push('Rings carry different tube values: they are used as ratios (r_i = tube * tube_i / largest tube_i), not as sizes.');
  const missing = tubes.some((t) => t === undefined);
  if (missing) notes.push('Rings without a tube value take ratio 1 (the thickest wire).');
  return tubes.map((t) => (t === undefined ? 1 : t / maxT));
}

/**
 * A linked arrangement of round rings that can be inflated: every ring is linked to some other ring.
 * The unlink is rejected with the reason: no round rings with all pairs unlinked form a non-trivial
 * link, so there is no Borromean-type arrangement to hold them (Freedman & Skora 1987).
 */
export function checkHeld(linking: number[][], layout: Layout, source: string): void {
  const n = layout.rings.length;
  if (n < 2) {
    throw new InputError(`${source}: has ${n} ring; inflating needs at least two linked rings (a lone ring can take tube = radius)`);
  }
  const anyLinked = linking.some((row) => row.some((x) => x !== 0));
  if (!anyLinked) {
    throw new InputError(
      `${source}: no two rings are linked, so nothing holds them and the tubes could grow without limit once the rings ` +
        'drift apart; round circles with every pair unlinked form only the unlink (no Borromean rings, Freedman & Skora 1987), ' +
        'so pass at least one ring through another',
    );
  }
  const { unheld } = connectedness(linking);
  if (unheld.length > 0) {
    const names = unheld.map((i) => layout.rings[i]!.name).join(', ');
    throw new InputError(
      `${source}: ring${unheld.length > 1 ? 's' : ''} ${names} ${unheld.length > 1 ? 'are' : 'is'} linked to no other ring, ` +
        'so nothing holds it and it would just move away (and round rings cannot be held by a Borromean-type ' +
        'arrangement, Freedman & Skora 1987); pass it through another ring or remove it',
    );
  }
}

function readLayout(path: string): Layout {
  const data = readJsonFile(path, 'layout');
  const layout = parseLayout(data, basename(path));
  if (layout.lattice) {
    // inflate and compare send weaves to the periodic path first (src/model/periodicSpec.ts); other callers cannot take them.
    throw new InputError(`layout file '${path}' has a lattice (a periodic weave), which only thickring inflate and compare read: run one of them, or remove "lattice" and list the rings`);
  }
  return layout;
}

function withRadii(layout: Layout, radii: number[], source: string): Layout {
  const n = layout.rings.length;
  radii.forEach((x) => {
    if (!(Number.isFinite(x) && x > 0)) throw new InputError(`--radii: ${x} must be a number > 0; give core radii like 1 or 1,1.5,1`);
  });
  if (radii.length !== 1 && radii.length !== n) {
    throw new InputError(`--radii: got ${radii.length} values but ${source} has ${n} rings; give one value for all rings or ${n} values`);
  }
  const rings = layout.rings.map((r, i) => {
    const radius = radii.length === 1 ? radii[0]! : radii[i]!;
    const { tube: _tube, ...rest } = r;
    return { ...rest, radius };
  });
  const extras: { units?: string; symmetry?: NonNullable<Layout['symmetry']> } = {};
  if (layout.units !== undefined) extras.units = layout.units;
  if (layout.symmetry !== undefined) extras.symmetry = layout.symmetry;
  return layoutFromRings(rings, extras, `${source} with --radii ${radii.join(',')}`);
}
