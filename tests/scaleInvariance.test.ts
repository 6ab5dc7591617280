// Inflation does not depend on where a layout sits or in which units it is drawn. Thickness is invariant under
// rigid motions and scales linearly under dilations (Gonzalez & Maddocks, PNAS 96, 1999; Cantarella, Kusner &
// Sullivan, Invent. Math. 150, 2002), so tube / R of a moved, turned and rescaled layout must be that of the
// original, up to the solver's tolerance and the rounding of the coordinates themselves (a centre at 5·10⁴ holds
// positions to ~7e-12 layout units). Every result is re-checked by the independent checker in the frame it was
// given in, and no reported tube may exceed the packing bound (Graham, Lubachevsky, Nurmela, Östergård,
// Discrete Math. 181, 1998; bound.ts), which the solve cannot know better than.
import { describe, expect, it } from 'vitest';
import { star } from './optimizeLayouts.js';
import { packingBound, packingRadius } from '../src/optimize/certify/bound.js';
import { verifyOutcome } from '../src/optimize/run/multistart.js';
import type { InflateProblem, SolveOptions } from '../src/optimize/run/problem.js';
import { solveInflate } from '../src/optimize/run/solve.js';
import { solvePeriodic } from '../src/optimize/run/periodicSolve.js';
import { hopfStart } from '../src/optimize/run/testPoses.js';
import { periodicLinks } from '../src/model/periodic.js';
import { weaveLayout } from '../src/model/weaves.js';
import type { Ring, Symmetry, Vec3 } from '../src/model/types.js';
import { linkingMatrix } from '../src/topology/index.js';
import { applyRotation, randomRotation, rng } from './reference/rng.js';

const OPTIONS: SolveOptions = { tol: 1e-10, maxIterations: 300, seed: 0, perturbation: 0.05 };

/** x -> s·M x + shift on points, M on directions, s on lengths. */
interface Motion { M: number[]; s: number; shift: Vec3 }

const movePoint = (m: Motion, p: ArrayLike<number>): Vec3 => {
  const q = applyRotation(m.M, p);
  return [m.s * q[0] + m.shift[0], m.s * q[1] + m.shift[1], m.s * q[2] + m.shift[2]];
};
const moveRings = (m: Motion, rings: Ring[]): Ring[] =>
  rings.map((r) => ({ ...r, center: movePoint(m, r.center), normal: applyRotation(m.M, r.normal), radius: m.s * r.radius }));

function problem(rings: Ring[], symmetry: Symmetry | null = null): InflateProblem {
  return { rings, tubeRatios: rings.map(() => 1), linking: linkingMatrix(rings), symmetry };
}

/** Scales 1e-6 and 1e6, moved 1e4..5e4 core radii away (farther would be beyond the coordinates' precision), turned. */
function motions(seed: number): Motion[] {
  const r = rng(seed);
  return [[1e-6, 1e4], [1e6, 3e4], [1, 5e4]].map(([s, d]) => {
    const dir = applyRotation(randomRotation(r), [1, 0, 0]);
    return { M: randomRotation(r), s: s!, shift: [d! * s! * dir[0], d! * s! * dir[1], d! * s! * dir[2]] as Vec3 };
  });
}

