// Worker-thread pool for inflation solves: each worker runs one solve at a time, so a WebAssembly
// abort in NLopt (which try/catch cannot stop) ends only that worker. The pool notices the thread's
// 'error'/'exit', starts a fresh worker and retries the same start with the next algorithm
// (slsqp -> ccsaq -> mma), recording the retries. Seeds travel with the tasks, so results do not
// depend on how many workers run them.
import * as Comlink from 'comlink';
import nodeEndpoint from 'comlink/dist/esm/node-adapter.mjs';
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { Algorithm, SolveWorkerApi, WorkerTask } from '../../../workers/solve.js';
import type { SolveOutcome } from './problem.js';

export type { Algorithm, WorkerTask } from '../../../workers/solve.js';

/** Retry order after a worker dies: SLSQP first (fast near a vertex), then the CCSA family. */
export const ALGORITHM_ORDER: readonly Algorithm[] = ['slsqp', 'ccsaq', 'mma'];

export interface PoolTask extends WorkerTask {
  id: number;
}

export interface PoolResult {
  id: number;
  /** Null when every algorithm failed (crash or thrown error). */
  outcome: SolveOutcome | null;
  /** Algorithm of the attempt that produced `outcome`. */
  algorithm: Algorithm | null;
  /** Worker crashes survived by this task. */
  retries: number;
  /** One line per failed attempt: algorithm and what happened. */
  errors: string[];
}

export interface PoolOptions {
  workers: number;
  /** Called as each task finishes (in finishing order). */
  onResult?: (result: PoolResult) => void;
  /** Called now and then while a task runs (a few times a second at most per worker). */
  onIteration?: (taskId: number, iteration: number, tube: number) => void;
  /** Asked before a task starts: true leaves it unrun (its result stays undefined). */
  skip?: (index: number) => boolean;
}

/** Run every task on at most `workers` worker threads; results come back in task order. */
export async function runPool(tasks: PoolTask[], options: PoolOptions): Promise<PoolResult[]> {
  const count = Math.max(1, Math.min(options.workers, tasks.length));
  const results: PoolResult[] = new Array(tasks.length);
  let next = 0;
  const lanes: Promise<void>[] = [];
  const live = new Set<SolveThread>();
  // Once the pool is closed (all done, or a callback threw) no lane may start another worker.
  let closed = false;
  try {
    for (let w = 0; w < count; w++) {
      lanes.push((async () => {
        let thread: SolveThread | null = null;
        while (next < tasks.length && !closed) {
          const index = next++;
          if (options.skip?.(index)) continue;
          const task = tasks[index]!;
          const r = await runTask(task, options.onIteration, () => {
            if (closed) throw new Error('the worker pool was closed');
            if (thread === null || thread.dead) {
              if (thread) live.delete(thread);
              thread = startThread();
              live.add(thread);
            }
            return thread;
          });
          results[index] = r;
          options.onResult?.(r);
        }
      })());
    }
    await Promise.all(lanes);
  } finally {
    closed = true;
    await Promise.all([...live].map((t) => t.stop()));
  }
  return results;
}

/** Default worker count: the cores available, at most the number of starts. */
export function defaultWorkers(starts: number): number {
  return Math.max(1, Math.min(starts, availableParallelism()));
}

// ---- helpers -------------------------------------------------------------------------------------

interface SolveThread {
  api: Comlink.Remote<SolveWorkerApi>;
  /** Rejects when the thread dies (error or exit); never left unhandled. */
  died: Promise<never>;
  dead: boolean;
  /** Last lines the thread wrote to stderr (an abort's message). */
  stderrTail: string[];
  stop(): Promise<void>;
}

async function runTask(
  task: PoolTask, onIteration: PoolOptions['onIteration'], thread: () => SolveThread,
): Promise<PoolResult> {
  const first = task.options.algorithm ?? 'slsqp';
  const order = [first, ...ALGORITHM_ORDER.filter((a) => a !== first)];
  const errors: string[] = [];
  let retries = 0;
  for (const algorithm of order) {
    const t = thread();
    const { id: _id, ...payload } = task;
    const workerTask: WorkerTask = { ...payload, options: { ...task.options, algorithm } };
    try {
      const heartbeat = onIteration ? Comlink.proxy((i: number, tube: number) => onIteration(task.id, i, tube)) : undefined;
      const outcome = await Promise.race([t.api.solve(workerTask, heartbeat), t.died]);
      return { id: task.id, outcome, algorithm, retries, errors };
    } catch (e) {
      const msg = e instanceof Error ? e.message : String(e);
      if (t.dead) {
        retries++;
        const tail = t.stderrTail.filter((l) => l.trim() !== '').slice(-1)[0];
        errors.push(`${algorithm}: worker died (${firstLine(msg)}${tail && !msg.includes(tail) ? `; ${firstLine(tail)}` : ''})`);
      } else {
        errors.push(`${algorithm}: ${firstLine(msg)}`);
      }
    }
  }
  return { id: task.id, outcome: null, algorithm: null, retries, errors };
}

/**
 * Start a worker. From dist the worker is the compiled workers/solve.js. From source (tests, tsx) it
 * is workers/solve.ts, loaded through tsx's ESM hooks registered inside the new thread: on Node 20
 * `execArgv: ['--import', 'tsx']` left the worker unable to load .ts files.
 */
function startThread(): SolveThread {
  const fromSource = import.meta.url.endsWith('.ts');
  const url = new URL(`../../../workers/solve.${fromSource ? 'ts' : 'js'}`, import.meta.url);
  // stdout/stderr: true keeps the worker's writes off the process's stdout (--json prints one object).
  const streams = { stdout: true, stderr: true };
  const worker = fromSource
    ? new Worker(`import('tsx/esm/api').then((m) => { m.register(); return import(${JSON.stringify(url.href)}); });`, { ...streams, eval: true })
    : new Worker(url, streams);
  const stderrTail: string[] = [];
  worker.stdout.on('data', () => {});
  worker.stderr.on('data', (chunk: Buffer) => {
    stderrTail.push(...chunk.toString('utf8').split('\n'));
    if (stderrTail.length > 20) stderrTail.splice(0, stderrTail.length - 20);
  });
  const state: { dead: boolean } = { dead: false };
  const died = new Promise<never>((_, reject) => {
    worker.once('error', (e: unknown) => {
      state.dead = true;
      reject(e instanceof Error ? e : new Error(String(e)));
    });
    worker.once('exit', (code: number) => {
      state.dead = true;
      reject(new Error(`worker exited with code ${code}`));
    });
  });
  died.catch(() => {});
  const api = Comlink.wrap<SolveWorkerApi>(nodeEndpoint(worker));
  return {
    api,
    died,
    get dead() {
      return state.dead;
    },
    stderrTail,
    async stop() {
      if (!state.dead) {
        api[Comlink.releaseProxy]();
        await worker.terminate();
      }
    },
  };
}

function firstLine(s: string): string {
  return s.split('\n')[0]!.trim();
}
