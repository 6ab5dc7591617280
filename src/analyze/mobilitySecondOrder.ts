// Second-order behaviour of first-order flexes, by exact kernel distances at moved poses.
// A flex x keeps every active contact at zero to first order; along the curve s x + (s²/2) y contact k
// changes by (s²/2)(q_k(x) + a_k . y) + O(s³). A y with q_k + a_k.y > 0 for every contact is a
// second-order escape (the set can then be thickened); by Farkas' lemma none exists exactly when a
// self-stress λ has Σ λ_k q_k(x) < 0. A stress whose form Ω(x) = Σ λ_k q_k(x) is negative definite on
// every flex proves the set locked at second order ("prestress stability", Connelly & Whiteley,
// "Second-order rigidity and prestress stability for tensegrity frameworks", SIAM J. Discrete Math. 9, 1996).
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { pointCircleDistance, ringDistance } from '../kernel/index.js';
import type { Lattice, Vec3 } from '../model/types.js';
import { imagePairs, shifted, type ImagePair } from './mobilityPairs.js';
import { cross, norm, rotate } from '../model/vec.js';
import { linkingNumber } from '../topology/index.js';
import { solveLp } from './mobilityLp.js';
import { dotN, type FirstOrder } from './mobility.js';
import type { Strut } from './mobilityContacts.js';
import { moveRing, movePoint, ringMotion, expandFree, type MotionFrame, type RingPose } from './mobilityMotion.js';

/** Rigid velocity of one ring: translation v (layout units per unit step) and rotation ω (radians per unit step). */
export interface RingVelocity {
  v: Vec3;
  omega: Vec3;
}

export type PairVerdict = 'opens-first-order' | 'closes-first-order' | 'opens-second-order' | 'closes-second-order' | 'flat';

export interface PairSecondOrder {
  a: number;
  b: number;
  /** Shift of ring b's copy (a lattice); [0,0,0] inside the cell. */
  offset: Vec3;
  /** Clearance d - r_a - r_b at s = 0 (layout units). */
  gap: number;
  /** Fitted clearance(s) - clearance(0) = c1 s + c2 s² + c3 s³ for s > 0 along the motion. */
  c1: number;
  c2: number;
  verdict: PairVerdict;
}

export interface AlongResult {
  pairs: PairSecondOrder[];
  /** Every active pair opens (at first or second order). */
  escape: boolean;
  /** Some active pair closes. */
  blocked: boolean;
  step: number;
}

export interface SecondOrderOptions {
  activeTol: number;
  /** Second-order correction y (one per ring): the motion follows s x + (s²/2) y. */
  correction?: readonly RingVelocity[];
  /** Step of the finite differences (layout units); default 1e-3 of the mean core radius. */
  step?: number;
  /** Translational periodicity of a weave: copies move with their rings. */
  lattice?: Lattice | null;
}

/** Slopes (dimensionless) and curvatures (per layout unit, times the length scale) below these are zero. */
export const SLOPE_TOL = 1e-5;
export const CURVATURE_TOL = 1e-5;
/** The pair-level check fits pair distances (minima over contacts, one-sided, step 1e-3): its curvature is
 * good to about 1e-5 on smooth motions but a corrected curve adds higher-order terms, so it calls a
 * curvature below this (times the length scale) flat. */
export const PAIR_CURVATURE_TOL = 1e-3;

/**
 * Move along the rigid velocities x (one per ring; with options.correction, along s x + (s²/2) y) and
 * classify every active pair by the fitted first- and second-order change of its exact kernel distance
 * (one-sided: s = h, 2h, 3h).
 */
