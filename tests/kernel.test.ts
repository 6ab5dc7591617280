// Circle–circle distance kernel against closed forms, hand-derived cases, and an independent brute force.
import { describe, expect, it } from 'vitest';
import { ringDistance, ringDistanceOneSided, pointCircleDistance, strutGradient, closestPointOnCircle } from '../src/kernel/index.js';
import type { Circle, Vec3 } from '../src/model/types.js';
import { mulTrig22, evalTrig4 } from '../src/kernel/trigPoly.js';
import { refMinima, refPoint, refPointCircle2, refF, refAngle } from './reference/bruteCircle.js';
import { applyRotation, randomRotation, randomUnit, rng } from './reference/rng.js';

interface TCircle extends Circle { center: number[]; normal: number[] }
const circle = (center: number[], normal: number[], radius: number): TCircle => ({ center, normal, radius });
const dist3 = (a: ArrayLike<number>, b: ArrayLike<number>) => Math.hypot(a[0]! - b[0]!, a[1]! - b[1]!, a[2]! - b[2]!);

describe('closed forms (Eberly, "Distance to Circles in 3D"; references.md)', () => {
  it('coaxial circles: d = sqrt(h^2 + (R1 - R0)^2), a continuum of closest pairs', () => {
    const r = rng(1);
    for (let i = 0; i < 50; i++) {
      const axis = randomUnit(r);
      const c0 = [r() * 4 - 2, r() * 4 - 2, r() * 4 - 2];
      const h = (r() - 0.5) * 3, R0 = 0.2 + r() * 2, R1 = 0.2 + r() * 2;
      const c1 = [c0[0]! + h * axis[0], c0[1]! + h * axis[1], c0[2]! + h * axis[2]];
      const res = ringDistance(circle(c0, axis, R0), circle(c1, r() < 0.5 ? axis : axis.map((x) => -x), R1));
      const expected = Math.hypot(h, R1 - R0);
      expect(res.distance).toBeCloseTo(expected, 12);
      expect(res.continuum?.kind).toBe('coaxial');
      for (const c of res.contacts) expect(c.distance).toBeCloseTo(expected, 12);
    }
  });

  it('parallel planes, not coaxial: planar distance of the projections combined with the plane gap', () => {
    const r = rng(2);
    for (let i = 0; i < 60; i++) {
      const R0 = 0.3 + r(), R1 = 0.3 + r(), h = (r() - 0.5) * 2, a = 0.05 + r() * 3;
      const res = ringDistance(circle([0, 0, 0], [0, 0, 1], R0), circle([a, 0, h], [0, 0, 1], R1));
      // Projections are coplanar circles with centre distance a: apart, crossing, or nested.
      const planar = a >= R0 + R1 ? a - R0 - R1 : a <= Math.abs(R0 - R1) ? Math.abs(R0 - R1) - a : 0;
      expect(res.distance).toBeCloseTo(Math.hypot(h, planar), 12);
      expect(res.continuum).toBeNull();
      // Crossing projections touch above the two crossing points: two struts of length |h|.
      if (planar === 0 && Math.abs(h) > 1e-3) {
        expect(res.contacts.filter((c) => Math.abs(c.distance - Math.abs(h)) < 1e-12)).toHaveLength(2);
      }
    }
  });

  it('coplanar circles: external d = a - R0 - R1 on the line of centres, nested d = |R0 - R1| - a', () => {
    const ext = ringDistance(circle([0, 0, 0], [0, 0, 1], 1), circle([3, 0, 0], [0, 0, 1], 0.5));
    expect(ext.distance).toBeCloseTo(1.5, 14);
    const nearest = ext.contacts.find((c) => Math.abs(c.distance - 1.5) < 1e-12)!;
    expect(dist3(nearest.onA, [1, 0, 0])).toBeLessThan(1e-12);
    expect(dist3(nearest.onB, [2.5, 0, 0])).toBeLessThan(1e-12);
    const nested = ringDistance(circle([0, 0, 0], [0, 0, 1], 2), circle([0.5, 0, 0], [0, 0, -1], 0.7));
    expect(nested.distance).toBeCloseTo(2 - 0.7 - 0.5, 14);
  });

  it('a circle lying on the tube around another (meridian and Villarceau circles) is a continuum', () => {
    const r = rng(3);
    for (let i = 0; i < 20; i++) {
      const RB = 0.5 + r() * 2, rho = (0.1 + 0.8 * r()) * RB;
      const phi = r() * 2 * Math.PI;
      // Meridian circle: centre on B's core, in the plane containing B's axis (a tube cross-section).
      const m = circle([RB * Math.cos(phi), RB * Math.sin(phi), 0], [-Math.sin(phi), Math.cos(phi), 0], rho);
      const b = circle([0, 0, 0], [0, 0, 1], RB);
      const res = ringDistance(m, b);
      expect(res.continuum?.kind).toBe('on-tube');
      expect(res.distance).toBeCloseTo(rho, 12);
      // Villarceau circle of the torus (core RB, tube rho): radius RB, centre at distance rho from the torus
      // centre, in a bitangent plane tilted by asin(rho / RB) (Villarceau 1848; from memory). Check the
      // construction with the brute-force reference before asserting the kernel's verdict.
      const t = Math.asin(rho / RB);
      const v = circle([0, rho, 0], [Math.sin(t), 0, Math.cos(t)], RB);
      for (let k = 0; k < 16; k++) {
        expect(Math.sqrt(refPointCircle2(refPoint(v, (k * Math.PI) / 8), b))).toBeCloseTo(rho, 10);
      }
      const rv = ringDistance(v, b);
      expect(rv.continuum?.kind).toBe('on-tube');
      expect(rv.distance).toBeCloseTo(rho, 12);
    }
  });

  it('tight Hopf arrangement: every point of one circle is at distance R from the other (Cantarella–Kusner–Sullivan 2002)', () => {
    for (const R of [1, 1e-3, 1e3]) {
      const res = ringDistance(circle([0, 0, 0], [0, 0, 1], R), circle([R, 0, 0], [0, 1, 0], R));
      expect(res.continuum?.kind).toBe('on-tube');
      expect(res.distance / R).toBeCloseTo(1, 12);
      for (const c of res.contacts) expect(c.distance / R).toBeCloseTo(1, 12);
    }
  });

  it('hand-derived: perpendicular rings apart along x have the single strut (1,0,0)-(c-R,0,0), d = c - 1 - R', () => {
    // A: unit circle in the xy-plane. B: radius R in the xz-plane centred at (c,0,0). The x axis is a common
    // symmetry line; the nearest points are the facing points on it (hand derivation).
    const c = 3, R = 0.75;
    const res = ringDistance(circle([0, 0, 0], [0, 0, 1], 1), circle([c, 0, 0], [0, 1, 0], R));
    expect(res.distance).toBeCloseTo(c - 1 - R, 14);
    const s = res.contacts.find((k) => Math.abs(k.distance - (c - 1 - R)) < 1e-12)!;
    expect(dist3(s.onA, [1, 0, 0])).toBeLessThan(1e-10);
    expect(dist3(s.onB, [c - R, 0, 0])).toBeLessThan(1e-10);
  });

  it('hand-derived: A crossing B\'s axis on a grid angle keeps the minimum beside the cusp (regression)', () => {
    // A: unit circle in the xy-plane centred (0,-s,0); B: unit circle in the xz-plane centred (1,0,0), axis the
    // line x = 1, z = 0. A(0) = (1,-s,0) lies on that axis (a cusp maximum of the distance). The nearest point is
    // A(π/2) = (0, 1-s, 0): its height over B's plane is |1-s| and its distance from B's axis equals R_B = 1,
    // so d = |1 - s| (hand derivation, also checked by the brute force).
    for (const s of [0.5, 2, 1.25]) {
      const a = circle([0, -s, 0], [0, 0, 1], 1), b = circle([1, 0, 0], [0, 1, 0], 1);
      const expected = Math.abs(1 - s);
      expect(ringDistance(a, b).distance).toBeCloseTo(expected, 13);
      expect(ringDistance(b, a).distance).toBeCloseTo(expected, 13);
      expect(Math.min(...refMinima(a, b).map((m) => m.d))).toBeCloseTo(expected, 10);
    }
  });

  it('a tight Hopf pair moved by 1e-7 is not a continuum: the cusp-side minimum is found (regression)', () => {
    // Lifting A by e along its own normal breaks the on-tube relation only near the cusp where A passes B's
    // axis; 16 evenly spread samples cannot see that, so the continuum test must look there. Values are
    // checked against the brute force (which samples the cusp densely), not derived.
    for (const e of [1e-7, 1e-5, 1e-3]) {
      const a = circle([0, 0, e], [0, 0, 1], 1), b = circle([1, 0, 0], [0, 1, 0], 1);
      const ref = Math.min(...refMinima(a, b).map((m) => m.d));
      const res = ringDistance(a, b);
      expect(res.continuum).toBeNull();
      expect(res.distance).toBeCloseTo(ref, 12);
      expect(ringDistance(b, a).distance).toBeCloseTo(ref, 12);
    }
  });

  it('a meridian circle of the other ring\'s tube gives R2 from both sides (regression: flat high-order minimum)', () => {
    // B (radius R2) centred on A's core, in the plane normal to A's tangent there: every point of B is at
    // distance R2 from A's core (tube cross-section, hand derivation). Seen from A, the nearest point is where A
    // runs along B's axis: f - R2^2 ~ R1 (R1 - R2) s^2 while h vanishes to third order.
    for (const [R1, R2] of [[1.5, 1], [3, 0.7], [2, 1.9]]) {
      const a = circle([0, 0, 0], [0, 0, 1], R1), b = circle([R1, 0, 0], [0, 1, 0], R2);
      expect(ringDistance(a, b).distance).toBeCloseTo(R2, 13);
      expect(ringDistance(b, a).distance).toBeCloseTo(R2, 13);
    }
  });

  it('point–circle distance matches d^2 = (n.Δ)^2 + (|Δ - (n.Δ)n| - r)^2 (Eberly) via the plain parametrisation', () => {
    const r = rng(4);
    for (let i = 0; i < 200; i++) {
      const b = circle([r(), r(), r()], randomUnit(r), 0.2 + r());
      const p = [3 * r() - 1.5, 3 * r() - 1.5, 3 * r() - 1.5];
      const out = [0, 0, 0];
      const d = closestPointOnCircle(p, b.center, b.normal, b.radius, out);
      expect(d).toBeCloseTo(Math.sqrt(refPointCircle2(p, b)), 12);
      expect(pointCircleDistance(p, b.center, b.normal, b.radius)).toBe(d);
      expect(dist3(out, b.center)).toBeCloseTo(b.radius, 12);
    }
  });
});

