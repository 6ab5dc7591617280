// One trust-region step of the outer loop: a strictly convex QP on the linearised struts.
//
//   maximise τ - (|z|² + τ²)/(2Δ)   subject to   c_k τ - G_k·z <= h_k  (h_k = g_k - c_k t >= 0),
//                                                |z_i| <= B,  τ <= t_max - t.
// Δ (the proximal radius) grows while the model predicts well; the box B stays below a fraction of the
// ring size so that a step never outruns the constraints gathered for it.
//
// Why a proximal QP and not the bare LP of sequential linear programming: the LP optimum sits at a vertex of
// the trust box, which near a degenerate optimum (a continuum of contacts, or fewer active struts than free
// variables) makes the steps jump between box corners; the proximal term picks the smallest step with the
// best predicted gain, and its fixed points are exactly the KKT points (Σμ_k c_k = 1, Σμ_k G_k = 0).
// Why this scaling: with y = z/√Δ, ψ = τ/√Δ the Hessian is the identity, which is SLSQP's starting
// quasi-Newton matrix, so its first QP subproblem is already the exact step and it stops one iteration later
// with no line-search trouble (the start sits strictly inside: a start that already solves the QP made the
// WebAssembly build abort). nlopt-js LD_SLSQP is the main
// solver as the design asks; LD_MMA and LD_CCSAQ are the alternatives the pool retries with. HiGHS
// (active-set QP) is the companion: used when an nlopt run fails or returns a non-finite or infeasible point.
// Observed here: when NLopt fails, the WebAssembly build throws a JS exception ("Exception catching is
// disabled") out of optimize(); thrown synchronously it can be caught, and the module keeps working, though
// each one leaks a little WebAssembly stack and heap — so after NLOPT_FAILURE_BUDGET failures in one thread
// only HiGHS is used. Uncaught, the same exception ends the thread, which is why solves run in workers.
import nlopt from 'nlopt-js';
import type { Highs } from 'highs';
import type { Constraint } from '../constraints/constraints.js';

export type InnerAlgorithm = 'slsqp' | 'mma' | 'ccsaq';

export interface StepResult {
  ok: boolean;
  z: Float64Array;
  /** Predicted increase of t (layout units). */
  tau: number;
  solver: 'nlopt' | 'highs';
}

/**
 * Violation of the linearised constraints (relative to the tube and box) accepted in a QP solution: only a
 * guard against garbage, since the outer loop judges every step on the exact kernel.
 */
const QP_FEAS_REL = 1e-6;
const NLOPT_ALGORITHM: Record<InnerAlgorithm, string> = { slsqp: 'LD_SLSQP', mma: 'LD_MMA', ccsaq: 'LD_CCSAQ' };
// Observed with nlopt-js 0.1.1: SLSQP returns its best *feasible* iterate, so a constraint tolerance far
// below the rounding of the constraint values (0, or an absolute 1e-14) made it hand back the start point;
// xtol_rel = 0 aborted the process. The tolerance is therefore relative to the size of the step box.
const NLOPT_XTOL = 1e-9;
const NLOPT_CTOL_REL = 1e-11;
// MMA and CCSAQ converge slowly on these QPs; an approximate step is enough (the outer loop judges it).
const NLOPT_MAXEVAL: Record<InnerAlgorithm, number> = { slsqp: 200, mma: 80, ccsaq: 60 };
const NLOPT_MAXTIME: Record<InnerAlgorithm, number> = { slsqp: 2, mma: 0.25, ccsaq: 0.25 };
/** Start of the inner solve: τ this fraction of the box below zero (scaled units). */
const START_BELOW_REL = 1e-3;

/** Infeasibility of an SLSQP step still used when HiGHS cannot answer (relative to the step box). */
const FALLBACK_FEAS_REL = 1e-6;
/** Seconds HiGHS may spend on one step before the step is abandoned. */
const HIGHS_STEP_TIME_LIMIT = 2;

let highsPromise: Promise<Highs> | null = null;
/** NLopt failures caught in this thread (each leaks a little WebAssembly memory). */
let nloptFailures = 0;
const NLOPT_FAILURE_BUDGET = 200;

/** The default export is the loader at run time (ESM build); the CommonJS typings hide that. */
function loadHighs(): Promise<Highs> {
  highsPromise ??= import('highs').then((m) => (m as unknown as { default: () => Promise<Highs> }).default());
  return highsPromise;
}

