// The result file written by every solving command (`-o result.json`) and read by
// report / fabricate / tracks / play. Keys `tube`, `rings`, `status`, `aspectRatio` are Contract.
import type { Lattice, SolveStatus, Symmetry, Vec3 } from './types.js';

export const RESULT_FORMAT = 'thickring-result/1';

export interface ResultRing {
  name: string;
  center: Vec3;
  normal: Vec3;
  /** Core radius R (layout units). */
  radius: number;
  /** This ring's tube radius r_i = tube * tubeRatio_i (layout units). */
  tube: number;
  /** Inner diameter / wire diameter = (R - r) / r. */
  aspectRatio: number;
}

/** One active strut at the optimum: a local closest pair between rings a and b. */
export interface ResultContact {
  a: number;
  b: number;
  onA: Vec3;
  onB: Vec3;
  /** Core-to-core distance of the pair (layout units). */
  distance: number;
  /** Non-negative strut force from the certificate (dimensionless, sum normalised to 1). */
  force: number;
  /** True when the pair touches along a continuum and this is one representative point. */
  continuum?: boolean;
}

export interface Certificate {
  /**
   * 'kkt-nnls': non-negative strut forces that balance the objective (the solver's last-step multipliers
   * checked first, else non-negative least squares); 'packing-bound': the tube equals the proven packing
   * bound, a global maximum whatever the force balance (certify/bound.ts).
   */
  method: string;
  /** Residual of the balance equations divided by the largest force term (dimensionless). */
  balanceResidual: number;
  /** Worst constraint violation after polishing, relative to the tube radius. */
  maxViolation: number;
  /**
   * Active constraints the certificate weighed: struts, sampled points of contact arcs, and the radius or
   * departure limit when binding (the note says how many of each). The name predates the samples.
   */
  activeStruts: number;
  /** True when the balance residual and violation are under tolerance. */
  certified: boolean;
  /** Free text that says what was proved and what was not. */
  note: string;
}

export interface Bound {
  /** Upper bound on the common tube radius from circle packing in a circle (layout units). */
  tube: number;
  /** Index of the ring that gives the bound, and how many rings pass through it. */
  ring: number;
  through: number;
  /** (bound - tube) / bound; 0 means the bound is attained. */
  gap: number;
}

/** How many of the last gains a start record keeps. */
export const LAST_GAINS_COUNT = 5;

/** The last `count` positive increases of a tube history, oldest first. */
export function lastGains(history: readonly number[], count = LAST_GAINS_COUNT): number[] {
  const out: number[] = [];
  for (let k = history.length - 1; k > 0 && out.length < count; k--) {
    const gain = history[k]! - history[k - 1]!;
    if (gain > 0) out.push(gain);
  }
  return out.reverse();
}

export interface StartRecord {
  seed: number;
  status: SolveStatus;
  tube: number;
  iterations: number;
  /** Tube radius after each outer iteration. */
  history: number[];
  /**
   * The last (up to LAST_GAINS_COUNT) increases of the tube between outer iterations, oldest first (layout
   * units; rejected steps, which gain nothing, are left out): near a regular optimum each is far smaller
   * than the one before, the sign of superlinear convergence. Absent in files written before it existed.
   */
  lastGains?: number[];
  /** Worker crashes survived by this start (WebAssembly aborts). */
  retries: number;
  /** Why this start stopped: 'polished', 'time limit', 'iteration limit', 'solver failure: ...', ... */
  stopReason?: string;
}

export interface Verification {
  ok: boolean;
  /** min over pairs of (sampled core distance - r_i - r_j), relative to the tube. */
  minClearance: number;
  linkingPreserved: boolean;
  tubeWithinRadius: boolean;
  messages: string[];
}

export interface SolveResult {
  format: typeof RESULT_FORMAT;
  command: string;
  spec: string;
  units: string | null;
  status: SolveStatus;
  tube: number;
  /** Common tube radius over the smallest core radius. */
  tubeOverCore: number;
  /** Smallest inner diameter / wire diameter over the rings (Contract), and the ring it belongs to. */
  aspectRatio: number;
  aspectRatioRing?: string;
  tubeRatios: number[];
  rings: ResultRing[];
  linking: number[][];
  symmetry: Symmetry | null;
  lattice?: Lattice;
  /** Every contact of the arrangement: under a symmetry, the full orbit of the solver's contacts. */
  contacts: ResultContact[];
  certificate: Certificate;
  /** What the result proves, in words (optimalityText), naming the symmetry a local certificate is limited to. */
  optimality?: string;
  bound: Bound | null;
  starts: StartRecord[];
  verification: Verification;
  elapsedSeconds: number;
  /** Present when the result is not a certified optimum: why the solve stopped short (time or iteration limit, solver failure, ...). */
  stopReason?: string;
}

/** Symmetric vs symmetry-broken comparison (`thickring compare`). */
export interface CompareRingChange {
  name: string;
  /** Centre displacement between the two optima after best rigid alignment (layout units). */
  displacement: number;
  /** Angle between the ring normals (degrees, axis direction ignored). */
  tiltDegrees: number;
}

export interface SweepPoint {
  /** Allowed departure from symmetry (layout units: bound on the distance to the symmetrised copy). */
  epsilon: number;
  tube: number;
  status: SolveStatus;
}

export interface CompareResult extends SolveResult {
  /** The main `tube`, `rings`, ... of a compare result are those of the symmetry-broken optimum. */
  symmetric: SolveResult;
  broken: SolveResult;
  gain: number;
  gainPercent: number;
  changes: CompareRingChange[];
  sweep: SweepPoint[];
}

/** Relative gap to the packing bound below which the bound counts as attained (the solve's own tolerance). */
export const BOUND_ATTAINED = 1e-9;

/**
 * What a result proves. 'global': the independent check passed and the packing bound, which holds for every
 * arrangement with this linking, is attained. 'local': the KKT certificate holds (no small motion of the rings
 * thickens the tube), which says nothing about arrangements far away. 'none': neither.
 */
export type Optimality = 'global' | 'local' | 'none';

export function optimalityOf(r: Pick<SolveResult, 'bound' | 'verification' | 'certificate'>): Optimality {
  if (r.verification.ok && r.bound && r.bound.gap <= BOUND_ATTAINED) return 'global';
  return r.certificate.certified ? 'local' : 'none';
}

/**
 * The optimality in words. A local certificate computed under a symmetry holds only among poses with that
 * symmetry: breaking it may thicken the tube (play then finds a saddle), so the text names the group.
 */
export function optimalityText(o: Optimality, symmetry: Symmetry | null = null): string {
  if (o === 'global') return 'global optimum (packing bound attained)';
  if (o === 'none') return 'not certified';
  return symmetry && symmetry.type !== 'none'
    ? `certified among poses with ${symmetry.type}:${symmetry.order} symmetry`
    : 'certified local optimum';
}
