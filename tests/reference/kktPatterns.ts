// Seeded KKT-shaped test matrices for the sparse LDLᵀ (tests/sparseLdl.test.ts, bench/ldl.ts): the pattern of a
// ring-contact graph (path = chain of rings, cycle = necklace, 2D grid = chainmail patch) with six rigid-motion
// variables per ring and one constraint row of 12 nonzeros per contact, assembled as the quasi-definite
// K = [[H + D1, Aᵀ], [A, -D2]] (Vanderbei 1995). Also random sparse ones, and dense copies for ml-matrix.
import { SymTriplets, type SymCsc } from '../../src/optimize/step/sparseLdl.js';

export type Rng = () => number;
export type Edge = readonly [number, number];

/** Variables per ring (three translations, three rotations). */
export const BLOCK = 6;

export function pathEdges(nodes: number): Edge[] {
  const e: Edge[] = [];
  for (let i = 0; i + 1 < nodes; i++) e.push([i, i + 1]);
  return e;
}

export function cycleEdges(nodes: number): Edge[] {
  const e = pathEdges(nodes);
  if (nodes > 2) e.push([nodes - 1, 0]);
  return e;
}

export function gridEdges(w: number, h: number): Edge[] {
  const e: Edge[] = [];
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const i = y * w + x;
      if (x + 1 < w) e.push([i, i + 1]);
      if (y + 1 < h) e.push([i, i + w]);
    }
  }
  return e;
}

const uniform = (rnd: Rng, a: number, b: number): number => a + (b - a) * rnd();

/**
 * KKT matrix of a contact graph: H couples the blocks of rings that touch (dense 6 × 6 blocks on the diagonal
 * and per edge), a constraint row per edge touches both rings' 6 variables. `definite` makes H + D1 strictly
 * diagonally dominant with a positive diagonal (so positive definite, Gershgorin) and D2 > 0, which makes K
 * quasi-definite; otherwise H is any symmetric matrix with that pattern and D2 may have either sign.
 */
export function kktFromGraph(nodes: number, edges: readonly Edge[], rnd: Rng, definite = true): SymTriplets {
  const nv = nodes * BLOCK, n = nv + edges.length;
  const t = new SymTriplets(n);
  const rowAbs = new Float64Array(nv);
  const couple = (i: number, j: number, v: number): void => {
    t.add(i, j, v);
    rowAbs[i] += Math.abs(v);
    if (i !== j) rowAbs[j] += Math.abs(v);
  };
  for (let r = 0; r < nodes; r++) {
    for (let a = 0; a < BLOCK; a++) {
      for (let b = a + 1; b < BLOCK; b++) couple(r * BLOCK + a, r * BLOCK + b, uniform(rnd, -1, 1));
    }
  }
  for (const [u, v] of edges) {
    for (let a = 0; a < BLOCK; a++) {
      for (let b = 0; b < BLOCK; b++) couple(u * BLOCK + a, v * BLOCK + b, uniform(rnd, -1, 1));
    }
  }
  for (let i = 0; i < nv; i++) {
    t.add(i, i, definite ? rowAbs[i]! + uniform(rnd, 0.1, 2) : uniform(rnd, -1, 1) * (rowAbs[i]! + 1));
  }
  edges.forEach(([u, v], c) => {
    const row = nv + c;
    for (let a = 0; a < BLOCK; a++) {
      t.add(row, u * BLOCK + a, uniform(rnd, -1, 1));
      t.add(row, v * BLOCK + a, uniform(rnd, -1, 1));
    }
    t.add(row, row, definite ? -uniform(rnd, 1e-3, 1) : uniform(rnd, -1, 1));
  });
  return t;
}

/** A random sparse quasi-definite matrix: nH primal and m dual rows, each off-diagonal entry present with probability `density`. */
export function randomQuasiDefinite(nH: number, m: number, density: number, rnd: Rng): SymTriplets {
  const n = nH + m, t = new SymTriplets(n);
  const rowAbs = new Float64Array(nH);
  for (let j = 0; j < nH; j++) {
    for (let i = 0; i < j; i++) {
      if (rnd() < density) {
        const v = uniform(rnd, -1, 1);
        t.add(i, j, v);
        rowAbs[i] += Math.abs(v);
        rowAbs[j] += Math.abs(v);
      }
    }
  }
  for (let i = 0; i < nH; i++) t.add(i, i, rowAbs[i]! + uniform(rnd, 0.05, 2));
  for (let r = 0; r < m; r++) {
    for (let j = 0; j < nH; j++) if (rnd() < density) t.add(nH + r, j, uniform(rnd, -2, 2));
    t.add(nH + r, nH + r, -uniform(rnd, 1e-3, 2));
  }
  return t;
}

/** A random sparse symmetric matrix with entries in [-1, 1] (diagonal always set). */
export function randomSymmetric(n: number, density: number, rnd: Rng): SymTriplets {
  const t = new SymTriplets(n);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < j; i++) if (rnd() < density) t.add(i, j, uniform(rnd, -1, 1));
    t.add(j, j, uniform(rnd, -1, 1));
  }
  return t;
}

/** The same matrix with rows and columns renumbered i -> map[i]. */
export function permuteSym(A: SymCsc, map: Int32Array): SymCsc {
  const t = new SymTriplets(A.n);
  forEachEntry(A, (i, j, v) => t.add(map[i]!, map[j]!, v));
  return t.toCsc().matrix;
}

export function randomPermutation(n: number, rnd: Rng): Int32Array {
  const p = new Int32Array(n);
  for (let i = 0; i < n; i++) p[i] = i;
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(rnd() * (i + 1));
    const s = p[i]!;
    p[i] = p[j]!;
    p[j] = s;
  }
  return p;
}

/** Calls f once per stored (upper-triangle) entry. */
export function forEachEntry(A: SymCsc, f: (i: number, j: number, v: number) => void): void {
  for (let j = 0; j < A.n; j++) for (let q = A.colPtr[j]!; q < A.colPtr[j + 1]!; q++) f(A.rowIdx[q]!, j, A.values[q]!);
}

/** Full dense rows of the symmetric matrix. */
export function denseOf(A: SymCsc): number[][] {
  const d = Array.from({ length: A.n }, () => new Array<number>(A.n).fill(0));
  forEachEntry(A, (i, j, v) => {
    d[i]![j] = v;
    d[j]![i] = v;
  });
  return d;
}

/** y = A x with the symmetric matrix given by its upper triangle. */
export function symMul(A: SymCsc, x: Float64Array): Float64Array {
  const y = new Float64Array(A.n);
  forEachEntry(A, (i, j, v) => {
    y[i] += v * x[j]!;
    if (i !== j) y[j] += v * x[i]!;
  });
  return y;
}
