// The independent invariant checker on known-good and known-bad configurations. References: the tight
// Hopf link (Cantarella, Kusner, Sullivan 2002: two round circles each through the other's centre, tube
// R/2), closed-form circle distances (references.md: coaxial d = sqrt(h² + (r1 − r0)²); coplanar
// circles), the disk-crossing definition of the linking number (Rolfsen, Knots and Links, 5D), and the
// kernel and topology modules as independent implementations to agree with.
import { describe, expect, it } from 'vitest';
import { coreDistance, gaussLinking, sameLinkUpToReversal, verifyConfiguration, verifyRings, type CheckRing } from '../src/check/verify.js';
import { ringDistance } from '../src/kernel/index.js';
import type { Vec3 } from '../src/model/types.js';
import { linkingNumber } from '../src/topology/index.js';

const h = Math.SQRT1_2;
/** Tight Hopf link of core radius 1: each circle passes through the other's centre. */
const tightHopf = (): CheckRing[] => [
  { name: 'A', center: [0.5, 0, 0], normal: [0, h, h], radius: 1 },
  { name: 'B', center: [-0.5, 0, 0], normal: [0, -h, h], radius: 1 },
];
const HOPF_LINK = [[0, 1], [1, 0]];

describe('coreDistance (grid plus Newton, no kernel)', () => {
  it('tight Hopf link: every point of one core lies at distance R from the other (CKS 2002)', () => {
    const [a, b] = tightHopf();
    expect(coreDistance(a!, b!).distance).toBeCloseTo(1, 12);
  });

  it('coaxial circles: d = sqrt(h² + (r1 − r0)²) (Eberly, Distance to Circles in 3D)', () => {
    const a: CheckRing = { name: 'a', center: [0, 0, 0], normal: [0, 0, 1], radius: 1.5 };
    const b: CheckRing = { name: 'b', center: [0, 0, 0.3], normal: [0, 0, -2], radius: 2 };
    expect(coreDistance(a, b).distance).toBeCloseTo(Math.hypot(0.3, 0.5), 12);
  });

  it('coplanar circles: |c1 − c2| − r1 − r2 apart, and nested r_out − r_in − |c1 − c2|', () => {
    const a: CheckRing = { name: 'a', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 };
    const b: CheckRing = { name: 'b', center: [3, 1, 0], normal: [0, 0, 1], radius: 0.7 };
    expect(coreDistance(a, b).distance).toBeCloseTo(Math.hypot(3, 1) - 1.7, 12);
    const c: CheckRing = { name: 'c', center: [0.2, 0.1, 0], normal: [0, 0, 1], radius: 0.4 };
    expect(coreDistance(a, c).distance).toBeCloseTo(1 - 0.4 - Math.hypot(0.2, 0.1), 12);
  });

  it('agrees with the kernel (independent implementation) on random pairs, to 1e-9 of the radius', () => {
    const rnd = lcg(12345);
    for (let k = 0; k < 40; k++) {
      const a = randomRing(rnd, 'a'), b = randomRing(rnd, 'b');
      const ours = coreDistance(a, b).distance;
      const kernel = ringDistance(a, b).distance;
      expect(Math.abs(ours - kernel)).toBeLessThan(1e-9 * Math.max(a.radius, b.radius));
    }
  });
});

describe('gaussLinking', () => {
  it('sign convention by hand: B crosses A\'s disk along n_A once, so lk = +1 (Rolfsen 5D)', () => {
    // A: unit circle in z = 0, counter-clockwise about +z. B: centre (1,0,0) in y = 0, normal +y, so
    // B(t) = (1 + sin t, 0, cos t); it crosses z = 0 inside A at t = −π/2 moving along +z.
    const a: CheckRing = { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 };
    const b: CheckRing = { name: 'B', center: [1, 0, 0], normal: [0, 1, 0], radius: 1 };
    expect(gaussLinking(a, b, 0.5).linking).toBe(1);
    expect(gaussLinking(a, { ...b, normal: [0, -1, 0] }, 0.5).linking).toBe(-1);
    expect(gaussLinking(a, { ...b, center: [2.5, 0, 0] }, 0.5).linking).toBe(0);
  });

  it('agrees with the topology module\'s disk-crossing count on random pairs', () => {
    const rnd = lcg(777);
    let linked = 0;
    for (let k = 0; k < 60; k++) {
      const a = randomRing(rnd, 'a'), b = randomRing(rnd, 'b');
      const d = coreDistance(a, b).distance;
      if (d < 1e-3) continue;
      const g = gaussLinking(a, b, d);
      expect(g.linking).toBe(linkingNumber(a, b));
      if (g.linking !== 0) linked++;
    }
    expect(linked).toBeGreaterThan(5);
  });
});

