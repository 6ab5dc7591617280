// The solver's worker pool for the page: the same contract as src/optimize/run/pool.ts (which the vite build
// swaps for this file), on Web Workers through comlink instead of worker_threads. A WebAssembly abort in
// NLopt ends only its worker; the lane starts a fresh one and retries with the next algorithm.
// stopPool() ends every running solve (the page's Stop button).
import * as Comlink from 'comlink';
import type { Algorithm, WorkerTask } from '../workers/solve.js';
import type { SolveOutcome } from '../src/optimize/run/problem.js';
import type { PoolOptions, PoolResult, PoolTask } from '../src/optimize/run/pool.js';
import type { PageSolveApi } from './solveWorker.js';
import { solverAssets, type SolverAssets } from './solverAssets.js';

export type { Algorithm, WorkerTask } from '../workers/solve.js';
export type { PoolOptions, PoolResult, PoolTask } from '../src/optimize/run/pool.js';

export const ALGORITHM_ORDER: readonly Algorithm[] = ['slsqp', 'ccsaq', 'mma'];

interface PageThread {
  worker: Worker;
  api: Comlink.Remote<PageSolveApi>;
  died: Promise<never>;
  dead: boolean;
}

const live = new Set<PageThread>();
let generation = 0;

/** End every solve now: workers are terminated and pending tasks come back with no outcome. */
export function stopPool(): void {
  generation++;
  for (const t of live) kill(t, 'stopped');
  live.clear();
}

export function defaultWorkers(starts: number): number {
  const cores = globalThis.navigator?.hardwareConcurrency ?? 2;
  return Math.max(1, Math.min(starts, cores, 4));
}

export async function runPool(tasks: PoolTask[], options: PoolOptions): Promise<PoolResult[]> {
  const mine = generation;
  const assets = await solverAssets();
  const count = Math.max(1, Math.min(options.workers, tasks.length));
  const results: PoolResult[] = new Array(tasks.length);
  let next = 0;
  const lanes: Promise<void>[] = [];
  for (let w = 0; w < count; w++) {
    lanes.push((async () => {
      let thread: PageThread | null = null;
      while (next < tasks.length) {
        const index = next++;
        const task = tasks[index]!;
        const r = await runTask(task, options, mine, () => {
          if (thread === null || thread.dead) thread = startThread(assets);
          return thread;
        });
        results[index] = r;
        options.onResult?.(r);
      }
      if (thread) kill(thread, 'done');
    })());
  }
  await Promise.all(lanes);
  return results;
}

// ---- helpers -------------------------------------------------------------------------------------

async function runTask(task: PoolTask, options: PoolOptions, mine: number, thread: () => PageThread): Promise<PoolResult> {
  const first = task.options.algorithm ?? 'slsqp';
  const order = [first, ...ALGORITHM_ORDER.filter((a) => a !== first)];
  const errors: string[] = [];
  let retries = 0;
  for (const algorithm of order) {
    if (mine !== generation) {
      errors.push(`${algorithm}: stopped`);
      break;
    }
    const t = thread();
    const { id: _id, ...payload } = task;
    const workerTask: WorkerTask = { ...payload, options: { ...task.options, algorithm } };
    try {
      const beat = options.onIteration;
      const heartbeat = beat ? Comlink.proxy((i: number, tube: number) => beat(task.id, i, tube)) : undefined;
      const outcome: SolveOutcome = await Promise.race([t.api.solve(workerTask, heartbeat), t.died]);
      return { id: task.id, outcome, algorithm, retries, errors };
    } catch (e) {
      const msg = e instanceof Error ? e.message : String(e);
      if (t.dead) retries++;
      errors.push(`${algorithm}: ${t.dead ? 'worker died' : 'error'} (${msg.split('\n')[0]})`);
      console.warn(`solve ${task.id}: ${errors[errors.length - 1]}`);
    }
  }
  return { id: task.id, outcome: null, algorithm: null, retries, errors };
}

function startThread(assets: SolverAssets): PageThread {
  const worker = new Worker(assets.workerUrl, { name: 'thickring solve' });
  let reject: (e: Error) => void = () => {};
  const died = new Promise<never>((_, rej) => { reject = rej; });
  died.catch(() => {});
  const t: PageThread = { worker, api: Comlink.wrap<PageSolveApi>(worker), died, dead: false };
  // An uncaught WebAssembly abort surfaces as the worker's error event; the page must not log it as its own.
  worker.addEventListener('error', (ev) => {
    ev.preventDefault();
    t.dead = true;
    live.delete(t);
    reject(new Error(ev.message || 'worker error'));
  });
  (t as PageThread & { kill: (why: string) => void }).kill = (why: string) => {
    t.dead = true;
    worker.terminate();
    reject(new Error(why));
  };
  void t.api.useHighs(assets.highs).catch(() => {});
  live.add(t);
  return t;
}

function kill(t: PageThread, why: string): void {
  live.delete(t);
  (t as PageThread & { kill: (why: string) => void }).kill(why);
}
