// thickring compare: rigid alignment of two optima, the choice of symmetry, and (with the optimizer)
// symmetric vs symmetry-broken optima of torus:3 and of the Hopf link, with the symmetry-breaking curve.
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import type { Io } from '../cli/io.js';
import { alignRings, type PoseLike } from '../src/analyze/align.js';
import { compare, compareSymmetry, detectSymmetry } from '../src/analyze/compare.js';
import { naturalSymmetry, parseCatalogSpec } from '../src/model/catalog.js';
import type { SweepOutcome } from '../src/analyze/sweep.js';
import { verifyConfiguration } from '../src/check/verify.js';
import { InputError } from '../src/model/errors.js';
import { resolveSpec } from '../src/model/spec.js';
import { ringOrbits, symmetryDeparture } from '../src/model/symmetry.js';
import type { Ring, Symmetry, Vec3 } from '../src/model/types.js';
import { solveInflate } from '../src/optimize/run/solve.js';
import { linkingMatrix } from '../src/topology/index.js';
import { normalize, rotate } from '../src/model/vec.js';

const CYCLIC3: Symmetry = { type: 'cyclic', order: 3, axis: [0, 0, 1], origin: [0, 0, 0] };

function rings(): PoseLike[] {
  // An arbitrary chiral arrangement (no symmetry), four rings of different radii.
  return [
    { name: 'A', center: [0.1, 0.2, -0.3], normal: normalize([0.2, 0.1, 1]), radius: 1 },
    { name: 'B', center: [1.3, -0.4, 0.2], normal: normalize([1, 0.3, -0.2]), radius: 1.4 },
    { name: 'C', center: [-0.7, 0.9, 0.5], normal: normalize([-0.1, 1, 0.4]), radius: 0.8 },
    { name: 'D', center: [0.4, 0.6, 1.6], normal: normalize([0.5, -0.5, 0.7]), radius: 1.1 },
  ];
}

function moved(rs: PoseLike[], axis: Vec3, angle: number, shift: Vec3): PoseLike[] {
  const k = normalize(axis);
  return rs.map((r) => {
    const c = rotate(r.center, k, angle);
    return { ...r, center: [c[0] + shift[0], c[1] + shift[1], c[2] + shift[2]], normal: rotate(r.normal, k, angle) };
  });
}

describe('best rigid alignment (Horn 1987, unit quaternions)', () => {
  it('undoes a known rotation and translation exactly: no ring moves or tilts', () => {
    // Horn, J. Opt. Soc. Am. A 4(4), 1987: the closed form is exact for noise-free corresponding data.
    const a = rings();
    const b = moved(a, [0.3, -1, 0.5], 2.1, [3, -1, 0.25]);
    const al = alignRings(b, a);
    expect(al.rms).toBeLessThan(1e-12);
    for (const r of al.rings) {
      expect(r.displacement).toBeLessThan(1e-12);
      expect(r.tiltDegrees).toBeLessThan(1e-5);
    }
  });

  it('ignores the direction of a ring axis (a flipped normal is the same ring)', () => {
    const a = rings();
    const b = moved(a, [1, 1, 0], 0.7, [0, 0, 1]);
    b[2] = { ...b[2]!, normal: [-b[2]!.normal[0]!, -b[2]!.normal[1]!, -b[2]!.normal[2]!] };
    const al = alignRings(b, a);
    expect(al.rms).toBeLessThan(1e-12);
    expect(Math.max(...al.rings.map((r) => r.tiltDegrees))).toBeLessThan(1e-5);
  });

  it('does not align a mirror image: only proper rotations are allowed', () => {
    const a = rings();
    const mirror = a.map((r) => ({ ...r, center: [-r.center[0]!, r.center[1]!, r.center[2]!], normal: [-r.normal[0]!, r.normal[1]!, r.normal[2]!] }));
    expect(alignRings(mirror, a).rms).toBeGreaterThan(0.05);
  });

  it('reports one ring moved by a known amount when the rest are the same', () => {
    // Ring E sits at the centroid of the centres, so a small move of E creates no torque in the fit:
    // least squares then only translates, by the mean move 0.01/5, leaving E 4/5 of its move and each
    // of the others 1/5 (the centroid property of the optimal translation, Horn 1987).
    const a: PoseLike[] = [
      { name: 'A', center: [-5, 0, 0], normal: [0, 0, 1], radius: 1 },
      { name: 'B', center: [5, 0, 0], normal: [0, 1, 0], radius: 1 },
      { name: 'C', center: [0, 5, 0], normal: [1, 0, 0], radius: 1 },
      { name: 'D', center: [0, -5, 0], normal: [0, 0, 1], radius: 1 },
      { name: 'E', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 },
    ];
    const b = a.map((r) => (r.name === 'E' ? { ...r, center: [0, 0, 0.01] } : r));
    const al = alignRings(b, a);
    expect(al.rings[4]!.displacement).toBeCloseTo(0.008, 9);
    for (const k of [0, 1, 2, 3]) expect(al.rings[k]!.displacement).toBeCloseTo(0.002, 9);
  });
});

