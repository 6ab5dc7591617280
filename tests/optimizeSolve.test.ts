// Inflation solves checked against published optima and bounds, each result re-verified independently
// (brute-force pair distances and Gauss-integral linking numbers from tests/optimizeReference.ts), never
// with the solver's own figures. Solves run in-process: these are cases whose inner QPs were checked not to
// trip the nlopt-js WebAssembly abort (field-notes.md); the worker pool isolates everything else.
import { describe, expect, it } from 'vitest';
import { star } from './optimizeLayouts.js';
import { packingBound, packingRadius } from '../src/optimize/certify/bound.js';
import { solveInflate } from '../src/optimize/run/solve.js';
import type { InflateProblem, SolveOptions, SolveOutcome } from '../src/optimize/run/problem.js';
import { chain3Start, hopfStart, torusLinkStart } from '../src/optimize/run/testPoses.js';
import { catalogLayout } from '../src/model/catalog.js';
import { symmetryDeparture } from '../src/model/symmetry.js';
import type { Ring, Symmetry, Vec3 } from '../src/model/types.js';
import { linkingMatrix } from '../src/topology/index.js';
import { check } from './optimizeReference.js';
import { applyRotation, randomRotation, rng } from './reference/rng.js';

const OPTIONS: SolveOptions = { tol: 1e-10, maxIterations: 300, seed: 0, perturbation: 0.05 };
const C3: Symmetry = { type: 'cyclic', order: 3, axis: [0, 0, 1], origin: [0, 0, 0] };
const timings: string[] = [];

async function solve(name: string, rings: Ring[], extra: Partial<InflateProblem> = {}, opts: Partial<SolveOptions> = {}): Promise<SolveOutcome> {
  const problem: InflateProblem = {
    rings, tubeRatios: rings.map(() => 1), linking: linkingMatrix(rings), symmetry: null, ...extra,
  };
  const t0 = performance.now();
  const out = await solveInflate(problem, { ...OPTIONS, ...opts });
  timings.push(`${name}: ${(performance.now() - t0).toFixed(0)} ms, ${out.iterations} iterations, ${out.status}`);
  return out;
}

/** The result keeps the linking, clears every pair by brute force and keeps r <= R. */
function expectValid(out: SolveOutcome, start: Ring[], ratios = start.map(() => 1)): void {
  const c = check(out.rings, out.tube, ratios);
  const expected = check(start, 1e-9, ratios).linking;
  expect(c.linkingRoundoff).toBeLessThan(1e-6);
  expect(c.linking).toEqual(expected);
  // Relative clearance: the brute force resolves distances to ~1e-15; allow rounding of the tube itself.
  expect(c.minClearance).toBeGreaterThan(-1e-10);
  out.rings.forEach((r, i) => expect(out.tube * ratios[i]!).toBeLessThanOrEqual(r.radius * (1 + 1e-12)));
}

