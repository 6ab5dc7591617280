// A primal-dual interior-point method for the sparse QP of one SQP step:
//
//   minimise ½ xᵀ P x + qᵀ x   subject to   C x <= h  (sparse rows),   l <= x <= u.
//
// Mehrotra's predictor–corrector (Mehrotra, SIAM J. Optim. 2(4), 1992; Nocedal & Wright, Numerical
// Optimization, 2nd ed., §16.6) from an infeasible start. Each iteration solves one reduced Newton system
//
//   [ P + Σ + δI    Cᵀ          ] [dx]   [r1]
//   [ C            −(S Y⁻¹ + ρ) ] [dy] = [r2],      Σ = W_l S_l⁻¹ + W_u S_u⁻¹ (the bounds, eliminated),
//
// through its normal matrix M = P + Σ + δI + Cᵀ(S Y⁻¹ + ρ)⁻¹C, whose pattern is that of P plus each row's
// pairs of columns (the ring-contact graph again), by a sparse LDLᵀ (step/sparseLdl.ts): the minimum-degree
// ordering and elimination tree are computed once per QP and each iteration refactors numerically, at a cost
// linear in the rings for a chain or a necklace. The small dual regularisation ρ bounds M's entries, so
// rounding cannot flip a pivot's sign, and three passes of iterative refinement on the unregularised system
// recover the accuracy. (The quasi-definite matrix itself, factorised in a fill-reducing order, was tried and
// dropped: eliminating a nearly active row first, with S/Y ~ 1e-20, flipped pivot signs by rounding.)
// P need not be convex (it is the Lagrangian Hessian of the tube problem plus the trust-region term); by the
// Schur complement and Sylvester's law the reduced system has the inertia of a convex QP exactly when M is
// positive definite, i.e. when its LDLᵀ has n positive pivots; else δ grows until it has — the inertia
// correction of Wächter & Biegler (Math. Program. 106, 2006, IPOPT).
// A QP that does not converge within its iteration or time budget is a failed step, never a hang.
import { analyseLdl, factorLdl, SymTriplets, type LdlFactor, type LdlPattern, type SymCsc } from './sparseLdl.js';

export interface SparseQp {
  /** Number of variables. */
  n: number;
  /** Upper-triangle entries of P (i <= j), duplicates summed. */
  pI: Int32Array | number[];
  pJ: Int32Array | number[];
  pV: Float64Array | number[];
  q: Float64Array;
  /** Rows of C (compressed sparse rows) and their right-hand sides. */
  rowPtr: Int32Array;
  colIdx: Int32Array;
  rowVal: Float64Array;
  h: Float64Array;
  /** Finite bounds, lower[i] < upper[i]. */
  lower: Float64Array;
  upper: Float64Array;
}

export interface QpOptions {
  /** Relative accuracy of the residuals and the complementarity gap (default 1e-12). */
  tol?: number;
  maxIterations?: number;
  /** Date.now() milliseconds after which the solve gives up (a failed step). */
  deadline?: number;
}

export interface QpSolution {
  ok: boolean;
  x: Float64Array;
  /** Multipliers of the rows C x <= h (>= 0). */
  y: Float64Array;
  iterations: number;
  /** Largest δ the inertia correction added to P's diagonal (0: the QP was convex where it mattered). */
  regularisation: number;
  message: string;
}

const DEFAULT_TOL = 1e-12;
const DEFAULT_MAX_ITERATIONS = 80;
/** Fraction of the way to the boundary a step may go. */
const TO_BOUNDARY = 0.995;
/** First inertia correction (relative to the largest |P_ii|, at least 1), its growth, and its decay between iterations. */
const DELTA_FIRST_REL = 1e-8;
const DELTA_GROWTH = 10;
const DELTA_DECAY = 1 / 3;
const DELTA_MAX_REL = 1e12;
/**
 * Mean complementarity product at convergence, relative to tol and the narrowest bound width: an active
 * row's slack is about μ over its multiplier, so this keeps its error far below the step's own accuracy.
 */