/** Random pairs from several families, most of them near a degenerate arrangement. */
function randomPair(r: () => number, i: number): [TCircle, TCircle] {
  const family = i % 6;
  const a = circle([2 * r() - 1, 2 * r() - 1, 2 * r() - 1], randomUnit(r), 0.3 + r());
  let b = circle([2 * r() - 1, 2 * r() - 1, 2 * r() - 1], randomUnit(r), 0.3 + r());
  const eps = 10 ** (-2 - 6 * r());
  const jitter = (v: ArrayLike<number>): number[] => [v[0]! + eps * (r() - 0.5), v[1]! + eps * (r() - 0.5), v[2]! + eps * (r() - 0.5)];
  if (family === 1) {
    // Near-coaxial.
    const h = 2 * r() - 1;
    b = circle(jitter([a.center[0]! + h * a.normal[0]!, a.center[1]! + h * a.normal[1]!, a.center[2]! + h * a.normal[2]!]), jitter(a.normal), 0.3 + r());
  } else if (family === 2) {
    // Near the tight Hopf arrangement (a whole circle of contacts).
    const R = 0.5 + r();
    a.radius = R;
    b = circle(jitter([R, 0, 0]), jitter([0, 1, 0]), R);
    a.center = [0, 0, 0];
    a.normal = [0, 0, 1];
  } else if (family === 3) {
    // Exactly parallel planes.
    b.normal = [...a.normal];
  } else if (family === 4) {
    // A passes exactly through B's axis (a cusp of the distance along A).
    const s = r() * 2 * Math.PI;
    const p = refPoint(a, s);
    const n = randomUnit(r);
    const t = 2 * r() - 1;
    b = circle([p[0]! - t * n[0], p[1]! - t * n[1], p[2]! - t * n[2]], n, 0.3 + r());
  }
  return [a, b];
}