describe('which symmetry compare breaks', () => {
  it('takes the catalogue layout\'s own group: dihedral D_2 for the Hopf link, D_3 for torus:3', () => {
    // N Hopf fibres through N equally spaced points are carried into each other by the N-fold turn and
    // by the half-turns about the perpendicular axes (dihedral D_N) — the catalogue's construction.
    expect(detectSymmetry(resolveSpec('hopf').layout.rings)).toMatchObject({ type: 'dihedral', order: 2 });
    expect(detectSymmetry(resolveSpec('torus:3').layout.rings)).toMatchObject({ type: 'dihedral', order: 3 });
  });

  it('the group read off the poses is the catalogue construction\'s group, for every family', () => {
    // Internal consistency, no outside source (the groups themselves are checked against the construction
    // in catalog.test.ts). Two routes to one fact: the catalogue states the group it builds (naturalSymmetry),
    // detection finds the largest group the generated rings actually have. A larger detected group would mean the
    // construction is more symmetric than documented; a smaller one, a construction bug.
    for (const spec of ['hopf', 'chain:3', 'chain:4', 'necklace:3', 'necklace:4', 'necklace:5', 'necklace:6', 'star:3', 'star:4', 'torus:3', 'torus:4', 'torus:5']) {
      const built = naturalSymmetry(parseCatalogSpec(spec));
      const found = detectSymmetry(resolveSpec(spec).layout.rings);
      expect(found && `${found.type}:${found.order}`, spec).toBe(`${built.type}:${built.order}`);
    }
  });

  it('a catalogue start with unequal radii keeps only the group its radii allow', () => {
    // torus:3 with one ring larger: the 3-fold turn no longer maps rings onto rings of the same size.
    const found = detectSymmetry(resolveSpec('torus:3', { radii: [1.3, 1, 1] }).layout.rings);
    expect(found === undefined || found.order < 3).toBe(true);
  });

  it('refuses none, and a layout file with no symmetry section, with a message that says what to pass', () => {
    const torus = resolveSpec('torus:3');
    expect(() => compareSymmetry(torus, null)).toThrow(InputError);
    const asFile = { ...torus, source: 'file' as const, catalog: null, spec: 'my-layout.json' };
    expect(() => compareSymmetry(asFile, undefined)).toThrow(/--symmetry cyclic:N or dihedral:N/);
    expect(() => compareSymmetry(torus, { type: 'cyclic', order: 4, axis: [0, 0, 1], origin: [0, 0, 0] })).toThrow(/does not divide the ring count 3/);
  });

  it('exits 2 before any solve for an order that does not divide the ring count', async () => {
    const err: string[] = [];
    const io: Io = { out: () => {}, err: (t) => err.push(t), interactive: false };
    expect(await main(['compare', 'torus:3', '--symmetry', 'cyclic:4'], io)).toBe(2);
    expect(err.join('')).toMatch(/cyclic:4.*does not divide the ring count 3/);
    expect(await main(['compare', 'torus:3', '--symmetry', 'none'], io)).toBe(2);
  });
});

