// The periodic inflation problem (weaves) and its outcome, shared by the solver, the worker pool and the CLI.
import type { PeriodicLink } from '../../model/periodic.js';
import type { ResultContact } from '../../model/result.js';
import type { Lattice, Ring } from '../../model/types.js';
import type { SolveOutcome } from './problem.js';

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