describe('solveInflate: published optima', () => {
  it('tight Hopf link of equal rings: tube R/2 with a whole circle of contacts', async () => {
    // Cantarella, Kusner, Sullivan, Invent. Math. 150 (2002): the tight Hopf link is two round circles,
    // each through the other's centre, so round rings of radius R take tube R/2 (a degenerate optimum).
    const R = 1;
    const start = hopfStart(R, R);
    const out = await solve('hopf', start);
    expect(out.status).toBe('optimal');
    expect(Math.abs(out.tube - R / 2)).toBeLessThan(1e-9 * R);
    expectValid(out, start);
    // Each ring passes through the other's centre (same source). The optimum is degenerate, so the poses
    // are only as sharp as the square root of the tube's accuracy.
    const [a, b] = out.rings as [Ring, Ring];
    expect(pointToCircle(b.center, a)).toBeLessThan(1e-6 * R);
    expect(pointToCircle(a.center, b)).toBeLessThan(1e-6 * R);
    // Certificate: non-negative forces normalised to 1, balance to the documented tolerance.
    expect(out.certificate.certified).toBe(true);
    expect(out.certificate.balanceResidual).toBeLessThan(1e-6);
    const total = out.contacts.reduce((s, k) => s + k.force, 0);
    expect(Math.abs(total - 1)).toBeLessThan(1e-12);
    expect(out.contacts.every((k) => k.force >= 0)).toBe(true);
    expect(out.contacts.some((k) => k.continuum === true)).toBe(true);
  });

  it('unequal Hopf link R1 >= R2: tube R2/2, in either ring order', async () => {
    // Same source: a linked component has length >= 4π at unit thickness, so r <= R2/2; attained with the
    // small ring a meridian of the big ring's tube of radius R2.
    for (const [R1, R2] of [[1.5, 1], [3, 0.7]] as const) {
      const start = hopfStart(R1, R2);
      const out = await solve(`hopf ${R1}/${R2}`, start);
      expect(Math.abs(out.tube - R2 / 2)).toBeLessThan(1e-9 * R2);
      expect(out.status).toBe('optimal');
      expectValid(out, start);
      const swapped = [start[1]!, start[0]!];
      const out2 = await solve(`hopf ${R1}/${R2} swapped`, swapped);
      expect(Math.abs(out2.tube - R2 / 2)).toBeLessThan(1e-9 * R2);
      expectValid(out2, swapped);
    }
  });

  it('three-ring chain of equal rings: tube R/3, the k = 2 circle-packing bound', async () => {
    // references.md: k rings through one ring need ID/WD >= 1/r_k; k = 2 gives tube <= R/3, and the chain
    // attains it (the two end rings pierce the middle disk 2r apart, each 2r from its core).
    const start = chain3Start(1);
    const out = await solve('chain3', start);
    expect(out.status).toBe('optimal');
    expect(Math.abs(out.tube - 1 / 3)).toBeLessThan(1e-9);
    expectValid(out, start);
    const bound = packingBound(start, [1, 1, 1], linkingMatrix(start))!;
    expect(Math.abs(bound.tube - 1 / 3)).toBeLessThan(1e-15);
  });

  it('eight-ring chain from the catalogue start: tube R/3 certified (regression: an unmoved SLSQP start taken as converged)', async () => {
    // Same k = 2 packing bound as the three-ring chain (references.md): every inner ring holds two rings.
    // With the CLI's defaults this start once stopped at 0.3263 R, "converged", after SLSQP handed back its
    // start point unchanged and HiGHS timed out on the same nearly linear QP.
    const start = catalogLayout('chain:8').rings;
    const out = await solve('chain8', start, {}, { tol: 1e-9, maxIterations: 400, seed: 0 });
    expect(out.status).toBe('optimal');
    expect(Math.abs(out.tube - 1 / 3)).toBeLessThan(1e-9);
    expectValid(out, start);
  });

  it('star of K rings through one ring (cyclic:K, dihedral:K and free) attains the packing bound r_K R / (1 + r_K)', async () => {
    // Graham, Lubachevsky, Nurmela, Östergård, Discrete Math. 181 (1998): r_3 = 2√3 - 3, r_4 = √2 - 1.
    // Rings upright through the central disk cut it in disks of radius r, so the best packing is reachable.
    for (const [K, rK] of [[3, 2 * Math.sqrt(3) - 3], [4, Math.SQRT2 - 1]] as const) {
      const start = star(K);
      const expected = rK / (1 + rK);
      const groups: (Symmetry | null)[] = [
        { type: 'cyclic', order: K, axis: [0, 0, 1], origin: [0, 0, 0] },
        { type: 'dihedral', order: K, axis: [0, 0, 1], origin: [0, 0, 0] },
        null,
      ];
      for (const symmetry of groups) {
        const out = await solve(`star:${K} ${symmetry?.type ?? 'free'}`, start, { symmetry });
        expect(Math.abs(out.tube - expected)).toBeLessThan(1e-9);
        expect(out.status).toBe('optimal');
        expectValid(out, start);
      }
      expect(Math.abs(packingRadius(K) - rK)).toBeLessThan(1e-15);
    }
  });

  it('torus:3: the free optimum is >= the C3-symmetric one and <= the packing bound', async () => {
    // Bound: every ring has two rings through it, so tube <= R/3 (references.md, k = 2).
    const start = torusLinkStart(3, 1);
    const sym = await solve('torus3 cyclic:3', start, { symmetry: C3 });
    expect(sym.status).toBe('optimal');
    expectValid(sym, start);
    // The symmetric optimum really is symmetric (independent check of the poses, not the solver's flag).
    expect(symmetryGap(sym.rings)).toBeLessThan(1e-9);
    const free = await solve('torus3 free', start, {}, { maxIterations: 400 });
    expectValid(free, start);
    expect(free.tube).toBeGreaterThanOrEqual(sym.tube * (1 - 1e-12));
    expect(free.tube).toBeLessThanOrEqual(1 / 3 + 1e-12);
    expect(sym.tube).toBeLessThanOrEqual(1 / 3 + 1e-12);
  });
});

