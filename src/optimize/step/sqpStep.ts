// One SQP step of the outer loop: the quadratic model of the max–min problem at the current arrangement,
//
//   maximise τ + ½ zᵀ W z - (|z|² + τ²)/(2Δ)   subject to   c_k τ - G_k·z <= h_k  (h_k = g_k - c_k t >= 0),
//                                                           |z_i| <= B,   τ <= t_max - t,
//
// where W = Σ λ_k ∇²g_k is the Hessian of the Lagrangian from the exact strut curvatures (the multipliers λ
// of the previous step's QP, carried to this step's constraints by `carryMultipliers`), and 1/Δ the
// Levenberg–Marquardt form of the trust region: Δ grows while the model predicts the kernel's tube well, so
// near the optimum the step becomes the Newton step on the Kuhn–Tucker system of the active struts and
// converges superlinearly, where the proximal step (W = 0) crept along flat valleys. The QP is solved by the
// sparse interior-point method (interiorQp.ts): a strut row touches the 12 coordinates of its two rings and
// W is block-sparse on the contact graph, so a step costs time linear in the rings for chains and necklaces.
import type { Constraint } from '../constraints/constraints.js';
import { prepareQp, solveQpInterior, type PreparedQp } from './interiorQp.js';

export interface SqpStepInput {
  cons: readonly Constraint[];
  nFree: number;
  t: number;
  /** Trust radius (layout units): the proximal weight is 1/Δ. */
  delta: number;
  /** Bound on every coordinate of the step (layout units). */
  box: number;
  tMax: number;
  /** Upper-triangle entries (i <= j) of W in free coordinates; empty for a first-order step. */
  wI: ArrayLike<number>;
  wJ: ArrayLike<number>;
  wV: ArrayLike<number>;
  deadline?: number | undefined;
  /** Relative accuracy of the QP (default QP_TOL): the outer loop asks for less while the gains are large. */
  accuracy?: number;
  /** Added to each row's slack h_k (a second-order correction), or none. */
  shift?: Float64Array;
  /** The QP structure of an earlier step on the same constraints, Hessian and Δ (SqpStepResult.structure). */
  structure?: QpStructure;
}

/** The parts of a step's QP that a re-solve with other slacks shares (its objective and rows). */
export interface QpStructure {
  pI: Int32Array;
  pJ: Int32Array;
  pV: Float64Array;
  q: Float64Array;
  rowPtr: Int32Array;
  colIdx: Int32Array;
  rowVal: Float64Array;
  prepared: PreparedQp;
}

export interface SqpStepResult {
  ok: boolean;
  z: Float64Array;
  /**
   * Predicted increase of the true tube (layout units): τ + ½ zᵀWz, the model's gain without the trust
   * term. The curvature term is the struts' own second-order change weighted by their forces (Σ λ c = 1),
   * which the linearised rows leave out: along a direction where the struts lengthen quadratically the
   * tube grows although τ alone may fall.
   */
  tau: number;
  /** Multipliers of `cons` at the QP's solution (>= 0; Σ λ_k c_k ≈ 1 near the optimum). */
  lambda: Float64Array;
  /** True when the QP had to be convexified beyond the trust-region term (the model was not concave there). */
  convexified: boolean;
  message: string;
  /** For a re-solve with shifted slacks (SqpStepInput.structure). */
  structure: QpStructure;
}

/** QP accuracy: far below the outer loop's final tolerance, so the step's own error never stops it. */
export const QP_TOL = 1e-13;
/** Interior-point iterations at most per step. */
const QP_MAX_ITERATIONS = 100;

