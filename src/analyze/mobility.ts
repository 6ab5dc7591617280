// First-order mobility of a ring set: the cone of rigid-body velocities (spins and whole-set motions
// quotiented out) that close no active contact to first order, C = { z : a_k . z >= 0 for every strut k }.
// Its linear span has dimension freeDimension; its lineality space {a_k . z = 0 for all k} holds the
// reversible motions. The contacts that stay at exactly zero for every motion in C (the implicit
// equalities E) are found by linear programs, and span(C) = null(a_E). A self-stress (λ >= 0, Σ λ_k a_k = 0)
// exists iff no motion opens every contact at once (Gordan's alternative); it carries the second-order test.
import { loadLpSolver, solveLp, type LpProblem, type LpRow } from './mobilityLp.js';
import { activeStruts, strutRow, type ActiveSet } from './mobilityContacts.js';
import { motionFrame, restrictToFree, splitSpan, type MotionFrame, type RingPose } from './mobilityMotion.js';
import { imagePairs, type ImagePair } from './mobilityPairs.js';
import type { Lattice } from '../model/types.js';

export interface FirstOrder {
  status: 'ok' | 'lp-failed';
  frame: MotionFrame;
  active: ActiveSet;
  /** Pairs (with lattice copies) that can touch at this tube. */
  pairs: ImagePair[];
  /** Unit-length constraint rows a_k in free coordinates z, one per active strut (same order). */
  rows: number[][];
  /** Length of each strut's gradient before normalising (dimensionless; 1 for a zero row). */
  rowNorms: number[];
  /** Dimension of span(C): every first-order motion beyond spins and whole-set motions. */
  freeDimension: number;
  /** Orthonormal basis (in z) of the reversible motions (lineality space of C). */
  reversible: number[][];
  /** Cone directions (in z, unit, orthogonal to `reversible`) that complete a basis of span(C): one-way motions. */
  oneWay: number[][];
  /** Orthonormal basis (in z) of span(C) = null(a_E). */
  span: number[][];
  /** Per strut: true when no first-order motion can open it (it belongs to E). */
  implicit: boolean[];
  /** max s with a_k . z >= s for all k, |z_a| <= 1; > 0 means every contact can open at once. */
  openingMargin: number | null;
  /** The motion (in z) that attains openingMargin. */
  openingDirection: number[] | null;
  /** Self-stress per strut (sums to 1), positive on as many of E as possible; null when none exists. */
  stress: number[] | null;
  detail: string;
}

export interface MobilityOptions {
  /** A contact with gap d - r_a - r_b <= activeTol (layout units) is active. */
  activeTol: number;
  /** Translational periodicity of a weave: copies in nearby cells count as neighbours. */
  lattice?: Lattice | null;
}

/** Singular values (rows normalised to length 1) below this count as zero: the contact rows are
 * exact to about 1e-9 for optimizer output, a genuine constraint is far above 1e-6. */
export const RANK_TOL = 1e-6;
/** LP slack above this (rows normalised, box |z| <= 1) means a contact really opens; it matches RANK_TOL,
 * since an optimizer's output is critical only to about its own tolerance. */
export const OPEN_TOL = 1e-6;
/** Gradient rows shorter than this (dimensionless) are zero: the contact is stationary at first order. */
const ZERO_ROW = 1e-9;
/** A self-stress may leave this much unbalanced (max norm, rows normalised, Σ λ = 1), for the same reason. */
export const STRESS_TOL = 1e-6;