const GAP_REL = 1e-2;
/** Rounding floor of the mean complementarity product (relative to the data's size). */
const GAP_FLOOR = 1e-15;
/**
 * At the iteration limit, a point that is primal and dual feasible to tol with a gap within this factor of
 * the target is accepted: the gap stalls there by rounding when rows are nearly parallel.
 */
const STALLED_GAP_FACTOR = 1e3;
/** Dual regularisation (relative) and the iterative-refinement passes that undo it. */
const DUAL_REG_REL = 1e-9;
const REFINE_STEPS = 3;
/** Residual (relative to the right-hand side) at which the refinement stops early. */
const REFINE_ENOUGH = 1e-14;
/**
 * Pivots counted as zero, relative to the largest diagonal entry: the barrier terms spread M's diagonal over
 * many orders of magnitude near the end, and a positive definite M has no zero pivot, so only a pivot lost to
 * rounding altogether counts.
 */
const PIVOT_ZERO_REL = 1e-40;

/**
 * What a QP's structure fixes (P, the pattern of C and of the normal matrix, its ordering and elimination
 * tree): computed once and shared by the QPs that differ only in q, h and the bounds (a second-order
 * correction re-solves the step's QP with shifted right-hand sides).
 */
export interface PreparedQp {
  readonly n: number;
  readonly m: number;
  readonly K: SymCsc;
  readonly base: Float64Array;
  readonly diagSlot: Int32Array;
  /** Per row: its group (rows with the same columns share the slots of their column pairs). */
  readonly rowGroup: Int32Array;
  readonly groupPairStart: Int32Array;
  readonly groupPairSlot: Int32Array;
  /** Per row, from rowPairStart[r]: the products of its entries for each column pair of its group. */
  readonly rowPairStart: Int32Array;
  readonly pairCoef: Float64Array;
  readonly pattern: LdlPattern;
  readonly P: CompactSym;
  readonly pDiagMax: number;
  /** The structure it was prepared for (checked on reuse). */
  readonly pV: SparseQp['pV'];
  readonly rowPtr: Int32Array;
  readonly colIdx: Int32Array;
  readonly rowVal: Float64Array;
}

/**
 * The normal matrix M = P + Σ + δI + Cᵀ (Y S⁻¹) C has P's entries, every diagonal entry, and each pair of
 * columns a row touches (the ring-contact graph again: a strut couples its two rings and the tube). Many rows
 * share their columns (a strut and the samples of one pair of rings), so the pattern is built per group of
 * rows with the same columns, and each row keeps only the products of its own entries.
 */
