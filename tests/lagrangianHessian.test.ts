// The assembled Lagrangian Hessian (exact strut curvatures pulled back through the chart, plus the chart's
// own curvature away from z = 0) against central differences of the exact envelope gradients: the
// differencing the Newton polish (kktNewton.ts) uses when no exact Hessian is given, an independent route
// through the kernel's tracked closest pairs. Ring chart with and without an imposed symmetry, the sparse
// entries against the dense matrix, and the periodic chart (cell rings and lattice vectors) on the weave
// catalogue, at the start poses, at perturbed poses and at a solved optimum.
import { describe, expect, it } from 'vitest';
import { resolveSpec } from '../src/model/spec.js';
import { periodicLinks } from '../src/model/periodic.js';
import { ringPairs } from '../src/model/ringPairs.js';
import { ringOrbits, symmetrize, type RingOrbits } from '../src/model/symmetry.js';
import type { Lattice, Ring, Symmetry } from '../src/model/types.js';
import { weaveEntries, weaveLayout } from '../src/model/weaves.js';
import { buildChart, posedAt, type Chart } from '../src/optimize/chart/chart.js';
import { collectConstraints } from '../src/optimize/constraints/collect.js';
import { kktJacobianOf, type KktModel } from '../src/optimize/certify/kktNewton.js';
import {
  addPeriodicLagrangianHessian, addRingLagrangianHessian, periodicLagrangianHessian, ringLagrangianHessian,
} from '../src/optimize/constraints/lagrangianHessian.js';
import { buildPeriodicChart, periodicPosedAt, stateOf } from '../src/optimize/chart/periodicChart.js';
import { evaluatePeriodic, newPeriodicConstraint, type Constraint, type PeriodicConstraint } from '../src/optimize/constraints/constraints.js';
import { periodicKktModel, ringKktModel, useExactHessian } from '../src/optimize/certify/polish.js';
import { solvePeriodic } from '../src/optimize/run/periodicSolve.js';
import { pairPlan, scanPairs, scanPeriodic } from '../src/optimize/constraints/scan.js';
import { torusLinkStart } from '../src/optimize/run/testPoses.js';
import { star } from './optimizeLayouts.js';
import { rng } from './reference/rng.js';

const C3: Symmetry = { type: 'cyclic', order: 3, axis: [0, 0, 1], origin: [0, 0, 0] };
// Central differences with step 1e-6 carry ~1e-12 truncation and ~1e-16/1e-6 rounding: 1e-6 of the largest
// entry leaves margin (common practice, no source).
const FD_REL = 1e-6;

/**
 * Largest |exact - differenced| entry of the Hessian block of the KKT Jacobian at z, relative to the largest
 * exact entry; the difference step is 1e-6·L (kktNewton.ts). Only struts that are still strict local
 * closest pairs at z are compared: a large move can carry a strut past a fold, where it stops being one.
 */
