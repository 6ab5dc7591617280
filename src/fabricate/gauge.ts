// Wire gauges for the `wire` process. American Wire Gauge from its defining formula (ASTM B258):
// d(n) = 0.127 mm * 92^((36 - n) / 39), n = -3 (4/0) ... 40. British Standard Wire Gauge (SWG) from the
// Imperial Standard Wire Gauge table (Board of Trade Order in Council, 1883; kept in BS 3737), in inches.
import { InputError } from '../model/errors.js';

const AWG_MIN = -3;
const AWG_MAX = 40;
const MM_PER_INCH = 25.4;

/** SWG 7/0 ... 50 in thousandths of an inch (Imperial Standard Wire Gauge, 1883); index 0 is 7/0. */
const SWG_MILS: readonly number[] = [
  500, 464, 432, 400, 372, 348, 324, // 7/0 .. 1/0
  300, 276, 252, 232, 212, 192, 176, 160, 144, 128, // 1 .. 10
  116, 104, 92, 80, 72, 64, 56, 48, 40, 36, // 11 .. 20
  32, 28, 24, 22, 20, 18, 16.4, 14.8, 13.6, 12.4, // 21 .. 30
  11.6, 10.8, 10, 9.2, 8.4, 7.6, 6.8, 6, 5.2, 4.8, // 31 .. 40
  4.4, 4, 3.6, 3.2, 2.8, 2.4, 2, 1.6, 1.2, 1, // 41 .. 50
];
const SWG_MIN = -6; // 7/0
const SWG_MAX = 50;

export type GaugeSystem = 'AWG' | 'SWG';

export interface GaugeChoice {
  system: GaugeSystem;
  /** Gauge number (0 = 1/0, -1 = 2/0, ...). */
  number: number;
  label: string;
  /** Nominal diameter of that gauge (mm). */
  diameter: number;
}

/** Diameter of AWG gauge n in mm. */
export function awgDiameter(n: number): number {
  return 0.127 * Math.pow(92, (36 - n) / 39);
}

/** Diameter of SWG gauge n in mm (n = 0 is 1/0, -6 is 7/0); null outside 7/0 ... 50. */
export function swgDiameter(n: number): number | null {
  if (!Number.isInteger(n) || n < SWG_MIN || n > SWG_MAX) return null;
  return (SWG_MILS[n - SWG_MIN]! / 1000) * MM_PER_INCH;
}

function diameterOf(system: GaugeSystem, n: number): number | null {
  if (system === 'SWG') return swgDiameter(n);
  return Number.isInteger(n) && n >= AWG_MIN && n <= AWG_MAX ? awgDiameter(n) : null;
}

/**
 * The thickest gauge of a system whose diameter does not exceed `wireDiameter` (mm): a thicker wire would
 * not fit the design. null when even the finest gauge is too thick or the wire is thicker than the largest.
 */
export function gaugeAtMost(wireDiameter: number, system: GaugeSystem = 'AWG'): GaugeChoice | null {
  // Guard against rounding at an exact gauge: accept up to one part in 1e9 over.
  const limit = wireDiameter * (1 + 1e-9);
  const [lo, hi] = system === 'AWG' ? [AWG_MIN, AWG_MAX] : [SWG_MIN, SWG_MAX];
  if (diameterOf(system, lo)! <= limit) return null;
  for (let n = lo; n <= hi; n++) {
    const d = diameterOf(system, n)!;
    if (d <= limit) return { system, number: n, label: gaugeLabel(system, n), diameter: d };
  }
  return null;
}

/** Range of a gauge system in mm, finest first, for messages. */
export function gaugeRange(system: GaugeSystem): [number, number] {
  return system === 'AWG' ? [awgDiameter(AWG_MAX), awgDiameter(AWG_MIN)] : [swgDiameter(SWG_MAX)!, swgDiameter(SWG_MIN)!];
}

export interface WireSpec {
  /** Wire diameter (mm). */
  diameter: number;
  /** The gauge when the wire was given as one. */
  gauge: GaugeChoice | null;
  /** As the user wrote it. */
  text: string;
}

/**
 * Parse `--wire`: a diameter in mm (`1.6`, `1.6mm`) or a gauge (`16swg`, `18awg`, `2/0awg`, `16 SWG`).
 * Throws InputError naming the flag, what was expected and an example.
 */
export function parseWire(text: string, flag = '--wire'): WireSpec {
  const t = text.trim().toLowerCase().replace(/\s+/g, '');
  const g = /^(\d+(?:\/0)?)(awg|swg)$/.exec(t);
  if (g) {
    const system = g[2] === 'awg' ? 'AWG' : 'SWG';
    const n = g[1]!.endsWith('/0') ? 1 - Number(g[1]!.slice(0, -2)) : Number(g[1]);
    const d = diameterOf(system, n);
    if (d === null) {
      const [lo, hi] = system === 'AWG' ? ['4/0', '40'] : ['7/0', '50'];
      throw new InputError(`${flag} '${text}': ${system} runs from ${lo} to ${hi}: give a gauge in that range or a diameter in mm (for example ${flag} 1.6)`);
    }
    return { diameter: d, gauge: { system, number: n, label: gaugeLabel(system, n), diameter: d }, text };
  }
  const m = /^(\d+(?:\.\d*)?|\.\d+)(mm)?$/.exec(t);
  const v = m ? Number(m[1]) : NaN;
  if (!(v > 0) || !Number.isFinite(v)) {
    throw new InputError(`${flag} '${text}' must be a wire diameter in mm > 0 or a gauge such as 16swg or 18awg (for example ${flag} 1.6)`);
  }
  return { diameter: v, gauge: null, text };
}

export function gaugeLabel(system: GaugeSystem, n: number): string {
  return n >= 1 ? `${n} ${system}` : `${1 - n}/0 ${system}`;
}