export function secondOrderAlong(rings: readonly RingPose[], x: readonly RingVelocity[], options: SecondOrderOptions): AlongResult {
  const L = meanRadius(rings);
  const h = options.step ?? 1e-3 * L;
  const y = options.correction;
  const moved = [1, 2, 3].map((j) => rings.map((r, i) => displace(r, x[i]!, y ? y[i]! : null, j * h)));
  const pairs: PairSecondOrder[] = [];
  const candidates = imagePairs(rings, options.lattice ?? null, 2 * maxTubeOf(rings) + options.activeTol);
  for (const { a, b, offset } of candidates) {
    const sum = rings[a]!.tube + rings[b]!.tube;
    const gap = ringDistance(rings[a]!, shifted(rings[b]!, offset)).distance - sum;
    if (gap > options.activeTol) continue;
    const f = moved.map((P) => ringDistance(P[a]!, shifted(P[b]!, offset)).distance - sum - gap);
    // Cubic through 0 and the three samples: solve the 3x3 Vandermonde system in s/h.
    const [k1, k2] = cubicThroughZero(f[0]!, f[1]!, f[2]!);
    const c1 = k1 / h, c2 = k2 / (h * h);
    pairs.push({ a, b, offset, gap, c1, c2, verdict: verdictOf(c1, c2 * L) });
  }
  const opens = (v: PairVerdict): boolean => v === 'opens-first-order' || v === 'opens-second-order';
  return {
    pairs,
    escape: pairs.length > 0 && pairs.every((p) => opens(p.verdict)),
    blocked: pairs.some((p) => p.verdict === 'closes-first-order' || p.verdict === 'closes-second-order'),
    step: h,
  };
}

/** Result of the second-order search over all first-order flexes of a FirstOrder analysis. */
export interface SecondOrderReport {
  /** 'first-order-locked': no flex at all; 'prestress-stable': every flex closes at second order;
   * 'escape': a motion opens every contact (the set can be thickened); 'flexible': a flex keeps every
   * contact to second order (it may rattle without thickening); 'undetermined'; 'not-run'. */
  outcome: 'first-order-locked' | 'prestress-stable' | 'escape' | 'flexible' | 'undetermined' | 'not-run';
  /** Order of the escape (1: opens every contact at first order, 2: needs the curvature). */
  escapeOrder: 1 | 2 | null;
  /** Escape direction x (reduced coordinates, unit) and its second-order correction y; null without escape. */
  direction: number[] | null;
  correction: number[] | null;
  /** Eigenvalues of the stress form Ω on the flexes, descending (per layout unit). */
  stressFormEigenvalues: number[];
  /** Largest LP margin min_k (q_k(x) + a_k.y) found (per layout unit); > 0 for a second-order escape. */
  margin: number | null;
  /** Thickest common tube after following the escape a finite step, checked with the exact kernel. */
  thickenedTube: number | null;
  thickenStep: number | null;
  /** The ring poses at that step (tubes unchanged); null without a confirmed thickening. */
  thickenedRings: RingPose[] | null;
  /** Pair-level check along the escape (or along the top flex when there is none). */
  along: AlongResult | null;
  detail: string;
}

/**
 * Search the flexes of `fo` for a second-order escape, or prove that every flex is blocked at second order.
 * `tube` and `ratios` describe the tube radii: r_i = tube * ratios[i].
 */
