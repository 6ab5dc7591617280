// Local coordinates of the ring poses around a base arrangement.
//
// One representative per ring orbit carries the variables; the other rings of the orbit are its images
// under the group. A representative moves by a centre displacement in the subspace its stabiliser fixes
// (basis bc) and by a rotation ω = n0 × δn, δn in the invariant part of its tangent plane (basis bn);
// variables are displacements in layout units (δn scaled by R), so one trust radius fits all of them.
// Rigid motions of the whole arrangement that commute with the group (all six without symmetry, the
// screw along the axis with C_N, none with D_N) are removed by fixing the variables they move most
// (complete pivoting, gauge.ts), so the remaining ones are a gauge-free chart.
import type { Ring, Vec3 } from '../../model/types.js';
import { mulVec, mulVecT, type Mat3, type RingOrbits } from '../../model/symmetry.js';
import { planeBasis } from '../../model/vec.js';
import { freeVariables, gaugePivotColumns, rigidMotionGenerator } from './gauge.js';
import { expMap, leftJacobian } from './rotation.js';

/** Basis vectors shorter than this after projection are dropped (the projected space is smaller). */
const BASIS_TOL = 1e-8;

export interface RepBlock {
  ring: number;
  radius: number;
  c0: Vec3;
  n0: Vec3;
  /** Orthonormal allowed centre moves. */
  bc: Vec3[];
  /** Orthonormal allowed normal moves (tangent to n0). */
  bn: Vec3[];
  /** Index of the block's first variable in the full variable vector (bc first, then bn). */
  offset: number;
}

export interface Chart {
  n: number;
  base: Ring[];
  /** Base material frames (planeBasis of each base normal), flat 3 per ring. */
  e1: Float64Array;
  e2: Float64Array;
  reps: RepBlock[];
  repOfRing: Int32Array;
  /** Element mapping the representative onto each ring. */
  matOfRing: Mat3[];
  origin: Vec3;
  nFull: number;
  /** Full-vector index of each free variable. */
  free: Int32Array;
  /** Free index of each full variable, or -1 when fixed by the gauge. */
  freeOf: Int32Array;
  nFree: number;
}

/** Poses at chart coordinates z (flat, 3 per ring), with what gradients need. */
export interface Posed {
  c: Float64Array;
  n: Float64Array;
  e1: Float64Array;
  e2: Float64Array;
  R: Float64Array;
  /** Per representative and bn vector: J(ω)(n0 × bn_k)/R, the ω-direction of a unit variable. */
  dirs: Float64Array[][];
  /** Per representative (3 each): its rotation vector ω, on which `dirs` depends (the chart's curvature). */
  omega: Float64Array;
}

/**
 * The group whose commuting rigid motions are gauge: the imposed symmetry, or, when only the departure
 * from a symmetry is bounded, that symmetry (a motion that does not commute with it changes the departure).
 */
export interface GaugeGroup {
  elements: Mat3[];
  origin: Vec3;
}

export function buildChart(rings: readonly Ring[], orbits: RingOrbits, gauge: GaugeGroup | false): Chart {
  const n = rings.length;
  const e1 = new Float64Array(3 * n), e2 = new Float64Array(3 * n);
  for (let j = 0; j < n; j++) {
    const [a, b] = planeBasis(rings[j]!.normal);
    e1.set(a, 3 * j);
    e2.set(b, 3 * j);
  }
  const reps: RepBlock[] = [];
  const repOfRing = new Int32Array(n);
  const matOfRing: Mat3[] = new Array<Mat3>(n);
  let offset = 0;
  for (let o = 0; o < orbits.orbits.length; o++) {
    const orbit = orbits.orbits[o]!;
    const r = orbit[0]!;
    const ring = rings[r]!;
    const stab: number[] = [];
    for (let g = 0; g < orbits.perms.length; g++) if (orbits.perms[g]![r] === r) stab.push(g);
    const Pc = average(stab.map((g) => orbits.elements[g]!), stab.map(() => 1));
    const Pn = average(stab.map((g) => orbits.elements[g]!), stab.map((g) => orbits.signs[g]![r]!));
    const bc = orthonormalImages(Pc, [[1, 0, 0], [0, 1, 0], [0, 0, 1]], null);
    const [t1, t2] = planeBasis(ring.normal);
    const bn = orthonormalImages(Pn, [t1, t2], ring.normal);
    reps.push({ ring: r, radius: ring.radius, c0: [...ring.center], n0: [...ring.normal], bc, bn, offset });
    offset += bc.length + bn.length;
    for (const j of orbit) {
      repOfRing[j] = o;
      matOfRing[j] = orbits.elements[orbits.fromRep[j]!]!;
    }
  }
  const nFull = offset;
  const fixed = gauge ? gaugeFixedVariables(rings, gauge, reps, nFull) : [];
  const { free, freeOf, nFree } = freeVariables(nFull, fixed);
  return { n, base: rings.slice(), e1, e2, reps, repOfRing, matOfRing, origin: [...orbits.origin], nFull, free, freeOf, nFree };
}