describe('randomised comparison with the brute-force reference (dense sampling + golden section)', () => {
  it('finds the global distance and exactly the local minima, on 3000 pairs incl. near-degenerate ones', () => {
    const r = rng(2024);
    let worst = 0;
    let uncertified = 0;
    for (let i = 0; i < 3000; i++) {
      const [a, b] = randomPair(r, i);
      const res = ringDistance(a, b);
      const ref = refMinima(a, b, 2048);
      const scale = a.radius + b.radius + dist3(a.center, b.center);
      const refMin = Math.min(...ref.map((m) => m.d));
      worst = Math.max(worst, Math.abs(res.distance - refMin) / scale);
      expect(Math.abs(res.distance - refMin)).toBeLessThan(1e-10 * scale);
      if (res.continuum) continue;
      // Every reference minimum deeper than the sampling noise is a kernel contact; in the (flagged)
      // near-continuum regime only those deeper than 1e-8 of the squared size are promised.
      if (!res.certified) uncertified++;
      const minDepth = (res.certified ? 1e-12 : 1e-8) * scale * scale;
      for (const m of ref) {
        if (m.depth < minDepth) continue;
        const p = refPoint(a, m.s);
        // Flat minima (near-coaxial pairs) are located only to ~sqrt(rounding / f''): match the length to 1e-10
        // and the position loosely.
        const hit = res.contacts.some((c) => dist3(c.onA, p) < 1e-3 * scale && Math.abs(c.distance - m.d) < 1e-10 * scale);
        expect(hit, `pair ${i}: reference minimum at s=${m.s} d=${m.d} missing`).toBe(true);
      }
      // Every kernel contact is a genuine local minimum with the right length and a foot point on B.
      for (const c of res.contacts) {
        expect(dist3(c.onB, b.center)).toBeCloseTo(b.radius, 10);
        // The foot point on B is ill-conditioned near B's axis (error ~ eps L / rho), the distance is not.
        expect(c.distance).toBeCloseTo(dist3(c.onA, c.onB), 10);
        const s = refAngle(a, c.onA);
        const f0 = refF(a, b, s);
        expect(Math.sqrt(f0)).toBeCloseTo(c.distance, 10);
        const delta = 1e-4;
        expect(refF(a, b, s - delta)).toBeGreaterThanOrEqual(f0 - 1e-13 * scale * scale);
        expect(refF(a, b, s + delta)).toBeGreaterThanOrEqual(f0 - 1e-13 * scale * scale);
      }
    }
    expect(worst).toBeLessThan(1e-10);
    // The sampled regime is the exception (near-tight-Hopf pairs), not the rule.
    expect(uncertified).toBeLessThan(300);
  });
});

