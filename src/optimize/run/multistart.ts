// Multistart inflation: run several seeded starts on the worker pool (startLoop.ts), check every outcome
// with the independent invariant checker (src/check/verify.ts), keep the best verified one and package it
// as a result file (format thickring-result/1).
import { verifyConfiguration, CLEARANCE_TOLERANCE } from '../../check/verify.js';
import type { SolveResult, Verification } from '../../model/result.js';
import type { Ring } from '../../model/types.js';
import { ringOrbits } from '../../model/symmetry.js';
import { expandContactOrbits } from '../../model/orbit.js';
import { optimalityOf, optimalityText } from '../../model/result.js';
import { boundAttained, packingBound, withGap } from '../certify/bound.js';
import type { InflateProblem, SolveOutcome } from './problem.js';
import { resultHead, runStarts, settleBest, type StartLoopOptions, type StartsRun } from './startLoop.js';

export { DEFAULT_MAX_ITERATIONS, DEFAULT_PERTURBATION, startSeed, type StartProgress } from './startLoop.js';

export interface MultistartOptions extends StartLoopOptions {
  /** Recorded in the result file. */
  spec: string;
  command: string;
  units: string | null;
}

export async function runMultistart(problem: InflateProblem, options: MultistartOptions): Promise<SolveResult> {
  const t0 = performance.now();
  // Surface a symmetry that does not fit the rings here, as bad input, not as a failed start in a worker.
  if (problem.symmetry) ringOrbits(problem.rings, problem.symmetry);
  // The packing bound holds for every arrangement with this linking: a verified start that reaches it is a global maximum.
  const attains = (o: SolveOutcome): boolean => {
    const bound = packingBound(o.rings, problem.tubeRatios, problem.linking);
    return bound !== null && boundAttained(o.tube, bound.tube, options.tol);
  };
  const run = await runStarts<SolveOutcome>(problem, options, (outcome, tol) => verifyOutcome(problem, outcome, tol), attains);
  return buildResult(problem, options, run, (performance.now() - t0) / 1000);
}

/** Verify a solver outcome against the problem's intended link, with no help from the solver. */
export function verifyOutcome(problem: InflateProblem, outcome: SolveOutcome, clearanceTolerance = CLEARANCE_TOLERANCE): Verification {
  return verifyConfiguration(
    { rings: outcome.rings, tube: outcome.tube, tubeRatios: problem.tubeRatios, linking: problem.linking },
    { clearanceTolerance },
  );
}

// ---- helpers -------------------------------------------------------------------------------------

function buildResult(
  problem: InflateProblem,
  options: MultistartOptions,
  run: StartsRun<SolveOutcome>,
  elapsedSeconds: number,
): SolveResult {
  const ratios = problem.tubeRatios;
  const { outcome, status, verification, certificate, stopReason } = settleBest(run, 'configuration');
  const rings: Ring[] = outcome?.rings ?? problem.rings;
  const tube = outcome?.tube ?? 0;
  const bound = withGap(packingBound(rings, ratios, problem.linking), tube);
  return {
    ...resultHead(options, status, tube, rings, ratios),
    linking: problem.linking.map((row) => row.slice()),
    symmetry: problem.symmetry,
    // The solve sees one ring per orbit: list every image of its contacts.
    contacts: expandContactOrbits(outcome?.contacts ?? [], rings, problem.symmetry),
    certificate,
    optimality: optimalityText(optimalityOf({ bound, verification, certificate }), problem.symmetry),
    bound,
    starts: run.starts,
    verification,
    elapsedSeconds,
    ...(stopReason !== null ? { stopReason } : {}),
  };
}