/** Poses at free coordinates z (length chart.nFree). */
export function posedAt(chart: Chart, z: ArrayLike<number>): Posed {
  const n = chart.n;
  const c = new Float64Array(3 * n), nn = new Float64Array(3 * n);
  const e1 = new Float64Array(3 * n), e2 = new Float64Array(3 * n), R = new Float64Array(n);
  const full = new Float64Array(chart.nFull);
  for (let k = 0; k < chart.nFree; k++) full[chart.free[k]!] = z[k]!;
  const repC: Vec3[] = [], repQ: Mat3[] = [];
  const dirs: Float64Array[][] = [];
  const omega = new Float64Array(3 * chart.reps.length);
  for (const rep of chart.reps) {
    const cc: Vec3 = [rep.c0[0], rep.c0[1], rep.c0[2]];
    rep.bc.forEach((b, k) => {
      const u = full[rep.offset + k]!;
      cc[0] += u * b[0]; cc[1] += u * b[1]; cc[2] += u * b[2];
    });
    let dx = 0, dy = 0, dz = 0;
    rep.bn.forEach((b, k) => {
      const v = full[rep.offset + rep.bc.length + k]! / rep.radius;
      dx += v * b[0]; dy += v * b[1]; dz += v * b[2];
    });
    const n0 = rep.n0;
    const wx = n0[1] * dz - n0[2] * dy, wy = n0[2] * dx - n0[0] * dz, wz = n0[0] * dy - n0[1] * dx;
    omega[3 * repQ.length] = wx;
    omega[3 * repQ.length + 1] = wy;
    omega[3 * repQ.length + 2] = wz;
    repC.push(cc);
    repQ.push(expMap(wx, wy, wz));
    const J = leftJacobian(wx, wy, wz);
    dirs.push(rep.bn.map((b) => {
      const d = mulVec(J, [n0[1] * b[2] - n0[2] * b[1], n0[2] * b[0] - n0[0] * b[2], n0[0] * b[1] - n0[1] * b[0]]);
      return Float64Array.of(d[0] / rep.radius, d[1] / rep.radius, d[2] / rep.radius);
    }));
  }
  const o = chart.origin;
  for (let j = 0; j < n; j++) {
    const r = chart.repOfRing[j]!;
    const M = chart.matOfRing[j]!;
    const cr = repC[r]!;
    const cj = mulVec(M, [cr[0] - o[0], cr[1] - o[1], cr[2] - o[2]]);
    c[3 * j] = cj[0] + o[0]; c[3 * j + 1] = cj[1] + o[1]; c[3 * j + 2] = cj[2] + o[2];
    // The ring turns by M Q Mᵀ about its own centre.
    const Q = repQ[r]!;
    const base = chart.base[j]!;
    const nj = conj(M, Q, base.normal);
    nn.set(nj, 3 * j);
    e1.set(conj(M, Q, chart.e1.subarray(3 * j, 3 * j + 3)), 3 * j);
    e2.set(conj(M, Q, chart.e2.subarray(3 * j, 3 * j + 3)), 3 * j);
    R[j] = base.radius;
  }
  return { c, n: nn, e1, e2, R, dirs, omega };
}

/**
 * Add the gradient of a function of ring j's pose to out (free coordinates): gc is its derivative in the
 * ring centre, gw in an infinitesimal rotation of the ring about its centre (frame-free, world axes).
 */