describe('trigonometric polynomial arithmetic used by the kernel', () => {
  // Pointwise: (x y)(s) = x(s) y(s) for the product built by the product-to-sum identities (Abramowitz and
  // Stegun, Handbook of Mathematical Functions, 4.3.31-4.3.33; numbers from memory), and the derivatives of
  // evalTrig4 against central differences of the value.
  it('degree-2 products equal the pointwise products, and evalTrig4 derivatives match differences', () => {
    const r = rng(5);
    const val = (p: ArrayLike<number>, s: number) => {
      let v = p[0]!;
      for (let k = 1; 2 * k <= p.length - 1; k++) v += p[2 * k - 1]! * Math.cos(k * s) + p[2 * k]! * Math.sin(k * s);
      return v;
    };
    const ev = new Float64Array(4), out = new Float64Array(9);
    for (let t = 0; t < 200; t++) {
      const x = Array.from({ length: 5 }, () => 2 * r() - 1), y = Array.from({ length: 5 }, () => 2 * r() - 1);
      mulTrig22(x, y, out);
      const s = 2 * Math.PI * r();
      expect(val(out, s)).toBeCloseTo(val(x, s) * val(y, s), 14);
      evalTrig4(out, Math.cos(s), Math.sin(s), ev);
      expect(ev[0]).toBeCloseTo(val(out, s), 14);
      // Each derivative against the central difference of the one below it.
      const h = 1e-5, plus = new Float64Array(4), minus = new Float64Array(4);
      evalTrig4(out, Math.cos(s + h), Math.sin(s + h), plus);
      evalTrig4(out, Math.cos(s - h), Math.sin(s - h), minus);
      for (let k = 1; k <= 3; k++) expect(ev[k]).toBeCloseTo((plus[k - 1]! - minus[k - 1]!) / (2 * h), 7);
    }
  });
});

