// From an optimum in layout units to a part in millimetres: one size option fixes the scale
// (applied to the largest ring; the others scale with it), the clearance shrinks every tube by
// clearance/2 so facing surfaces that touched at the optimum end up `clearance` apart.
import { InputError } from '../model/errors.js';
import type { SolveResult } from '../model/result.js';
import type { SolveStatus, Vec3 } from '../model/types.js';
import { normalize } from '../model/vec.js';
import { tightestRing } from '../model/orbit.js';
import { gaugeAtMost, type GaugeChoice } from './gauge.js';
import type { SpringBack } from './materials.js';
import { PRESETS, type ProcessName, type ProcessPreset } from './presets.js';

/** Which dimension of the largest ring the user fixed (all in mm, of the printed part). */
export type SizeOption =
  | { kind: 'coreRadius'; value: number }
  | { kind: 'innerDiameter'; value: number }
  | { kind: 'outerDiameter'; value: number }
  /** Wire diameter of the thickest-wired ring (mm). */
  | { kind: 'wire'; value: number }
  /** Mandrel the largest ring is wound on (mm); its inner diameter is the mandrel plus spring-back. */
  | { kind: 'mandrel'; value: number };

export interface PlanOptions {
  size: SizeOption;
  process: ProcessName;
  /** Gap between facing surfaces (mm); the process preset when absent. */
  clearance?: number;
  /** Minimum wire (tube) diameter (mm); the process preset when absent. */
  minWall?: number;
  /** Accept a wire below the minimum wall with a WARNING instead of refusing it. */
  allowThin?: boolean;
  /** Wire process: spring-back of the wound rings (the mandrel figures need it). */
  springBack?: SpringBack;
}

/** Rings of one size made of wire: printed once per distinct size, not once per ring. */
export interface WireGroup {
  rings: string[];
  /** Wire diameter (mm). */
  wireDiameter: number;
  /** Smallest inner diameter the link or weave allows with this wire: AR x wire (mm). */
  innerDiameter: number;
  /** Aspect ratio of these rings (dimensionless). */
  aspectRatio: number;
  /** Mandrel diameter ignoring spring-back (= inner diameter, mm). */
  mandrel: number;
  /** Mandrel diameter that gives the inner diameter after spring-back (mm). */
  mandrelWithSpringBack: number;
  /** Thickest gauges not over the wire diameter (null when out of the gauge's range). */
  awg: GaugeChoice | null;
  swg: GaugeChoice | null;
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
  /** Smallest aspect ratio over the printed rings (Contract `aspectRatio`, dimensionless), and its ring. */
  aspectRatio: number;
  aspectRatioRing: string;
  /** Translation applied to the layout (mm) that puts the assembly on the build plate: lowest z = 0, centred in x, y. */
  placement: Vec3;
  minWallMet: boolean;
  /** Thinnest wire inside the quoted minimum-wall range: printable on a well-tuned machine only. */
  minWallMarginal: boolean;
  /** Wire process: one entry per distinct ring size; null for print processes. */
  wire: WireGroup[] | null;
  springBack: SpringBack | null;
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
  if ((size.kind === 'wire' || size.kind === 'mandrel') && options.process !== 'wire') {
    throw new InputError(`${flagOf(size)} sizes wire rings: drop --process ${options.process} (--process wire is implied) or give --core-radius, --inner-diameter or --outer-diameter`);
  }
  for (const ring of result.rings) {
    if (!(ring.tube > 0)) {
      throw new InputError(`ring ${ring.name}: tube ${ring.tube} must be > 0 to make a part: use a result with a positive tube radius`);
    }
    if (ring.tube > ring.radius) {
      throw new InputError(`ring ${ring.name}: tube ${ring.tube} exceeds its core radius ${ring.radius} (self-intersecting torus): use a feasible result`);
    }
  }