export function addRingGradient(
  chart: Chart, posed: Posed, j: number, gc: ArrayLike<number>, gw: ArrayLike<number>, scale: number, out: Float64Array,
): void {
  const r = chart.repOfRing[j]!;
  const rep = chart.reps[r]!;
  const M = chart.matOfRing[j]!;
  // Rotations act on ω like vectors (proper rotations only), so pull both back with Mᵀ.
  const c = mulVecT(M, gc), w = mulVecT(M, gw);
  for (let k = 0; k < rep.bc.length; k++) {
    const f = chart.freeOf[rep.offset + k]!;
    if (f < 0) continue;
    const b = rep.bc[k]!;
    out[f] = out[f]! + scale * (c[0] * b[0] + c[1] * b[1] + c[2] * b[2]);
  }
  const dirs = posed.dirs[r]!;
  for (let k = 0; k < rep.bn.length; k++) {
    const f = chart.freeOf[rep.offset + rep.bc.length + k]!;
    if (f < 0) continue;
    const d = dirs[k]!;
    out[f] = out[f]! + scale * (w[0] * d[0]! + w[1] * d[1]! + w[2] * d[2]!);
  }
}

/** Free coordinates of the representatives of rings a and b (ascending, each once): a pair row's support. */
export function pairSupport(chart: Chart, a: number, b: number): Int32Array {
  const out: number[] = [];
  const ra = chart.repOfRing[a]!, rb = chart.repOfRing[b]!;
  for (const r of ra === rb ? [ra] : [ra, rb]) {
    const rep = chart.reps[r]!;
    const len = rep.bc.length + rep.bn.length;
    for (let k = 0; k < len; k++) {
      const f = chart.freeOf[rep.offset + k]!;
      if (f >= 0) out.push(f);
    }
  }
  return Int32Array.from(out).sort();
}

/** The rings at a posed configuration (names and radii from the base). */
export function ringsOf(chart: Chart, posed: Posed): Ring[] {
  return chart.base.map((ring, j) => {
    const nx = posed.n[3 * j]!, ny = posed.n[3 * j + 1]!, nz = posed.n[3 * j + 2]!;
    const l = Math.hypot(nx, ny, nz);
    return {
      name: ring.name,
      center: [posed.c[3 * j]!, posed.c[3 * j + 1]!, posed.c[3 * j + 2]!],
      normal: [nx / l, ny / l, nz / l],
      radius: ring.radius,
    };
  });
}

// --- helpers ---

/** Rigid motions commuting with the group, as variable vectors; fix one variable per independent one. */
function gaugeFixedVariables(rings: readonly Ring[], group: GaugeGroup, reps: RepBlock[], nFull: number): number[] {
  const G = group.elements;
  const fixAxes = orthonormalImages(average(G, G.map(() => 1)), [[1, 0, 0], [0, 1, 0], [0, 0, 1]], null);
  // Rotations about the centroid when there is no symmetry (better conditioned); otherwise about the origin.
  let o: Vec3 = [...group.origin];
  if (G.length === 1 && rings.length > 0) {
    o = [0, 0, 0];
    for (const r of rings) for (let k = 0; k < 3; k++) o[k]! += r.center[k]! / rings.length;
  }
  const gens: Float64Array[] = [];
  for (const f of fixAxes) {
    for (const kind of ['translate', 'rotate'] as const) gens.push(rigidMotionGenerator(reps, f, o, kind, nFull));
  }
  return gaugePivotColumns(gens, nFull);
}

function conj(M: Mat3, Q: Mat3, v: ArrayLike<number>): Vec3 {
  return mulVec(M, mulVec(Q, mulVecT(M, v)));
}

/** Weighted mean of matrices. */
function average(mats: Mat3[], weights: number[]): Mat3 {
  const out = new Array<number>(9).fill(0) as Mat3;
  mats.forEach((M, g) => {
    for (let k = 0; k < 9; k++) out[k] = out[k]! + (weights[g]! * M[k]!) / mats.length;
  });
  return out;
}

/** Orthonormal basis of the span of P v over the given vectors, optionally orthogonal to `perp`. */
function orthonormalImages(P: Mat3, vs: ArrayLike<number>[], perp: ArrayLike<number> | null): Vec3[] {
  const out: Vec3[] = [];
  for (const v of vs) {
    let w = mulVec(P, v);
    if (perp) w = sub(w, scaleV(perp, dot(w, perp)));
    for (const b of out) w = sub(w, scaleV(b, dot(w, b)));
    const l = Math.hypot(w[0], w[1], w[2]);
    if (l > BASIS_TOL) out.push([w[0] / l, w[1] / l, w[2] / l]);
  }
  return out;
}

function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  return a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
}
function sub(a: ArrayLike<number>, b: ArrayLike<number>): Vec3 {
  return [a[0]! - b[0]!, a[1]! - b[1]!, a[2]! - b[2]!];
}
function scaleV(a: ArrayLike<number>, s: number): Vec3 {
  return [a[0]! * s, a[1]! * s, a[2]! * s];
}
