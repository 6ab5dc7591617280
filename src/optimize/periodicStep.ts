// One trust-region step of the periodic solve: the proximal QP of localStep.ts,
//   maximise τ - (|z|² + τ²)/(2Δ)   subject to   c_k τ - G_k·z <= h_k,  |z_i| <= B,  τ <= t_max - t,
// solved as localStep.ts solves it (nlopt-js SLSQP, HiGHS as companion) but with the HiGHS run bounded in
// time; the code is localStep's, repeated here because that file is shared with the finite solver. Observed here:
// on the 2 × 2 supercell of Japanese 6-in-1 (193 nearly dependent struts, 81 variables) the HiGHS QP solver
// that localStep falls back to when SLSQP's answer misses its feasibility test ran for over 18 minutes; with
// a time limit it stops at once, and the SLSQP answer (off by ~1e-9 at most) is used instead: the outer loop
// judges every step on the exact kernel anyway.
import nlopt from 'nlopt-js';
import type { Highs } from 'highs';
import type { Constraint } from './constraints.js';
import type { InnerAlgorithm, StepResult } from './localStep.js';

/** Wall-clock limit of one HiGHS QP (seconds); a healthy solve of these sizes takes milliseconds. */
export const HIGHS_TIME_LIMIT = 2;
/** Relative feasibility slack accepted in an SLSQP step (as localStep.ts). */
const QP_FEAS_REL = 1e-9;
/** Infeasibility of an SLSQP step still used when HiGHS cannot answer (relative to the step box). */
const FALLBACK_FEAS_REL = 1e-6;
const NLOPT_ALGORITHM: Record<InnerAlgorithm, string> = { slsqp: 'LD_SLSQP', mma: 'LD_MMA', ccsaq: 'LD_CCSAQ' };
const NLOPT_XTOL = 1e-9;
const NLOPT_CTOL_REL = 1e-11;
const NLOPT_MAXEVAL: Record<InnerAlgorithm, number> = { slsqp: 200, mma: 80, ccsaq: 60 };
const NLOPT_MAXTIME: Record<InnerAlgorithm, number> = { slsqp: 2, mma: 0.25, ccsaq: 0.25 };
const START_BELOW_REL = 1e-3;

let highsPromise: Promise<Highs> | null = null;

function loadHighs(): Promise<Highs> {
  highsPromise ??= import('highs').then((m) => (m as unknown as { default: () => Promise<Highs> }).default());
  return highsPromise;
}

/** The step; a predicted gain at or below `confirmBelow` is confirmed by HiGHS (within its time limit). */
export async function periodicStep(
  cons: readonly Constraint[], nFree: number, t: number, delta: number, box: number, tMax: number, algorithm: InnerAlgorithm,
  confirmBelow = 0,
): Promise<StepResult> {
  let first: StepResult | null = null;
  try {
    first = nloptStep(cons, nFree, t, delta, box, tMax, algorithm);
  } catch {
    nlopt.GC.flush();
  }
  const firstOk = first !== null && first.ok && violation(first, cons, t, box) <= QP_FEAS_REL * Math.max(t, box) + 1e-12 * box;
  if (firstOk && first!.tau > confirmBelow) return first!;
  const second = await highsStep(cons, nFree, t, delta, box, tMax);
  const secondOk = second.ok && violation(second, cons, t, box) <= QP_FEAS_REL * Math.max(t, box) + 1e-12 * box;
  if (firstOk && (!secondOk || first!.tau >= second.tau)) return first!;
  if (secondOk) return second;
  // HiGHS gave no answer (time limit): a nearly feasible SLSQP step is still worth judging on the kernel.
  if (first !== null && first.ok && violation(first, cons, t, box) <= FALLBACK_FEAS_REL * box) return first;
  return { ok: false, z: new Float64Array(nFree), tau: 0, solver: 'nlopt' };
}

// ---- helpers -------------------------------------------------------------------------------------

/** SLSQP on the QP scaled so its Hessian is the identity (see localStep.ts for why). */
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
  lower[nFree] = -(t + tMax) / s - 1;
  upper[nFree] = Math.max(0, (tMax - t) / s);
  opt.setLowerBounds(lower);
  opt.setUpperBounds(upper);
  opt.setMaxeval(NLOPT_MAXEVAL[algorithm]);
  opt.setMaxtime(NLOPT_MAXTIME[algorithm]);
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
  return { ok: finite && Number.isFinite(tau), z, tau, solver: 'nlopt' };
}

/** The same QP by HiGHS, with a time limit. */
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
        model.options.set({ output_flag: false, time_limit: HIGHS_TIME_LIMIT });
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

/** Largest violation of the linearised constraints and the box at a step (layout units). */
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