export async function firstOrderMobility(rings: readonly RingPose[], options: MobilityOptions): Promise<FirstOrder> {
  await loadLpSolver();
  const lattice = options.lattice ?? null;
  const frame = motionFrame(rings, lattice);
  const maxTube = Math.max(0, ...rings.map((r) => r.tube));
  const pairs = imagePairs(rings, lattice, 2 * maxTube + options.activeTol);
  const active = activeStruts(rings, options.activeTol, pairs);
  const m = frame.free.length;
  const raw = active.struts.map((s) => restrictToFree(frame, strutRow(s, rings, frame)));
  // A contact whose distance no (periodic) motion changes to first order, e.g. a ring against its own copy
  // in the next cell, gets a zero row: it constrains only at second order. Its norm is taken as 1 so it
  // still enters the stress form and the correction LP (q_k >= margin) with unit weight.
  const rowNorms = raw.map((g) => Math.sqrt(dotN(g, g)));
  const rows = raw.map((g, k) => (rowNorms[k]! > ZERO_ROW ? g.map((v) => v / rowNorms[k]!) : g.map(() => 0)));
  rowNorms.forEach((v, k) => { if (!(v > ZERO_ROW)) rowNorms[k] = 1; });
  const K = rows.length;
  const base = { frame, active, rows, rowNorms, pairs };
  if (m === 0 || K === 0) {
    const all = identity(m);
    return {
      ...base, status: 'ok', freeDimension: m, reversible: all, oneWay: [], span: all,
      implicit: new Array<boolean>(K).fill(false), openingMargin: K === 0 ? null : 0, openingDirection: null,
      stress: null, detail: K === 0 ? 'no active contacts' : 'no free coordinates',
    };
  }

  // Reversible motions: the null space of every contact row.
  const reversible = nullSpace(rows, m);

  // Implicit equalities: repeatedly open as many undecided contacts as possible; what never opens is E.
  const implicit = new Array<boolean>(K).fill(true);
  const witnesses: number[][] = [];
  let undecided = Array.from({ length: K }, (_, k) => k);
  for (let round = 0; round < K && undecided.length > 0; round++) {
    const sol = await solveLp(openSomeLp(rows, m, undecided));
    if (sol.status !== 'optimal') return failed(base, reversible, `implicit-equality LP: ${sol.detail}`);
    const z = zOf(sol.values, m);
    const opened = undecided.filter((k) => (sol.values.get(`s${k}`) ?? 0) > OPEN_TOL);
    if (opened.length === 0) break;
    for (const k of opened) implicit[k] = false;
    witnesses.push(z);
    undecided = undecided.filter((k) => implicit[k]);
  }

  const span = nullSpace(rows.filter((_, k) => implicit[k]), m);
  const oneWay = independentCompletion(reversible, witnesses, span.length - reversible.length);

  // Strictly-opening motion: one s for every contact.
  const open = await solveLp(openAllLp(rows, m));
  if (open.status !== 'optimal') return failed(base, reversible, `opening LP: ${open.detail}`);
  const openingMargin = open.values.get('s') ?? 0;
  const openingDirection = openingMargin > OPEN_TOL ? zOf(open.values, m) : null;

  let stress: number[] | null = null;
  if (openingDirection === null) {
    const balance = await solveLp(stressLp(rows, m, implicit, null));
    const residual = balance.status === 'optimal' ? balance.values.get('r') ?? Infinity : Infinity;
    if (residual <= STRESS_TOL) {
      const st = await solveLp(stressLp(rows, m, implicit, Math.max(2 * residual, 1e-14)));
      const sol = st.status === 'optimal' ? st : balance;
      stress = rows.map((_, k) => Math.max(0, sol.values.get(`l${k}`) ?? 0));
      const sum = stress.reduce((a, b) => a + b, 0);
      stress = sum > 0 ? stress.map((v) => v / sum) : null;
    }
  }
  return {
    ...base, status: 'ok', freeDimension: span.length, reversible, oneWay, span, implicit,
    openingMargin, openingDirection, stress, detail: 'ok',
  };
}

/** max Σ s_k over undecided k: a_k.z >= s_k (0 <= s_k <= 1), a_j.z >= 0 for the rest, |z| <= 1. */
function openSomeLp(rows: number[][], m: number, undecided: number[]): LpProblem {
  const isU = new Set(undecided);
  const lpRows: LpRow[] = rows.map((a, k) => ({
    terms: [...zTerms(a), ...(isU.has(k) ? ([[`s${k}`, -1]] as [string, number][]) : [])],
    sense: '>=',
    rhs: 0,
  }));
  return {
    sense: 'maximize',
    objective: undecided.map((k) => [`s${k}`, 1] as [string, number]),
    rows: lpRows,
    bounds: [...zBounds(m), ...undecided.map((k) => [`s${k}`, 0, 1] as [string, number, number])],
  };
}