export async function secondOrderSearch(
  rings: readonly RingPose[],
  fo: FirstOrder,
  tube: number,
  ratios: readonly number[],
  options: SecondOrderOptions,
): Promise<SecondOrderReport> {
  const frame = fo.frame;
  const L = frame.length;
  const h = options.step ?? 1e-3 * L;
  const none: SecondOrderReport = {
    outcome: 'not-run', escapeOrder: null, direction: null, correction: null, stressFormEigenvalues: [],
    margin: null, thickenedTube: null, thickenStep: null, thickenedRings: null, along: null, detail: '',
  };
  if (fo.status !== 'ok') return { ...none, detail: `first-order analysis failed (${fo.detail})` };
  if (fo.active.struts.length === 0) return { ...none, detail: 'no active contacts: every motion is free' };

  // Order 1: one motion opens every contact at once.
  if (fo.openingDirection !== null) {
    const x = unit(expandFree(frame, fo.openingDirection));
    const thick = thicken(rings, frame, x, null, tube, ratios, options.lattice ?? null);
    return {
      ...none, outcome: 'escape', escapeOrder: 1, direction: x, stressFormEigenvalues: [], margin: fo.openingMargin,
      thickenedTube: thick.tube, thickenStep: thick.step, thickenedRings: thick.rings,
      along: secondOrderAlong(rings, velocities(frame, x), options),
      detail: 'a first-order motion opens every active contact',
    };
  }
  if (fo.freeDimension === 0) return { ...none, outcome: 'first-order-locked', detail: 'no first-order motion beyond spins' };
  if (fo.stress === null) return { ...none, outcome: 'undetermined', detail: 'no self-stress found by the LP' };

  // Stress form Ω on span(C), by polarisation of second derivatives along basis sums.
  // The LP stress balances unit rows; divide by the gradient lengths to balance the true gradients.
  const stressed = fo.active.struts.map((s, k) => ({ s, k, w: fo.stress![k]! / fo.rowNorms[k]! })).filter((e) => e.w > 0);
  const basis = fo.span.map((z) => expandFree(frame, z));
  const f = basis.length;
  const omegaOf = (x: number[]): number =>
    stressed.reduce((acc, e) => acc + e.w * contactCurvature(rings, frame, e.s, x, h), 0);
  const diag = basis.map(omegaOf);
  const M = Matrix.zeros(f, f);
  for (let i = 0; i < f; i++) {
    M.set(i, i, diag[i]!);
    for (let j = i + 1; j < f; j++) {
      const sum = basis[i]!.map((v, k) => v + basis[j]![k]!);
      const off = (omegaOf(sum) - diag[i]! - diag[j]!) / 2;
      M.set(i, j, off);
      M.set(j, i, off);
    }
  }
  const evd = new EigenvalueDecomposition(M, { assumeSymmetric: true });
  const order = evd.realEigenvalues.map((v, i) => [v, i] as const).sort((p, q) => q[0] - p[0]);
  const eigen = order.map(([v]) => v);
  const tol = CURVATURE_TOL / L;
  if (eigen[0]! < -tol) {
    const top = combine(basis, evd.eigenvectorMatrix.getColumn(order[0]![1]));
    return {
      ...none, outcome: 'prestress-stable', stressFormEigenvalues: eigen,
      along: secondOrderAlong(rings, velocities(frame, top), options),
      detail: 'every first-order flex closes some contact at second order',
    };
  }

  // Candidates: flexes on which the stress form is not negative, best first; a one-way flex must open
  // (not close) the contacts outside E at first order, so try both signs.
  let bestMargin = -Infinity;
  let flexible: { x: number[]; y: number[] } | null = null;
  for (const [value, col] of order) {
    if (value < -tol) break;
    const x0 = unit(combine(basis, evd.eigenvectorMatrix.getColumn(col)));
    for (const sign of [1, -1]) {
      const x = x0.map((v) => sign * v);
      const slopes = fo.active.struts.map((s) => contactSlope(rings, frame, s, x, h));
      if (slopes.some((d) => d < -SLOPE_TOL)) continue;
      const flat = fo.active.struts.map((_, k) => k).filter((k) => Math.abs(slopes[k]!) <= SLOPE_TOL);
      const q = flat.map((k) => contactCurvature(rings, frame, fo.active.struts[k]!, x, h));
      const lp = await correctionLp(fo, flat, q, L);
      if (lp === null) continue;
      bestMargin = Math.max(bestMargin, lp.margin);
      if (lp.margin > tol) {
        const thick = thicken(rings, frame, x, lp.y, tube, ratios, options.lattice ?? null);
        return {
          ...none, outcome: 'escape', escapeOrder: 2, direction: x, correction: lp.y, stressFormEigenvalues: eigen,
          margin: lp.margin, thickenedTube: thick.tube, thickenStep: thick.step, thickenedRings: thick.rings,
          along: secondOrderAlong(rings, velocities(frame, x), { ...options, correction: velocities(frame, lp.y) }),
          detail: 'a first-order flex with a second-order correction opens every active contact',
        };
      }
      if (lp.margin >= -tol && flexible === null) flexible = { x, y: lp.y };
    }
  }
  if (flexible !== null) {
    return {
      ...none, outcome: 'flexible', direction: flexible.x, correction: flexible.y, stressFormEigenvalues: eigen, margin: bestMargin,
      along: secondOrderAlong(rings, velocities(frame, flexible.x), { ...options, correction: velocities(frame, flexible.y) }),
      detail: 'a first-order flex keeps every contact to second order: the set may move without thickening',
    };
  }
  return {
    ...none, outcome: 'undetermined', stressFormEigenvalues: eigen, margin: Number.isFinite(bestMargin) ? bestMargin : null,
    detail: 'the stress form is not negative definite, but no tested flex escapes',
  };
}