export function sqpStep(input: SqpStepInput): SqpStepResult {
  const { cons, nFree, t, box, tMax } = input;
  const n = nFree + 1;
  const m = cons.length;
  const structure = input.structure ?? qpStructure(input);
  const h = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const con = cons[k]!;
    // Rounding can leave a slack of -1e-16; the linearisation point must stay feasible.
    h[k] = Math.max(0, con.g - con.c * t) + (input.shift ? input.shift[k]! : 0);
  }
  const lower = new Float64Array(n).fill(-box), upper = new Float64Array(n).fill(box);
  // τ: no useful lower limit (a step may have to give up some t), capped by t·w_i <= R_i.
  lower[nFree] = -(t + tMax) - box;
  upper[nFree] = Math.max(box * 1e-12, tMax - t);
  const { prepared, ...rest } = structure;
  const sol = solveQpInterior(
    { n, ...rest, h, lower, upper },
    { tol: input.accuracy ?? QP_TOL, maxIterations: QP_MAX_ITERATIONS, ...(input.deadline !== undefined ? { deadline: input.deadline } : {}) },
    prepared,
  );
  const z = sol.x.subarray(0, nFree).slice();
  let curvature = 0;
  for (let k = 0; k < input.wV.length; k++) {
    const i = input.wI[k]!, j = input.wJ[k]!;
    curvature += (i === j ? 0.5 : 1) * input.wV[k]! * z[i]! * z[j]!;
  }
  const tau = sol.x[nFree]! + curvature;
  const finite = Number.isFinite(tau) && z.every(Number.isFinite);
  return {
    ok: sol.ok && finite, z, tau: finite ? Math.min(tau, Math.max(0, tMax - t)) : 0, lambda: sol.y,
    convexified: sol.regularisation > 0, message: sol.message, structure,
  };
}

/** The QP's objective and rows: P = -W + I/Δ (τ too) and q = -e_τ in x = (z, τ); rows c τ - G·z <= h. */
function qpStructure(input: SqpStepInput): QpStructure {
  const { cons, nFree, delta } = input;
  const n = nFree + 1;
  const m = cons.length;
  const nw = input.wV.length;
  const pI = new Int32Array(n + nw), pJ = new Int32Array(n + nw), pV = new Float64Array(n + nw);
  for (let i = 0; i < n; i++) {
    pI[i] = i;
    pJ[i] = i;
    pV[i] = 1 / delta;
  }
  for (let k = 0; k < nw; k++) {
    pI[n + k] = input.wI[k]!;
    pJ[n + k] = input.wJ[k]!;
    pV[n + k] = -input.wV[k]!;
  }
  const q = new Float64Array(n);
  q[nFree] = -1;
  // The nonzeros of the (dense-stored) gradients.
  const rowPtr = new Int32Array(m + 1);
  const colIdx: number[] = [], rowVal: number[] = [];
  for (let k = 0; k < m; k++) {
    const con = cons[k]!;
    const G = con.grad;
    const sup = con.support;
    const len = sup ? sup.length : nFree;
    for (let p = 0; p < len; p++) {
      const i = sup ? sup[p]! : p;
      if (G[i] !== 0) {
        colIdx.push(i);
        rowVal.push(-G[i]!);
      }
    }
    if (con.c !== 0) {
      colIdx.push(nFree);
      rowVal.push(con.c);
    }
    rowPtr[k + 1] = colIdx.length;
  }
  const rows = { pI, pJ, pV, q, rowPtr, colIdx: Int32Array.from(colIdx), rowVal: Float64Array.from(rowVal) };
  return { ...rows, prepared: prepareQp({ n, ...rows, h: new Float64Array(m), lower: new Float64Array(n), upper: new Float64Array(n) }) };
}

/** Angular distance (radians) within which a strut of the previous step is the same strut now. */
const SAME_STRUT_ANGLE = 0.3;

/**
 * Carry the multipliers of the previous step's constraints onto this step's: a strut or sample matches the
 * one of the same kind and pair whose contact angles are nearest (within SAME_STRUT_ANGLE); others get 0.
 */
export function carryMultipliers(prev: readonly Constraint[], prevLambda: ArrayLike<number>, next: readonly Constraint[]): Float64Array {
  const byPair = new Map<string, number[]>();
  prev.forEach((c, k) => {
    if (!(prevLambda[k]! > 0)) return;
    const key = `${c.kind}:${c.a}:${c.b}`;
    const list = byPair.get(key);
    if (list) list.push(k);
    else byPair.set(key, [k]);
  });
  const out = new Float64Array(next.length);
  next.forEach((c, k) => {
    const list = byPair.get(`${c.kind}:${c.a}:${c.b}`);
    if (!list) return;
    let best = -1, bestD = SAME_STRUT_ANGLE;
    for (const j of list) {
      const p = prev[j]!;
      const d = Math.max(angleGap(p.ta, c.ta), angleGap(p.tb, c.tb));
      if (d <= bestD) {
        bestD = d;
        best = j;
      }
    }
    if (best >= 0) out[k] = prevLambda[best]!;
  });
  return out;
}

function angleGap(a: number, b: number): number {
  const d = Math.abs(a - b) % (2 * Math.PI);
  return Math.min(d, 2 * Math.PI - d);
}
