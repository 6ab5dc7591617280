// The symmetry-breaking curve: the thickest tube when the layout may depart from a symmetry by at most
// ε (symmetryDeparture, layout units), from ε = 0 (the symmetric optimum) until the gain saturates at
// the unconstrained optimum. Each ε is warm-started from the solution at the previous ε, which stays
// feasible as ε grows, so the best feasible tube found can only rise: when a solve comes back lower
// (or fails), the previous configuration is kept as the value at this ε — an honest lower bound on the
// curve, flagged 'stalled'. Both ends are re-checked by the independent checker (verify.ts), and every
// point's departure is re-measured here rather than trusted to the solver.
import { verifyConfiguration } from './verify.js';
import { alignRings, applyAlignment } from './align.js';
import type { ResultRing, SolveResult, SweepPoint, Verification } from '../model/result.js';
import { ringOrbits, symmetryDeparture, type RingOrbits } from '../model/symmetry.js';
import type { Ring, SolveStatus, Symmetry } from '../model/types.js';
import { runMultistart } from '../optimize/multistart.js';
import type { InflateProblem } from '../optimize/problem.js';

export interface SweepOptions {
  tol: number;
  seed: number;
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

export interface SweepOutcome {
  points: SweepPoint[];
  /** Independent re-check of the configurations at the first and last point. */
  startCheck: Verification;
  endCheck: Verification;
  /** Departure of the unconstrained optimum after best rigid alignment onto the symmetric one (layout units). */
  brokenDeparture: number;
  /** True when the last point reached the unconstrained value within the saturation tolerance. */
  saturated: boolean;
  /** Poses and tube of the last point, for a caller that wants to polish them further. */
  end: { rings: Ring[]; tube: number };
  messages: string[];
}

export const DEFAULT_SWEEP_POINTS = 6;
/** Saturation tolerance relative to the tube: the larger of this and SATURATION_TOL_FACTOR × tol. */
export const SATURATION_REL_MIN = 1e-6;
export const SATURATION_TOL_FACTOR = 100;
/** A solve may exceed ε by this much (relative) and still count: the constraint is met to solver tolerance. */
const DEPARTURE_SLACK_REL = 1e-6;
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
  const brokenDeparture = departure(alignedBroken, symmetry, orbits);
  const minRadius = Math.min(...symmetricRings.map((r) => r.radius));
  const satTol = Math.max(SATURATION_REL_MIN, SATURATION_TOL_FACTOR * options.tol) * Math.max(broken.tube, symmetric.tube);
  const messages: string[] = [];

  const points: SweepPoint[] = [{ epsilon: 0, tube: symmetric.tube, status: symmetric.status }];
  let current = { rings: symmetricRings, tube: symmetric.tube };
  const saturatedAt = (tube: number): boolean => tube >= broken.tube - satTol;

  // Grid: evenly spaced up to the broken optimum's departure; a flat stretch when the optima coincide.
  const steps = Math.max(1, options.points ?? DEFAULT_SWEEP_POINTS);
  const flat = saturatedAt(symmetric.tube);
  const epsMax = flat ? Math.max(brokenDeparture, FLAT_SHOW_REL * minRadius) : brokenDeparture;
  const grid = flat ? [epsMax] : Array.from({ length: steps }, (_, k) => (epsMax * (k + 1)) / steps);
  let done = 0;
  for (const [k, epsilon] of grid.entries()) {
    const last = k === grid.length - 1;
    const starts: Ring[][] = [current.rings];
    // At the last ε the aligned broken optimum itself is feasible: start there too, so the curve reaches it.
    if (last && !flat) starts.push(alignedBroken);
    let best: { rings: Ring[]; tube: number; status: SolveStatus } | null = null;
    for (const [s, rings] of starts.entries()) {
      const r = await solveAt(rings, epsilon, s);
      if (r && (!best || r.tube > best.tube)) best = r;
    }
    let status: SolveStatus;
    if (best && best.tube >= current.tube) {
      current = { rings: best.rings, tube: best.tube };
      status = best.status;
    } else {
      // The previous configuration is feasible at this larger ε: keep it rather than report a dip.
      status = 'stalled';
      messages.push(`sweep: at ε = ${fmt(epsilon)} no start improved on the previous point; its configuration is kept (a lower bound)`);
    }
    points.push({ epsilon, tube: current.tube, status });
    options.onProgress?.({ done: ++done, total: grid.length, epsilon, tube: current.tube, status });
    if (saturatedAt(current.tube) && !flat) break;
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
  return { points, startCheck, endCheck, brokenDeparture, saturated, end: current, messages };

  // One warm-started solve with the departure bound; null unless the outcome is verified and within ε.
  async function solveAt(rings: Ring[], epsilon: number, attempt: number): Promise<{ rings: Ring[]; tube: number; status: SolveStatus } | null> {
    const problem: InflateProblem = {
      rings, tubeRatios: ratios, linking: base.linking, symmetry: null, departure: { symmetry, epsilon },
    };
    const r = await runMultistart(problem, {
      starts: 1, workers: 1, seed: options.seed + attempt, tol: options.tol, spec: options.spec,
      command: 'compare', units: options.units,
      ...(options.maxIterations !== undefined ? { maxIterations: options.maxIterations } : {}),
    });
    if (!(r.status === 'optimal' || r.status === 'stalled') || !r.verification.ok) return null;
    const out = r.rings.map(toRing);
    const d = departure(out, symmetry, orbits);
    if (d > epsilon * (1 + DEPARTURE_SLACK_REL) + DEPARTURE_SLACK_REL * minRadius * options.tol) {
      messages.push(`sweep: at ε = ${fmt(epsilon)} the solver returned departure ${fmt(d)} (layout units); that point was not used`);
      return null;
    }
    return { rings: out, tube: r.tube, status: r.status };
  }
}

function departure(rings: Ring[], symmetry: Symmetry, orbits: RingOrbits): number {
  return symmetryDeparture(rings, symmetry, orbits);
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
