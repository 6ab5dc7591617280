// The symmetry-breaking curve: the thickest tube when the layout may depart from a symmetry by at most
// ε (symmetryDeparture, layout units), from ε = 0 (the symmetric optimum) until the gain saturates at
// the unconstrained optimum.
//
// Each ε is warm-started from the solution at the previous ε (as given, and slightly perturbed: the
// symmetric optimum is a critical point of the unconstrained problem too — symmetric criticality — so
// an unperturbed start can sit there) and from the straight path between the symmetric optimum and the
// aligned unconstrained one, whose departure grows linearly along the path. The previous solution stays
// feasible as ε grows, so the best feasible tube found can only rise: when no start improves on it, it
// is kept as the value at this ε (an honest lower bound on the curve, flagged 'stalled'). At the last ε
// the aligned unconstrained optimum is itself feasible, so the curve ends at the unconstrained value.
// Every point's departure is re-measured here and both ends are re-checked by verify.ts. Every solve bounds and
// every point measures the departure with one ring matching, the symmetric optimum's (nearest images): the
// unconstrained optimum is usually too far from symmetric for nearest images to pair its own rings consistently.
import { verifyConfiguration } from '../check/verify.js';
import { alignRings, applyAlignment } from './align.js';
import type { ResultRing, SolveResult, SweepPoint, Verification } from '../model/result.js';
import { ringOrbits, symmetryDeparture } from '../model/symmetry.js';
import type { Ring, SolveStatus, Symmetry } from '../model/types.js';
import { runMultistart } from '../optimize/run/multistart.js';
import type { InflateProblem } from '../optimize/run/problem.js';

export interface SweepOptions {
  tol: number;
  seed: number;
  workers: number;
  /** Steps between ε = 0 and the departure of the unconstrained optimum (default 6). */
  points?: number;
  maxIterations?: number;
  spec: string;
  units: string | null;
  onProgress?: (e: SweepProgress) => void;
}

export interface SweepProgress {
  done: number;
  total: number;
  epsilon: number;
  tube: number;
  status: SolveStatus;
}

/** The configuration behind one point of the curve. */
export interface SweepConfiguration {
  epsilon: number;
  tube: number;
  rings: Ring[];
}

export interface SweepOutcome {
  points: SweepPoint[];
  configurations: SweepConfiguration[];
  /** Independent re-check of the configurations at the first and last point. */
  startCheck: Verification;
  endCheck: Verification;
  /** Departure of the unconstrained optimum after best rigid alignment onto the symmetric one (layout units). */
  brokenDeparture: number;
  /** True when the last point reached the unconstrained value within the saturation tolerance. */
  saturated: boolean;
  messages: string[];
}

export const DEFAULT_SWEEP_POINTS = 6;
/** Saturation tolerance relative to the tube: the larger of this and SATURATION_TOL_FACTOR × tol. */
export const SATURATION_REL_MIN = 1e-6;
export const SATURATION_TOL_FACTOR = 100;
/** Perturbation of the warm start, relative to each ring's radius (dimensionless). */
const WARM_PERTURBATION = 0.01;
/**
 * A solve may exceed ε by this much (relative to ε) and still count — the solver meets the bound only to
 * its own tolerance; such a point is plotted at the departure it really has, so the curve stays honest.
 */
const DEPARTURE_SLACK_REL = 1e-2;
/** ... plus this much relative to the smallest core radius, for ε near 0. */
const DEPARTURE_SLACK_ABS_REL = 1e-9;
/** When the two optima coincide, the curve is still shown flat out to this departure (× smallest core radius). */
const FLAT_SHOW_REL = 0.05;

/**
 * Sweep ε from 0 to the departure of the (aligned) unconstrained optimum. `base` supplies tube ratios
 * and the linking to keep; the symmetric and broken results are the two ends.
 */