/** Per-ring velocities of a reduced motion x. */
export function velocities(frame: MotionFrame, x: ArrayLike<number>): RingVelocity[] {
  return Array.from({ length: frame.rings }, (_, i) => ringMotion(frame, x, i));
}

/**
 * Largest common tube (r_i = t ratio_i) the poses allow: every listed pair apart and every tube embedded.
 * `pairs` defaults to every pair of the rings (no lattice).
 */
export function maxCommonTube(rings: readonly RingPose[], ratios: readonly number[], pairs?: readonly ImagePair[]): number {
  let t = Infinity;
  for (let i = 0; i < rings.length; i++) if (ratios[i]! > 0) t = Math.min(t, rings[i]!.radius / ratios[i]!);
  for (const { a, b, offset } of pairs ?? imagePairs(rings, null, 0)) {
    const s = ratios[a]! + ratios[b]!;
    if (s > 0) t = Math.min(t, ringDistance(rings[a]!, shifted(rings[b]!, offset)).distance / s);
  }
  return t;
}

// ---------------------------------------------------------------------------------------------------

/**
 * Follow s x + (s²/2) y for growing s (where the second-order model holds: up to a tenth of the mean core
 * radius) and keep the best common tube, checked with the exact kernel, while every linking number stays.
 */
function thicken(
  rings: readonly RingPose[], frame: MotionFrame, x: number[], y: number[] | null, tube: number, ratios: readonly number[],
  lattice: Lattice | null,
): { tube: number | null; step: number | null; rings: RingPose[] | null } {
  // Steps reach a tenth of the length scale; copies farther than this cannot start to matter.
  const pairs = imagePairs(rings, lattice, 4 * maxTubeOf(rings) + frame.length);
  const base = maxCommonTube(rings, ratios, pairs);
  const linking = pairLinking(rings, pairs);
  let best = base, bestStep: number | null = null, bestRings: RingPose[] | null = null;
  for (let k = 0; k <= 10; k++) {
    const s = frame.length * 1e-4 * 2 ** k;
    const P = rings.map((r, i) => displace(r, ringMotion(frame, x, i), y === null ? null : ringMotion(frame, y, i), s));
    if (!sameLinking(pairLinking(P, pairs), linking)) break;
    const t = maxCommonTube(P, ratios, pairs);
    if (t <= best) {
      if (bestStep !== null) break;
      continue;
    }
    best = t;
    bestStep = s;
    bestRings = P;
  }
  const gain = best - Math.max(base, tube);
  return bestStep === null || !(gain > THICKEN_REL * frame.length)
    ? { tube: null, step: null, rings: null }
    : { tube: best, step: bestStep, rings: bestRings };
}

/** A thickening smaller than this (relative to the mean core radius) is not claimed. */
const THICKEN_REL = 1e-12;

function pairLinking(rings: readonly RingPose[], pairs: readonly ImagePair[]): number[] {
  return pairs.map(({ a, b, offset }) => linkingNumber(rings[a]!, shifted(rings[b]!, offset)));
}

function maxTubeOf(rings: readonly RingPose[]): number {
  return Math.max(0, ...rings.map((r) => r.tube));
}

function sameLinking(a: number[], b: number[]): boolean {
  return a.every((v, k) => v === b[k]);
}