function exactVsDifferences<C extends Constraint, P>(model: KktModel<C, P>, cons0: C[], lambda0: Float64Array, z: Float64Array, L = 1): number {
  const n = model.nFree;
  const posed = model.posedAt(z);
  const keep = cons0.map((k) => model.copy(k)).map((k) => {
    if (!Number.isFinite(model.evaluate(k, posed, true))) return null;
    const { ta, tb } = k;
    return Number.isFinite(model.evaluate(k, posed, true)) && Math.abs(k.ta - ta) + Math.abs(k.tb - tb) < 1e-9 ? k : null;
  });
  const cons = keep.filter((k): k is C => k !== null);
  const lambda = Float64Array.from(lambda0.filter((_, i) => keep[i] !== null));
  expect(cons.length).toBeGreaterThan(cons0.length / 2);
  useExactHessian(false);
  const Jd = kktJacobianOf(model, cons, z, lambda, L)!;
  useExactHessian(true);
  // The exact route must not fall back to differences here (no continuum struts, no departure rows).
  expect(model.hessian!(cons, posed, lambda)).not.toBeNull();
  const Je = kktJacobianOf(model, cons, z, lambda, L)!;
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

function ringCase(rings: Ring[], orbits: RingOrbits, seed: number): { chart: Chart; cons: Constraint[]; lambda: Float64Array } {
  const chart = buildChart(rings, orbits, { elements: orbits.elements, origin: orbits.origin });
  const posed = posedAt(chart, new Float64Array(chart.nFree));
  const full = buildChart(rings, orbits, false);
  const scans = scanPairs(posedAt(full, new Float64Array(full.nFree)), pairPlan(orbits, rings.length), rings.map(() => 1));
  // Every strut and sampled contact within a wide margin, with random positive forces.
  const cons = collectConstraints(chart, posed, scans, { t: 0, margin: 10, w: rings.map(() => 1), dep: null, samples: true });
  expect(cons.filter((k) => k.kind === 'strut').length).toBeGreaterThan(0);
  const r = rng(seed);
  return { chart, cons, lambda: Float64Array.from(cons.map(() => r())) };
}

/** Exact vs differences at z = 0 and at a chart point z ≠ 0 (rotations of a few degrees: the chart curves). */
function compareRing(rings: Ring[], orbits: RingOrbits, seed: number): number {
  const { chart, cons, lambda } = ringCase(rings, orbits, seed);
  const model = ringKktModel(chart, null);
  const r = rng(seed + 100);
  const z = Float64Array.from({ length: chart.nFree }, () => 0.05 * (2 * r() - 1));
  return Math.max(exactVsDifferences(model, cons, lambda, new Float64Array(chart.nFree)), exactVsDifferences(model, cons, lambda, z));
}

/** A ring arrangement from the catalogue, every ring moved and turned at random (layout units, radians). */
function shaken(spec: string, size: number, seed: number): Ring[] {
  const rings = resolveSpec(spec).layout.rings.map(({ tube: _t, ...ring }) => ring);
  const chart = buildChart(rings, ringOrbits(rings, null), false);
  const r = rng(seed);
  const z = Float64Array.from({ length: chart.nFree }, () => size * (2 * r() - 1));
  return chart.base.map((ring, j) => {
    const p = posedAt(chart, z);
    return { ...ring, center: [p.c[3 * j]!, p.c[3 * j + 1]!, p.c[3 * j + 2]!], normal: [p.n[3 * j]!, p.n[3 * j + 1]!, p.n[3 * j + 2]!] };
  });
}

describe('ring-chart Lagrangian Hessian from strut curvatures', () => {
  it('agrees with central differences of the envelope gradients (1e-6 of the largest entry), free rings', () => {
    expect(compareRing(star(4), ringOrbits(star(4), null), 1)).toBeLessThan(FD_REL);
    const torus = torusLinkStart(3);
    expect(compareRing(torus, ringOrbits(torus, null), 2)).toBeLessThan(FD_REL);
  });

  it('agrees under an imposed cyclic symmetry (reduced chart)', () => {
    const torus = torusLinkStart(3);
    const orbits = ringOrbits(torus, C3);
    expect(compareRing(symmetrize(torus, C3, orbits), orbits, 3)).toBeLessThan(FD_REL);
  });

  it('sparse entries: upper triangle only, on the ring-contact graph, summing to the dense matrix; both match differences', () => {
    for (const [spec, seed] of [['chain:6', 11], ['necklace:8', 12], ['star:5', 13]] as const) {
      const rings = shaken(spec, 0.04, seed);
      const { chart, cons, lambda } = ringCase(rings, ringOrbits(rings, null), seed);
      const n = chart.nFree;
      const posed = posedAt(chart, new Float64Array(n));
      // Rings coupled by a constraint with a force: only their variables may meet in an entry.
      const ringOfFull = (f: number): number => chart.reps.findIndex((rep) => f >= rep.offset && f < rep.offset + 5);
      const coupled = new Set<string>();
      cons.forEach((k, i) => {
        if (lambda[i]! !== 0) coupled.add(`${Math.min(k.a, k.b)}/${Math.max(k.a, k.b)}`);
      });
      const upper = new Float64Array(n * n);
      let calls = 0;
      const ok = addRingLagrangianHessian(chart, posed, cons, lambda, (i, j, v) => {
        calls++;
        expect(i).toBeLessThanOrEqual(j);
        const a = ringOfFull(chart.free[i]!), b = ringOfFull(chart.free[j]!);
        if (a !== b) expect(coupled.has(`${Math.min(a, b)}/${Math.max(a, b)}`)).toBe(true);
        upper[i * n + j] = upper[i * n + j]! + v;
      });
      expect(ok).toBe(true);
      // At most (10 · 11 / 2) entries per strut: linear in the constraints, not n².
      expect(calls).toBeLessThanOrEqual(55 * cons.length);
      const W = ringLagrangianHessian(chart, posed, cons, lambda)!;
      let largest = 0;
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          largest = Math.max(largest, Math.abs(W[i * n + j]!));
          expect(W[i * n + j]).toBe(W[j * n + i]);
          if (i <= j) expect(Math.abs(W[i * n + j]! - upper[i * n + j]!)).toBeLessThanOrEqual(1e-14 * Math.max(1, Math.abs(W[i * n + j]!)));
          if (i > j) expect(upper[i * n + j]).toBe(0);
        }
      }
      expect(largest).toBeGreaterThan(0);
      const model = ringKktModel(chart, null);
      expect(exactVsDifferences(model, cons, lambda, new Float64Array(n))).toBeLessThan(FD_REL);
    }
  });

  it('refuses what it cannot give: a departure row', () => {
    const { chart, cons, lambda } = ringCase(star(3), ringOrbits(star(3), null), 4);
    const posed = posedAt(chart, new Float64Array(chart.nFree));
    const dep = { ...cons[0]!, kind: 'departure' as const };
    expect(addRingLagrangianHessian(chart, posed, [...cons, dep], Float64Array.of(...lambda, 1), () => undefined)).toBe(false);
    expect(ringLagrangianHessian(chart, posed, [...cons, dep], Float64Array.of(...lambda, 1))).toBeNull();
  });
});