export async function symmetryBreakingSweep(
  base: Pick<InflateProblem, 'tubeRatios' | 'linking'>,
  symmetry: Symmetry,
  symmetric: SolveResult,
  broken: SolveResult,
  options: SweepOptions,
): Promise<SweepOutcome> {
  const ratios = base.tubeRatios;
  const symmetricRings = symmetric.rings.map(toRing);
  const orbits = ringOrbits(symmetricRings, symmetry);
  const alignment = alignRings(broken.rings, symmetric.rings);
  const alignedBroken = broken.rings.map((r) => toRing(applyAlignment(alignment, r)));
  const brokenDeparture = symmetryDeparture(alignedBroken, symmetry, orbits);
  const minRadius = Math.min(...symmetricRings.map((r) => r.radius));
  const satTol = Math.max(SATURATION_REL_MIN, SATURATION_TOL_FACTOR * options.tol) * Math.max(broken.tube, symmetric.tube);
  const saturatedAt = (tube: number): boolean => tube >= broken.tube - satTol;
  const messages: string[] = [];
  let seed = options.seed;

  const points: SweepPoint[] = [{ epsilon: 0, tube: symmetric.tube, status: symmetric.status }];
  const configurations: SweepConfiguration[] = [{ epsilon: 0, tube: symmetric.tube, rings: symmetricRings }];
  let current = { rings: symmetricRings, tube: symmetric.tube };

  // Grid: evenly spaced up to the broken optimum's departure; one flat step when the optima coincide.
  const steps = Math.max(1, options.points ?? DEFAULT_SWEEP_POINTS);
  const flat = saturatedAt(symmetric.tube);
  const epsMax = flat ? Math.max(brokenDeparture, FLAT_SHOW_REL * minRadius) : brokenDeparture;
  const grid = flat || !(epsMax > 0) ? [Math.max(epsMax, FLAT_SHOW_REL * minRadius)] : Array.from({ length: steps }, (_, k) => (epsMax * (k + 1)) / steps);
  for (const [k, epsilon] of grid.entries()) {
    if (epsilon <= points[points.length - 1]!.epsilon) continue;
    const last = k === grid.length - 1;
    const candidates: Candidate[] = [];
    // Warm start as given (start 0) and perturbed (start 1).
    candidates.push(...await solveAt(current.rings, epsilon, 2));
    if (!flat && epsMax > 0) {
      // Two paths towards the unconstrained optimum: straight from the symmetric optimum, and the
      // unconstrained optimum itself, which the solver first pulls towards its symmetrised copy until
      // it is within ε. They run side by side on the worker pool.
      const s = Math.min(1, epsilon / epsMax);
      const paths = await Promise.all([
        solveAt(interpolate(symmetricRings, alignedBroken, s), epsilon, 1),
        solveAt(alignedBroken, epsilon, 1),
      ]);
      candidates.push(...paths.flat());
    }
    if (last && !flat && epsilon >= brokenDeparture) {
      // The aligned unconstrained optimum is feasible here as it stands (a rigid motion keeps every distance).
      candidates.push({ rings: alignedBroken, tube: broken.tube, status: broken.status, departure: brokenDeparture });
    }
    const best = candidates.reduce<Candidate | null>((b, c) => (b === null || c.tube > b.tube ? c : b), null);
    let status: SolveStatus;
    let at = epsilon;
    if (best && best.tube >= current.tube) {
      current = { rings: best.rings, tube: best.tube };
      status = best.status;
      // The solver meets the bound to its own tolerance: plot the point at the departure it really has.
      at = Math.max(epsilon, best.departure);
    } else {
      // The previous configuration is feasible at this larger ε: keep it rather than report a dip.
      status = 'stalled';
      messages.push(`sweep: at ε = ${fmt(epsilon)} no start improved on the previous point; its configuration is kept (a lower bound)`);
    }
    points.push({ epsilon: at, tube: current.tube, status });
    configurations.push({ epsilon: at, tube: current.tube, rings: current.rings });
    options.onProgress?.({ done: k + 1, total: grid.length, epsilon: at, tube: current.tube, status });
    if (!flat && saturatedAt(current.tube)) break;
  }

  const startCheck = verifyConfiguration({ rings: symmetricRings, tube: symmetric.tube, tubeRatios: ratios, linking: base.linking });
  const endCheck = verifyConfiguration({ rings: current.rings, tube: current.tube, tubeRatios: ratios, linking: base.linking });
  if (!startCheck.ok) {
    points[0]!.status = 'failed';
    messages.push(`sweep: the ε = 0 configuration fails the independent check: ${startCheck.messages.join('; ')}`);
  }
  if (!endCheck.ok) {
    points[points.length - 1]!.status = 'failed';
    messages.push(`sweep: the last configuration fails the independent check: ${endCheck.messages.join('; ')}`);
  }
  const saturated = saturatedAt(current.tube);
  if (!saturated) {
    messages.push(
      `sweep: stopped at ε = ${fmt(points[points.length - 1]!.epsilon)} with tube ${fmt(current.tube)}, short of the unconstrained ` +
        `${fmt(broken.tube)} by more than the tolerance ${fmt(satTol)} (layout units)`,
    );
  }
  return { points, configurations, startCheck, endCheck, brokenDeparture, saturated, messages };

  // Warm-started solves with the departure bound; only verified outcomes (nearly) within ε come back.
  async function solveAt(rings: Ring[], epsilon: number, starts: number): Promise<Candidate[]> {
    const problem: InflateProblem = {
      rings, tubeRatios: ratios, linking: base.linking, symmetry: null, departure: { symmetry, epsilon, reference: symmetricRings },
    };
    const r = await runMultistart(problem, {
      starts, workers: Math.min(starts, options.workers), seed: seed++, tol: options.tol, perturbation: WARM_PERTURBATION,
      spec: options.spec, command: 'compare', units: options.units,
      ...(options.maxIterations !== undefined ? { maxIterations: options.maxIterations } : {}),
    });
    if (!(r.status === 'optimal' || r.status === 'stalled') || !r.verification.ok) return [];
    const out = r.rings.map(toRing);
    // Measured with the ring matching the solver bounded: the symmetric optimum's, for every start and ε.
    const d = symmetryDeparture(out, symmetry, orbits);
    if (d > epsilon * (1 + DEPARTURE_SLACK_REL) + DEPARTURE_SLACK_ABS_REL * minRadius) {
      messages.push(`sweep: at ε = ${fmt(epsilon)} the solver returned departure ${fmt(d)} (layout units); that start was not used`);
      return [];
    }
    return [{ rings: out, tube: r.tube, status: r.status, departure: d }];
  }
}

