// Linking numbers of round circles against an independent reference: Gauss's linking integral
// lk(A, B) = (1/4π) ∮∮ (a − b)·(a' × b') / |a − b|³ dθ dφ (C. F. Gauss, 1833; D. Rolfsen,
// "Knots and Links", 1976, ch. 5D), evaluated by a 400 x 400 midpoint rule, which for smooth
// periodic integrands converges geometrically. Nothing of src/ is used to build the reference.
import { describe, expect, it } from 'vitest';
import {
  allPairsUnlinked, connectedness, linkingChanges, linkingMatrix, linkingNumber,
} from '../src/topology/index.js';
import type { Circle, Vec3 } from '../src/model/types.js';
import { seededRandom as mulberry32 } from '../src/model/random.js';

const N = 400;

/** Points and tangents of a circle run counter-clockwise about its normal, in its own orthonormal frame. */
function samples(c: Circle): { p: Float64Array; t: Float64Array } {
  const n = unit([c.normal[0]!, c.normal[1]!, c.normal[2]!]);
  // Any vector not parallel to n gives e1; e2 = n × e1 makes (e1, e2, n) right-handed.
  const helper: Vec3 = Math.abs(n[0]) < 0.6 ? [1, 0, 0] : [0, 1, 0];
  const e1 = unit(crossV(helper, n));
  const e2 = crossV(n, e1);
  const p = new Float64Array(3 * N), t = new Float64Array(3 * N);
  const dth = (2 * Math.PI) / N;
  for (let k = 0; k < N; k++) {
    const th = (k + 0.5) * dth;
    const co = Math.cos(th), si = Math.sin(th);
    for (let q = 0; q < 3; q++) {
      p[3 * k + q] = c.center[q]! + c.radius * (co * e1[q]! + si * e2[q]!);
      t[3 * k + q] = c.radius * (-si * e1[q]! + co * e2[q]!) * dth;
    }
  }
  return { p, t };
}

/** Gauss integral and the smallest sampled distance (an upper bound on the true distance). */
function gauss(a: Circle, b: Circle): { lk: number; minDist: number } {
  const A = samples(a), B = samples(b);
  let sum = 0, min2 = Infinity;
  for (let i = 0; i < N; i++) {
    const ax = A.p[3 * i]!, ay = A.p[3 * i + 1]!, az = A.p[3 * i + 2]!;
    const tax = A.t[3 * i]!, tay = A.t[3 * i + 1]!, taz = A.t[3 * i + 2]!;
    for (let j = 0; j < N; j++) {
      const dx = ax - B.p[3 * j]!, dy = ay - B.p[3 * j + 1]!, dz = az - B.p[3 * j + 2]!;
      const tbx = B.t[3 * j]!, tby = B.t[3 * j + 1]!, tbz = B.t[3 * j + 2]!;
      const cx = tay * tbz - taz * tby, cy = taz * tbx - tax * tbz, cz = tax * tby - tay * tbx;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 < min2) min2 = r2;
      sum += (dx * cx + dy * cy + dz * cz) / (r2 * Math.sqrt(r2));
    }
  }
  return { lk: sum / (4 * Math.PI), minDist: Math.sqrt(min2) };
}


function crossV(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}
function unit(a: Vec3): Vec3 {
  const l = Math.hypot(...a);
  return [a[0] / l, a[1] / l, a[2] / l];
}
function randomDir(rnd: () => number): Vec3 {
  // Uniform on the sphere (Marsaglia-style via z and angle).
  const z = 2 * rnd() - 1, ph = 2 * Math.PI * rnd(), s = Math.sqrt(1 - z * z);
  return [s * Math.cos(ph), s * Math.sin(ph), z];
}
const neg = (v: Vec3): Vec3 => [-v[0], -v[1], -v[2]];
const circle = (center: Vec3, normal: Vec3, radius: number): Circle => ({ center, normal, radius });

