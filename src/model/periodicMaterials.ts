// Wire materials for the weight of a weave: `--density` takes g/cm³ or a material name. Pure metals are
// the CRC Handbook of Chemistry and Physics room-temperature densities; alloys are typical supplier
// data-sheet values (composition varies). All are quoted from memory.
import { InputError } from './errors.js';
import { periodicKind, cellMeasure } from './periodic.js';
import type { Lattice } from './types.js';

export interface Density {
  /** g/cm³ */
  gramsPerCm3: number;
  /** Material name when given by name, else null. */
  material: string | null;
  source: string;
}

const HANDBOOK = 'CRC Handbook of Chemistry and Physics, density of the element at room temperature (from memory)';
const ALLOY = 'typical supplier data-sheet value for the alloy; composition varies (from memory)';

/** Material densities in g/cm³. */
export const MATERIALS: Readonly<Record<string, { density: number; source: string }>> = {
  aluminium: { density: 2.70, source: HANDBOOK },
  titanium: { density: 4.51, source: HANDBOOK },
  steel: { density: 7.85, source: `${ALLOY}; plain carbon steel` },
  'stainless-steel': { density: 8.0, source: `${ALLOY}; austenitic 304/316` },
  brass: { density: 8.5, source: `${ALLOY}; yellow brass` },
  niobium: { density: 8.57, source: HANDBOOK },
  bronze: { density: 8.8, source: `${ALLOY}; phosphor bronze` },
  copper: { density: 8.96, source: HANDBOOK },
  'sterling-silver': { density: 10.36, source: `${ALLOY}; 92.5 % silver` },
  'fine-silver': { density: 10.49, source: HANDBOOK },
  gold: { density: 19.32, source: `${HANDBOOK}; 24 carat` },
};

const ALIASES: Readonly<Record<string, string>> = {
  aluminum: 'aluminium', stainless: 'stainless-steel', sterling: 'sterling-silver', silver: 'fine-silver',
};

/** Densities this far outside the range of solid metals are almost surely a unit mistake. */
const MIN_DENSITY = 0.5;
const MAX_DENSITY = 25;

/** Parse `--density`: a number in g/cm³ or a material name. */
export function parseDensity(text: string): Density {
  const t = text.trim().toLowerCase();
  const name = ALIASES[t] ?? t;
  const known = MATERIALS[name];
  if (known) return { gramsPerCm3: known.density, material: name, source: known.source };
  const x = Number(t);
  if (t === '' || !Number.isFinite(x) || x < MIN_DENSITY || x > MAX_DENSITY) {
    throw new InputError(
      `--density: '${text}' must be a density in g/cm3 from ${MIN_DENSITY} to ${MAX_DENSITY} or a material name ` +
        `(${Object.keys(MATERIALS).join(', ')}); for example --density 7.85 or --density sterling-silver`,
    );
  }
  return { gramsPerCm3: x, material: null, source: 'given on the command line' };
}

/** Parse `--wire-diameter` (mm). */
export function parseWireDiameter(text: string): number {
  const x = Number(text.trim());
  if (text.trim() === '' || !Number.isFinite(x) || !(x > 0) || x > 100) {
    throw new InputError(`--wire-diameter: '${text}' must be a wire diameter in mm, > 0 and at most 100 (for example --wire-diameter 1.6)`);
  }
  return x;
}

export interface WeaveWeight {
  density: Density;
  /** Millimetres per layout unit used for the weight. */
  mmPerUnit: number;
  /** How the scale was chosen (one sentence). */
  scale: string;
  /** Wire diameter and inner diameter of the thickest-wired ring at that scale (mm). */
  wireDiameterMm: number;
  innerDiameterMm: number;
  /** Chain: grams per metre and rings per metre; sheet: grams per square metre and rings per square metre. */
  grams: number;
  rings: number;
  per: 'metre' | 'square metre';
}

export interface WeightInput {
  rings: { radius: number; tube: number }[];
  lattice: Lattice;
  units: string | null;
}

/**
 * Weight of the weave at its optimum: torus volume 2π² R r² per ring (Pappus), over the period length
 * (chain) or the cell area (sheet). The scale is `wireDiameterMm` for the thickest wire when given,
 * else 1 mm per layout unit when the layout is in mm, else a 1 mm thickest wire.
 */
export function weaveWeight(input: WeightInput, density: Density, wireDiameterMm?: number): WeaveWeight {
  const thickest = input.rings.reduce((a, r) => (r.tube > a.tube ? r : a), input.rings[0]!);
  let mmPerUnit: number;
  let scale: string;
  if (wireDiameterMm !== undefined) {
    mmPerUnit = wireDiameterMm / (2 * thickest.tube);
    scale = `scaled so the thickest wire is ${wireDiameterMm} mm in diameter (--wire-diameter)`;
  } else if (input.units === 'mm') {
    mmPerUnit = 1;
    scale = 'layout units are mm';
  } else {
    mmPerUnit = 1 / (2 * thickest.tube);
    scale = 'scaled to a 1 mm thickest wire (give --wire-diameter MM for another size; grams per metre scale with the square of the wire diameter, per square metre with the wire diameter)';
  }
  let volumeMm3 = 0;
  for (const r of input.rings) volumeMm3 += 2 * Math.PI * Math.PI * r.radius * r.tube * r.tube * mmPerUnit ** 3;
  const grams = (density.gramsPerCm3 * volumeMm3) / 1000;
  const kind = periodicKind(input.lattice);
  const measure = cellMeasure(input.lattice);
  const perMetre = kind === 'chain' ? 1000 / (measure * mmPerUnit) : 1e6 / (measure * mmPerUnit * mmPerUnit);
  return {
    density, mmPerUnit, scale,
    wireDiameterMm: 2 * thickest.tube * mmPerUnit,
    innerDiameterMm: 2 * (thickest.radius - thickest.tube) * mmPerUnit,
    grams: grams * perMetre,
    rings: input.rings.length * perMetre,
    per: kind === 'chain' ? 'metre' : 'square metre',
  };
}
