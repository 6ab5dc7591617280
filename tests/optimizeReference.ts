// Independent re-verification of inflation results for the optimizer tests: the pair distance by dense
// sampling plus golden-section refinement (tests/reference/bruteCircle.ts, which shares nothing with the
// kernel but the definition of a circle), and linking numbers from Gauss's double integral
// lk = (1/4π) ∮∮ (a - b)·(da × db) / |a - b|³ (Gauss 1833), summed by the trapezoid rule (spectrally
// accurate for smooth periodic integrands). Nothing here calls the solver, the kernel or src/topology.
import { refMinima } from './reference/bruteCircle.js';
import type { Ring } from '../src/model/types.js';

export interface Check {
  /** min over pairs of (brute-force distance - t (w_a + w_b)) / t. */
  minClearance: number;
  /** Signed linking matrix from the Gauss integral, rounded. */
  linking: number[][];
  /** Largest |Gauss integral - nearest integer|. */
  linkingRoundoff: number;
  /** Brute-force distance of every pair i < j. */
  distances: number[][];
}

export function bruteDistance(a: Ring, b: Ring): number {
  let d = Infinity;
  for (const m of refMinima(a, b, 2048)) d = Math.min(d, m.d);
  for (const m of refMinima(b, a, 2048)) d = Math.min(d, m.d);
  return d;
}

export function gaussLinking(a: Ring, b: Ring, n = 400): number {
  const pa = samples(a, n), pb = samples(b, n);
  const h = (2 * Math.PI) / n;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const [ax, ay, az, dax, day, daz] = pa[i]!;
    for (let j = 0; j < n; j++) {
      const [bx, by, bz, dbx, dby, dbz] = pb[j]!;
      const rx = ax - bx, ry = ay - by, rz = az - bz;
      const r3 = Math.hypot(rx, ry, rz) ** 3;
      const cx = day * dbz - daz * dby, cy = daz * dbx - dax * dbz, cz = dax * dby - day * dbx;
      sum += (rx * cx + ry * cy + rz * cz) / r3;
    }
  }
  return (sum * h * h) / (4 * Math.PI);
}

export function check(rings: readonly Ring[], tube: number, ratios: readonly number[]): Check {
  const n = rings.length;
  const linking = rings.map(() => new Array<number>(n).fill(0));
  const distances = rings.map(() => new Array<number>(n).fill(Infinity));
  let minClearance = Infinity, roundoff = 0;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const d = bruteDistance(rings[i]!, rings[j]!);
      distances[i]![j] = distances[j]![i] = d;
      minClearance = Math.min(minClearance, (d - tube * (ratios[i]! + ratios[j]!)) / tube);
      const g = gaussLinking(rings[i]!, rings[j]!);
      const k = Math.round(g) + 0; // + 0 turns -0 into 0
      roundoff = Math.max(roundoff, Math.abs(g - k));
      linking[i]![j] = linking[j]![i] = k;
    }
  }
  return { minClearance, linking, linkingRoundoff: roundoff, distances };
}

/** Points and tangents (d/dθ) of a ring in its own frame (any orthonormal frame will do). */
function samples(r: Ring, n: number): number[][] {
  const nn = r.normal;
  const l = Math.hypot(nn[0], nn[1], nn[2]);
  const z = [nn[0] / l, nn[1] / l, nn[2] / l];
  const a = Math.abs(z[0]!) < 0.6 ? [1, 0, 0] : [0, 1, 0];
  const d = a[0]! * z[0]! + a[1]! * z[1]! + a[2]! * z[2]!;
  const u0 = [a[0]! - d * z[0]!, a[1]! - d * z[1]!, a[2]! - d * z[2]!];
  const lu = Math.hypot(u0[0]!, u0[1]!, u0[2]!);
  const u = u0.map((x) => x / lu);
  // v = z × u, so (u, v, z) is right-handed and θ runs counter-clockwise about the normal.
  const v = [z[1]! * u[2]! - z[2]! * u[1]!, z[2]! * u[0]! - z[0]! * u[2]!, z[0]! * u[1]! - z[1]! * u[0]!];
  const out: number[][] = [];
  for (let k = 0; k < n; k++) {
    const th = (2 * Math.PI * k) / n, c = Math.cos(th), s = Math.sin(th);
    const p = [0, 1, 2].map((i) => r.center[i]! + r.radius * (c * u[i]! + s * v[i]!));
    const dp = [0, 1, 2].map((i) => r.radius * (-s * u[i]! + c * v[i]!));
    out.push([...p, ...dp]);
  }
  return out;
}
