// The inflation problems and the solver's options and outcome (shared with the multistart pool and the CLI):
// free rings (InflateProblem, on the ring chart) and periodic arrangements, weaves (PeriodicProblem, on the
// periodic chart: the cell's rings and the lattice vectors).
import type { PeriodicLink } from '../../model/periodic.js';
import type { Certificate, ResultContact } from '../../model/result.js';
import type { Lattice, Ring, SolveStatus, Symmetry } from '../../model/types.js';

/**
 * Maximise the common tube t over ring poses, with ring i's tube r_i = t · tubeRatios[i], subject to
 * every strut (local closest pair of two core circles) being at least r_i + r_j long and r_i <= R_i,
 * keeping the signed linking matrix `linking`.
 */
export interface InflateProblem {
  /** Start poses; core radii are fixed. */
  rings: Ring[];
  tubeRatios: number[];
  /** Required signed linking numbers (from src/topology linkingMatrix of the intended arrangement). */
  linking: number[][];
  /** Imposed symmetry: one pose per orbit is optimised, the others are its images. */
  symmetry: Symmetry | null;
  /**
   * Instead of imposing `symmetry`, bound the departure from it: symmetryDeparture(rings) <= epsilon, with
   * each ring compared to the images of the ring it is paired with by nearest images on `reference` (default:
   * the start). A start far from symmetric may pair no consistent way; a sweep passes its symmetric optimum.
   */
  departure?: { symmetry: Symmetry; epsilon: number; reference?: Ring[] };
}

export interface SolveOptions {
  /** Relative tolerance on the tube radius (dimensionless), e.g. 1e-9. */
  tol: number;
  /** Outer (trust-region) iterations at most. */
  maxIterations: number;
  /** Seed of the start perturbation; 0 keeps the start as given. */
  seed: number;
  /** Size of the start perturbation relative to each ring's radius (dimensionless), e.g. 0.05. */
  perturbation: number;
  /** Inner solver of each local step (nlopt-js); the pool retries with another when a worker dies. */
  algorithm?: 'slsqp' | 'mma' | 'ccsaq';
  /** The outer loop's step: 'sqp' (second order, step/sqpStep.ts) or 'proximal' (first order, localStep.ts). */
  step?: 'sqp' | 'proximal';
  /**
   * Saddles stepped off at most (default 3, trustRegion.ts MAX_ESCAPES); 0 stops at the first polished
   * Kuhn–Tucker point, saddle or not.
   */
  maxEscapes?: number;
  onIteration?: (iteration: number, tube: number) => void;
  /**
   * Wall-clock time (Date.now() milliseconds, the same clock in every worker) at which the outer loop stops
   * and reports what it has, status 'stalled' with stopReason 'time limit'.
   */
  deadline?: number;
}

export interface SolveOutcome {
  status: SolveStatus;
  /** Common tube radius t (layout units); ring i's tube is t · tubeRatios[i]. */
  tube: number;
  /** Final poses; each ring's `tube` is set to t · tubeRatios[i]. */
  rings: Ring[];
  iterations: number;
  /** Tube radius after each outer iteration, starting with the start's. */
  history: number[];
  contacts: ResultContact[];
  certificate: Certificate;
  message: string;
  /** Why the outer loop stopped: 'polished', 'iteration limit', 'time limit', 'the local solver failed', ... */
  stopReason?: string;
}

/**
 * Maximise the common tube t over the poses of the cell's rings and the lattice vectors, ring i's tube
 * being t · tubeRatios[i], subject to every strut between a cell ring and any image of a cell ring being
 * at least r_i + r_j long and r_i <= R_i, keeping exactly the linked image pairs `links`.
 */
export interface PeriodicProblem {
  /** Start poses of the cell's rings; core radii are fixed. */
  rings: Ring[];
  /** Start lattice vectors (1: chain, 2: sheet); they are optimisation variables. */
  lattice: Lattice;
  tubeRatios: number[];
  /** The pattern: every linked image pair, each once (src/model/periodic.ts periodicLinks). */
  links: PeriodicLink[];
}

/** A contact of ring a with the copy of ring b at `shift` (onB lies on that copy). */
export interface PeriodicContact extends ResultContact {
  shift: number[];
}

export interface PeriodicOutcome extends SolveOutcome {
  /** Lattice vectors at the optimum (layout units). */
  lattice: Lattice;
  contacts: PeriodicContact[];
}

export function isPeriodicProblem(p: object): p is PeriodicProblem {
  return 'lattice' in p && 'links' in p;
}