  const sizedRing = size.kind === 'wire' ? thickestRing(result) : largestRing(result);
  const springBack = options.process === 'wire' ? options.springBack ?? null : null;
  const scale = scaleFor(result, sizedRing, sizeForScale(size, springBack), clearance);
  const placement = buildPlatePlacement(result, scale, clearance);
  const rings = result.rings.map((r): PlannedRing => {
    const radius = r.radius * scale;
    const tube = r.tube * scale;
    const printedTube = tube - clearance / 2;
    return {
      name: r.name,
      center: [r.center[0] * scale + placement[0], r.center[1] * scale + placement[1], r.center[2] * scale + placement[2]],
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
  const wire = options.process === 'wire' ? wireGroups(rings, springBack?.percent ?? 0) : null;

  const warnings: string[] = [];
  if (!minWallMet) {
    const base = `ring ${thin.name}'s printed wire diameter ${fmt(thin.printedWireDiameter)} mm is below the minimum wall ${fmt(minWall)} mm for ${preset.label}`;
    if (options.allowThin !== true) {
      const need = smallestSizeForWall(result, sizedRing, size, springBack, clearance, minWall, thinnest);
      throw new InputError(`--min-wall: ${base}: give ${need} or more, lower --min-wall, or add --allow-thin to make it anyway`);
    }
    warnings.push(`WARNING: ${base} (--allow-thin): the part may break or fail to print`);
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
    ...tightestRing(rings),
    placement,
    minWallMet,
    minWallMarginal,
    wire,
    springBack,
    warnings,
  };
}

/** The CLI flag behind a size option, for messages. */
export function flagOf(size: SizeOption): string {
  switch (size.kind) {
    case 'coreRadius': return '--core-radius';
    case 'innerDiameter': return '--inner-diameter';
    case 'outerDiameter': return '--outer-diameter';
    case 'wire': return '--wire';
    case 'mandrel': return '--mandrel';
  }
}

/** Ring with the thickest tube (first on ties): a given wire is the thickest wire of the part. */
function thickestRing(result: SolveResult): number {
  let best = 0;
  for (let i = 1; i < result.rings.length; i++) if (result.rings[i]!.tube > result.rings[best]!.tube) best = i;
  return best;
}

// A mandrel of diameter M winds rings whose inner diameter is M (1 + spring-back).
function sizeForScale(size: SizeOption, springBack: SpringBack | null): SizeOption {
  if (size.kind !== 'mandrel') return size;
  return { kind: 'innerDiameter', value: size.value * (1 + (springBack?.percent ?? 0) / 100) };
}

// The size value (in the user's own option) at which the thinnest printed wire is exactly the minimum wall.
function smallestSizeForWall(
  result: SolveResult, sized: number, size: SizeOption, springBack: SpringBack | null, clearance: number, minWall: number, thin: number,
): string {
  const s = (minWall + clearance) / (2 * result.rings[thin]!.tube);
  const R = result.rings[sized]!.radius * s, r = result.rings[sized]!.tube * s;
  const value =
    size.kind === 'coreRadius' ? R
      : size.kind === 'innerDiameter' ? 2 * (R - r) + clearance
        : size.kind === 'outerDiameter' ? 2 * (R + r) - clearance
          : size.kind === 'wire' ? 2 * r - clearance
            : (2 * (R - r) + clearance) / (1 + (springBack?.percent ?? 0) / 100);
  // Round up in the last shown digit so the figure given really meets the wall.
  const step = Math.pow(10, Math.floor(Math.log10(value)) - 3);
  return `${flagOf(size)} ${Number((Math.ceil(value / step) * step).toPrecision(4))} (mm)`;
}

// Exact extents of a torus (centre c, unit normal n, core R, tube r) along axis k: c_k +- (R sqrt(1 - n_k^2) + r).
function buildPlatePlacement(result: SolveResult, scale: number, clearance: number): Vec3 {
  const lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity];
  for (const g of result.rings) {
    const n = normalize(g.normal);
    const r = g.tube * scale - clearance / 2;
    for (let k = 0; k < 3; k++) {
      const half = g.radius * scale * Math.sqrt(Math.max(0, 1 - n[k]! * n[k]!)) + r;
      lo[k] = Math.min(lo[k]!, g.center[k]! * scale - half);
      hi[k] = Math.max(hi[k]!, g.center[k]! * scale + half);
    }
  }
  return [-(lo[0]! + hi[0]!) / 2, -(lo[1]! + hi[1]!) / 2, -lo[2]!];
}

/** Same wire and inner diameter within this relative tolerance count as one ring size. */
const SAME_SIZE = 1e-9;

function wireGroups(rings: readonly PlannedRing[], springBackPercent: number): WireGroup[] {
  const groups: WireGroup[] = [];
  for (const r of rings) {
    const same = groups.find((g) =>
      Math.abs(g.wireDiameter - r.printedWireDiameter) <= SAME_SIZE * r.printedWireDiameter &&
      Math.abs(g.innerDiameter - r.innerDiameter) <= SAME_SIZE * r.outerDiameter);
    if (same) { same.rings.push(r.name); continue; }
    groups.push({
      rings: [r.name],
      wireDiameter: r.printedWireDiameter,
      innerDiameter: r.innerDiameter,
      aspectRatio: r.aspectRatio,
      mandrel: r.innerDiameter,
      mandrelWithSpringBack: r.innerDiameter / (1 + springBackPercent / 100),
      awg: gaugeAtMost(r.printedWireDiameter, 'AWG'),
      swg: gaugeAtMost(r.printedWireDiameter, 'SWG'),
    });
  }
  return groups;
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
    case 'wire':
      // The printed wire is the given wire: 2 r s - c = W.
      return (size.value + clearance) / (2 * r);
    case 'mandrel':
      throw new Error('mandrel sizes are turned into inner diameters first');
  }
}

function fmt(x: number): string {
  return Number(x.toPrecision(4)).toString();
}
