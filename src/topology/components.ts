// Link structure from a linking matrix: which rings hold together, which are loose, what changed.
import type { Circle } from '../model/types.js';
import { linkingNumber, type LinkingNumber } from './linking.js';

/** Symmetric matrix of pairwise linking numbers, 0 on the diagonal. */
export type LinkingMatrix = LinkingNumber[][];

export function linkingMatrix(rings: readonly Circle[]): LinkingMatrix {
  const n = rings.length;
  const m: LinkingMatrix = Array.from({ length: n }, () => new Array<LinkingNumber>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      // lk is symmetric for disjoint circles; compute once so the matrix is symmetric by construction.
      const l = linkingNumber(rings[i]!, rings[j]!);
      m[i]![j] = l;
      m[j]![i] = l;
    }
  }
  return m;
}

export interface Connectedness {
  /** Rings grouped by "linked to, directly or through others" (indices, each group ascending). */
  components: number[][];
  /** Rings linked to no other ring: nothing holds them, they fall out of the object. */
  unheld: number[];
  /** True when all rings form one linked piece. */
  connected: boolean;
}

/**
 * Components of the graph whose edges are the linked pairs. `extraEdges` adds links found outside
 * the matrix, e.g. between a ring and a lattice copy of another ring in a weave.
 */
export function connectedness(matrix: readonly (readonly number[])[], extraEdges: readonly [number, number][] = []): Connectedness {
  const n = matrix.length;
  const edges: [number, number][] = [];
  for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) if (matrix[i]![j] !== 0) edges.push([i, j]);
  return connectednessOf(n, [...edges, ...extraEdges]);
}

/** Components of n rings joined by the linked pairs `edges` (the sparse form; (i, i) marks a ring linked to its own copy). */
export function connectednessOf(n: number, edges: readonly [number, number][]): Connectedness {
  const parent = Array.from({ length: n }, (_, i) => i);
  const find = (i: number): number => {
    while (parent[i] !== i) i = parent[i] = parent[parent[i]!]!;
    return i;
  };
  const join = (i: number, j: number): void => {
    const a = find(i), b = find(j);
    if (a !== b) parent[Math.max(a, b)] = Math.min(a, b);
  };
  const held = new Array<boolean>(n).fill(false);
  for (const [i, j] of edges) {
    join(i, j);
    if (i !== j) held[i] = held[j] = true;
    else held[i] = true;
  }
  const groups = new Map<number, number[]>();
  for (let i = 0; i < n; i++) {
    const r = find(i);
    const g = groups.get(r);
    if (g) g.push(i);
    else groups.set(r, [i]);
  }
  const components = [...groups.values()];
  const unheld = held.flatMap((h, i) => (h ? [] : [i]));
  return { components, unheld, connected: components.length <= 1 };
}

/** True when no pair is linked. With round rings that means the rings are not held together at all. */
export function allPairsUnlinked(matrix: readonly (readonly number[])[]): boolean {
  return matrix.every((row, i) => row.every((l, j) => i === j || l === 0));
}

export interface LinkingChange {
  a: number;
  b: number;
  before: number;
  after: number;
}

/** Pairs whose linking number differs between two matrices of the same rings (empty: topology kept). */
export function linkingChanges(before: readonly (readonly number[])[], after: readonly (readonly number[])[]): LinkingChange[] {
  const out: LinkingChange[] = [];
  for (let i = 0; i < before.length; i++) {
    for (let j = i + 1; j < before.length; j++) {
      const x = before[i]![j]!, y = after[i]?.[j];
      if (y === undefined || x !== y) out.push({ a: i, b: j, before: x, after: y ?? Number.NaN });
    }
  }
  return out;
}