/**
 * Struts between every cell ring and every image whose bounding spheres come within `margin`, with random
 * positive forces; with `activeAt`, only those of length within 1e-7 of 2·activeAt (the active set there).
 */
function periodicCase(rings: Ring[], lattice: Lattice, margin: number, seed: number, activeAt: number | null = null) {
  const pc = buildPeriodicChart(rings, lattice);
  const base = periodicPosedAt(pc, new Float64Array(pc.nFree));
  const pairs = ringPairs({ rings, lattice }, margin).map((p) => ({ a: p.i, b: p.j, shift: p.shift }));
  const cons: PeriodicConstraint[] = [];
  for (const s of scanPeriodic(base, pairs, rings.map(() => 1))) {
    if (s.continuum !== null) continue;
    for (const c of s.contacts) {
      if (activeAt !== null && c.d - 2 * activeAt > 1e-7 * activeAt) continue;
      const con = newPeriodicConstraint('strut', s.a, s.b, s.shift, c.ta, c.tb, s.c, pc.nFree);
      if (Number.isFinite(evaluatePeriodic(con, pc, base, true))) cons.push(con);
    }
  }
  const r = rng(seed);
  return { pc, cons, lambda: Float64Array.from(cons.map(() => 0.1 + r())) };
}

/** Exact vs differences at z = 0 and at a random chart point (poses and lattice moved by up to `size`). */
function comparePeriodic(rings: Ring[], lattice: Lattice, margin: number, seed: number, size: number): number {
  const { pc, cons, lambda } = periodicCase(rings, lattice, margin, seed);
  expect(cons.length).toBeGreaterThan(0);
  // Some strut joins a ring to an image in another cell, so the lattice columns are exercised.
  expect(cons.some((k) => k.shift.some((s) => s !== 0))).toBe(true);
  const model = periodicKktModel(pc);
  const r = rng(seed + 100);
  const z = Float64Array.from({ length: pc.nFree }, () => size * (2 * r() - 1));
  return Math.max(exactVsDifferences(model, cons, lambda, new Float64Array(pc.nFree)), exactVsDifferences(model, cons, lambda, z));
}