describe('verifyConfiguration', () => {
  it('accepts the tight Hopf link at tube R/2 and rejects a tube 1e-6 thicker', () => {
    // Tight Hopf link tube R/2 (Cantarella, Kusner, Sullivan, Invent. Math. 150 (2002)); a tube 1e-6 thicker
    // has clearance (R - 2 t) / t = -2e-6 relative to the tube (hand derivation, R = 1).
    const good = verifyConfiguration({ rings: tightHopf(), tube: 0.5, linking: HOPF_LINK });
    expect(good.ok).toBe(true);
    expect(Math.abs(good.minClearance)).toBeLessThan(1e-12);
    const bad = verifyConfiguration({ rings: tightHopf(), tube: 0.5 * (1 + 1e-6), linking: HOPF_LINK });
    expect(bad.ok).toBe(false);
    expect(bad.minClearance).toBeCloseTo(-2e-6, 9);
    expect(bad.messages[0]).toMatch(/rings A and B: .*overlap/);
  });

  it('rejects intersecting rings', () => {
    const rings: CheckRing[] = [
      { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 },
      { name: 'B', center: [1.5, 0, 0], normal: [0, 0, 1], radius: 1 },
    ];
    const v = verifyConfiguration({ rings, tube: 0.01, linking: [[0, 0], [0, 0]] });
    expect(v.ok).toBe(false);
    expect(v.minClearance).toBeLessThan(-1);
  });

  it('rejects rings that passed through each other (relinked), and a mirror image', () => {
    const [a, b] = tightHopf();
    const apart = [a!, { ...b!, center: [-3, 0, 0] as Vec3 }];
    const v = verifyConfiguration({ rings: apart, tube: 0.1, linking: HOPF_LINK });
    expect(v.linkingPreserved).toBe(false);
    expect(v.ok).toBe(false);
    // Three pairwise-linked rings: reversing one ring is the same object, the mirror image is not.
    const lk = [[0, 1, 1], [1, 0, 1], [1, 1, 0]];
    expect(sameLinkUpToReversal(lk, [[0, -1, 1], [-1, 0, -1], [1, -1, 0]], ['A', 'B', 'C'])).toBe(true);
    expect(sameLinkUpToReversal(lk, [[0, -1, -1], [-1, 0, -1], [-1, -1, 0]], ['A', 'B', 'C'])).toBe(false);
  });

  it('flags a tube thicker than its core radius', () => {
    const v = verifyConfiguration({ rings: tightHopf(), tube: 0.5, tubeRatios: [1, 2.5], linking: HOPF_LINK });
    expect(v.tubeWithinRadius).toBe(false);
    expect(v.ok).toBe(false);
  });

  it('gives the same verdict rotated, translated, scaled by 1e±3 and reordered', () => {
    const base = verifyConfiguration({ rings: tightHopf(), tube: 0.49, linking: HOPF_LINK });
    const rot = rotation([0.3, -0.5, 0.8], 1.1);
    for (const s of [1e-3, 1, 1e3]) {
      const moved = tightHopf().reverse().map((r) => ({
        ...r,
        center: add(scale(rot(r.center as Vec3), s), [5 * s, -2 * s, 7 * s]),
        normal: rot(r.normal as Vec3),
        radius: r.radius * s,
      }));
      const v = verifyRings(moved.map((r) => ({ ...r, tube: 0.49 * s })), 0.49 * s, HOPF_LINK);
      expect(v.ok).toBe(true);
      expect(v.minClearance).toBeCloseTo(base.minClearance, 9);
    }
  });
});