/** Load the WebAssembly solvers once per thread (HiGHS in the background: it is needed only near the end). */
export async function readySolvers(): Promise<void> {
  loadHighs().catch(() => undefined);
  await nlopt.ready;
}

/**
 * The step of the proximal QP. A predicted gain at or below `confirmBelow` (layout units) is confirmed by
 * HiGHS before the caller stops on it: an nlopt run that stopped early would otherwise end the solve.
 */
export async function localStep(
  cons: readonly Constraint[], nFree: number, t: number, delta: number, box: number, tMax: number, algorithm: InnerAlgorithm,
  confirmBelow = 0,
): Promise<StepResult> {
  let first: StepResult | null = null;
  if (nloptFailures < NLOPT_FAILURE_BUDGET) {
    try {
      first = nloptStep(cons, nFree, t, delta, box, tMax, algorithm);
    } catch {
      nloptFailures++;
      nlopt.GC.flush();
    }
  }
  const firstOk = first !== null && first.ok && feasible(first, cons, t, box);
  if (firstOk && first!.tau > confirmBelow) return first!;
  const second = await highsStep(cons, nFree, t, delta, box, tMax);
  const secondOk = second.ok && feasible(second, cons, t, box);
  if (firstOk && (!secondOk || first!.tau >= second.tau)) return first!;
  if (secondOk) return second;
  // HiGHS gave no answer (time limit): a nearly feasible SLSQP step is still worth judging on the kernel.
  if (first !== null && first.ok && violation(first, cons, t, box) <= FALLBACK_FEAS_REL * box) return first;
  return { ok: false, z: new Float64Array(nFree), tau: 0, solver: 'nlopt' };
}

function nloptStep(
  cons: readonly Constraint[], nFree: number, t: number, delta: number, box: number, tMax: number, algorithm: InnerAlgorithm,
): StepResult {
  const s = Math.sqrt(delta);
  const n = nFree + 1;
  const opt = new nlopt.Optimize(nlopt.Algorithm[NLOPT_ALGORITHM[algorithm]]!, n);
  opt.setMinObjective((x, grad) => {
    let f = 0;
    for (let i = 0; i < n; i++) {
      f += 0.5 * x[i]! * x[i]!;
      if (grad) grad[i] = x[i]!;
    }
    f -= s * x[nFree]!;
    if (grad) grad[nFree] = grad[nFree]! - s;
    return f;
  }, NLOPT_XTOL);
  const ctol = NLOPT_CTOL_REL * (box / s);
  for (const con of cons) {
    // Rounding can leave a slack of -1e-16; the start point must stay feasible.
    const h = Math.max(0, con.g - con.c * t) / s;
    const G = con.grad, c = con.c;
    opt.addInequalityConstraint((x, grad) => {
      let v = c * x[nFree]! - h;
      for (let i = 0; i < nFree; i++) v -= G[i]! * x[i]!;
      if (grad) {
        for (let i = 0; i < nFree; i++) grad[i] = -G[i]!;
        grad[nFree] = c;
      }
      return v;
    }, ctol);
  }
  const lower = new Array<number>(n).fill(-box / s), upper = new Array<number>(n).fill(box / s);
  // τ: no useful lower limit (a step may have to give up some t), capped by t·w_i <= R_i.
  lower[nFree] = -(t + tMax) / s - 1;
  upper[nFree] = Math.max(0, (tMax - t) / s);
  opt.setLowerBounds(lower);
  opt.setUpperBounds(upper);
  opt.setMaxeval(NLOPT_MAXEVAL[algorithm]);
  opt.setMaxtime(NLOPT_MAXTIME[algorithm]);
  // Start strictly inside, just below the current tube: observed with nlopt-js 0.1.1, SLSQP aborts the
  // process when its start point already solves the QP (a zero first step), and the solution never has τ < 0.
  const x0 = new Array<number>(n).fill(0);
  x0[nFree] = Math.max(lower[nFree]!, -START_BELOW_REL * (box / s));
  const res = opt.optimize(x0);
  nlopt.GC.flush();
  const z = new Float64Array(nFree);
  let finite = res.success && Array.isArray(res.x) && res.x.length === n;
  if (finite) {
    for (let i = 0; i < nFree; i++) {
      z[i] = s * res.x[i]!;
      if (!Number.isFinite(z[i]!)) finite = false;
    }
  }
  const tau = finite ? s * res.x[nFree]! : 0;
  // Observed (chain:8, seed 0, with the proximal radius far above the box, where the QP is nearly an LP):
  // SLSQP hands back its start unchanged, τ below zero. That is no answer; taken as one, it ended the solve
  // as "converged" 2 % below the optimum when HiGHS also timed out. A failed step shrinks the radius instead.
  const unmoved = finite && res.x.every((v, i) => v === x0[i]);
  return { ok: finite && Number.isFinite(tau) && !unmoved, z, tau, solver: 'nlopt' };
}