describe('periodic-chart Lagrangian Hessian (cell rings and lattice vectors)', () => {
  for (const [i, entry] of weaveEntries().entries()) {
    it(`${entry.spec}: agrees with central differences of the envelope gradients, start and perturbed poses`, () => {
      const layout = weaveLayout(entry.spec);
      const rings = layout.rings.map(({ tube: _t, ...ring }) => ring);
      expect(comparePeriodic(rings, layout.lattice!, 0.5, 20 + i, 0.02)).toBeLessThan(FD_REL);
      // Moved off the catalogue pose, so no entry vanishes by symmetry.
      const pc = buildPeriodicChart(rings, layout.lattice!);
      const r = rng(40 + i);
      const moved = stateOf(pc, periodicPosedAt(pc, Float64Array.from({ length: pc.nFree }, () => 0.03 * (2 * r() - 1))));
      expect(comparePeriodic(moved.rings, moved.lattice, 0.5, 60 + i, 0.02)).toBeLessThan(FD_REL);
    });
  }

  it('weave:2-in-1 at its solved optimum: the active struts with their forces', async () => {
    const layout = weaveLayout('weave:2-in-1');
    const problem = { rings: layout.rings, lattice: layout.lattice!, tubeRatios: layout.rings.map(() => 1), links: periodicLinks(layout.rings, layout.lattice!) };
    const o = await solvePeriodic(problem, { tol: 1e-9, maxIterations: 200, seed: 5, perturbation: 0.05 });
    expect(o.status).toBe('optimal');
    const rings = o.rings.map(({ tube: _t, ...ring }) => ring);
    // A ring also touches its own images here (the flat rings of the chain), so reach past 2t.
    const { pc, cons } = periodicCase(rings, o.lattice, 2.1 * o.tube, 7, o.tube);
    // Two linked pairs and each ring with its next copy (docs/weaves.md): at least four struts.
    expect(cons.length).toBeGreaterThanOrEqual(4);
    const lambda = Float64Array.from(cons.map((_, k) => 1 + 0.1 * k));
    const model = periodicKktModel(pc);
    // The contacts here are nearly conformal (large third derivatives): the differences' error falls as h²
    // (measured 5e-3, 5e-5 of 319 at h = 1e-6, 1e-7), so the step is 3e-8 (L = 0.03) and 1e-6 still holds.
    expect(exactVsDifferences(model, cons, lambda, new Float64Array(pc.nFree), 0.03)).toBeLessThan(FD_REL);
    const r = rng(8);
    expect(exactVsDifferences(model, cons, lambda, Float64Array.from({ length: pc.nFree }, () => 0.01 * (2 * r() - 1)), 0.03)).toBeLessThan(FD_REL);
  });

  it('sparse entries sum to the dense matrix; a radius row adds nothing', () => {
    const layout = weaveLayout('weave:euro-4-in-1');
    const { pc, cons, lambda } = periodicCase(layout.rings.map(({ tube: _t, ...ring }) => ring), layout.lattice!, 0.5, 9);
    const pp = periodicPosedAt(pc, new Float64Array(pc.nFree));
    const n = pc.nFree;
    const upper = new Float64Array(n * n);
    expect(addPeriodicLagrangianHessian(pc, pp, cons, lambda, (i, j, v) => {
      expect(i).toBeLessThanOrEqual(j);
      upper[i * n + j] = upper[i * n + j]! + v;
    })).toBe(true);
    const radius = newPeriodicConstraint('radius', 0, 0, [], 0, 0, 1, n);
    const W = periodicLagrangianHessian(pc, pp, [...cons, radius], Float64Array.of(...lambda, 5))!;
    for (let i = 0; i < n; i++) {
      for (let j = i; j < n; j++) expect(Math.abs(W[i * n + j]! - upper[i * n + j]!)).toBeLessThanOrEqual(1e-14 * Math.max(1, Math.abs(W[i * n + j]!)));
    }
  });
});
