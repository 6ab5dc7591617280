// Worker thread that runs one inflation solve at a time for src/optimize/pool.ts, exposed with comlink.
// A WebAssembly abort inside NLopt ("Exception catching is disabled") cannot be caught; here it ends
// only this thread, and the pool starts a fresh worker and retries with another algorithm.
import * as Comlink from 'comlink';
import nodeEndpoint from 'comlink/dist/esm/node-adapter.mjs';
import { parentPort } from 'node:worker_threads';
import { isPeriodicProblem, type PeriodicProblem } from '../src/optimize/periodicProblem.js';
import { solvePeriodic } from '../src/optimize/periodicSolve.js';
import type { InflateProblem, SolveOptions, SolveOutcome } from '../src/optimize/problem.js';
import { solveInflate } from '../src/optimize/solve.js';

export type Algorithm = NonNullable<SolveOptions['algorithm']>;

export interface WorkerTask {
  /** A finite arrangement, or a periodic one (a weave: it carries `lattice` and `links`). */
  problem: InflateProblem | PeriodicProblem;
  options: Omit<SolveOptions, 'onIteration'>;
  /**
   * Test-only: algorithms for which this worker dies the way a WebAssembly abort kills it (an
   * uncaught error on the thread), so the pool's crash handling can be exercised deterministically.
   */
  simulateAbort?: Algorithm[];
}

const api = {
  async solve(task: WorkerTask): Promise<SolveOutcome> {
    const algorithm = task.options.algorithm ?? 'slsqp';
    if (task.simulateAbort?.includes(algorithm)) {
      setImmediate(() => {
        throw new Error(`Aborted(simulated WebAssembly abort in ${algorithm}). Exception catching is disabled`);
      });
      return new Promise<SolveOutcome>(() => {});
    }
    const options = { ...task.options, algorithm };
    return isPeriodicProblem(task.problem) ? solvePeriodic(task.problem, options) : solveInflate(task.problem, options);
  },
};

export type SolveWorkerApi = typeof api;

if (parentPort) Comlink.expose(api, nodeEndpoint(parentPort));
