// From an optimum in layout units to a part in millimetres: one size option fixes the scale
// (applied to the largest ring; the others scale with it), the clearance shrinks every tube by
// clearance/2 so facing surfaces that touched at the optimum end up `clearance` apart.
import { InputError } from '../model/errors.js';
import type { SolveResult } from '../model/result.js';
import type { SolveStatus, Vec3 } from '../model/types.js';
import { normalize } from '../model/vec.js';
import { gaugeAtMost, type GaugeChoice } from './gauge.js';
import { PRESETS, type ProcessName, type ProcessPreset } from './presets.js';

/** Which dimension of the largest ring the user fixed (all in mm, of the printed part). */
export type SizeOption =
  | { kind: 'coreRadius'; value: number }
  | { kind: 'innerDiameter'; value: number }
  | { kind: 'outerDiameter'; value: number };

export interface PlanOptions {
  size: SizeOption;
  process: ProcessName;
  /** Gap between facing surfaces (mm); the process preset when absent. */
  clearance?: number;
  /** Minimum wire (tube) diameter (mm); the process preset when absent. */
  minWall?: number;
}

export interface PlannedRing {
  name: string;
  /** Centre and core radius in mm; the normal is unit length. */
  center: Vec3;
  normal: Vec3;
  radius: number;
  /** Tube radius of the optimum, scaled (mm). */
  tube: number;
  /** Tube radius after the clearance: tube - clearance/2 (mm). */
  printedTube: number;
  wireDiameter: number;
  printedWireDiameter: number;
  /** Of the printed ring: 2 (R - printedTube) and 2 (R + printedTube) (mm). */
  innerDiameter: number;
  outerDiameter: number;
  /** Printed inner diameter / printed wire diameter (dimensionless). */
  aspectRatio: number;
}

export interface FabricationPlan {
  status: SolveStatus;
  units: 'mm';
  process: ProcessPreset;
  /** mm per layout unit. */
  scale: number;
  /** Index of the ring the size option applies to (largest core radius, first on ties). */
  sizedRing: number;
  size: SizeOption;
  clearance: number;
  minWall: number;
  /** Common tube radius of the optimum in mm (Contract `tube`). */
  tube: number;
  rings: PlannedRing[];
  largestWireDiameter: number;
  largestPrintedWireDiameter: number;
  /** Thinnest printed wire: its ring index and diameter (mm). */
  thinnestRing: number;
  thinnestPrintedWireDiameter: number;
  /** Aspect ratio of the thinnest-walled printed ring (Contract `aspectRatio`, dimensionless). */
  aspectRatio: number;
  minWallMet: boolean;
  /** Thinnest wire inside the quoted minimum-wall range: printable on a well-tuned machine only. */
  minWallMarginal: boolean;
  /** Wire process: thickest AWG gauge not thicker than each ring's wire (null when out of range). */
  gauges: (GaugeChoice | null)[] | null;
  warnings: string[];
}