describe('first-order condition of a strut (a closest pair is perpendicular to both circles)', () => {
  // A local minimum of |A(s) - B(t)| has (B - A) . A'(s) = 0 and (B - A) . B'(t) = 0: the chord is normal to
  // both curves (calculus of the squared distance; any differential-geometry text). The kernel never tests
  // this itself: it resolves the root angle of its stationary polynomial, so this checks how exactly.
  it('holds to 1e-11 of the size on 2000 random certified pairs (1e-8 next to the tight Hopf continuum)', () => {
    const r = rng(77);
    let checked = 0, worst = 0, worstNearHopf = 0;
    for (let i = 0; i < 2000; i++) {
      const [a, b] = randomPair(r, i);
      const res = ringDistance(a, b);
      if (res.continuum || !res.certified) continue;
      const scale = a.radius + b.radius + dist3(a.center, b.center);
      for (const c of res.contacts) {
        const chord = [0, 1, 2].map((k) => c.onB[k]! - c.onA[k]!);
        const len = Math.hypot(chord[0]!, chord[1]!, chord[2]!);
        if (len < 1e-6 * scale) continue; // touching cores: the chord has no direction
        // The foot point on B is ill-conditioned next to B's axis (error ~ eps L / rho): skip those.
        const rel = [0, 1, 2].map((k) => c.onA[k]! - b.center[k]!);
        const nb = Math.hypot(b.normal[0]!, b.normal[1]!, b.normal[2]!);
        const along = (rel[0]! * b.normal[0]! + rel[1]! * b.normal[1]! + rel[2]! * b.normal[2]!) / nb;
        const rho = Math.sqrt(Math.max(0, rel[0]! ** 2 + rel[1]! ** 2 + rel[2]! ** 2 - along * along));
        if (rho < 1e-3 * scale) continue;
        for (const [circ, p] of [[a, c.onA], [b, c.onB]] as const) {
          // Tangent at p: normal x (p - centre).
          const q = [0, 1, 2].map((k) => p[k]! - circ.center[k]!);
          const n = circ.normal;
          const t = [n[1]! * q[2]! - n[2]! * q[1]!, n[2]! * q[0]! - n[0]! * q[2]!, n[0]! * q[1]! - n[1]! * q[0]!];
          const tl = Math.hypot(t[0]!, t[1]!, t[2]!);
          const cosAngle = Math.abs(chord[0]! * t[0]! + chord[1]! * t[1]! + chord[2]! * t[2]!) / (tl * len);
          // Next to the tight Hopf continuum f is nearly flat (f'' ~ the offset), so the root angle is
          // ill-conditioned and the residual f'' * (angle error) is larger, while the length stays exact.
          if (i % 6 === 2) worstNearHopf = Math.max(worstNearHopf, cosAngle * len / scale);
          else worst = Math.max(worst, cosAngle * len / scale);
          checked++;
        }
      }
    }
    expect(checked).toBeGreaterThan(1500);
    expect(worst).toBeLessThan(1e-11);
    expect(worstNearHopf).toBeLessThan(1e-8);
  });
});

describe('extreme proportions against the brute-force reference', () => {
  // Reference: tests/reference/bruteCircle.ts (dense sampling of A, Eberly's closed-form point–circle distance,
  // golden-section refinement), which shares nothing with the kernel's polynomial method.
  it('radius ratios up to 1e3 and rings up to 1e4 radii apart: same global distance and minima', () => {
    const r = rng(31);
    for (let i = 0; i < 600; i++) {
      const far = i % 2 === 1;
      const ra = far ? 0.5 + r() : 10 ** (3 * r() - 1.5), rb = far ? 0.5 + r() : 10 ** (3 * r() - 1.5);
      const sep = far ? 10 ** (1 + 3 * r()) : 1;
      const a = circle([0, 0, 0], randomUnit(r), ra);
      const b = circle([sep * (2 * r() - 1), sep * (2 * r() - 1), sep * (2 * r() - 1)], randomUnit(r), rb);
      const res = ringDistance(a, b);
      const ref = refMinima(a, b, 4096);
      const scale = ra + rb + dist3(a.center, b.center);
      expect(Math.abs(res.distance - Math.min(...ref.map((m) => m.d))), `pair ${i}`).toBeLessThan(1e-10 * scale);
      if (res.continuum) continue;
      for (const m of ref) {
        if (m.depth < 1e-12 * scale * scale) continue;
        expect(res.contacts.some((c) => Math.abs(c.distance - m.d) < 1e-10 * scale), `pair ${i}: minimum d=${m.d} missing`).toBe(true);
      }
    }
  });
});

describe('invariance: rotation, translation, scaling by 1e±3, swapping A and B', () => {
  it('gives the same distance and the same set of closest pairs', () => {
    const r = rng(77);
    for (let i = 0; i < 300; i++) {
      const [a, b] = randomPair(r, i);
      const base = ringDistance(a, b);
      const M = randomRotation(r);
      const t = [10 * r() - 5, 10 * r() - 5, 10 * r() - 5];
      const k = [1e-3, 1, 1e3][i % 3]!;
      const tr = (c: TCircle): TCircle => {
        const p = applyRotation(M, c.center);
        return circle([k * (p[0] + t[0]!), k * (p[1] + t[1]!), k * (p[2] + t[2]!)], applyRotation(M, c.normal), k * c.radius);
      };
      const moved = ringDistance(tr(b), tr(a)); // swapped too
      expect(moved.distance / k).toBeCloseTo(base.distance, 9);
      expect(moved.continuum?.kind ?? null).toBe(base.continuum?.kind ?? null);
      if (base.continuum || !base.certified || !moved.certified) continue;
      // Same strut set: each base strut maps to a moved strut (with A and B exchanged).
      for (const c of base.contacts) {
        const pa = applyRotation(M, c.onA).map((x, j) => k * (x + t[j]!));
        const found = moved.contacts.some((m) => dist3(m.onB, pa) < 1e-3 * k && Math.abs(m.distance / k - c.distance) < 1e-9);
        expect(found, `pair ${i}`).toBe(true);
      }
      expect(moved.contacts.length).toBe(base.contacts.length);
    }
  });
});

