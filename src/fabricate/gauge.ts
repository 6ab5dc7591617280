// Wire gauge for the `wire` process: American Wire Gauge from its defining formula
// (ASTM B258): d(n) = 0.127 mm * 92^((36 - n) / 39), n = -3 (4/0) ... 40.

const AWG_MIN = -3;
const AWG_MAX = 40;

export interface GaugeChoice {
  /** AWG number (-3 = 4/0, -2 = 3/0, -1 = 2/0, 0 = 1/0). */
  awg: number;
  label: string;
  /** Nominal diameter of that gauge (mm). */
  diameter: number;
}

/** Diameter of AWG gauge n in mm. */
export function awgDiameter(n: number): number {
  return 0.127 * Math.pow(92, (36 - n) / 39);
}

/**
 * The thickest AWG gauge whose diameter does not exceed `wireDiameter` (mm): a thicker wire would
 * not fit the design. null when even AWG 40 is too thick or the wire is thicker than 4/0.
 */
export function gaugeAtMost(wireDiameter: number): GaugeChoice | null {
  // Guard against rounding at an exact gauge: accept up to one part in 1e9 over.
  const limit = wireDiameter * (1 + 1e-9);
  if (awgDiameter(AWG_MIN) <= limit) return null;
  for (let n = AWG_MIN; n <= AWG_MAX; n++) {
    const d = awgDiameter(n);
    if (d <= limit) return { awg: n, label: awgLabel(n), diameter: d };
  }
  return null;
}

function awgLabel(n: number): string {
  return n >= 0 ? (n === 0 ? '1/0 AWG' : `${n} AWG`) : `${1 - n}/0 AWG`;
}