/** Validate the options against the design and work out every printed dimension. */
export function planFabrication(result: SolveResult, options: PlanOptions): FabricationPlan {
  const preset = PRESETS[options.process];
  const clearance = options.clearance ?? preset.clearance;
  const minWall = options.minWall ?? preset.minWall;
  if (!(Number.isFinite(clearance) && clearance >= 0)) {
    throw new InputError(`--clearance ${clearance} must be a number >= 0 (mm)`);
  }
  if (!(Number.isFinite(minWall) && minWall >= 0)) {
    throw new InputError(`--min-wall ${minWall} must be a number >= 0 (mm)`);
  }
  const { size } = options;
  if (!(Number.isFinite(size.value) && size.value > 0)) {
    throw new InputError(`${flagOf(size)} ${size.value} must be > 0 (mm): give the size of the largest ring in millimetres`);
  }
  for (const ring of result.rings) {
    if (!(ring.tube > 0)) {
      throw new InputError(`ring ${ring.name}: tube ${ring.tube} must be > 0 to make a part: use a result with a positive tube radius`);
    }
    if (ring.tube > ring.radius) {
      throw new InputError(`ring ${ring.name}: tube ${ring.tube} exceeds its core radius ${ring.radius} (self-intersecting torus): use a feasible result`);
    }
  }

  const sizedRing = largestRing(result);
  const scale = scaleFor(result, sizedRing, size, clearance);
  const rings = result.rings.map((r): PlannedRing => {
    const radius = r.radius * scale;
    const tube = r.tube * scale;
    const printedTube = tube - clearance / 2;
    return {
      name: r.name,
      center: [r.center[0] * scale, r.center[1] * scale, r.center[2] * scale],
      normal: normalize(r.normal),
      radius,
      tube,
      printedTube,
      wireDiameter: 2 * tube,
      printedWireDiameter: 2 * printedTube,
      innerDiameter: 2 * (radius - printedTube),
      outerDiameter: 2 * (radius + printedTube),
      aspectRatio: (radius - printedTube) / printedTube,
    };
  });
  for (const r of rings) {
    if (!(r.printedTube > 0)) {
      throw new InputError(
        `--clearance ${clearance} mm is not smaller than ring ${r.name}'s wire diameter ${fmt(r.wireDiameter)} mm: lower the clearance or make the part larger`,
      );
    }
  }

  let thinnest = 0;
  for (let i = 1; i < rings.length; i++) if (rings[i]!.printedTube < rings[thinnest]!.printedTube) thinnest = i;
  const thin = rings[thinnest]!;
  const minWallMet = thin.printedWireDiameter >= minWall;
  const usesPresetWall = options.minWall === undefined;
  const minWallMarginal = minWallMet && usesPresetWall && thin.printedWireDiameter < preset.minWallRange[1];
  const gauges = options.process === 'wire' ? rings.map((r) => gaugeAtMost(r.printedWireDiameter)) : null;

  const warnings: string[] = [];
  if (!minWallMet) {
    warnings.push(
      `WARNING: ring ${thin.name}'s printed wire diameter ${fmt(thin.printedWireDiameter)} mm is below the minimum wall ${fmt(minWall)} mm for ${preset.label}: the part may break or fail to print; make it larger or choose another process`,
    );
  }
  if (result.status !== 'optimal') {
    warnings.push(
      `WARNING: the result's status is '${result.status}', not 'optimal': the rings may not be at their certified thickest; check the solve before making parts`,
    );
  }
  const maxTube = Math.max(...rings.map((r) => r.tube));
  const maxPrinted = Math.max(...rings.map((r) => r.printedTube));
  return {
    status: result.status,
    units: 'mm',
    process: preset,
    scale,
    sizedRing,
    size,
    clearance,
    minWall,
    tube: result.tube * scale,
    rings,
    largestWireDiameter: 2 * maxTube,
    largestPrintedWireDiameter: 2 * maxPrinted,
    thinnestRing: thinnest,
    thinnestPrintedWireDiameter: thin.printedWireDiameter,
    aspectRatio: thin.aspectRatio,
    minWallMet,
    minWallMarginal,
    gauges,
    warnings,
  };
}

/** The CLI flag behind a size option, for messages. */
export function flagOf(size: SizeOption): string {
  return size.kind === 'coreRadius' ? '--core-radius' : size.kind === 'innerDiameter' ? '--inner-diameter' : '--outer-diameter';
}

function largestRing(result: SolveResult): number {
  let best = 0;
  for (let i = 1; i < result.rings.length; i++) if (result.rings[i]!.radius > result.rings[best]!.radius) best = i;
  return best;
}

// Sizes are of the printed part: printed ID = 2(R - r) s + c and printed OD = 2(R + r) s - c.
function scaleFor(result: SolveResult, index: number, size: SizeOption, clearance: number): number {
  const ring = result.rings[index]!;
  const R = ring.radius, r = ring.tube;
  switch (size.kind) {
    case 'coreRadius':
      return size.value / R;
    case 'innerDiameter': {
      const hole = 2 * (R - r);
      // A hole smaller than a part in a million of the ring is no hole: the inner diameter cannot set the scale.
      if (hole <= 1e-6 * R) {
        throw new InputError(
          `--inner-diameter: ring ${ring.name} has no hole (tube = core radius), so its inner diameter is the clearance alone: use --core-radius or --outer-diameter`,
        );
      }
      if (!(size.value > clearance)) {
        throw new InputError(
          `--inner-diameter ${size.value} mm must exceed the clearance ${clearance} mm: the printed hole is at least the clearance; give a larger inner diameter`,
        );
      }
      return (size.value - clearance) / hole;
    }
    case 'outerDiameter':
      return (size.value + clearance) / (2 * (R + r));
  }
}

function fmt(x: number): string {
  return Number(x.toPrecision(4)).toString();
}