describe('strut gradient (envelope theorem) against central finite differences of the exact distance', () => {
  it('matches for centre, rotation and radius of both rings', () => {
    const r = rng(99);
    const rot = (v: ArrayLike<number>, w: number[]): Vec3 => {
      // exact rotation by vector w (Rodrigues)
      const th = Math.hypot(w[0]!, w[1]!, w[2]!);
      if (th === 0) return [v[0]!, v[1]!, v[2]!];
      const k = w.map((x) => x / th);
      const c = Math.cos(th), s = Math.sin(th);
      const kv = k[0]! * v[0]! + k[1]! * v[1]! + k[2]! * v[2]!;
      const kx = [k[1]! * v[2]! - k[2]! * v[1]!, k[2]! * v[0]! - k[0]! * v[2]!, k[0]! * v[1]! - k[1]! * v[0]!];
      return [0, 1, 2].map((j) => v[j]! * c + kx[j]! * s + k[j]! * kv * (1 - c)) as Vec3;
    };
    let checked = 0;
    for (let i = 0; checked < 100; i++) {
      const a = circle([2 * r() - 1, 2 * r() - 1, 2 * r() - 1], randomUnit(r), 0.4 + r());
      const b = circle([2 * r() - 1, 2 * r() - 1, 2 * r() - 1], randomUnit(r), 0.4 + r());
      const res = ringDistance(a, b);
      if (res.contacts.length !== 1 || res.distance < 0.05) continue; // a single, well-separated strut
      checked++;
      const c0 = res.contacts[0]!;
      const g = new Float64Array(14);
      strutGradient(c0.onA, c0.onB, a.center, a.radius, b.center, b.radius, g);
      const h = 1e-6;
      const dAt = (mod: (aa: TCircle, bb: TCircle) => void): number => {
        const aa = circle([...a.center as number[]], [...a.normal as number[]], a.radius);
        const bb = circle([...b.center as number[]], [...b.normal as number[]], b.radius);
        mod(aa, bb);
        return ringDistance(aa, bb).distance;
      };
      for (let j = 0; j < 3; j++) {
        const e = [0, 0, 0]; e[j] = h;
        const fd = (sgn: number, which: 'a' | 'b', kind: 'c' | 'w') =>
          dAt((aa, bb) => {
            const t = which === 'a' ? aa : bb;
            if (kind === 'c') t.center = (t.center as number[]).map((x, q) => x + sgn * e[q]!);
            else t.normal = rot(t.normal, e.map((x) => sgn * x));
          });
        expect(g[j]).toBeCloseTo((fd(1, 'a', 'c') - fd(-1, 'a', 'c')) / (2 * h), 6);
        expect(g[3 + j]).toBeCloseTo((fd(1, 'a', 'w') - fd(-1, 'a', 'w')) / (2 * h), 6);
        expect(g[7 + j]).toBeCloseTo((fd(1, 'b', 'c') - fd(-1, 'b', 'c')) / (2 * h), 6);
        expect(g[10 + j]).toBeCloseTo((fd(1, 'b', 'w') - fd(-1, 'b', 'w')) / (2 * h), 6);
      }
      const fdR = (which: 'a' | 'b') => (dAt((aa, bb) => { (which === 'a' ? aa : bb).radius += h; }) - dAt((aa, bb) => { (which === 'a' ? aa : bb).radius -= h; })) / (2 * h);
      expect(g[6]).toBeCloseTo(fdR('a'), 6);
      expect(g[13]).toBeCloseTo(fdR('b'), 6);
    }
  });
});

