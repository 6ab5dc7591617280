// Scaling benchmark: time to tol 1e-9 and outer iterations against the ring count N for chain:N and
// necklace:N (N = 4, 8, 16, … up to --max, default 64), two outer-loop steps side by side in the same run:
//   proximal  the first-order proximal QP (localStep.ts: nlopt-js SLSQP, HiGHS as companion), the old method;
//   sqp       the second-order step (step/sqpStep.ts: exact Lagrangian Hessian, sparse interior-point QP).
// Both finish with the same Newton polish. Seeded, one warm-up solve, median of repeats, a time budget per
// case (a case over budget is reported as "> budget" with the verified tube the solver reached by its
// deadline, and left out of the fit; the larger N of that family are not run with that method); the fitted
// exponent is the least-squares slope of log(time) against log(N) over the cases in budget, and the tail exponent the same over the three largest of them (at small
// N the fixed costs of a solve flatten the curve, so the full fit mixes two regimes). Every result is
// re-checked by the independent verifier (verifyOutcome).
// Run: npm run build && node dist/bench/scaling.js [--max 64] [--repeats 1] [--budget 60] [--methods sqp,proximal] [--json]
import { solveInflate } from '../src/optimize/run/solve.js';
import { verifyOutcome } from '../src/optimize/run/multistart.js';
import type { InflateProblem } from '../src/optimize/run/problem.js';
import { resolveSpec } from '../src/model/spec.js';
import { DEFAULT_MAX_ITERATIONS } from '../src/optimize/run/startLoop.js';

const SEED = 20261201;
const TOL = 1e-9;
/** The solver's own default, as a user runs it. */
const MAX_ITERATIONS = DEFAULT_MAX_ITERATIONS;

const args = process.argv.slice(2);
const num = (name: string, dflt: number): number => {
  const i = args.indexOf(name);
  return i >= 0 ? Number(args[i + 1]) : dflt;
};
const MAX_N = num('--max', 64);
const REPEATS = Math.max(1, num('--repeats', 1));
const BUDGET_S = num('--budget', 60);
const json = args.includes('--json');
type Method = 'proximal' | 'sqp';
const methodsArg = args.indexOf('--methods');
const METHODS: readonly Method[] = methodsArg >= 0 ? (args[methodsArg + 1]!.split(',') as Method[]) : ['proximal', 'sqp'];

class OverBudget extends Error {}
/**
 * The solver stops itself at the deadline (SolveOptions.deadline) and reports what it reached; past this
 * multiple of the budget a callback aborts it outright (a step that overran the deadline).
 */
const HARD_STOP_FACTOR = 1.5;

function problemOf(spec: string): InflateProblem {
  const r = resolveSpec(spec);
  return { rings: r.layout.rings, tubeRatios: r.layout.rings.map(() => 1), linking: r.linking, symmetry: null };
}

interface Cell {
  seconds: number | null;
  iterations: number;
  status: string;
  tube: number;
  verified: boolean;
}

async function solveOnce(spec: string, method: Method): Promise<Cell> {
  const problem = problemOf(spec);
  const t0 = performance.now();
  try {
    const out = await solveInflate(problem, {
      tol: TOL, maxIterations: MAX_ITERATIONS, seed: SEED, perturbation: 0.05, step: method,
      // The solver's own time limit too: work between iterations (a final assessment) reports to no callback.
      deadline: Date.now() + BUDGET_S * 1000,
      onIteration: () => {
        if ((performance.now() - t0) / 1000 > HARD_STOP_FACTOR * BUDGET_S) throw new OverBudget();
      },
    });
    const seconds = (performance.now() - t0) / 1000;
    const verified = verifyOutcome(problem, out).ok;
    // Over budget: what the solver had reached when its deadline stopped it (status stalled, time limit).
    if (seconds > BUDGET_S || (out.status !== 'optimal' && out.stopReason === 'time limit')) {
      return { seconds: null, iterations: out.iterations, status: `> budget (${out.status})`, tube: out.tube, verified };
    }
    return { seconds, iterations: out.iterations, status: out.status, tube: out.tube, verified };
  } catch (e) {
    if (e instanceof OverBudget) return { seconds: null, iterations: 0, status: '> budget (aborted)', tube: NaN, verified: false };
    throw e;
  }
}