interface Candidate {
  rings: Ring[];
  tube: number;
  status: SolveStatus;
  /** Measured departure from the symmetry (layout units). */
  departure: number;
}

/** Poses a fraction s of the way from a to b (centres linearly, normals linearly then normalised). */
function interpolate(a: Ring[], b: Ring[], s: number): Ring[] {
  return a.map((r, i) => {
    const q = b[i]!;
    const sign = r.normal[0] * q.normal[0] + r.normal[1] * q.normal[1] + r.normal[2] * q.normal[2] >= 0 ? 1 : -1;
    const n = [0, 1, 2].map((k) => (1 - s) * r.normal[k]! + s * sign * q.normal[k]!);
    const l = Math.hypot(n[0]!, n[1]!, n[2]!) || 1;
    return {
      name: r.name,
      center: [0, 1, 2].map((k) => (1 - s) * r.center[k]! + s * q.center[k]!) as [number, number, number],
      normal: [n[0]! / l, n[1]! / l, n[2]! / l],
      radius: r.radius,
    };
  });
}

function toRing(r: Pick<ResultRing, 'name' | 'center' | 'normal' | 'radius'>): Ring {
  return {
    name: r.name,
    center: [r.center[0], r.center[1], r.center[2]],
    normal: [r.normal[0], r.normal[1], r.normal[2]],
    radius: r.radius,
  };
}

function fmt(x: number): string {
  return Number.isFinite(x) ? String(Number(x.toPrecision(6))) : String(x);
}