describe('verifyConfiguration on many rings (sphere prefilter)', () => {
  /** 2-in-1 chain of unit rings 1.5 apart, planes alternating: ring i pierces ring i ± 1's disk 0.5 from its core. */
  const chain = (n: number): CheckRing[] =>
    Array.from({ length: n }, (_, i) => ({ name: `R${i}`, center: [1.5 * i, 0, 0] as Vec3, normal: (i % 2 === 0 ? [0, 0, 1] : [0, 1, 0]) as Vec3, radius: 1 }));

  it('a 260-ring chain: linking as the disk-crossing count gives it, tube 0.25 touches, 0.26 overlaps, a far ring moved onto another is caught', () => {
    // Hand geometry: ring i+1 crosses ring i's plane at distance 0.5 from its core, so the largest tube is 0.25.
    const rings = chain(260);
    const linking = rings.map((a) => rings.map((b) => (a === b ? 0 : linkingNumber(a as never, b as never))));
    const ok = verifyConfiguration({ rings, tube: 0.25, linking });
    expect(ok.ok).toBe(true);
    expect(Math.abs(ok.minClearance)).toBeLessThan(1e-9);
    expect(verifyConfiguration({ rings, tube: 0.26, linking }).ok).toBe(false);
    // Ring 250 put onto ring 10 (same pose, shifted 0.1 along its axis): those two overlap and link no more as intended.
    const moved = rings.map((r, i) => (i === 250 ? { ...r, center: [15, 0, 0.1] as Vec3, normal: [0, 0, 1] as Vec3 } : r));
    const bad = verifyConfiguration({ rings: moved, tube: 0.2, linking });
    expect(bad.ok).toBe(false);
    expect(bad.messages.join(' ')).toMatch(/rings R10 and R250: core distance/);
  });

  it('minClearance is the least over all pairs, also when no pair comes near (brute force over every pair)', () => {
    const rnd = lcg(77);
    for (const spread of [3, 20]) {
      const rings = Array.from({ length: 14 }, (_, k) => {
        const r = randomRing(rnd, `Q${k}`);
        return { ...r, center: scale(r.center as Vec3, spread) };
      });
      const tube = 0.01;
      let brute = Infinity;
      for (let i = 0; i < rings.length; i++) {
        for (let j = i + 1; j < rings.length; j++) brute = Math.min(brute, (coreDistance(rings[i]!, rings[j]!).distance - 2 * tube) / tube);
      }
      const linking = rings.map((a) => rings.map((b) => (a === b ? 0 : linkingNumber(a as never, b as never))));
      const v = verifyConfiguration({ rings, tube, linking });
      expect(Math.abs(v.minClearance - brute)).toBeLessThan(1e-9 * Math.max(1, Math.abs(brute)));
    }
  });
});

// ---- helpers -------------------------------------------------------------------------------------

function lcg(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

function randomRing(rnd: () => number, name: string): CheckRing {
  const c: Vec3 = [rnd() * 2 - 1, rnd() * 2 - 1, rnd() * 2 - 1];
  const n: Vec3 = [rnd() * 2 - 1, rnd() * 2 - 1, rnd() * 2 - 1];
  return { name, center: c, normal: n, radius: 0.5 + rnd() };
}

function rotation(axis: Vec3, angle: number): (v: Vec3) => Vec3 {
  const l = Math.hypot(...axis);
  const k: Vec3 = [axis[0] / l, axis[1] / l, axis[2] / l];
  const c = Math.cos(angle), s = Math.sin(angle);
  return (v) => {
    const kv = k[0] * v[0] + k[1] * v[1] + k[2] * v[2];
    const x: Vec3 = [k[1] * v[2] - k[2] * v[1], k[2] * v[0] - k[0] * v[2], k[0] * v[1] - k[1] * v[0]];
    return [0, 1, 2].map((i) => v[i]! * c + x[i]! * s + k[i]! * kv * (1 - c)) as Vec3;
  };
}

const add = (a: Vec3, b: Vec3): Vec3 => [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
const scale = (a: Vec3, s: number): Vec3 => [a[0] * s, a[1] * s, a[2] * s];