/** The time column: seconds, "> budget" for a case the deadline stopped, "-" for one not run or aborted. */
function timeText(c: Cell): string {
  return c.seconds !== null ? `${c.seconds.toFixed(2)} s` : c.iterations > 0 ? `> ${BUDGET_S} s` : '-';
}

async function measure(spec: string, method: Method): Promise<Cell> {
  const runs: Cell[] = [];
  for (let r = 0; r < REPEATS; r++) {
    const c = await solveOnce(spec, method);
    runs.push(c);
    if (c.seconds === null) return c;
  }
  runs.sort((a, b) => a.seconds! - b.seconds!);
  return runs[Math.floor(runs.length / 2)]!;
}

function slope(points: [number, number][]): number {
  if (points.length < 2) return NaN;
  const xs = points.map((p) => Math.log(p[0])), ys = points.map((p) => Math.log(p[1]));
  const mx = xs.reduce((a, b) => a + b) / xs.length, my = ys.reduce((a, b) => a + b) / ys.length;
  let sxy = 0, sxx = 0;
  xs.forEach((x, i) => {
    sxy += (x - mx) * (ys[i]! - my);
    sxx += (x - mx) ** 2;
  });
  return sxy / sxx;
}

async function main(): Promise<void> {
  // Warm-up: load the WebAssembly solvers and let the JIT settle.
  for (const m of METHODS) await solveOnce('chain:3', m);
  const Ns: number[] = [];
  for (let n = 4; n <= MAX_N; n *= 2) Ns.push(n);
  const rows: { spec: string; N: number; cells: Record<Method, Cell> }[] = [];
  const notRun: Cell = { seconds: null, iterations: 0, status: 'not run (a smaller N was over budget)', tube: NaN, verified: false };
  for (const family of ['chain', 'necklace']) {
    const exhausted = new Set<Method>();
    for (const N of Ns) {
      const spec = `${family}:${N}`;
      const cells = {} as Record<Method, Cell>;
      for (const m of METHODS) {
        // A smaller N of this family was over budget: a larger one would be too (not run).
        cells[m] = exhausted.has(m) ? notRun : await measure(spec, m);
        if (cells[m].seconds === null) exhausted.add(m);
        const c = cells[m];
        process.stderr.write(`${spec} ${m}: ${timeText(c)}, ${c.iterations} it, ${c.status}, tube ${c.tube}\n`);
      }
      rows.push({ spec, N, cells });
    }
  }
  const fits: Record<string, number> = {};
  for (const family of ['chain', 'necklace']) {
    for (const m of METHODS) {
      const pts = rows.filter((r) => r.spec.startsWith(family) && r.cells[m].seconds !== null).map((r) => [r.N, r.cells[m].seconds!] as [number, number]);
      fits[`${family}/${m}`] = slope(pts);
      fits[`${family}/${m} (tail: three largest N)`] = slope(pts.slice(-3));
    }
  }
  if (json) {
    console.log(JSON.stringify({ seed: SEED, tol: TOL, repeats: REPEATS, budgetSeconds: BUDGET_S, rows, exponents: fits }, null, 2));
    return;
  }
  console.log(`| case | ${METHODS.map((m) => `${m}: time | it | status | tube/R`).join(' | ')} |`);
  console.log(`| --- |${METHODS.map(() => ' --- | --- | --- | --- |').join('')}`);
  for (const r of rows) {
    const cells = METHODS.map((m) => {
      const c = r.cells[m];
      const checked = c.verified || c.iterations === 0 ? '' : ' (unverified)';
      return `${timeText(c)} | ${c.iterations || '-'} | ${c.status}${checked} | ${Number.isFinite(c.tube) ? c.tube.toFixed(10) : '-'}`;
    });
    console.log(`| ${r.spec} | ${cells.join(' | ')} |`);
  }
  for (const [k, v] of Object.entries(fits)) console.log(`fitted exponent of time against N, ${k}: ${v.toFixed(2)}`);
}

await main();