describe('symmetric vs broken optimum (runs the optimizer)', () => {
  const tol = 1e-9;
  const options = { starts: 2, perturbedStarts: 2, workers: 2, seed: 0, tol, sweepPoints: 3 };

  it('torus:3: breaking cyclic:3 gives a strictly thicker tube, and the curve rises from one to the other', async () => {
    const spec = resolveSpec('torus:3');
    let sweep: SweepOutcome | null = null;
    const c = await compare(spec, { ...options, symmetry: CYCLIC3, onSweep: (s) => { sweep = s; } });
    const R = 1;
    expect(c.symmetric.status).toMatch(/optimal|stalled/);
    expect(c.broken.status).toMatch(/optimal|stalled/);
    // The symmetric optimum really is cyclic:3 symmetric.
    expect(symmetryDeparture(c.symmetric.rings, CYCLIC3)).toBeLessThan(1e-9);
    // Unconstrained strictly thicker (by far more than the tolerance).
    expect(c.broken.tube).toBeGreaterThan(c.symmetric.tube * (1 + 1e-4));
    expect(c.gain).toBeCloseTo(c.broken.tube - c.symmetric.tube, 15);
    // Both below the packing bound: two rings through each ring, so r <= R/3 (Kravitz 1967; Graham et al. 1998).
    expect(c.broken.tube).toBeLessThanOrEqual(R / 3 + 1e-12);
    // Independent re-check of both optima (verify.ts: brute-force distances, Gauss linking integral).
    for (const r of [c.symmetric, c.broken]) {
      const v = verifyConfiguration({ rings: r.rings, tube: r.tube, linking: spec.linking });
      expect(v.ok, v.messages.join('; ')).toBe(true);
    }
    // The curve: symmetric value at ε = 0, monotone non-decreasing, ending at the unconstrained value.
    expect(c.sweep[0]).toMatchObject({ epsilon: 0, tube: c.symmetric.tube });
    for (let k = 1; k < c.sweep.length; k++) {
      expect(c.sweep[k]!.epsilon).toBeGreaterThan(c.sweep[k - 1]!.epsilon);
      expect(c.sweep[k]!.tube).toBeGreaterThanOrEqual(c.sweep[k - 1]!.tube);
    }
    expect(c.sweep[c.sweep.length - 1]!.tube).toBeGreaterThanOrEqual(c.broken.tube * (1 - 1e-6));
    expect(c.sweep.some((p) => p.tube > c.symmetric.tube * (1 + 1e-6) && p.tube < c.broken.tube * (1 - 1e-6))).toBe(true);
    expect(c.verification.messages.join('\n')).toMatch(/sweep ends re-checked independently: ε = 0 passed, ε = [\d.e-]+ passed/);
    expect(c.changes.map((ch) => ch.name)).toEqual(['A', 'B', 'C']);

    // Every configuration behind a curve point is feasible (independent check) and within its ε.
    expect(sweep).not.toBeNull();
    expect(sweep!.configurations.map((cfg) => cfg.tube)).toEqual(sweep!.points.map((p) => p.tube));
    const orbits = ringOrbits(c.symmetric.rings, CYCLIC3);
    for (const cfg of sweep!.configurations) {
      const v = verifyConfiguration({ rings: cfg.rings, tube: cfg.tube, linking: spec.linking });
      expect(v.ok, `ε = ${cfg.epsilon}: ${v.messages.join('; ')}`).toBe(true);
      expect(symmetryDeparture(cfg.rings, CYCLIC3, orbits)).toBeLessThanOrEqual(cfg.epsilon * (1 + 1e-6) + 1e-9);
    }
  }, 600_000);

  it('hopf: nothing to gain — the symmetric optimum R/2 is already the thickest (Cantarella–Kusner–Sullivan 2002)', async () => {
    const c = await compare(resolveSpec('hopf'), options);
    expect(c.symmetric.symmetry).toMatchObject({ type: 'dihedral', order: 2 });
    expect(c.symmetric.tube).toBeCloseTo(0.5, 7);
    expect(c.broken.tube).toBeCloseTo(0.5, 7);
    expect(Math.abs(c.gain)).toBeLessThanOrEqual(1e-6 * c.symmetric.tube);
    for (const p of c.sweep) expect(p.tube).toBeCloseTo(0.5, 7);
  }, 300_000);
});