describe('inflation in any position and units', () => {
  it('a Hopf pair of radius 0.01 placed 5e4 away: tube R/2 to 1e-9, never above the bound, verified where it was given', async () => {
    // Tight Hopf link of equal round rings: tube R/2 (Cantarella, Kusner, Sullivan 2002).
    const R = 0.01;
    const rings = hopfStart(1, 1).map((g) => ({ ...g, center: [5e4 + R * g.center[0], R * g.center[1], R * g.center[2]] as Vec3, radius: R }));
    const p = problem(rings);
    const out = await solveInflate(p, OPTIONS);
    const bound = packingBound(rings, p.tubeRatios, p.linking)!.tube;
    expect(Math.abs(bound - R / 2)).toBeLessThanOrEqual(1e-18);
    expect(out.status).toBe('optimal');
    expect(out.tube).toBeLessThanOrEqual(bound);
    expect(Math.abs(out.tube / R - 0.5)).toBeLessThan(1e-9);
    expect(verifyOutcome(p, out).ok).toBe(true);
    // History and contacts are in the frame the layout was given in.
    expect(out.history.at(-1)).toBe(out.tube);
    for (const c of out.contacts) {
      expect(Math.abs(c.onA[0] - 5e4)).toBeLessThan(2 * R);
      expect(c.distance).toBeGreaterThan(0.9 * R);
    }
  });

  it('4-ring star (free) and 3-ring star (cyclic:3, moved group) keep tube / R under scaling 1e-6..1e6, motion and turning', async () => {
    // Star of K rings through one ring attains the packing bound r_K R / (1 + r_K) (Graham et al. 1998).
    for (const [K, symmetric] of [[4, false], [3, true]] as const) {
      const base = star(K);
      const C: Symmetry = { type: 'cyclic', order: K, axis: [0, 0, 1], origin: [0, 0, 0] };
      const ref = await solveInflate(problem(base, symmetric ? C : null), OPTIONS);
      const expected = packingRadius(K) / (1 + packingRadius(K));
      expect(Math.abs(ref.tube - expected)).toBeLessThan(1e-9);
      for (const m of motions(10 + K)) {
        const rings = moveRings(m, base);
        // The symmetry moves with the layout: its origin is a point, its axis a direction.
        const sym: Symmetry | null = symmetric ? { ...C, origin: movePoint(m, C.origin), axis: applyRotation(m.M, C.axis) } : null;
        const p = problem(rings, sym);
        const out = await solveInflate(p, OPTIONS);
        expect(out.status).toBe('optimal');
        expect(Math.abs(out.tube / m.s - ref.tube) / ref.tube).toBeLessThan(1e-9);
        expect(out.tube).toBeLessThanOrEqual(packingBound(rings, p.tubeRatios, p.linking)!.tube);
        expect(verifyOutcome(p, out).ok).toBe(true);
      }
    }
  });

  it('progress reports the tube in the units of the layout', async () => {
    const m: Motion = { M: [1, 0, 0, 0, 1, 0, 0, 0, 1], s: 1e6, shift: [2e10, 0, 0] };
    const heard: number[] = [];
    const out = await solveInflate(problem(moveRings(m, star(3))), { ...OPTIONS, onIteration: (_k, t) => heard.push(t) });
    expect(heard.length).toBeGreaterThan(0);
    // The tube never decreases along the outer loop (trust-region acceptance), so the last report is the tube.
    expect(Math.abs(heard.at(-1)! - out.tube) / out.tube).toBeLessThan(1e-9);
  });

  it('2-in-1 weave scaled by 1e-6 and 1e6 and moved: tube R/3 to 1e-9, lattice scaled with it', async () => {
    // Two rings through each ring: packing bound R/3 (Graham et al. 1998), attained by the flat chain (docs/weaves.md).
    const layout = weaveLayout('weave:2-in-1');
    for (const m of motions(31).slice(0, 2)) {
      const rings = moveRings(m, layout.rings);
      const lattice = { vectors: layout.lattice!.vectors.map((v) => applyRotation(m.M, v).map((x) => m.s * x) as Vec3) };
      const out = await solvePeriodic({ rings, lattice, tubeRatios: rings.map(() => 1), links: periodicLinks(rings, lattice) }, OPTIONS);
      expect(out.status).toBe('optimal');
      expect(Math.abs(out.tube / m.s - 1 / 3)).toBeLessThan(1e-9);
      expect(out.tube).toBeLessThanOrEqual(m.s / 3);
      // Period of two rings 8R/3 (docs/weaves.md).
      expect(Math.hypot(...out.lattice.vectors[0]!) / m.s).toBeCloseTo(8 / 3, 8);
    }
  });
});