/** The same QP by the HiGHS active-set solver (in the unscaled variables). */
async function highsStep(
  cons: readonly Constraint[], nFree: number, t: number, delta: number, box: number, tMax: number,
): Promise<StepResult> {
  const fail: StepResult = { ok: false, z: new Float64Array(nFree), tau: 0, solver: 'highs' };
  try {
    const highs = await loadHighs();
    const n = nFree + 1, m = cons.length;
    const starts = new Int32Array(m + 1), indices: number[] = [], values: number[] = [];
    const rowLower = new Float64Array(m).fill(-highs.infinity), rowUpper = new Float64Array(m);
    cons.forEach((con, k) => {
      for (let i = 0; i < nFree; i++) {
        if (con.grad[i] !== 0) {
          indices.push(i);
          values.push(-con.grad[i]!);
        }
      }
      if (con.c !== 0) {
        indices.push(nFree);
        values.push(con.c);
      }
      starts[k + 1] = indices.length;
      rowUpper[k] = Math.max(0, con.g - con.c * t);
    });
    const colCost = new Float64Array(n);
    colCost[nFree] = -1;
    const colLower = new Float64Array(n).fill(-box), colUpper = new Float64Array(n).fill(box);
    colLower[nFree] = -(t + tMax) - 1;
    colUpper[nFree] = Math.max(0, tMax - t);
    const hStarts = new Int32Array(n + 1), hIdx = new Int32Array(n), hVal = new Float64Array(n).fill(1 / delta);
    for (let i = 0; i < n; i++) {
      hStarts[i + 1] = i + 1;
      hIdx[i] = i;
    }
    return highs.withModel(
      {
        numCols: n, numRows: m, colCost, colLower, colUpper, rowLower, rowUpper,
        matrix: { format: 'csr', numRows: m, numCols: n, starts, indices: Int32Array.from(indices), values: Float64Array.from(values) },
        hessian: { format: 'triangular', dimension: n, starts: hStarts, indices: hIdx, values: hVal },
      },
      (model) => {
        // A time limit so a degenerate QP cannot hang a solve (seen on a 2 x 2 weave supercell); a stopped
        // step is a rejected step, never a wrong one.
        model.options.set({ output_flag: false, time_limit: HIGHS_STEP_TIME_LIMIT });
        model.run();
        if (model.getModelStatus() !== highs.constants.modelStatus.optimal) return fail;
        const x = model.getSolution().colValue;
        return { ok: true, z: Float64Array.from(x.subarray(0, nFree)), tau: x[nFree]!, solver: 'highs' as const };
      },
    );
  } catch {
    return fail;
  }
}

/** The linearised constraints and the box hold at the returned step (up to QP_FEAS_REL of the scale). */
/** Largest violation of the linearised constraints and the box at a step (layout units; Infinity if not finite). */
function violation(step: StepResult, cons: readonly Constraint[], t: number, box: number): number {
  let worst = 0;
  for (const z of step.z) worst = Math.max(worst, Math.abs(z) - box * (1 + 1e-9));
  for (const con of cons) {
    let v = con.c * step.tau - (con.g - con.c * t);
    for (let i = 0; i < step.z.length; i++) v -= con.grad[i]! * step.z[i]!;
    worst = Math.max(worst, v);
  }
  return Number.isFinite(worst) ? worst : Infinity;
}

/** The linearised constraints and the box hold at the returned step (up to QP_FEAS_REL of the scale). */
function feasible(step: StepResult, cons: readonly Constraint[], t: number, box: number): boolean {
  return violation(step, cons, t, box) <= QP_FEAS_REL * Math.max(t, box, 1e-300) + 1e-12 * box;
}