describe('solveInflate: invariance and bookkeeping', () => {
  it('a rotated, translated and rescaled Hopf start gives the scaled optimum', async () => {
    // Common practice, no source: the problem is invariant under rigid motions and scales with R.
    const r = rng(7);
    for (const scale of [1e-3, 1e3]) {
      const M = randomRotation(r);
      const shift: Vec3 = [3 * scale, -2 * scale, 5 * scale];
      const start = hopfStart(1, 1).map((ring) => {
        const c = applyRotation(M, ring.center);
        return {
          ...ring,
          center: [c[0] * scale + shift[0], c[1] * scale + shift[1], c[2] * scale + shift[2]] as Vec3,
          normal: applyRotation(M, ring.normal),
          radius: ring.radius * scale,
        };
      });
      const out = await solve(`hopf x${scale}`, start);
      expect(Math.abs(out.tube / scale - 0.5)).toBeLessThan(1e-9);
      expectValid(out, start);
    }
  });

  it('a seed perturbs the start deterministically; seed 0 keeps it', async () => {
    const start = chain3Start(1);
    const a = await solve('chain3 seed 5', start, {}, { seed: 5 });
    const b = await solve('chain3 seed 5 again', start, {}, { seed: 5 });
    expect(b.tube).toBe(a.tube);
    expect(b.history).toEqual(a.history);
    const c = await solve('chain3 seed 6', start, {}, { seed: 6, maxIterations: 0 });
    const d = await solve('chain3 seed 0', start, {}, { seed: 0, maxIterations: 0 });
    expect(c.history[0]).not.toBe(d.history[0]);
    expect(Math.abs(a.tube - 1 / 3)).toBeLessThan(1e-9);
  });

  it('bounded departure from symmetry: feasible from the symmetric optimum, and no thinner than it', async () => {
    const start = torusLinkStart(3, 1);
    const sym = await solve('torus3 sym for departure', start, { symmetry: C3 });
    const eps = 0.01;
    const out = await solve('torus3 departure 0.01', sym.rings, { departure: { symmetry: C3, epsilon: eps } }, { maxIterations: 60 });
    // A bound on the departure only widens the feasible set: the symmetric optimum stays feasible.
    expect(out.tube).toBeGreaterThanOrEqual(sym.tube * (1 - 1e-12));
    expect(symmetryGap(out.rings)).toBeLessThanOrEqual(eps * (1 + 1e-6));
    expect(symmetryDeparture(out.rings, C3)).toBeLessThanOrEqual(eps * (1 + 1e-9));
    expectValid(out, start);
  });

  it('reports an infeasible start instead of throwing', async () => {
    // Two rings in one plane crossing each other: no linking number exists and no tube fits.
    const rings: Ring[] = [
      { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 },
      { name: 'B', center: [1, 0, 0], normal: [0, 0, 1], radius: 1 },
    ];
    const out = await solveInflate({ rings, tubeRatios: [1, 1], linking: [[0, 1], [1, 0]], symmetry: null }, OPTIONS);
    expect(out.status).toBe('infeasible');
    expect(out.certificate.certified).toBe(false);
    // A linking matrix the start does not have is also infeasible.
    const hopf = hopfStart(1, 1);
    const wrong = await solveInflate({ rings: hopf, tubeRatios: [1, 1], linking: [[0, 0], [0, 0]], symmetry: null }, OPTIONS);
    expect(wrong.status).toBe('infeasible');
  });

  it('rejects malformed problems with InputError naming the field', async () => {
    const hopf = hopfStart(1, 1);
    await expect(solveInflate({ rings: hopf, tubeRatios: [1], linking: linkingMatrix(hopf), symmetry: null }, OPTIONS)).rejects.toThrow(/tubeRatios/);
    await expect(solveInflate({ rings: hopf, tubeRatios: [1, -1], linking: linkingMatrix(hopf), symmetry: null }, OPTIONS)).rejects.toThrow(/ring B: tube ratio/);
  });

  it('timings (reported, not asserted)', () => {
    console.info(`inflate solve times:\n  ${timings.join('\n  ')}`);
    expect(timings.length).toBeGreaterThan(0);
  });
});