/** max s: a_k.z >= s for every k, |z| <= 1, s <= 1. */
function openAllLp(rows: number[][], m: number): LpProblem {
  return {
    sense: 'maximize',
    objective: [['s', 1]],
    rows: rows.map((a) => ({ terms: [...zTerms(a), ['s', -1]], sense: '>=', rhs: 0 })),
    bounds: [...zBounds(m), ['s', -Infinity, 1]],
  };
}

/**
 * Self-stress on the implicit contacts, Σ λ_k = 1, λ_k = 0 off E. With residual = null: minimise the
 * imbalance r = max_a |Σ λ_k a_k[a]|. With a residual: keep r <= residual and put as much weight as
 * possible on every implicit contact (max t, λ_k >= t on E).
 */
function stressLp(rows: number[][], m: number, implicit: boolean[], residual: number | null): LpProblem {
  const lpRows: LpRow[] = [];
  for (let a = 0; a < m; a++) {
    const terms = rows.map((r, k) => [`l${k}`, implicit[k] ? r[a]! : 0] as [string, number]);
    lpRows.push({ terms: [...terms, ['r', -1]], sense: '<=', rhs: 0 });
    lpRows.push({ terms: [...terms, ['r', 1]], sense: '>=', rhs: 0 });
  }
  lpRows.push({ terms: rows.map((_, k) => [`l${k}`, 1] as [string, number]), sense: '=', rhs: 1 });
  if (residual !== null) {
    rows.forEach((_, k) => {
      if (implicit[k]) lpRows.push({ terms: [[`l${k}`, 1], ['t', -1]], sense: '>=', rhs: 0 });
    });
  }
  return {
    sense: residual === null ? 'minimize' : 'maximize',
    objective: residual === null ? [['r', 1]] : [['t', 1]],
    rows: lpRows,
    bounds: [
      ...rows.map((_, k) => [`l${k}`, 0, implicit[k] ? 1 : 0] as [string, number, number]),
      ['r', 0, residual === null ? Infinity : residual],
      ...(residual === null ? [] : [['t', -Infinity, 1] as [string, number, number]]),
    ],
  };
}

/** Orthonormal basis of { z : row . z = 0 for every row }. */
export function nullSpace(rows: readonly (readonly number[])[], m: number): number[][] {
  if (rows.length === 0) return identity(m);
  // Eigenvalues of Σ a aᵀ are squared singular values of the stacked rows.
  return splitSpan(rows, m, 0, RANK_TOL * RANK_TOL).kernel;
}

/** Unit vectors from `candidates`, orthogonal to `base` and to each other, at most `count`. */
function independentCompletion(base: number[][], candidates: number[][], count: number): number[][] {
  const basis = base.map((v) => [...v]);
  const out: number[][] = [];
  for (const c of candidates) {
    if (out.length >= count) break;
    const v = [...c];
    for (const b of basis) {
      const d = dotN(v, b);
      for (let i = 0; i < v.length; i++) v[i]! -= d * b[i]!;
    }
    const l = Math.sqrt(dotN(v, v));
    if (l <= RANK_TOL * Math.max(1, Math.sqrt(dotN(c, c)))) continue;
    const u = v.map((x) => x / l);
    basis.push(u);
    out.push(u);
  }
  return out;
}

function failed(base: { frame: MotionFrame; active: ActiveSet; rows: number[][]; rowNorms: number[]; pairs: ImagePair[] }, reversible: number[][], detail: string): FirstOrder {
  return {
    ...base, status: 'lp-failed', freeDimension: reversible.length, reversible, oneWay: [], span: reversible,
    implicit: base.rows.map(() => true), openingMargin: null, openingDirection: null, stress: null, detail,
  };
}

function zTerms(a: readonly number[]): [string, number][] {
  return a.map((c, i) => [`z${i}`, c] as [string, number]);
}

function zBounds(m: number): [string, number, number][] {
  return Array.from({ length: m }, (_, i) => [`z${i}`, -1, 1] as [string, number, number]);
}

function zOf(values: Map<string, number>, m: number): number[] {
  return Array.from({ length: m }, (_, i) => values.get(`z${i}`) ?? 0);
}

function identity(m: number): number[][] {
  return Array.from({ length: m }, (_, i) => Array.from({ length: m }, (_, j) => (i === j ? 1 : 0)));
}

export function dotN(a: readonly number[], b: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i]! * b[i]!;
  return s;
}
