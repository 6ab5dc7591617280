// The SQP step (src/optimize/step/sqpStep.ts) on real step data, cross-checked against nlopt-js SLSQP and
// HiGHS (two independent general-purpose solvers, behind the first-order step localStep.ts): with no
// curvature (W = 0) both solve the same proximal QP, so their steps must agree. And a whole solve with the
// SQP step reaches a known optimum on a link too long for the first-order step.
import { describe, expect, it } from 'vitest';
import { resolveSpec } from '../src/model/spec.js';
import { perturbRings } from '../src/optimize/chart/perturb.js';
import { trivialOrbits } from '../src/model/symmetry.js';
import { buildChart, posedAt } from '../src/optimize/chart/chart.js';
import { collectConstraints } from '../src/optimize/constraints/collect.js';
import { pairPlan, radiusLimit, scanPairs, trueTube } from '../src/optimize/constraints/scan.js';
import { localStep, readySolvers } from '../src/optimize/step/localStep.js';
import { sqpStep } from '../src/optimize/step/sqpStep.js';
import { solveInflate } from '../src/optimize/run/solve.js';
import { verifyOutcome } from '../src/optimize/run/multistart.js';

describe('SQP step', () => {
  it.each([['chain:4', 1], ['star:3', 2], ['necklace:6', 3]])(
    '%s (seed %i): with W = 0 the interior-point step equals the proximal step of nlopt-js / HiGHS',
    async (spec, seed) => {
      await readySolvers();
      const r = resolveSpec(spec);
      const n = r.layout.rings.length;
      const orbits = trivialOrbits(n);
      const rings = perturbRings(r.layout.rings, orbits, seed, 0.05);
      const w = rings.map(() => 1);
      const chart = buildChart(rings, orbits, { elements: orbits.elements, origin: orbits.origin });
      const posed = posedAt(chart, new Float64Array(chart.nFree));
      const scans = scanPairs(posed, pairPlan(orbits, n), w);
      const R = Float64Array.from(rings.map((g) => g.radius));
      const t = trueTube(scans, R, w);
      const delta = 0.05, box = 0.05;
      const cons = collectConstraints(chart, posed, scans, { t, margin: 8 * box, w, dep: null, samples: true });
      const tMax = radiusLimit(R, w);
      const ours = sqpStep({ cons, nFree: chart.nFree, t, delta, box, tMax, wI: [], wJ: [], wV: [] });
      const ref = await localStep(cons, chart.nFree, t, delta, box, tMax, 'slsqp', Infinity);
      expect(ours.ok, ours.message).toBe(true);
      expect(ref.ok).toBe(true);
      // A real step: the start is not optimal, so the model promises a gain.
      expect(ours.tau).toBeGreaterThan(1e-6);
      // The proximal QP is strictly convex: one minimiser. Tolerances: SLSQP stops at xtol 1e-9 of the box.
      expect(Math.abs(ours.tau - ref.tau)).toBeLessThan(1e-7 * box);
      let dz = 0;
      for (let i = 0; i < chart.nFree; i++) dz = Math.max(dz, Math.abs(ours.z[i]! - ref.z[i]!));
      expect(dz).toBeLessThan(1e-5 * box);
      // Multipliers balance the τ row of the QP: Σ λ c = 1 - τ/Δ (Kuhn–Tucker conditions of the QP).
      let lc = 0;
      cons.forEach((c, k) => (lc += ours.lambda[k]! * c.c));
      expect(Math.abs(lc - (1 - ours.tau / delta))).toBeLessThan(1e-8);
    },
  );

  it('chain:40 reaches R/3 certified and re-verified (2-in-1 chain: packing radius 1/2, Graham et al., Discrete Math. 181, 1998)', async () => {
    const r = resolveSpec('chain:40');
    const problem = { rings: r.layout.rings, tubeRatios: r.layout.rings.map(() => 1), linking: r.linking, symmetry: null };
    const out = await solveInflate(problem, { tol: 1e-9, maxIterations: 400, seed: 20261201, perturbation: 0.05 });
    const R = r.layout.rings[0]!.radius;
    expect(out.status).toBe('optimal');
    expect(Math.abs(out.tube / R - 1 / 3)).toBeLessThan(1e-9);
    expect(verifyOutcome(problem, out).ok).toBe(true);
  }, 120_000);
});