// --- helpers ---

function pointToCircle(p: ArrayLike<number>, r: Ring): number {
  const d = [p[0]! - r.center[0], p[1]! - r.center[1], p[2]! - r.center[2]];
  const z = d[0]! * r.normal[0] + d[1]! * r.normal[1] + d[2]! * r.normal[2];
  const rho = Math.sqrt(Math.max(0, d[0]! ** 2 + d[1]! ** 2 + d[2]! ** 2 - z * z));
  return Math.hypot(z, rho - r.radius);
}

/**
 * RMS distance of the three poses to the nearest C3-symmetric arrangement, computed here from scratch:
 * rotate each ring back by its index times 120° about z, average (normals sign-aligned), compare.
 */
function symmetryGap(rings: Ring[]): number {
  const rot = (v: ArrayLike<number>, k: number): number[] => {
    const a = (-2 * Math.PI * k) / 3, c = Math.cos(a), s = Math.sin(a);
    return [c * v[0]! - s * v[1]!, s * v[0]! + c * v[1]!, v[2]!];
  };
  // Ring k should be ring 0 turned by k·120°; find which ring plays which role by nearest centre.
  const order = [0, 1, 2].map((k) => {
    const target = rot(rings[0]!.center, -k);
    let best = 0, bd = Infinity;
    rings.forEach((r, j) => {
      const d = Math.hypot(r.center[0] - target[0]!, r.center[1] - target[1]!, r.center[2] - target[2]!);
      if (d < bd) { bd = d; best = j; }
    });
    return best;
  });
  const back = order.map((j, k) => ({ c: rot(rings[j]!.center, k), n: rot(rings[j]!.normal, k), R: rings[j]!.radius }));
  const sign = back.map((b) => (b.n[0]! * back[0]!.n[0]! + b.n[1]! * back[0]!.n[1]! + b.n[2]! * back[0]!.n[2]! >= 0 ? 1 : -1));
  const cm = [0, 1, 2].map((i) => back.reduce((s, b) => s + b.c[i]! / 3, 0));
  const nm = [0, 1, 2].map((i) => back.reduce((s, b, k) => s + (sign[k]! * b.n[i]!) / 3, 0));
  let sum = 0;
  back.forEach((b, k) => {
    for (let i = 0; i < 3; i++) sum += (b.c[i]! - cm[i]!) ** 2 + b.R ** 2 * (sign[k]! * b.n[i]! - nm[i]!) ** 2;
  });
  return Math.sqrt(sum / 3);
}