describe('linkingNumber', () => {
  it('Hopf link: each circle through the other, ±1 by orientation (Rolfsen ch. 5D; Gauss integral)', () => {
    const a = circle([0, 0, 0], [0, 0, 1], 1);
    const b = circle([1, 0, 0], [0, 1, 0], 1);
    const g = gauss(a, b).lk;
    expect(Math.abs(g)).toBeCloseTo(1, 3);
    // Hand count: A (counter-clockwise about +z) passes B's centre (1,0,0) heading +y = n_B: +1.
    expect(linkingNumber(a, b)).toBe(1);
    expect(linkingNumber(a, b)).toBe(Math.round(g));
    expect(linkingNumber(a, circle([1, 0, 0], [0, -1, 0], 1))).toBe(-1);
  });

  it('unlinked examples: far apart, side by side, stacked, coplanar nested (all 0 by the Gauss integral)', () => {
    const base = circle([0, 0, 0], [0, 0, 1], 1);
    const cases = [
      circle([5, 0, 0], [0, 1, 0], 1), // far away
      circle([2.5, 0, 0], [0, 1, 0], 1), // B's disk does not reach A
      circle([0, 0, 1], [0, 0, 1], 1), // parallel planes, coaxial
      circle([0.1, 0, 0], [0, 0, 1], 0.5), // coplanar, nested
      circle([0, 0, 0.3], [1, 0, 0], 0.2), // A passes nowhere near; B sits inside A's disk, crossing it twice
    ];
    for (const b of cases) {
      expect(Math.abs(gauss(base, b).lk)).toBeLessThan(1e-3);
      expect(linkingNumber(base, b)).toBe(0);
      expect(linkingNumber(b, base)).toBe(0);
    }
  });

  it('degenerate cases decided: tangent to the plane, and a crossing on the rim (intersecting) give 0', () => {
    const a = circle([0, 0, 0], [0, 0, 1], 1);
    // B's plane z = 1 touches nothing; tilt B's plane so A is tangent to it at (1,0,0), inside B.
    const tangentPlane = circle([1, 0, 0], [1, 0, 0], 0.5);
    expect(linkingNumber(a, tangentPlane)).toBe(0);
    // A passes exactly through B's rim point (1,0,0): circles intersect.
    const rim = circle([1, 0, 0.5], [0, 1, 0], 0.5);
    expect(linkingNumber(a, rim)).toBe(0);
    expect(linkingNumber(rim, a)).toBe(0);
  });

  it('matches the Gauss integral on 500 seeded random pairs; symmetric; normal reversal flips the sign', () => {
    const rnd = mulberry32(20240611);
    let tested = 0, linked = 0, unlinked = 0, skipped = 0;
    while (tested < 500) {
      const ra = 0.5 + 1.5 * rnd(), rb = 0.5 + 1.5 * rnd();
      const na = randomDir(rnd), nb = randomDir(rnd);
      const ca: Vec3 = [4 * rnd() - 2, 4 * rnd() - 2, 4 * rnd() - 2];
      // Two thirds of the pairs put B's centre near A's core so that linked pairs are common.
      let cb: Vec3;
      if (rnd() < 2 / 3) {
        const s = samples(circle(ca, na, ra)).p;
        const k = Math.floor(rnd() * N);
        const off = ra * 0.8;
        cb = [s[3 * k]! + off * (2 * rnd() - 1), s[3 * k + 1]! + off * (2 * rnd() - 1), s[3 * k + 2]! + off * (2 * rnd() - 1)];
      } else {
        cb = [4 * rnd() - 2, 4 * rnd() - 2, 4 * rnd() - 2];
      }
      const a = circle(ca, na, ra), b = circle(cb, nb, rb);
      const g = gauss(a, b);
      // Too close to intersecting for the 400-point rule to resolve: skip (margin 0.1 of the smaller radius).
      if (g.minDist < 0.1 * Math.min(ra, rb)) {
        skipped++;
        continue;
      }
      tested++;
      const lk = linkingNumber(a, b);
      expect(Math.abs(g.lk - Math.round(g.lk))).toBeLessThan(0.02);
      expect(lk).toBe(Math.round(g.lk) + 0);
      expect(linkingNumber(b, a)).toBe(lk);
      expect(linkingNumber(circle(ca, neg(na), ra), b)).toBe(-lk || 0);
      expect(linkingNumber(a, circle(cb, neg(nb), rb))).toBe(-lk || 0);
      // Non-unit normals give the same answer (public entry points accept any length).
      expect(linkingNumber(circle(ca, [na[0] * 7, na[1] * 7, na[2] * 7], ra), b)).toBe(lk);
      if (lk === 0) unlinked++;
      else linked++;
    }
    // The sample must exercise both outcomes in earnest.
    expect(linked).toBeGreaterThan(100);
    expect(unlinked).toBeGreaterThan(100);
    expect(skipped).toBeLessThan(500);
  });
});

describe('linking matrix and connectedness', () => {
  /** Chain of n rings along x, alternating planes, each through its neighbours (common practice, no source). */
  function chain(n: number): Circle[] {
    return Array.from({ length: n }, (_, i) => circle([1.5 * i, 0, 0], i % 2 === 0 ? [0, 0, 1] : [0, 1, 0], 1));
  }

  it('a chain links neighbours only, matching the Gauss integral pair by pair', () => {
    const rings = chain(5);
    const m = linkingMatrix(rings);
    for (let i = 0; i < 5; i++) {
      for (let j = 0; j < 5; j++) {
        if (i === j) {
          expect(m[i]![j]).toBe(0);
          continue;
        }
        expect(Math.abs(m[i]![j]!)).toBe(Math.abs(i - j) === 1 ? 1 : 0);
        if (i < j) expect(m[i]![j]).toBe(Math.round(gauss(rings[i]!, rings[j]!).lk) + 0);
        expect(m[i]![j]).toBe(m[j]![i]);
      }
    }
    const c = connectedness(m);
    expect(c.connected).toBe(true);
    expect(c.unheld).toEqual([]);
    expect(allPairsUnlinked(m)).toBe(false);
  });

  it('reports a loose ring and separate pieces', () => {
    const rings = [...chain(2), circle([20, 0, 0], [0, 0, 1], 1), circle([40, 0, 0], [0, 0, 1], 1), circle([41.5, 0, 0], [0, 1, 0], 1)];
    const c = connectedness(linkingMatrix(rings));
    expect(c.connected).toBe(false);
    expect(c.unheld).toEqual([2]);
    expect(c.components).toEqual([[0, 1], [2], [3, 4]]);
    // A link found outside the matrix (e.g. to a lattice copy) holds the ring.
    expect(connectedness(linkingMatrix(rings), [[2, 2]]).unheld).toEqual([]);
  });

  it('all pairs unlinked, and linking changes are listed', () => {
    const apart = [circle([0, 0, 0], [0, 0, 1], 1), circle([5, 0, 0], [0, 0, 1], 1)];
    expect(allPairsUnlinked(linkingMatrix(apart))).toBe(true);
    const before = linkingMatrix(chain(3));
    const after = linkingMatrix([...chain(2), circle([10, 0, 0], [0, 0, 1], 1)]);
    expect(linkingChanges(before, before)).toEqual([]);
    expect(linkingChanges(before, after)).toEqual([{ a: 1, b: 2, before: before[1]![2], after: 0 }]);
  });
});
