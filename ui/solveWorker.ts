// Web Worker that runs one inflation solve at a time for the page (browserPool.ts), the browser twin of
// workers/solve.ts: the same solver entry point and progress plumbing (workers/progress.ts), exposed with comlink.
// Built as one classic script and started from a blob: URL (ui/vite.config.ts), so it imports nothing at run time.
import './shims/atobBuffer.js';
import * as Comlink from 'comlink';
import type { WorkerTask } from '../workers/solve.js';
import type { SolveOptions, SolveOutcome } from '../src/optimize/run/problem.js';
import { solveInflate } from '../src/optimize/run/solve.js';
import { releaseProgress, throttledProgress } from '../workers/progress.js';
import { provideHighs } from './shims/highs.js';

/** Iteration reports at most this often (milliseconds): enough for a smooth on-screen tube. */
const HEARTBEAT_MS = 100;

const api = {
  /** HiGHS's WebAssembly, compiled once by the page. */
  useHighs(module: WebAssembly.Module): void {
    provideHighs(module);
  },
  async solve(task: WorkerTask, progress?: (iteration: number, tube: number) => void): Promise<SolveOutcome> {
    const options: SolveOptions = { ...task.options, algorithm: task.options.algorithm ?? 'slsqp' };
    if (progress) options.onIteration = throttledProgress(progress, HEARTBEAT_MS);
    try {
      return await solveInflate(task.problem as Parameters<typeof solveInflate>[0], options);
    } finally {
      releaseProgress(progress);
    }
  },
};

export type PageSolveApi = typeof api;

Comlink.expose(api);
