// Second-order behaviour of contacts along rigid motions, against closed forms derived from plane geometry,
// and the escape from the symmetric torus:3 optimum.
import { describe, expect, it } from 'vitest';
import { analyzePlay } from '../src/analyze/play.js';
import { secondOrderAlong } from '../src/analyze/mobilitySecondOrder.js';
import { refMinima } from './reference/bruteCircle.js';
import type { RingPose } from '../src/analyze/mobilityMotion.js';
import { ringDistance } from '../src/kernel/index.js';
import { linkingMatrix, linkingNumber } from '../src/topology/index.js';
import { catalogLayout } from '../src/model/catalog.js';
import { solveInflate } from '../src/optimize/run/solve.js';
import type { Symmetry, Vec3 } from '../src/model/types.js';
import { rotate } from '../src/model/vec.js';
import { resultOf, type RingSpec } from './playFixtures.js';

const still = { v: [0, 0, 0] as Vec3, omega: [0, 0, 0] as Vec3 };

/** Two coplanar rings of radius 1 in the xy-plane, centres L apart on the x-axis, tubes touching. */
function sideBySide(L: number): RingPose[] {
  const r = (L - 2) / 2;
  return [
    { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1, tube: r },
    { name: 'B', center: [L, 0, 0], normal: [0, 0, 1], radius: 1, tube: r },
  ];
}

describe('second-order coefficients against closed forms (coplanar circles)', () => {
  // Coplanar, non-nested circles are |c_A - c_B| - R_A - R_B apart (plane geometry).
  it('B sliding sideways opens at second order with c2 = 1/(2L)', () => {
    // Distance sqrt(L² + s²) - 2 = (L - 2) + s²/(2L) + O(s⁴).
    const L = 3;
    const p = secondOrderAlong(sideBySide(L), [still, { v: [0, 1, 0], omega: [0, 0, 0] }], { activeTol: 1e-9 }).pairs[0]!;
    expect(Math.abs(p.c1)).toBeLessThan(1e-8);
    expect(p.c2).toBeCloseTo(1 / (2 * L), 5);
    expect(p.verdict).toBe('opens-second-order');
  });

  it('B moving along the line of centres opens or closes at first order with slope ±1', () => {
    const rings = sideBySide(3);
    const away = secondOrderAlong(rings, [still, { v: [1, 0, 0], omega: [0, 0, 0] }], { activeTol: 1e-9 });
    const toward = secondOrderAlong(rings, [still, { v: [-1, 0, 0], omega: [0, 0, 0] }], { activeTol: 1e-9 });
    expect(away.pairs[0]!.c1).toBeCloseTo(1, 8);
    expect(away.escape).toBe(true);
    expect(toward.pairs[0]!.c1).toBeCloseTo(-1, 8);
    expect(toward.blocked).toBe(true);
  });

  it('B tilting about its own y-axis opens at second order with c2 = (L-1)/(2(L-2))', () => {
    // B's nearest point (L-1, 0, 0) goes to (L - cos β, 0, sin β); it stays the nearest (mirror symmetry in y),
    // so d² = (L - 1 - cos β)² + sin² β = D0² + (D0 + 1) β² + O(β⁴) with D0 = L - 2, d = D0 + (D0 + 1) β² / (2 D0).
    const L = 3;
    const p = secondOrderAlong(sideBySide(L), [still, { v: [0, 0, 0], omega: [0, 1, 0] }], { activeTol: 1e-9 }).pairs[0]!;
    expect(Math.abs(p.c1)).toBeLessThan(1e-8);
    // One-sided cubic fit: the O(s⁴) term leaves an error of about 11 c4 h² (h = 1e-3), so 4 decimals.
    expect(p.c2).toBeCloseTo((L - 1) / (2 * (L - 2)), 4);
  });

  it('a ring resting inside a larger one closes at second order when it slides sideways (c2 = -1)', () => {
    // Nested coplanar circles are R_A - R_B - |c| apart: 2 - 1 - sqrt(0.25 + s²) = 0.5 - s² + O(s⁴).
    const rings: RingPose[] = [
      { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 2, tube: 0.25 },
      { name: 'B', center: [0.5, 0, 0], normal: [0, 0, 1], radius: 1, tube: 0.25 },
    ];
    const p = secondOrderAlong(rings, [still, { v: [0, 1, 0], omega: [0, 0, 0] }], { activeTol: 1e-9 }).pairs[0]!;
    expect(p.c2).toBeCloseTo(-1, 4);
    expect(p.verdict).toBe('closes-second-order');
  });
});