/** max μ s.t. q_k + a_k.y >= μ on the flat contacts, |y_a| <= Y (y in the free coordinates, per layout unit). */
async function correctionLp(
  fo: FirstOrder, flat: number[], q: number[], L: number,
): Promise<{ margin: number; y: number[] } | null> {
  const m = fo.frame.free.length;
  if (flat.length === 0) return { margin: Infinity, y: new Array<number>(fo.frame.dim).fill(0) };
  const Y = 100 / L;
  const yBounds = (): [string, number, number][] => Array.from({ length: m }, (_, a) => [`y${a}`, -Y, Y] as [string, number, number]);
  // Rows a_k = g_k/|g_k|: a_k.y >= mu - q_k/|g_k| is q_k + g_k.y >= |g_k| mu, the same sign test.
  const rows = (mu: number | null) => flat.map((k, i) => ({
    terms: [
      ...fo.rows[k]!.map((c, a) => [`y${a}`, c] as [string, number]),
      ...(mu === null ? [['mu', -1] as [string, number]] : []),
    ],
    sense: '>=' as const,
    rhs: -q[i]! / fo.rowNorms[k]! + (mu ?? 0),
  }));
  const best = await solveLp({
    sense: 'maximize', objective: [['mu', 1]], rows: rows(null), bounds: [...yBounds(), ['mu', -Infinity, Infinity]],
  });
  if (best.status !== 'optimal') return null;
  const margin = best.values.get('mu') ?? -Infinity;
  let yz = Array.from({ length: m }, (_, a) => best.values.get(`y${a}`) ?? 0);
  if (Number.isFinite(margin)) {
    // The smallest correction (1-norm) that keeps half the margin (or, without a margin, stays within the
    // curvature tolerance of it): a large y bends the curve s x + (s²/2) y sharply, and the second-order
    // model then holds only for tiny steps.
    const target = margin > 0 ? margin / 2 : margin - CURVATURE_TOL / L;
    const small = await solveLp({
      sense: 'minimize',
      objective: Array.from({ length: m }, (_, a) => [`w${a}`, 1] as [string, number]),
      rows: [
        ...rows(target),
        ...Array.from({ length: m }, (_, a) => ({ terms: [[`w${a}`, 1], [`y${a}`, -1]] as [string, number][], sense: '>=' as const, rhs: 0 })),
        ...Array.from({ length: m }, (_, a) => ({ terms: [[`w${a}`, 1], [`y${a}`, 1]] as [string, number][], sense: '>=' as const, rhs: 0 })),
      ],
      bounds: [...yBounds(), ...Array.from({ length: m }, (_, a) => [`w${a}`, 0, Infinity] as [string, number, number])],
    });
    if (small.status === 'optimal') yz = Array.from({ length: m }, (_, a) => small.values.get(`y${a}`) ?? 0);
  }
  return { margin, y: expandFree(fo.frame, yz) };
}

/** d/ds of contact k's local-minimum distance at s = 0 along x (central difference). */
function contactSlope(rings: readonly RingPose[], frame: MotionFrame, s: Strut, x: number[], h: number): number {
  return (contactDistance(rings, frame, s, x, h) - contactDistance(rings, frame, s, x, -h)) / (2 * h);
}

/** d²/ds² of contact k's local-minimum distance at s = 0 along x (five-point stencil, error O(h⁴)). */
function contactCurvature(rings: readonly RingPose[], frame: MotionFrame, s: Strut, x: number[], h: number): number {
  const f = (t: number): number => contactDistance(rings, frame, s, x, t);
  return (-f(2 * h) + 16 * f(h) - 30 * f(0) + 16 * f(-h) - f(-2 * h)) / (12 * h * h);
}

/**
 * Distance of contact k after moving every ring by s x. A continuum sample keeps its material point
 * (the whole touching circle is sampled, so the minimum over samples is the pair's distance); an isolated
 * strut is re-minimised near its moved material point (golden-section search over A's angle, exact
 * point–circle distance to B), so it follows the local minimum as the kernel would.
 */
function contactDistance(rings: readonly RingPose[], frame: MotionFrame, s: Strut, x: number[], step: number): number {
  const A = rings[s.a]!, B = shifted(rings[s.b]!, s.offset);
  const ma = ringMotion(frame, x, s.a), mb = ringMotion(frame, x, s.b);
  const dA = scale3(ma.v, step), wA = scale3(ma.omega, step);
  const dB = scale3(mb.v, step), wB = scale3(mb.omega, step);
  const A1 = moveRing(A, dA, wA), B1 = moveRing(B, dB, wB);
  if (s.kind === 'continuum') {
    if (s.sampleOn === 'b') return pointCircleDistance(movePoint(B, s.pB, dB, wB), A1.center, A1.normal, A1.radius);
    return pointCircleDistance(movePoint(A, s.pA, dA, wA), B1.center, B1.normal, B1.radius);
  }
  // Material frame of A carried by the motion: the contact's angle stays meaningful.
  const arm = [s.pA[0] - A.center[0], s.pA[1] - A.center[1], s.pA[2] - A.center[2]] as Vec3;
  const e1 = unit3(arm);
  const e2 = cross(A.normal, e1);
  const angle = norm(wA);
  const k: Vec3 | null = angle > 0 ? [wA[0] / angle, wA[1] / angle, wA[2] / angle] : null;
  const f1 = k === null ? e1 : rotate(e1, k, angle);
  const f2 = k === null ? e2 : rotate(e2, k, angle);
  const g = (t: number): number => {
    const c = Math.cos(t) * A.radius, sn = Math.sin(t) * A.radius;
    const p: Vec3 = [A1.center[0] + c * f1[0] + sn * f2[0], A1.center[1] + c * f1[1] + sn * f2[1], A1.center[2] + c * f1[2] + sn * f2[2]];
    return pointCircleDistance(p, B1.center, B1.normal, B1.radius);
  };
  return goldenMin(g, -0.25, 0.25);
}

