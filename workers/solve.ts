// Worker thread that runs one inflation solve at a time for src/optimize/run/pool.ts, exposed with comlink.
// A WebAssembly abort inside NLopt ("Exception catching is disabled") cannot be caught; here it ends
// only this thread, and the pool starts a fresh worker and retries with another algorithm.
import * as Comlink from 'comlink';
import nodeEndpoint from 'comlink/dist/esm/node-adapter.mjs';
import { parentPort } from 'node:worker_threads';
import { isPeriodicProblem, type InflateProblem, type PeriodicProblem, type SolveOptions, type SolveOutcome } from '../src/optimize/run/problem.js';
import { solvePeriodic } from '../src/optimize/run/periodicSolve.js';
import { solveInflate } from '../src/optimize/run/solve.js';
import { releaseProgress, throttledProgress } from './progress.js';

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

/** Iteration reports to the main thread at most this often (milliseconds): each one is a message. */
const HEARTBEAT_MS = 250;

const api = {
  /** `progress`, when given (a comlink proxy), hears the iteration count and tube now and then. */
  async solve(task: WorkerTask, progress?: (iteration: number, tube: number) => void): Promise<SolveOutcome> {
    const algorithm = task.options.algorithm ?? 'slsqp';
    if (task.simulateAbort?.includes(algorithm)) {
      setImmediate(() => {
        throw new Error(`Aborted(simulated WebAssembly abort in ${algorithm}). Exception catching is disabled`);
      });
      return new Promise<SolveOutcome>(() => {});
    }
    const options: SolveOptions = { ...task.options, algorithm };
    if (progress) options.onIteration = throttledProgress(progress, HEARTBEAT_MS);
    try {
      return await (isPeriodicProblem(task.problem) ? solvePeriodic(task.problem, options) : solveInflate(task.problem, options));
    } finally {
      releaseProgress(progress);
    }
  },
};

export type SolveWorkerApi = typeof api;

if (parentPort) Comlink.expose(api, nodeEndpoint(parentPort));