export function prepareQp(qp: SparseQp): PreparedQp {
  const n = qp.n, m = qp.h.length;
  const trip = new SymTriplets(n);
  for (let k = 0; k < qp.pV.length; k++) trip.add(qp.pI[k]!, qp.pJ[k]!, qp.pV[k]!);
  const firstDiag = trip.length;
  for (let i = 0; i < n; i++) trip.add(i, i, 0);
  const groups = new Map<string, number>();
  const rowGroup = new Int32Array(m);
  const groupPairStartList: number[] = [0];
  const rowPairStart = new Int32Array(m + 1);
  const firstPair = trip.length;
  for (let r = 0; r < m; r++) {
    const start = qp.rowPtr[r]!, end = qp.rowPtr[r + 1]!;
    const len = end - start;
    rowPairStart[r + 1] = rowPairStart[r]! + (len * (len + 1)) / 2;
    const key = Array.prototype.join.call(qp.colIdx.subarray(start, end), ',');
    let g = groups.get(key);
    if (g === undefined) {
      g = groups.size;
      groups.set(key, g);
      for (let p = start; p < end; p++) for (let p2 = p; p2 < end; p2++) trip.add(qp.colIdx[p]!, qp.colIdx[p2]!, 0);
      groupPairStartList.push(groupPairStartList[groupPairStartList.length - 1]! + (len * (len + 1)) / 2);
    }
    rowGroup[r] = g;
  }
  const { matrix: K, slot } = trip.toCsc();
  // Each row's products of entries, fixed for the QP (two entries of a row in the same column meet twice on
  // the diagonal): an iteration scales them by the row's barrier weight.
  const pairCoef = new Float64Array(rowPairStart[m]!);
  for (let r = 0; r < m; r++) {
    const start = qp.rowPtr[r]!, end = qp.rowPtr[r + 1]!;
    let e = rowPairStart[r]!;
    for (let p = start; p < end; p++) {
      for (let p2 = p; p2 < end; p2++) {
        pairCoef[e++] = qp.rowVal[p]! * qp.rowVal[p2]! * (p !== p2 && qp.colIdx[p] === qp.colIdx[p2] ? 2 : 1);
      }
    }
  }
  const base = Float64Array.from(K.values);
  const groupPairStart = Int32Array.from(groupPairStartList);
  const groupPairSlot = slot.slice(firstPair, firstPair + groupPairStart[groupPairStart.length - 1]!);
  const pattern = analyseLdl(K);
  // P with its duplicates summed (a Lagrangian Hessian arrives as one block per strut, many on the same
  // pair of rings): the products by P in the residuals and the refinement run over the distinct entries.
  const P = compactP(K, slot, qp.pV.length, base);
  let pDiagMax = 1;
  for (let k = 0; k < P.v.length; k++) if (P.i[k] === P.j[k]) pDiagMax = Math.max(pDiagMax, Math.abs(P.v[k]!));
  return {
    n, m, K, base, diagSlot: slot.slice(firstDiag, firstDiag + n), rowGroup, groupPairStart, groupPairSlot, rowPairStart,
    pairCoef, pattern, P, pDiagMax, pV: qp.pV, rowPtr: qp.rowPtr, colIdx: qp.colIdx, rowVal: qp.rowVal,
  };
}