describe('escapes', () => {
  it('two touching unlinked rings escape at first order by moving apart, and the tube grows', async () => {
    // The only contact's normal is the x-axis, so any opening motion moves B away from A along +x.
    const specs: RingSpec[] = sideBySide(3).map(({ name, center, normal, radius }) => ({ name, center, normal, radius }));
    const report = await analyzePlay(resultOf(specs, 0.5));
    expect(report.locked).toBe(false);
    // One contact in 2 x 5 - 6 = 4 free coordinates: its null space (3) slides both ways, moving apart is one-way.
    expect(report.freeDimension).toBe(4);
    expect(report.reversibleDimension).toBe(3);
    expect(report.freeMotions.filter((m) => m.kind === 'one-way')).toHaveLength(1);
    expect(report.secondOrder.escape).toBe(true);
    expect(report.secondOrder.escapeOrder).toBe(1);
    expect(report.secondOrder.thickenedTube!).toBeGreaterThan(0.5);
    const b = report.secondOrder.direction!.rings.find((r) => r.name === 'B')!;
    expect(b.translation[0]).toBeGreaterThan(0);
  });
});

type Pose = { rho: number; alpha: number };

/**
 * torus:3 with dihedral symmetry D3 about z (2-fold axis x through ring A): ring A centred (ρ, 0, 0) with
 * normal (0, cos α, sin α), rings B, C its images under turns of 120° and 240° about z.
 */
function torus3(p: Pose): RingSpec[] {
  const n0: Vec3 = [0, Math.cos(p.alpha), Math.sin(p.alpha)];
  return [0, 1, 2].map((k) => ({
    name: 'ABC'[k]!,
    center: rotate([p.rho, 0, 0], [0, 0, 1], (2 * Math.PI * k) / 3),
    normal: rotate(n0, [0, 0, 1], (2 * Math.PI * k) / 3),
    radius: 1,
  }));
}

/** Largest common tube of a D3 pose that keeps all three pairs linked (else -1). */
function torusTube(p: Pose): number {
  const r = torus3(p);
  for (const [i, j] of [[0, 1], [0, 2], [1, 2]] as const) {
    if (linkingNumber(r[i]!, r[j]!) === 0) return -1;
  }
  return Math.min(ringDistance(r[0]!, r[1]!).distance, ringDistance(r[0]!, r[2]!).distance, ringDistance(r[1]!, r[2]!).distance) / 2;
}

/** The D3-symmetric optimum by direct search over its two parameters: a coarse grid, then compass search. */
function symmetricTorus3(): { pose: Pose; tube: number } {
  let best: Pose = { rho: 0.5, alpha: 0.5 }, tube = -Infinity;
  for (let rho = 0.1; rho < 1.5; rho += 0.1) {
    for (let alpha = 0; alpha < Math.PI; alpha += 0.1) {
      const t = torusTube({ rho, alpha });
      if (t > tube) { tube = t; best = { rho, alpha }; }
    }
  }
  for (let step = 0.05; step > 1e-13;) {
    let moved = false;
    for (const [dr, da] of [[1, 0], [-1, 0], [0, 1], [0, -1], [1, 1], [-1, -1], [1, -1], [-1, 1]] as const) {
      const q = { rho: best.rho + dr * step, alpha: best.alpha + da * step };
      const t = torusTube(q);
      if (t > tube) { tube = t; best = q; moved = true; }
    }
    if (!moved) step /= 2;
  }
  return { pose: best, tube };
}

