// The assembled Lagrangian Hessian of the ring chart (exact strut curvatures pulled back through the chart)
// against central differences of the exact envelope gradients (the method the Newton polish used before),
// with and without an imposed symmetry.
import { describe, expect, it } from 'vitest';
import { ringOrbits, symmetrize, type RingOrbits } from '../src/model/symmetry.js';
import type { Ring, Symmetry } from '../src/model/types.js';
import { buildChart, posedAt } from '../src/optimize/chart.js';
import { collectConstraints } from '../src/optimize/collect.js';
import { kktJacobianOf } from '../src/optimize/kktNewton.js';
import { ringKktModel, useExactHessian } from '../src/optimize/polish.js';
import { pairPlan, scanPairs } from '../src/optimize/scan.js';
import { torusLinkStart } from '../src/optimize/testPoses.js';
import { star } from './optimizeLayouts.js';
import { rng } from './reference/rng.js';

const C3: Symmetry = { type: 'cyclic', order: 3, axis: [0, 0, 1], origin: [0, 0, 0] };

function compare(rings: Ring[], orbits: RingOrbits, seed: number): number {
  const chart = buildChart(rings, orbits, { elements: orbits.elements, origin: orbits.origin });
  const posed = posedAt(chart, new Float64Array(chart.nFree));
  const full = buildChart(rings, orbits, false);
  const scans = scanPairs(posedAt(full, new Float64Array(full.nFree)), pairPlan(orbits, rings.length), rings.map(() => 1));
  // Every strut and sampled contact within a wide margin, with random positive forces.
  const cons = collectConstraints(chart, posed, scans, { t: 0, margin: 10, w: rings.map(() => 1), dep: null, samples: true });
  expect(cons.filter((k) => k.kind === 'strut').length).toBeGreaterThan(0);
  const r = rng(seed);
  const lambda = Float64Array.from(cons.map(() => r()));
  const model = ringKktModel(chart, null);
  const z = new Float64Array(chart.nFree);
  useExactHessian(false);
  const Jd = kktJacobianOf(model, cons, z, lambda, 1)!;
  useExactHessian(true);
  const Je = kktJacobianOf(model, cons, z, lambda, 1)!;
  const n = chart.nFree;
  let worst = 0, largest = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      worst = Math.max(worst, Math.abs(Je.get(i, j) - Jd.get(i, j)));
      largest = Math.max(largest, Math.abs(Je.get(i, j)));
    }
  }
  expect(largest).toBeGreaterThan(0);
  return worst / largest;
}

describe('ring-chart Lagrangian Hessian from strut curvatures', () => {
  it('agrees with central differences of the envelope gradients (1e-6 of the largest entry), free rings', () => {
    // Differences with step 1e-6 carry ~1e-9 truncation and ~1e-10/1e-6 rounding: 1e-6 leaves margin
    // (common practice, no source).
    expect(compare(star(4), ringOrbits(star(4), null), 1)).toBeLessThan(1e-6);
    const torus = torusLinkStart(3);
    expect(compare(torus, ringOrbits(torus, null), 2)).toBeLessThan(1e-6);
  });

  it('agrees under an imposed cyclic symmetry (reduced chart)', () => {
    const torus = torusLinkStart(3);
    const orbits = ringOrbits(torus, C3);
    expect(compare(symmetrize(torus, C3, orbits), orbits, 3)).toBeLessThan(1e-6);
  });
});
