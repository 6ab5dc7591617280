// The optimiser's pair scan looks only at pairs whose bounding spheres come near. Each selection is checked
// against the O(N²) definition it replaces: every pair (or the symmetric representatives of src/model/symmetry
// orbits), the all-pairs linking matrix of src/topology, and the lattice-image enumeration of
// src/model/ringPairs.ts. The skip is sound because a round circle lies in the sphere of radius R about its
// centre (common practice, no source) and two circles link only if each meets the other's disk (Rolfsen,
// Knots and Links, 1976, ch. 5D: the disk is a Seifert surface), which lies in that sphere.
import { describe, expect, it } from 'vitest';
import { buildChart, posedAt } from '../src/optimize/chart/chart.js';
import { linkingHolds, periodicNearPairs, pairPlan, scanMargin, scanPairs } from '../src/optimize/constraints/scan.js';
import { catalogLayout } from '../src/model/catalog.js';
import { ringPairs } from '../src/model/ringPairs.js';
import { ringOrbits, trivialOrbits, type RingOrbits } from '../src/model/symmetry.js';
import type { Ring, Symmetry } from '../src/model/types.js';
import { weaveLayout } from '../src/model/weaves.js';
import { linkingMatrix } from '../src/topology/index.js';
import { randomUnit, rng } from './reference/rng.js';

function posed(rings: Ring[], orbits: RingOrbits) {
  const chart = buildChart(rings, orbits, false);
  return posedAt(chart, new Float64Array(chart.nFree));
}

/** The old scan: every representative pair, near or far (the definition in src/model/symmetry orbits). */
function allRepresentatives(orbits: RingOrbits, n: number): [number, number][] {
  const out: [number, number][] = [];
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      if (orbits.perms.every((p) => { const lo = Math.min(p[i]!, p[j]!), hi = Math.max(p[i]!, p[j]!); return lo > i || (lo === i && hi >= j); })) out.push([i, j]);
    }
  }
  return out;
}

function randomRings(seed: number, n: number, box: number): Ring[] {
  const r = rng(seed);
  return Array.from({ length: n }, (_, i) => ({
    name: `R${i}`, center: [box * r(), box * r(), box * r()], normal: randomUnit(r), radius: 0.5 + r(),
  }));
}

describe('pair scan with bounding spheres', () => {
  it('scans exactly the pairs within R_a + R_b + margin, and the skipped ones are farther than any tube could reach', () => {
    for (const [seed, n, box] of [[1, 40, 12], [2, 120, 30], [3, 8, 2]] as const) {
      const rings = randomRings(seed, n, box);
      const w = rings.map((_, i) => 1 + (i % 3) * 0.5);
      const orbits = trivialOrbits(n);
      const p = posed(rings, orbits);
      const got = scanPairs(p, pairPlan(orbits, n), w).map((s) => [s.a, s.b]);
      const all = scanPairs(p, allRepresentatives(orbits, n), w);
      const margin = scanMargin(p.R, w);
      const expected = all.filter((s) => {
        const a = rings[s.a]!, b = rings[s.b]!;
        return Math.hypot(a.center[0] - b.center[0], a.center[1] - b.center[1], a.center[2] - b.center[2]) <= a.radius + b.radius + margin;
      });
      expect(got).toEqual(expected.map((s) => [s.a, s.b]));
      // Every skipped pair clears the largest tube the radii allow by more than 2 min R (trustRegion.ts margins).
      const tMax = Math.min(...rings.map((g, i) => g.radius / w[i]!));
      const rMin = Math.min(...rings.map((g) => g.radius));
      for (const s of all) {
        if (got.some(([a, b]) => a === s.a && b === s.b)) continue;
        expect(s.distance - tMax * s.c).toBeGreaterThan(2 * rMin);
      }
    }
  });

  it('keeps one pair per orbit under a symmetry: the same representatives as the all-pairs list, near ones only', () => {
    const layout = catalogLayout('necklace:40');
    const sym: Symmetry = { type: 'dihedral', order: 20, axis: [0, 0, 1], origin: [0, 0, 0] };
    const orbits = ringOrbits(layout.rings, sym);
    const n = layout.rings.length;
    const w = layout.rings.map(() => 1);
    const p = posed(layout.rings, orbits);
    const got = scanPairs(p, pairPlan(orbits, n), w).map((s) => [s.a, s.b]);
    const all = allRepresentatives(orbits, n);
    // Exactly the all-pairs representatives whose spheres come within the margin, every linked pair's orbit present.
    const margin = scanMargin(p.R, w);
    const rs = layout.rings;
    expect(got).toEqual(all.filter(([i, j]) => Math.hypot(rs[i]!.center[0] - rs[j]!.center[0], rs[i]!.center[1] - rs[j]!.center[1], rs[i]!.center[2] - rs[j]!.center[2]) <= 2 + margin));
    const L = linkingMatrix(layout.rings);
    for (const [i, j] of all) if (L[i]![j] !== 0) expect(got).toContainEqual([i, j]);
    expect(got.length).toBeLessThan(all.length);
  });

  it('linking checked on near pairs only agrees with the full linking matrix (src/topology), and catches a lost or a new link', () => {
    const chain = catalogLayout('chain:30').rings;
    const L = linkingMatrix(chain);
    expect(linkingHolds(chain, L)).toBe(true);
    // A link the rings do not have, between far rings: detected although that pair is never computed.
    const extra = L.map((row) => row.slice());
    extra[0]![29] = extra[29]![0] = 1;
    expect(linkingHolds(chain, extra)).toBe(false);
    // Pull ring 0 out of ring 1: the intended link is gone.
    const moved = chain.map((g, i) => (i === 0 ? { ...g, center: [g.center[0] - 10, g.center[1], g.center[2]] as Ring['center'] } : g));
    expect(linkingHolds(moved, L)).toBe(false);
    for (const seed of [4, 5, 6]) {
      const rings = randomRings(seed, 60, 6);
      expect(linkingHolds(rings, linkingMatrix(rings))).toBe(true);
    }
  });

  it('weaves: the cell pairs and lattice images within reach are those of src/model/ringPairs.ts', () => {
    for (const spec of ['weave:2-in-1', 'weave:euro-4-in-1', 'weave:box', 'weave:japanese-6-in-1']) {
      const layout = weaveLayout(spec);
      for (const margin of [0, 0.5, 3]) {
        const got = periodicNearPairs(layout.rings, layout.lattice!, margin, 12)!;
        const ref = ringPairs(layout, margin).filter((p) => {
          // ringPairs lists every cell pair; the scan keeps the near ones only.
          const a = layout.rings[p.i]!, b = layout.rings[p.j]!;
          const d = Math.hypot(b.center[0] + p.offset[0] - a.center[0], b.center[1] + p.offset[1] - a.center[1], b.center[2] + p.offset[2] - a.center[2]);
          return d <= a.radius + b.radius + margin;
        });
        expect(got).toEqual(ref.map((p) => ({ a: p.i, b: p.j, shift: p.shift })));
      }
    }
  });
});