describe('the curve\'s departure-bounded solves pair rings as the symmetric optimum does (runs the optimizer)', () => {
  it('torus:3 under dihedral:3: a start far from symmetric is solved with the reference\'s ring matching', async () => {
    // A torus:3 arrangement far from its D_3 symmetry (like the unconstrained optimum aligned onto the
    // symmetric one, where the curve starts one of its paths): nearest images do not pair its own rings
    // consistently, so the departure bound must take the matching from a symmetric reference.
    const far: Ring[] = [
      { name: 'A', center: [0.014, 0, -0.007], normal: normalize([0.151, 0.146, 0.978]), radius: 1 },
      { name: 'B', center: [-0.059, 0.659, -0.08], normal: normalize([-0.852, -0.016, 0.523]), radius: 1 },
      { name: 'C', center: [0.046, -0.659, 0.087], normal: normalize([0.771, 0.126, 0.624]), radius: 1 },
    ];
    const torus = resolveSpec('torus:3');
    const D3 = naturalSymmetry(parseCatalogSpec('torus:3'))!;
    expect(D3).toMatchObject({ type: 'dihedral', order: 3 });
    // Same link as the catalogue's (every pair linked once: the Gauss linking integral of src/topology).
    const linking = linkingMatrix(far);
    expect(linking.map((row) => row.map(Math.abs))).toEqual(torus.linking.map((row) => row.map(Math.abs)));
    expect(() => ringOrbits(far, D3)).toThrow(/not arranged with this symmetry/);
    const reference = torus.layout.rings;
    const orbits = ringOrbits(reference, D3);
    const epsilon = symmetryDeparture(far, D3, orbits) / 2;
    const out = await solveInflate(
      { rings: far, tubeRatios: [1, 1, 1], linking, symmetry: null, departure: { symmetry: D3, epsilon, reference } },
      { tol: 1e-9, maxIterations: 200, seed: 0, perturbation: 0 },
    );
    expect(out.status).toMatch(/optimal|stalled/);
    // Within ε with the reference's matching, re-checked independently, and below the packing bound:
    // two rings through each ring, so r <= R/3 (Kravitz 1967; Graham et al. 1998).
    expect(symmetryDeparture(out.rings, D3, orbits)).toBeLessThanOrEqual(epsilon * (1 + 1e-9));
    const v = verifyConfiguration({ rings: out.rings, tube: out.tube, linking });
    expect(v.ok, v.messages.join('; ')).toBe(true);
    expect(out.tube).toBeGreaterThan(0);
    expect(out.tube).toBeLessThanOrEqual(1 / 3 + 1e-12);
  }, 120_000);
});

describe('thickring compare on the command line, then report (runs the optimizer)', () => {
  it('prints exactly one JSON object, writes the same result file, and the report reads it', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'thickring-compare-'));
    try {
      const out: string[] = [], err: string[] = [];
      const io: Io = { out: (t) => out.push(t), err: (t) => err.push(t), interactive: false };
      const file = join(dir, 'hopf.json');
      const code = await main(['compare', 'hopf', '--starts', '1', '--workers', '1', '--sweep-points', '1', '--json', '-o', file], io);
      expect(code, err.join('\n')).toBe(0);
      expect(out).toHaveLength(1);
      const printed = JSON.parse(out[0]!);
      expect(printed).toMatchObject({ format: 'thickring-result/1', command: 'compare', spec: 'hopf' });
      expect(JSON.parse(readFileSync(file, 'utf8'))).toEqual(printed);
      // Progress went to stderr, one line per finished solve.
      expect(err.join('\n')).toMatch(/compare: symmetric optimum 1\/1/);
      const html = join(dir, 'hopf.html');
      expect(await main(['report', file, '-o', html, '--no-play'], io)).toBe(0);
      expect(existsSync(html)).toBe(true);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }, 300_000);
});