/** `prepared`: from prepareQp on a QP with the same P and C (q, h and the bounds may differ). */
export function solveQpInterior(qp: SparseQp, options: QpOptions = {}, prepared?: PreparedQp): QpSolution {
  const tol = options.tol ?? DEFAULT_TOL;
  const maxIt = options.maxIterations ?? DEFAULT_MAX_ITERATIONS;
  const n = qp.n, m = qp.h.length;
  const prep = prepared ?? prepareQp(qp);
  if (prep.n !== n || prep.m !== m || prep.pV !== qp.pV || prep.rowPtr !== qp.rowPtr || prep.colIdx !== qp.colIdx || prep.rowVal !== qp.rowVal) {
    throw new RangeError('solveQpInterior: the prepared structure belongs to another QP; call prepareQp for this one');
  }
  const { K, base, diagSlot, rowGroup, groupPairStart, groupPairSlot, rowPairStart, pairCoef, pattern, P, pDiagMax } = prep;
  const rowScale = new Float64Array(m);

  const { lower: l, upper: u, h, q } = qp;
  // Start: x at the bound-clipped origin, slacks and multipliers at a size set by the data.
  const x = new Float64Array(n);
  const width = new Float64Array(n);
  let hScale = 0;
  for (let i = 0; i < n; i++) {
    width[i] = u[i]! - l[i]!;
    x[i] = Math.min(Math.max(0, l[i]! + 0.25 * width[i]!), u[i]! - 0.25 * width[i]!);
  }
  for (let r = 0; r < m; r++) hScale = Math.max(hScale, Math.abs(h[r]!));
  const cx = new Float64Array(m);
  mulC(qp, x, cx);
  const s = new Float64Array(m), y = new Float64Array(m);
  const sl = new Float64Array(n), wl = new Float64Array(n), su = new Float64Array(n), wu = new Float64Array(n);
  let boxScale = 0, minWidth = Infinity;
  for (let i = 0; i < n; i++) {
    boxScale = Math.max(boxScale, width[i]!);
    minWidth = Math.min(minWidth, width[i]!);
  }
  const s0 = 0.1 * Math.max(Math.min(hScale, boxScale), 1e-8 * Math.max(hScale, boxScale, 1e-300));
  for (let r = 0; r < m; r++) {
    s[r] = Math.max(h[r]! - cx[r]!, s0);
    y[r] = 1;
  }
  for (let i = 0; i < n; i++) {
    sl[i] = Math.max(x[i]! - l[i]!, 0.25 * width[i]!);
    su[i] = Math.max(u[i]! - x[i]!, 0.25 * width[i]!);
    wl[i] = 1;
    wu[i] = 1;
  }

  const qScale = 1 + maxAbs(q);
  const rd = new Float64Array(n), rp = new Float64Array(m), rl = new Float64Array(n), ru = new Float64Array(n);
  const rhs1 = new Float64Array(n), rhs2 = new Float64Array(m), scaled = new Float64Array(m), ctY2 = new Float64Array(n);
  const res1 = new Float64Array(n), res2 = new Float64Array(m), corrX = new Float64Array(n), aDiag = new Float64Array(n);
  // Dual regularisation of the rows, relative to the data's scale: it bounds the normal matrix's entries, so
  // rounding cannot flip the sign of a pivot (the inertia test stays trustworthy to the end).
  const rho = DUAL_REG_REL * Math.max(pDiagMax, 1) ** -1;
  const dx = new Float64Array(n), dy = new Float64Array(m), ds = new Float64Array(m);
  const dsl = new Float64Array(n), dwl = new Float64Array(n), dsu = new Float64Array(n), dwu = new Float64Array(n);
  const aff = { ds: new Float64Array(m), dy: new Float64Array(m), dsl: new Float64Array(n), dwl: new Float64Array(n), dsu: new Float64Array(n), dwu: new Float64Array(n) };
  const ctY = new Float64Array(n), px = new Float64Array(n);
  const affOut = { dx: new Float64Array(n), ...aff };
  const nComp = m + 2 * n;
  let delta = 0, deltaUsed = 0;
  let lastRes: [number, number, number] = [Infinity, Infinity, Infinity];
  let gapTarget = 0;
  let it = 0;
  let message = 'iteration limit';
  let ok = false;

  for (; it < maxIt; it++) {
    if (options.deadline !== undefined && Date.now() > options.deadline) {
      message = 'time limit';
      break;
    }
    // Residuals.
    mulP(P, x, px);
    mulCt(qp, y, ctY);
    mulC(qp, x, cx);
    let gap = 0;
    for (let i = 0; i < n; i++) {
      rd[i] = px[i]! + q[i]! + ctY[i]! - wl[i]! + wu[i]!;
      rl[i] = x[i]! - l[i]! - sl[i]!;
      ru[i] = u[i]! - x[i]! - su[i]!;
      gap += sl[i]! * wl[i]! + su[i]! * wu[i]!;
    }
    for (let r = 0; r < m; r++) {
      rp[r] = cx[r]! + s[r]! - h[r]!;
      gap += s[r]! * y[r]!;
    }
    const mu = gap / Math.max(nComp, 1);
    lastRes = [0, 0, mu];
    const primalRes = Math.max(maxAbs(rp) / (1 + hScale), maxAbs(rl) / (1 + boxScale), maxAbs(ru) / (1 + boxScale));
    const dualRes = maxAbs(rd) / qScale;
    lastRes = [primalRes, dualRes, mu];
    gapTarget = Math.max(GAP_REL * tol * minWidth, GAP_FLOOR * qScale * Math.max(1, hScale));
    if (primalRes <= tol && dualRes <= tol && mu <= gapTarget) {
      ok = true;
      message = `converged in ${it} iterations`;
      break;
    }
    if (!Number.isFinite(gap) || !Number.isFinite(primalRes) || !Number.isFinite(dualRes)) {
      message = 'non-finite iterate';
      break;
    }

    // Factor, correcting the inertia.
    let factor: LdlFactor | null = null;
    delta = delta > 0 ? Math.max(delta * DELTA_DECAY, DELTA_FIRST_REL * pDiagMax) : 0;
    for (;;) {
      const vals = K.values;
      vals.set(base);
      for (let i = 0; i < n; i++) {
        aDiag[i] = wl[i]! / sl[i]! + wu[i]! / su[i]! + delta;
        vals[diagSlot[i]!] = vals[diagSlot[i]!]! + aDiag[i]!;
      }
      for (let r = 0; r < m; r++) {
        const d = 1 / (s[r]! / y[r]! + rho);
        rowScale[r] = d;
        const g = rowGroup[r]!, gs = groupPairStart[g]!, off = rowPairStart[r]! - gs;
        for (let e = gs, end = groupPairStart[g + 1]!; e < end; e++) vals[groupPairSlot[e]!] += d * pairCoef[e + off]!;
      }
      const f = factorLdl(pattern, K, PIVOT_ZERO_REL);
      // By the Schur complement, the reduced system has n positive and m negative eigenvalues exactly when
      // M is positive definite.
      if (f.zero === 0 && f.positive === n) {
        factor = f;
        break;
      }
      delta = delta === 0 ? DELTA_FIRST_REL * pDiagMax : delta * DELTA_GROWTH;
      if (delta > DELTA_MAX_REL * pDiagMax) break;
    }
    if (factor === null) {
      message = 'the Newton system could not be made quasi-definite';
      break;
    }
    deltaUsed = Math.max(deltaUsed, delta);

    // Predictor (affine scaling): σ = 0.
    const solveDir = (
      sigmaMu: number, corr: typeof aff | null,
      out: { dx: Float64Array; dy: Float64Array; ds: Float64Array; dsl: Float64Array; dwl: Float64Array; dsu: Float64Array; dwu: Float64Array },
    ): void => {
      // Complementarity targets: r_c = s∘y - σμ (+ Δs_aff∘Δy_aff in the corrector).
      for (let i = 0; i < n; i++) {
        const rcl = sl[i]! * wl[i]! - sigmaMu + (corr ? corr.dsl[i]! * corr.dwl[i]! : 0);
        const rcu = su[i]! * wu[i]! - sigmaMu + (corr ? corr.dsu[i]! * corr.dwu[i]! : 0);
        rhs1[i] = -rd[i]! - (rcl + wl[i]! * rl[i]!) / sl[i]! + (rcu + wu[i]! * ru[i]!) / su[i]!;
        // Stash for back-substitution.
        out.dsl[i] = rcl;
        out.dsu[i] = rcu;
      }
      for (let r = 0; r < m; r++) {
        const rc = s[r]! * y[r]! - sigmaMu + (corr ? corr.ds[r]! * corr.dy[r]! : 0);
        rhs2[r] = -rp[r]! + rc / y[r]!;
        out.ds[r] = rc;
      }
      // The regularised system by its normal matrix, then iterative refinement on the exact one.
      out.dx.fill(0);
      out.dy.fill(0);
      res1.set(rhs1);
      res2.set(rhs2);
      for (let pass = 0; pass <= REFINE_STEPS; pass++) {
        // [M] ddx = R1 + Cᵀ D R2;  ddy = D (C ddx - R2),  D = (S Y⁻¹ + ρ)⁻¹.
        for (let r = 0; r < m; r++) scaled[r] = rowScale[r]! * res2[r]!;
        mulCt(qp, scaled, ctY2);
        for (let i = 0; i < n; i++) res1[i] = res1[i]! + ctY2[i]!;
        factor!.solve(res1, corrX);
        mulC(qp, corrX, cx);
        for (let i = 0; i < n; i++) out.dx[i] = out.dx[i]! + corrX[i]!;
        for (let r = 0; r < m; r++) out.dy[r] = out.dy[r]! + rowScale[r]! * (cx[r]! - res2[r]!);
        if (pass === REFINE_STEPS) break;
        // Residual of [A Cᵀ; C -E] (dx, dy) = (r1, r2), A = P + Σ + δI, E = S Y⁻¹.
        mulP(P, out.dx, res1);
        mulCt(qp, out.dy, ctY2);
        let r1 = 0, r2 = 0, b1 = 0, b2 = 0;
        for (let i = 0; i < n; i++) {
          res1[i] = rhs1[i]! - res1[i]! - aDiag[i]! * out.dx[i]! - ctY2[i]!;
          r1 = Math.max(r1, Math.abs(res1[i]!));
          b1 = Math.max(b1, Math.abs(rhs1[i]!));
        }
        mulC(qp, out.dx, cx);
        for (let r = 0; r < m; r++) {
          res2[r] = rhs2[r]! - cx[r]! + (s[r]! / y[r]!) * out.dy[r]!;
          r2 = Math.max(r2, Math.abs(res2[r]!));
          b2 = Math.max(b2, Math.abs(rhs2[r]!));
        }
        // Solved to rounding already: a further pass would change nothing.
        if (r1 <= REFINE_ENOUGH * b1 && r2 <= REFINE_ENOUGH * b2) break;
      }
      // ds = -rp - C dx;  dsl = dx + rl;  dwl = -(rcl + wl dsl)/sl;  dsu = -dx + ru;  dwu = -(rcu + wu dsu)/su.
      mulC(qp, out.dx, cx);
      for (let r = 0; r < m; r++) out.ds[r] = -rp[r]! - cx[r]!;
      for (let i = 0; i < n; i++) {
        const rcl = out.dsl[i]!, rcu = out.dsu[i]!;
        out.dsl[i] = out.dx[i]! + rl[i]!;
        out.dwl[i] = -(rcl + wl[i]! * out.dsl[i]!) / sl[i]!;
        out.dsu[i] = -out.dx[i]! + ru[i]!;
        out.dwu[i] = -(rcu + wu[i]! * out.dsu[i]!) / su[i]!;
      }
    };
    solveDir(0, null, affOut);
    const aAff = Math.min(
      stepToBoundary(s, affOut.ds, 1), stepToBoundary(y, affOut.dy, 1), stepToBoundary(sl, affOut.dsl, 1),
      stepToBoundary(wl, affOut.dwl, 1), stepToBoundary(su, affOut.dsu, 1), stepToBoundary(wu, affOut.dwu, 1),
    );
    let gapAff = 0;
    for (let r = 0; r < m; r++) gapAff += (s[r]! + aAff * affOut.ds[r]!) * (y[r]! + aAff * affOut.dy[r]!);
    for (let i = 0; i < n; i++) {
      gapAff += (sl[i]! + aAff * affOut.dsl[i]!) * (wl[i]! + aAff * affOut.dwl[i]!);
      gapAff += (su[i]! + aAff * affOut.dsu[i]!) * (wu[i]! + aAff * affOut.dwu[i]!);
    }
    const sigma = Math.min(1, (gapAff / Math.max(gap, 1e-300)) ** 3);
    // Corrector.
    const dir = { dx, dy, ds, dsl, dwl, dsu, dwu };
    solveDir(sigma * mu, affOut, dir);
    const alpha = Math.min(
      1,
      TO_BOUNDARY * Math.min(
        stepToBoundary(s, ds, Infinity), stepToBoundary(y, dy, Infinity), stepToBoundary(sl, dsl, Infinity),
        stepToBoundary(wl, dwl, Infinity), stepToBoundary(su, dsu, Infinity), stepToBoundary(wu, dwu, Infinity),
      ),
    );
    for (let i = 0; i < n; i++) {
      x[i] = x[i]! + alpha * dx[i]!;
      sl[i] = sl[i]! + alpha * dsl[i]!;
      wl[i] = wl[i]! + alpha * dwl[i]!;
      su[i] = su[i]! + alpha * dsu[i]!;
      wu[i] = wu[i]! + alpha * dwu[i]!;
    }
    for (let r = 0; r < m; r++) {
      s[r] = s[r]! + alpha * ds[r]!;
      y[r] = y[r]! + alpha * dy[r]!;
    }
  }
  if (!ok && it >= maxIt && lastRes[0] <= tol && lastRes[1] <= tol && lastRes[2] <= STALLED_GAP_FACTOR * gapTarget) {
    // Feasible and dual feasible, the gap held up by rounding (nearly parallel rows: the sampled arc of a
    // contact continuum): the point is as good as the data allow.
    ok = true;
    message = `converged to the rounding floor of the gap in ${maxIt} iterations (gap ${lastRes[2].toExponential(1)})`;
  } else if (!ok && it >= maxIt) {
    message = `no convergence in ${maxIt} iterations (primal ${lastRes[0].toExponential(1)}, dual ${lastRes[1].toExponential(1)}, gap ${lastRes[2].toExponential(1)}, δ ${delta.toExponential(1)})`;
  }
  return { ok, x, y, iterations: it, regularisation: deltaUsed, message };
}