describe('torus:3 symmetric optimum (three pairwise-linked rings, D3 symmetry)', () => {
  // A symmetric optimum is critical for every motion, symmetric or not (principle of symmetric criticality,
  // Palais, Comm. Math. Phys. 69, 1979), so nothing opens at first order; the escape, if any, is second order.
  // The claim checked: following the reported escape with the exact kernel gives a thicker common tube while
  // every pair stays linked.
  it('is critical at first order but has a second-order escape that thickens the set', async () => {
    const { pose, tube } = symmetricTorus3();
    // Upper bound: two rings pass through each ring, r <= R/3 (circle packing in a circle, Kravitz 1967).
    expect(tube).toBeLessThan(1 / 3);
    expect(tube).toBeGreaterThan(0.3);
    const rings = torus3(pose);
    const report = await analyzePlay(resultOf(rings, tube, 'torus:3'));
    expect(report.mobility.selfStress).toBe(true);
    expect(report.locked).toBe(false);
    expect(report.secondOrder.escape).toBe(true);
    expect(report.secondOrder.escapeOrder).toBe(2);
    expect(report.secondOrder.thickenedTube!).toBeGreaterThan(tube * (1 + 1e-6));
    // Every active pair opens at second order along the corrected escape curve.
    for (const p of report.secondOrder.pairs) expect(p.verdict).toBe('opens-second-order');
    // The escape breaks the symmetry: B and C do not move as mirror images of each other under the
    // 2-fold axis x (which maps B to C), else the motion would stay in the D3 family.
    const [, b, c] = report.secondOrder.direction!.rings;
    const mirrored = Math.hypot(b!.translation[0] - c!.translation[0], b!.translation[1] + c!.translation[1], b!.translation[2] + c!.translation[2]);
    expect(mirrored).toBeGreaterThan(1e-3);
    // Independent check of the thicker pose with the brute-force reference (dense sampling + golden section):
    // every pair is farther apart than twice the symmetric tube, and still linked.
    const moved = report.secondOrder.thickenedRings!;
    for (const [i, j] of [[0, 1], [0, 2], [1, 2]] as const) {
      const d = Math.min(...refMinima(moved[i]!, moved[j]!, 4096).map((m) => m.d));
      expect(d / 2).toBeGreaterThan(tube * (1 + 1e-6));
      expect(linkingNumber(moved[i]!, moved[j]!)).not.toBe(0);
    }
  });

  it('the optimizer finds the same symmetric optimum, and re-inflating from the escape ends thicker', async () => {
    // The optimizer (src/optimize/run/solve.ts) with dihedral:3 imposed must reproduce the direct search above; the
    // escape then leads, without symmetry, to a strictly thicker Kuhn–Tucker point (the point of `compare`).
    const layout = catalogLayout('torus:3');
    const linking = linkingMatrix(layout.rings);
    const d3: Symmetry = { type: 'dihedral', order: 3, axis: [0, 0, 1], origin: [0, 0, 0] };
    const options = { tol: 1e-10, maxIterations: 300, seed: 0, perturbation: 0 };
    const sym = await solveInflate({ rings: layout.rings, tubeRatios: [1, 1, 1], linking, symmetry: d3 }, options);
    expect(sym.status).toBe('optimal');
    expect(sym.tube).toBeCloseTo(symmetricTorus3().tube, 9);
    const specs: RingSpec[] = sym.rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius }));
    const report = await analyzePlay(resultOf(specs, sym.tube, 'torus:3'));
    expect(report.secondOrder.escape).toBe(true);
    const start = report.secondOrder.thickenedRings!;
    // 100 outer iterations keep the test short; the climb from near a saddle is slow (the full run reaches
    // about 0.3316 after 300), so the run may end 'stalled' on its budget, but it must not fail or go back.
    const broken = await solveInflate({ rings: start, tubeRatios: [1, 1, 1], linking, symmetry: null }, { ...options, maxIterations: 100 });
    expect(['optimal', 'stalled']).toContain(broken.status);
    expect(broken.tube).toBeGreaterThan(sym.tube * (1 + 1e-3));
    expect(linkingMatrix(broken.rings)).toEqual(linking);
    // Two rings pass through each ring: r <= R/3 still holds (Kravitz 1967).
    expect(broken.tube).toBeLessThan(1 / 3);
  });
});