describe('regressions: symmetric poses and argument order', () => {
  // Hand derivation (A in z = 0 with radius RA at the origin; B in y = 0 centred (RB, 0, 0), so B passes through
  // A's centre with its plane containing A's axis): A(s) is at height RA sin s over B's plane and |RA cos s - RB|
  // from B's axis, so by Eberly's point–circle formula f(s) = RA^2 where RA cos s < RB (every such point is nearest
  // to B's point at A's centre) and f(s) = RA^2 - 4 RA RB cos s + 4 RB^2 elsewhere. Hence d = |RA - 2 RB| for
  // RB <= RA (one strut, (RA,0,0)-(2RB,0,0)), and d = RA for RB >= RA (every point of A at RA from A's centre,
  // which lies on B: a whole circle of closest pairs).
  const upright = (RA: number, RB: number): [TCircle, TCircle] => [circle([0, 0, 0], [0, 0, 1], RA), circle([RB, 0, 0], [0, 1, 0], RB)];
  const onCircle = (p: ArrayLike<number>, c: TCircle) => {
    const d = [p[0]! - c.center[0]!, p[1]! - c.center[1]!, p[2]! - c.center[2]!];
    const n = c.normal, z = d[0]! * n[0]! + d[1]! * n[1]! + d[2]! * n[2]!;
    return Math.hypot(z, Math.hypot(d[0]! - z * n[0]!, d[1]! - z * n[1]!, d[2]! - z * n[2]!) - c.radius);
  };

  it('an upright ring through the centre: d = |RA - 2 RB| (RB <= RA), else RA, from both orders', () => {
    for (const [RA, RB] of [[1, 0.8], [1, 0.5], [1, 1], [1, 1.5], [2, 0.3], [1, 0.99], [3, 0.1], [1, 2]]) {
      const [a, b] = upright(RA!, RB!);
      const expected = RB! <= RA! ? Math.abs(RA! - 2 * RB!) : RA!;
      for (const [x, y] of [[a, b], [b, a]] as const) {
        const r = ringDistance(x, y);
        expect(r.distance, `RA=${RA} RB=${RB}`).toBeCloseTo(expected, 12);
        for (const k of r.contacts) {
          expect(onCircle(k.onA, x)).toBeLessThan(1e-12);
          expect(onCircle(k.onB, y)).toBeLessThan(1e-12);
        }
        // RB > RA or RB = RA: a continuum along A (the tight Hopf link at RB = RA also has one around B).
        expect(r.degenerate).toBe(RB! >= RA!);
      }
      if (RB! < RA! && RB !== RA! / 2) {
        const s = ringDistance(a, b).contacts.find((k) => Math.abs(k.distance - expected) < 1e-12)!;
        // g vanishes identically here (A lies on the quartic torus surface), so the minimum comes from the
        // sampled regime on f and h: its position to ~sqrt(eps), its length exact.
        expect(dist3(s.onA, [RA!, 0, 0])).toBeLessThan(1e-6);
        expect(dist3(s.onB, [2 * RB!, 0, 0])).toBeLessThan(1e-6);
      }
    }
  });

  it('each parametrisation alone finds the continuum around the other ring (meridian, Hopf, upright RB > RA)', () => {
    // A meridian circle B of A's tube (radius rho <= RA, centred on A's core, normal along A's tangent) has every
    // point at distance rho from A's core (references.md: a circle on the tube of the other). Parametrising A, the
    // minimum sits where A passes through B's centre along B's axis, and all of B is nearest to it.
    const cases: [TCircle, TCircle, number][] = [
      [circle([0, 0, 0], [0, 0, 1], 1.5), circle([1.5, 0, 0], [0, 1, 0], 1), 1],
      [circle([0, 0, 0], [0, 0, 1], 1), circle([1, 0, 0], [0, 1, 0], 1), 1],
      [...upright(1, 1.5), 1] as [TCircle, TCircle, number],
    ];
    for (const [a, b, d] of cases) {
      const fromA = ringDistanceOneSided(a, b), fromB = ringDistanceOneSided(b, a, true);
      for (const r of [fromA, fromB]) {
        expect(r.distance).toBeCloseTo(d, 12);
        expect(r.continuum?.kind).toBe('on-tube');
        for (const k of r.contacts) expect(k.distance).toBeCloseTo(d, 12);
      }
      // Same rings carry the continuum from both sides: compare which rings the representatives spread round.
      const spreadOn = (pts: ArrayLike<number>[]) => pts.some((p) => dist3(p, pts[0]!) > 1e-6);
      expect(spreadOn(fromA.contacts.map((k) => k.onA))).toBe(spreadOn(fromB.contacts.map((k) => k.onA)));
      expect(spreadOn(fromA.contacts.map((k) => k.onB))).toBe(spreadOn(fromB.contacts.map((k) => k.onB)));
    }
  });

  it('foot points next to the other ring\'s axis stay on their ring (scaled 1e-6, near the tight Hopf link)', () => {
    // Found by the property families: a foot point computed from a tiny distance to the axis left B's plane by
    // 6e-11 of the radius. The check is plain geometry (distance of a point from a circle).
    const a = circle([0, 0, 0], [0, -0.9999999999890872, -0.000004671781391902045], 2e-7);
    const b = circle([0, 0, 2e-7], [-1, 0, 0], 2e-7);
    for (const r of [ringDistanceOneSided(a, b), ringDistanceOneSided(b, a, true)]) {
      for (const k of r.contacts) {
        expect(onCircle(k.onA, a)).toBeLessThan(1e-12 * 6e-7);
        expect(onCircle(k.onB, b)).toBeLessThan(1e-12 * 6e-7);
      }
    }
  });

  it('a ring touching the other\'s centre from the side has two struts, d = R (sqrt 2 - 1) (grid-point minimum)', () => {
    // Hand derivation: A radius R in z = 0 at the origin, B radius R in the plane y = -R centred (0, -R, 0), so A
    // touches B's centre. Eberly's formula gives f(s)/R^2 = (1 + sin s)^2 + (|cos s| - 1)^2 = 3 + 2 sin s - 2|cos s|,
    // minimal at s = -π/4 and 5π/4 with d = R sqrt(3 - 2 sqrt 2) = R (sqrt 2 - 1). Radii and centre rounded as the
    // property families produced them: the minimum at -π/4 sits on an isolation grid point and was lost.
    const R = 0.20000000000000018;
    const a = circle([0, 0, 0], [0, 0, 1], R), b = circle([0, -0.19999999999999996, 0], [0, 1, 0], R);
    for (const r of [ringDistanceOneSided(a, b), ringDistanceOneSided(b, a, true)]) {
      const struts = r.contacts.filter((k) => Math.abs(k.distance - R * (Math.SQRT2 - 1)) < 1e-12);
      expect(struts).toHaveLength(2);
      expect(r.contacts).toHaveLength(2);
    }
  });

  it('no contact at a kink where a ring passes the other\'s axis (it is a maximum of the distance)', () => {
    // A (radius 0.38) at the origin, normal (0, -1, -1)/sqrt 2; B (radius 2, in x = 0) centred (0, 0, 2) passes
    // through A's centre and crosses A's axis again at (0, 2, 2), where the distance to A has a downward kink.
    // The brute force (tests/reference/bruteCircle.ts) lists two minima from B's side; the kernel listed a third
    // at the kink.
    const a = circle([0, 0, 0], [0, -Math.SQRT1_2, -Math.SQRT1_2], 0.38081761144497317);
    const b = circle([0, 0, 2], [-1, 0, 0], 2);
    const ref = refMinima(b, a).filter((m) => m.depth > 1e-12);
    const r = ringDistanceOneSided(b, a);
    expect(r.contacts).toHaveLength(ref.length);
    for (const m of ref) expect(r.contacts.some((k) => Math.abs(k.distance - m.d) < 1e-10)).toBe(true);
  });

  it('an upright ring through the centre moved 1e4 away: one strut, not a continuum, from both sides', () => {
    // The upright pose above (RB = 0.15 RA, so d = RA - 2 RB by the hand derivation) as the property families
    // produced it 1e4 away: rounding puts B's passage through A's axis ~1e-12 off it, where f's smooth maximum
    // gets a crater of depth ~1e-13, which B's side once took for a circle of closest pairs around A.
    const a = circle([10000, -6000, 8000], [-0.9999999987174352, 0, -0.0000506471121659472], 0.6991216543205586);
    const b = circle([10000.000005311274, -6000, 7999.895131751987], [0, -1, 0], 0.10486824814808379);
    for (const r of [ringDistanceOneSided(a, b), ringDistanceOneSided(b, a, true)]) {
      expect(r.distance).toBeCloseTo(a.radius - 2 * b.radius, 10);
      expect(r.degenerate).toBe(false);
    }
  });

  it('ringDistance(a, b) and ringDistance(b, a) are the same answer with the points exchanged', () => {
    // Symmetry of the distance (a fact of the definition); a near-coaxial pair tilted by 2e-12 sits on the
    // continuum test's tolerance, where the two sides once disagreed on `degenerate`.
    const pairs: [TCircle, TCircle][] = [
      [circle([0, 0, 0], [-1, 0, 0], 200000.29418241093), circle([0, 0, 0], [-1, 1.999998529090109e-12, 0], 200000)],
      upright(2, 0.3), upright(1, 1),
    ];
    for (const [a, b] of pairs) {
      const r1 = ringDistance(a, b), r2 = ringDistance(b, a);
      expect(r2.distance).toBe(r1.distance);
      expect(r2.degenerate).toBe(r1.degenerate);
      expect(r2.contacts.map((k) => [k.onB, k.onA])).toEqual(r1.contacts.map((k) => [k.onA, k.onB]));
    }
  });
});
