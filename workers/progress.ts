// The solve workers' progress plumbing, shared by the Node worker (workers/solve.ts) and the page's Web
// Worker (ui/solveWorker.ts): nothing here touches Node or the DOM.
import * as Comlink from 'comlink';
import type { SolveOptions } from '../src/optimize/run/problem.js';

export type Progress = (iteration: number, tube: number) => void;

/** An `onIteration` that passes at most one report per `everyMs` milliseconds on to `progress`. */
export function throttledProgress(progress: Progress, everyMs: number): NonNullable<SolveOptions['onIteration']> {
  let last = -Infinity; // the first report goes through at once
  return (iteration, tube) => {
    const now = performance.now();
    if (now - last < everyMs) return;
    last = now;
    // Fire and forget: a report the caller no longer wants must not fail the solve.
    Promise.resolve(progress(iteration, tube)).catch(() => {});
  };
}

/** Close a comlink callback's channel so the caller's end of it does not outlive the task. */
export function releaseProgress(progress: Progress | undefined): void {
  (progress as unknown as Partial<Record<typeof Comlink.releaseProxy, () => void>> | undefined)?.[Comlink.releaseProxy]?.();
}