function goldenMin(g: (t: number) => number, lo: number, hi: number): number {
  const r = (Math.sqrt(5) - 1) / 2;
  let a = lo, b = hi;
  let c = b - r * (b - a), d = a + r * (b - a);
  let gc = g(c), gd = g(d);
  for (let i = 0; i < 80 && b - a > 1e-13; i++) {
    if (gc < gd) {
      b = d; d = c; gd = gc; c = b - r * (b - a); gc = g(c);
    } else {
      a = c; c = d; gc = gd; d = a + r * (b - a); gd = g(d);
    }
  }
  return Math.min(gc, gd, g((a + b) / 2));
}

/** Ring r moved by s·vx + (s²/2)·vy (translations and rotation vectors). */
function displace(r: RingPose, vx: RingVelocity, vy: RingVelocity | undefined | null, s: number): RingPose {
  const q = vy ? (s * s) / 2 : 0;
  const d: Vec3 = [s * vx.v[0] + q * (vy?.v[0] ?? 0), s * vx.v[1] + q * (vy?.v[1] ?? 0), s * vx.v[2] + q * (vy?.v[2] ?? 0)];
  const w: Vec3 = [
    s * vx.omega[0] + q * (vy?.omega[0] ?? 0),
    s * vx.omega[1] + q * (vy?.omega[1] ?? 0),
    s * vx.omega[2] + q * (vy?.omega[2] ?? 0),
  ];
  return moveRing(r, d, w);
}

function verdictOf(c1: number, c2L: number): PairVerdict {
  if (c1 > SLOPE_TOL) return 'opens-first-order';
  if (c1 < -SLOPE_TOL) return 'closes-first-order';
  if (c2L > PAIR_CURVATURE_TOL) return 'opens-second-order';
  if (c2L < -PAIR_CURVATURE_TOL) return 'closes-second-order';
  return 'flat';
}

/** Coefficients (k1, k2) of k1 u + k2 u² + k3 u³ through (1, f1), (2, f2), (3, f3). */
function cubicThroughZero(f1: number, f2: number, f3: number): [number, number] {
  // Inverse of [[1,1,1],[2,4,8],[3,9,27]] applied to (f1, f2, f3).
  const k1 = 3 * f1 - 1.5 * f2 + f3 / 3;
  const k2 = -2.5 * f1 + 2 * f2 - 0.5 * f3;
  return [k1, k2];
}

function combine(basis: number[][], coef: number[]): number[] {
  const out = new Array<number>(basis[0]!.length).fill(0);
  basis.forEach((b, i) => b.forEach((v, k) => (out[k]! += coef[i]! * v)));
  return out;
}

function unit(v: number[]): number[] {
  const l = Math.sqrt(dotN(v, v));
  return l > 0 ? v.map((x) => x / l) : v;
}

function unit3(v: Vec3): Vec3 {
  const l = norm(v);
  return [v[0] / l, v[1] / l, v[2] / l];
}

function scale3(v: Vec3, s: number): Vec3 {
  return [v[0] * s, v[1] * s, v[2] * s];
}

function meanRadius(rings: readonly RingPose[]): number {
  return rings.length === 0 ? 1 : rings.reduce((s, r) => s + r.radius, 0) / rings.length;
}