// --- helpers ---

/** Largest α in (0, cap] with v + α dv >= 0 (cap when no component decreases). */
function stepToBoundary(v: Float64Array, dv: Float64Array, cap: number): number {
  let a = cap;
  for (let i = 0; i < v.length; i++) if (dv[i]! < 0) a = Math.min(a, -v[i]! / dv[i]!);
  return a;
}

/** Largest absolute entry (the max norm). */
export function maxAbs(v: ArrayLike<number>): number {
  let a = 0;
  for (let i = 0; i < v.length; i++) a = Math.max(a, Math.abs(v[i]!));
  return a;
}

function mulC(qp: SparseQp, x: ArrayLike<number>, out: Float64Array): void {
  for (let r = 0; r < qp.h.length; r++) {
    let v = 0;
    for (let p = qp.rowPtr[r]!; p < qp.rowPtr[r + 1]!; p++) v += qp.rowVal[p]! * x[qp.colIdx[p]!]!;
    out[r] = v;
  }
}

function mulCt(qp: SparseQp, y: ArrayLike<number>, out: Float64Array): void {
  out.fill(0);
  for (let r = 0; r < qp.h.length; r++) {
    const yr = y[r]!;
    if (yr === 0) continue;
    for (let p = qp.rowPtr[r]!; p < qp.rowPtr[r + 1]!; p++) out[qp.colIdx[p]!] = out[qp.colIdx[p]!]! + qp.rowVal[p]! * yr;
  }
}

