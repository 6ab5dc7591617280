// Fill-reducing ordering for the sparse LDLᵀ: minimum degree on the quotient graph with approximate
// external degrees and element absorption, in the spirit of P. R. Amestoy, T. A. Davis, I. S. Duff, "An
// approximate minimum degree ordering algorithm", SIAM J. Matrix Anal. Appl. 17(4), 1996 (AMD), without
// its supervariables (indistinguishable nodes): at n of a few thousand the plain quotient graph is fast
// enough and the orderings are of the same kind. Notation: A_i variables adjacent to variable i, E_i the
// elements (eliminated variables) adjacent to i, L_e the live variables of element e.
//
// Cost: eliminating p touches L_p and, for each i in L_p, its lists A_i and E_i; element lists are
// append-only in one pool whose size is the total of |L_p| (at most the fill of the Cholesky factor).

/** Rows of degree above this times √n (and above DENSE_MIN) are ordered last, as AMD does, so one dense row cannot make every step cost O(n). */
const DENSE_FACTOR = 10;
const DENSE_MIN = 16;

/** Variable states. */
const LIVE = 0, ELEMENT = 1, ABSORBED = 2;

/** A minimum-degree permutation (perm[k] = original index of the k-th pivot) of the symmetric pattern given by its upper triangle in compressed columns. */
export function minimumDegreeOrder(n: number, colPtr: Int32Array, rowIdx: Int32Array): Int32Array {
  // Full adjacency (both triangles, no diagonal).
  const deg0 = new Int32Array(n);
  for (let j = 0; j < n; j++) {
    for (let q = colPtr[j]!; q < colPtr[j + 1]!; q++) {
      const i = rowIdx[q]!;
      if (i !== j) {
        deg0[i]!++;
        deg0[j]!++;
      }
    }
  }
  const denseLimit = Math.max(DENSE_MIN, DENSE_FACTOR * Math.sqrt(n));
  const state = new Uint8Array(n);
  const dense: number[] = [];
  for (let i = 0; i < n; i++) {
    if (deg0[i]! > denseLimit) {
      state[i] = ABSORBED; // out of the graph; ordered last
      dense.push(i);
    }
  }
  const adj: number[][] = new Array(n);
  const elems: number[][] = new Array(n);
  for (let i = 0; i < n; i++) {
    adj[i] = [];
    elems[i] = [];
  }
  for (let j = 0; j < n; j++) {
    if (state[j] !== LIVE) continue;
    for (let q = colPtr[j]!; q < colPtr[j + 1]!; q++) {
      const i = rowIdx[q]!;
      if (i !== j && state[i] === LIVE) {
        adj[i]!.push(j);
        adj[j]!.push(i);
      }
    }
  }
  const live = n - dense.length;

  // Degree buckets: doubly linked lists, head[d] the first variable of degree d.
  const head = new Int32Array(n + 1).fill(-1), next = new Int32Array(n), prev = new Int32Array(n);
  const degree = new Int32Array(n);
  const insert = (i: number, d: number): void => {
    degree[i] = d;
    prev[i] = -1;
    next[i] = head[d]!;
    if (head[d]! >= 0) prev[head[d]!] = i;
    head[d] = i;
  };
  const remove = (i: number): void => {
    if (prev[i]! >= 0) next[prev[i]!] = next[i]!;
    else head[degree[i]!] = next[i]!;
    if (next[i]! >= 0) prev[next[i]!] = prev[i]!;
  };
  // Insert in reverse so that among equal degrees the lowest index comes out first (deterministic ties).
  for (let i = n - 1; i >= 0; i--) if (state[i] === LIVE) insert(i, adj[i]!.length);

  // Element lists L_e in one growing pool.
  let pool = new Int32Array(Math.max(64, 2 * (colPtr[n]! + n)));
  let poolTop = 0;
  const eStart = new Int32Array(n), eLen = new Int32Array(n);
  const mark = new Int32Array(n), wStamp = new Int32Array(n), w = new Int32Array(n);
  let stamp = 0;

  const perm = new Int32Array(n), external = new Int32Array(n);
  let minDeg = 0;
  let k = 0; // pivots placed so far
  while (k < live) {
    // Pivot: a variable of least approximate degree.
    while (head[minDeg]! < 0) minDeg++;
    const p = head[minDeg]!;
    remove(p);
    perm[k++] = p;
    stamp++;
    mark[p] = stamp;
    // L_p = (A_p ∪ ⋃_{e ∈ E_p} L_e) \ {p}; the elements of E_p are absorbed into p.
    if (poolTop + (n - k) > pool.length) {
      const bigger = new Int32Array(Math.max(pool.length * 2, poolTop + (n - k)));
      bigger.set(pool.subarray(0, poolTop));
      pool = bigger;
    }
    const start = poolTop;
    for (const j of adj[p]!) {
      if (state[j] === LIVE && mark[j] !== stamp) {
        mark[j] = stamp;
        pool[poolTop++] = j;
      }
    }
    for (const e of elems[p]!) {
      if (state[e] !== ELEMENT) continue;
      for (let q = eStart[e]!, end = q + eLen[e]!; q < end; q++) {
        const j = pool[q]!;
        if (state[j] === LIVE && mark[j] !== stamp) {
          mark[j] = stamp;
          pool[poolTop++] = j;
        }
      }
      state[e] = ABSORBED;
    }
    state[p] = ELEMENT;
    adj[p] = [];
    elems[p] = [];
    eStart[p] = start;

    // w(e) = |L_e \ L_p| for every element next to L_p (AMD's first scan).
    for (let q = start; q < poolTop; q++) {
      const i = pool[q]!;
      remove(i);
      for (const e of elems[i]!) {
        if (state[e] !== ELEMENT) continue;
        if (wStamp[e] !== stamp) {
          wStamp[e] = stamp;
          w[e] = eLen[e]!;
        }
        w[e]!--;
      }
    }
    // Prune E_i and A_i for each i in L_p. A variable left with no neighbour but p has the structure of p
    // less itself: eliminate it now, with no new fill (mass elimination; George & Liu 1989, "The evolution
    // of the minimum degree ordering algorithm", SIAM Rev. 31) — the six variables of a ring go together.
    let top = start;
    for (let q = start; q < poolTop; q++) {
      const i = pool[q]!;
      const Ei = elems[i]!;
      let kept = 0, ext = 0;
      for (let t = 0; t < Ei.length; t++) {
        const e = Ei[t]!;
        if (state[e] !== ELEMENT) continue;
        // An element inside L_p adds nothing beyond p: absorb it (aggressive absorption).
        if (w[e] === 0) {
          state[e] = ABSORBED;
          continue;
        }
        Ei[kept++] = e;
        ext += w[e]!;
      }
      Ei.length = kept;
      // Variables already in L_p are reached through element p.
      const Ai = adj[i]!;
      let keptA = 0;
      for (let t = 0; t < Ai.length; t++) {
        const j = Ai[t]!;
        if (state[j] === LIVE && mark[j] !== stamp) Ai[keptA++] = j;
      }
      Ai.length = keptA;
      if (kept === 0 && keptA === 0) {
        perm[k++] = i;
        state[i] = ABSORBED;
        adj[i] = [];
        elems[i] = [];
        continue;
      }
      Ei.push(p);
      external[i] = ext;
      pool[top++] = i;
    }
    poolTop = top;
    const lp = poolTop - start;
    eLen[p] = lp;
    // Approximate external degree: d_i = min(remaining - 1, d_i + |L_p \ i|, |A_i| + |L_p \ i| + Σ |L_e \ L_p|).
    const remaining = live - k;
    for (let q = start; q < poolTop; q++) {
      const i = pool[q]!;
      const d = Math.min(remaining - 1, degree[i]! + lp - 1, adj[i]!.length + lp - 1 + external[i]!);
      insert(i, d);
      if (d < minDeg) minDeg = d;
    }
  }
  for (let t = 0; t < dense.length; t++) perm[live + t] = dense[t]!;
  return perm;
}
