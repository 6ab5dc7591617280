// Local coordinates of a periodic arrangement: the poses of the cell's rings and the lattice vectors.
//
// Ring variables are those of the plain chart (chart.ts with no symmetry: 3 centre moves and 2 normal
// moves scaled by R, in layout units); each lattice vector adds 3 (layout units). The image of ring j at
// shift s has centre c_j + Σ s_k L_k and ring j's normal, so a function of that image depends on ring j's
// pose (as if it were ring j) and on every L_k with weight s_k. Rigid motions of the whole pattern (three
// translations; three rotations, which turn the lattice vectors too) leave every distance unchanged:
// one variable per motion is fixed by complete pivoting (gauge.ts, as for chart.ts), so the chart is
// gauge-free.
import { trivialOrbits } from '../../model/symmetry.js';
import type { Lattice, Ring, Vec3 } from '../../model/types.js';
import { addRingGradient, buildChart, posedAt, ringsOf, type Chart, type Posed } from './chart.js';
import { freeVariables, gaugePivotColumns, rigidMotionGenerator } from './gauge.js';

export interface PeriodicChart {
  /** Chart of the cell's ring poses (no symmetry, no gauge: its variables are the first 5m full ones). */
  ring: Chart;
  m: number;
  /** Number of lattice vectors (1 chain, 2 sheet). */
  K: number;
  /** Base lattice vectors, flat 3 per vector. */
  L0: Float64Array;
  nFull: number;
  free: Int32Array;
  /** Free index of each full variable, or -1 when fixed by the gauge. */
  freeOf: Int32Array;
  nFree: number;
}

export interface PeriodicPosed {
  posed: Posed;
  /** Lattice vectors, flat 3 per vector. */
  L: Float64Array;
}

export function buildPeriodicChart(rings: readonly Ring[], lattice: Lattice): PeriodicChart {
  const m = rings.length;
  const K = lattice.vectors.length;
  const ring = buildChart(rings, trivialOrbits(m), false);
  const L0 = new Float64Array(3 * K);
  lattice.vectors.forEach((v, k) => L0.set(v, 3 * k));
  const nFull = ring.nFull + 3 * K;
  const { free, freeOf, nFree } = freeVariables(nFull, gaugeFixed(ring, L0, K, nFull));
  return { ring, m, K, L0, nFull, free, freeOf, nFree };
}

/** Poses and lattice at free coordinates z. */
export function periodicPosedAt(pc: PeriodicChart, z: ArrayLike<number>): PeriodicPosed {
  const full = new Float64Array(pc.nFull);
  for (let k = 0; k < pc.nFree; k++) full[pc.free[k]!] = z[k]!;
  const posed = posedAt(pc.ring, full.subarray(0, pc.ring.nFull));
  const L = Float64Array.from(pc.L0);
  for (let k = 0; k < 3 * pc.K; k++) L[k] = L[k]! + full[pc.ring.nFull + k]!;
  return { posed, L };
}

/** The cell's rings and the lattice at a posed configuration. */
export function stateOf(pc: PeriodicChart, pp: PeriodicPosed): { rings: Ring[]; lattice: Lattice } {
  const vectors: Vec3[] = [];
  for (let k = 0; k < pc.K; k++) vectors.push([pp.L[3 * k]!, pp.L[3 * k + 1]!, pp.L[3 * k + 2]!]);
  return { rings: ringsOf(pc.ring, pp.posed), lattice: { vectors } };
}

/**
 * Add to `full` (length nFull) the gradient of a function of the image of ring j at `shift`: gc is its
 * derivative in the image's centre, gw in an infinitesimal rotation of the image about its centre.
 */
export function addImageGradient(
  pc: PeriodicChart, pp: PeriodicPosed, j: number, shift: readonly number[] | null,
  gc: ArrayLike<number>, gw: ArrayLike<number>, scale: number, full: Float64Array,
): void {
  addRingGradient(pc.ring, pp.posed, j, gc, gw, scale, full);
  if (shift === null) return;
  const o = pc.ring.nFull;
  for (let k = 0; k < pc.K; k++) {
    const s = shift[k]!;
    if (s === 0) continue;
    for (let d = 0; d < 3; d++) full[o + 3 * k + d] = full[o + 3 * k + d]! + scale * s * gc[d]!;
  }
}

/** The lattice vectors of a posed configuration. */
export function latticeVectors(pp: PeriodicPosed): Vec3[] {
  const out: Vec3[] = [];
  for (let k = 0; k < pp.L.length / 3; k++) out.push([pp.L[3 * k]!, pp.L[3 * k + 1]!, pp.L[3 * k + 2]!]);
  return out;
}

/** Gather a full-variable vector into free coordinates. */
export function toFree(pc: PeriodicChart, full: Float64Array, out: Float64Array): void {
  for (let k = 0; k < pc.nFree; k++) out[k] = full[pc.free[k]!]!;
}

// ---- helpers -------------------------------------------------------------------------------------

/** Translations and rotations of the whole pattern as variable vectors; fix one variable per motion. */
function gaugeFixed(chart: Chart, L0: Float64Array, K: number, nFull: number): number[] {
  const o: Vec3 = [0, 0, 0];
  for (const rep of chart.reps) for (let k = 0; k < 3; k++) o[k]! += rep.c0[k]! / chart.reps.length;
  const gens: Float64Array[] = [];
  const axes: Vec3[] = [[1, 0, 0], [0, 1, 0], [0, 0, 1]];
  for (const f of axes) {
    for (const kind of ['translate', 'rotate'] as const) {
      const v = rigidMotionGenerator(chart.reps, f, o, kind, nFull);
      // The lattice turns with the pattern; a translation leaves it alone.
      if (kind === 'rotate') {
        for (let k = 0; k < K; k++) {
          const dl = cross(f, L0.subarray(3 * k, 3 * k + 3));
          for (let d = 0; d < 3; d++) v[chart.nFull + 3 * k + d] = dl[d]!;
        }
      }
      gens.push(v);
    }
  }
  return gaugePivotColumns(gens, nFull);
}

function cross(a: ArrayLike<number>, b: ArrayLike<number>): Vec3 {
  return [a[1]! * b[2]! - a[2]! * b[1]!, a[2]! * b[0]! - a[0]! * b[2]!, a[0]! * b[1]! - a[1]! * b[0]!];
}
