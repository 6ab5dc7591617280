import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { nearPairs } from '../src/kernel/broadphase.js';
import { rng } from './reference/rng.js';

// Reference: the O(N^2) all-pairs sphere test (the definition of a candidate pair).
function allPairs(c: number[], reach: number[], margin: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < reach.length; i++) {
    for (let j = i + 1; j < reach.length; j++) {
      const d = Math.hypot(c[3 * i]! - c[3 * j]!, c[3 * i + 1]! - c[3 * j + 1]!, c[3 * i + 2]! - c[3 * j + 2]!);
      if (d <= reach[i]! + reach[j]! + margin) out.push(i, j);
    }
  }
  return out;
}

describe('nearPairs (uniform-grid broad phase)', () => {
  it('equals the all-pairs sphere test on random clouds, chains and spread-out sets (brute-force reference)', () => {
    const r = rng(20261204);
    for (let trial = 0; trial < 60; trial++) {
      const n = 2 + Math.floor(r() * 120);
      const spread = [1, 10, 1e3, 1e15][trial % 4]!;
      const c: number[] = [], reach: number[] = [];
      for (let i = 0; i < n; i++) {
        c.push(spread * (r() - 0.5), trial % 3 === 0 ? 0 : spread * (r() - 0.5), spread * (r() - 0.5));
        reach.push(trial % 5 === 0 ? 1 : 0.1 + 2 * r());
      }
      const margin = trial % 2 === 0 ? 0 : r();
      expect(Array.from(nearPairs(c, reach, margin))).toEqual(allPairs(c, reach, margin));
    }
  });

  it('finds exactly the neighbours in a long chain of touching spheres (hand count: N - 1 pairs)', () => {
    const n = 1000;
    const c: number[] = [], reach: number[] = [];
    for (let i = 0; i < n; i++) { c.push(1.9 * i, 0, 0); reach.push(1); }
    const p = nearPairs(c, reach, 0);
    expect(p.length / 2).toBe(n - 1);
    for (let k = 0; k < n - 1; k++) expect([p[2 * k], p[2 * k + 1]]).toEqual([k, k + 1]);
  });

  it('property: agrees with the all-pairs test on arbitrary finite inputs (fast-check, seeded)', () => {
    const finite = fc.double({ min: -1e6, max: 1e6, noNaN: true });
    fc.assert(
      fc.property(
        fc.array(fc.tuple(finite, finite, finite, fc.double({ min: 0, max: 1e3, noNaN: true })), { minLength: 0, maxLength: 40 }),
        fc.double({ min: 0, max: 10, noNaN: true }),
        (rings, margin) => {
          const c = rings.flatMap(([x, y, z]) => [x, y, z]);
          const reach = rings.map((q) => q[3]);
          expect(Array.from(nearPairs(c, reach, margin))).toEqual(allPairs(c, reach, margin));
        },
      ),
      { seed: 20261204, numRuns: 300 },
    );
  });
});