interface CompactSym {
  i: Int32Array;
  j: Int32Array;
  v: Float64Array;
}

/** The distinct upper-triangle entries of P: the slots of K its first `count` triplets landed in. */
function compactP(K: { n: number; colPtr: Int32Array; rowIdx: Int32Array }, slot: Int32Array, count: number, values: Float64Array): CompactSym {
  const used = new Uint8Array(values.length);
  for (let k = 0; k < count; k++) used[slot[k]!] = 1;
  let nnz = 0;
  for (let q = 0; q < used.length; q++) nnz += used[q]!;
  const out: CompactSym = { i: new Int32Array(nnz), j: new Int32Array(nnz), v: new Float64Array(nnz) };
  let e = 0;
  for (let c = 0; c < K.n; c++) {
    for (let q = K.colPtr[c]!; q < K.colPtr[c + 1]!; q++) {
      if (!used[q]) continue;
      out.i[e] = K.rowIdx[q]!;
      out.j[e] = c;
      out.v[e] = values[q]!;
      e++;
    }
  }
  return out;
}

function mulP(P: CompactSym, x: ArrayLike<number>, out: Float64Array): void {
  out.fill(0);
  for (let k = 0; k < P.v.length; k++) {
    const i = P.i[k]!, j = P.j[k]!, v = P.v[k]!;
    out[i] = out[i]! + v * x[j]!;
    if (i !== j) out[j] = out[j]! + v * x[i]!;
  }
}

