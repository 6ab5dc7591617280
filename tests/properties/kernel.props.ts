// Property families for the circle–circle kernel (fast-check). Every case is checked against sources outside the
// kernel: the independent brute force of tests/reference/bruteCircle.ts (dense sampling + golden section, shares no
// code with the kernel), closed forms (references.md: coaxial, coplanar, parallel planes, a circle on the tube of
// the other, the tight Hopf link; hand derivations named where used), and the symmetry of the distance itself
// (dist(A, B) = dist(B, A): the answer, its degeneracy and its closest pairs may not depend on argument order).
// Exported for the fuzz runner (long time budgets) and for tests/kernelProperties.test.ts (small seeded counts).
// No test-framework imports here: check() throws an Error on failure.
import fc from 'fast-check';
import { ringDistance, ringDistanceOneSided, type RingDistance } from '../../src/kernel/index.js';
import { refMinima } from '../reference/bruteCircle.js';

type V3 = [number, number, number];
export interface Ring { center: V3; normal: V3; radius: number }
export interface KernelCase {
  a: Ring;
  b: Ring;
  /** Closed-form distance where the family has one (scaled with the case), with its source. */
  expected?: { d: number; source: string };
}

const EPS = 2.220446049250313e-16;

// ---- small vector helpers (plain arithmetic; nothing from the kernel) ------------------------------------------
const add = (p: V3, q: V3): V3 => [p[0] + q[0], p[1] + q[1], p[2] + q[2]];
const sub = (p: V3, q: V3): V3 => [p[0] - q[0], p[1] - q[1], p[2] - q[2]];
const mul = (k: number, p: V3): V3 => [k * p[0], k * p[1], k * p[2]];
const dot = (p: V3, q: V3): number => p[0] * q[0] + p[1] * q[1] + p[2] * q[2];
const cross = (p: V3, q: V3): V3 => [p[1] * q[2] - p[2] * q[1], p[2] * q[0] - p[0] * q[2], p[0] * q[1] - p[1] * q[0]];
const norm = (p: V3): number => Math.hypot(p[0], p[1], p[2]);
const unit = (p: V3): V3 => mul(1 / norm(p), p);
const dist = (p: ArrayLike<number>, q: ArrayLike<number>): number => Math.hypot(p[0]! - q[0]!, p[1]! - q[1]!, p[2]! - q[2]!);
/** A unit vector perpendicular to n (Gram–Schmidt against the least aligned axis). */
const perp = (n: V3): V3 => unit(cross(n, Math.abs(n[0]) < 0.6 ? [1, 0, 0] : [0, 1, 0]));
/** Point of ring r at angle t, in the frame (perp(n), n x perp(n)). */
function pointOn(r: Ring, t: number): V3 {
  const u = perp(r.normal), v = cross(r.normal, u);
  return add(r.center, add(mul(r.radius * Math.cos(t), u), mul(r.radius * Math.sin(t), v)));
}
/** Unit tangent of ring r at angle t. */
function tangentOn(r: Ring, t: number): V3 {
  const u = perp(r.normal), v = cross(r.normal, u);
  return add(mul(-Math.sin(t), u), mul(Math.cos(t), v));
}

// ---- arbitraries -----------------------------------------------------------------------------------------------
const coord = fc.double({ min: -2, max: 2, noNaN: true });
const point = fc.tuple(coord, coord, coord) as fc.Arbitrary<V3>;
const direction = fc.tuple(coord, coord, coord).filter((v) => norm(v as V3) > 0.1).map((v) => unit(v as V3));
const radius = fc.double({ min: 0.2, max: 2, noNaN: true });
const angle = fc.double({ min: 0, max: 2 * Math.PI, noNaN: true, maxExcluded: true });
const ring = fc.record({ center: point, normal: direction, radius });

const randomFamily = fc.record({ a: ring, b: ring }) as fc.Arbitrary<KernelCase>;

/** B passes through A's centre. */
const throughCentre = fc.tuple(ring, direction, angle, radius).map(([a, nB, t, rB]): KernelCase => {
  const u = perp(nB), v = cross(nB, u);
  const toA = add(mul(Math.cos(t), u), mul(Math.sin(t), v));
  return { a, b: { center: sub(a.center, mul(rB, toA)), normal: nB, radius: rB } };
});

/**
 * B upright through A's centre: B's centre in A's plane at distance R_B from A's centre, B's plane containing A's
 * axis. Hand derivation (A in z = 0, B in y = 0 centred (R_B, 0, 0)): A(s) = R_A (cos s, sin s, 0) is at height
 * R_A sin s over B's plane and |R_A cos s - R_B| from B's axis, so by the point–circle formula (Eberly)
 * f(s) = R_A^2 where R_A cos s < R_B (every such point is nearest to B's point at A's centre), and
 * f(s) = R_A^2 - 4 R_A R_B cos s + 4 R_B^2 elsewhere; hence d = |R_A - 2 R_B| if R_B <= R_A, else d = R_A.
 * Ratios include the exact ones where the answer changes form (R_B = R_A/2 touching, R_B = R_A the tight Hopf link).
 */
const uprightThroughCentre = fc.tuple(ring, angle, fc.oneof(fc.double({ min: 0.1, max: 3, noNaN: true }), fc.constantFrom(0.5, 1, 1.5, 0.15)))
  .map(([a, t, ratio]): KernelCase => {
    const e = unit(add(mul(Math.cos(t), perp(a.normal)), mul(Math.sin(t), cross(a.normal, perp(a.normal)))));
    const rB = ratio * a.radius;
    const d = rB <= a.radius ? Math.abs(a.radius - 2 * rB) : a.radius;
    return {
      a, b: { center: add(a.center, mul(rB, e)), normal: unit(cross(a.normal, e)), radius: rB },
      expected: { d, source: 'hand derivation (upright through the centre)' },
    };
  });

/**
 * B a meridian circle of A's tube: centred on A's core, in the plane normal to A's tangent there. For
 * rho <= R_A every point of B is at distance rho from A's core (a tube cross-section; references.md: a circle on
 * the tube of the other).
 */
const meridian = fc.tuple(ring, angle, fc.oneof(fc.double({ min: 0.05, max: 1.5, noNaN: true }), fc.constantFrom(1, 0.5)))
  .map(([a, t, k]): KernelCase => {
    const rho = k * a.radius;
    const c: KernelCase = { a, b: { center: pointOn(a, t), normal: tangentOn(a, t), radius: rho } };
    if (k <= 1) c.expected = { d: rho, source: 'circle on the tube of the other (references.md)' };
    return c;
  });

/** Coaxial: d = sqrt(h^2 + (R_B - R_A)^2) (references.md, Eberly). */
const coaxial = fc.tuple(ring, fc.double({ min: -2, max: 2, noNaN: true }), radius, fc.boolean()).map(([a, h, rB, flip]): KernelCase => ({
  a, b: { center: add(a.center, mul(h, a.normal)), normal: flip ? mul(-1, a.normal) : a.normal, radius: rB },
  expected: { d: Math.hypot(h, rB - a.radius), source: 'coaxial closed form (references.md)' },
}));

/**
 * Parallel planes at height h, centres offset by e in the plane: the projections are coplanar circles at centre
 * distance e (apart: e - R_A - R_B; nested: |R_A - R_B| - e; crossing: 0), combined with h by Pythagoras
 * (references.md: parallel planes; coplanar circles). h = 0 gives the coplanar family.
 */
function planar(h: fc.Arbitrary<number>, eMax: number): fc.Arbitrary<KernelCase> {
  return fc.tuple(ring, h, fc.double({ min: 0.01, max: eMax, noNaN: true }), angle, radius, fc.boolean()).map(([a, hh, e, t, rB, flip]): KernelCase => {
    const u = add(mul(Math.cos(t), perp(a.normal)), mul(Math.sin(t), cross(a.normal, perp(a.normal))));
    const rA = a.radius;
    const planarGap = e >= rA + rB ? e - rA - rB : e <= Math.abs(rA - rB) ? Math.abs(rA - rB) - e : 0;
    return {
      a, b: { center: add(add(a.center, mul(hh, a.normal)), mul(e, u)), normal: flip ? mul(-1, a.normal) : a.normal, radius: rB },
      expected: { d: Math.hypot(hh, planarGap), source: 'parallel planes / coplanar closed form (references.md)' },
    };
  });
}
const coplanar = planar(fc.constant(0), 5);
const parallelPlanes = planar(fc.double({ min: -2, max: 2, noNaN: true }), 5);

/** Nested: B inside A in A's plane (or slightly above it): d = sqrt(h^2 + (R_A - R_B - e)^2) (references.md). */
const nested = fc.tuple(ring, fc.double({ min: 0.05, max: 0.9, noNaN: true }), fc.double({ min: 0, max: 0.9, noNaN: true }), angle,
  fc.constantFrom(0, 0, 0.1, -0.3), fc.boolean()).map(([a, kr, ke, t, h, flip]): KernelCase => {
  const rB = kr * a.radius, e = ke * (a.radius - rB);
  const u = add(mul(Math.cos(t), perp(a.normal)), mul(Math.sin(t), cross(a.normal, perp(a.normal))));
  return {
    a, b: { center: add(add(a.center, mul(h * a.radius, a.normal)), mul(e, u)), normal: flip ? mul(-1, a.normal) : a.normal, radius: rB },
    expected: { d: Math.hypot(h * a.radius, a.radius - rB - e), source: 'nested coplanar circles (references.md)' },
  };
});

/**
 * Touching: B passes through a point P of A (d = 0, a fact of the construction). Half the cases are tangent at
 * P (B's plane turned about A's tangent at P), the rest cross there.
 */
const touching = fc.tuple(ring, angle, radius, direction, fc.boolean(), angle).map(([a, t, rB, n, tangent, phi]): KernelCase => {
  const P = pointOn(a, t);
  const T = tangentOn(a, t);
  const nB = tangent ? unit(add(mul(Math.cos(phi), a.normal), mul(Math.sin(phi), cross(T, a.normal)))) : n;
  // Direction from P to B's centre: in B's plane, perpendicular to A's tangent when tangent (so B's tangent at P is T).
  const toC = tangent ? unit(cross(nB, T)) : perp(nB);
  return { a, b: { center: add(P, mul(rB, toC)), normal: nB, radius: rB }, expected: { d: 0, source: 'construction: B passes through a point of A' } };
});

/** Equal radii, centres within 2 R; one in four the tight Hopf link (d = R, Cantarella–Kusner–Sullivan 2002). */
const equalRings = fc.tuple(ring, point, direction, fc.nat(3), angle).map(([a, c, n, k, t]): KernelCase => {
  if (k === 0) {
    const e = unit(add(mul(Math.cos(t), perp(a.normal)), mul(Math.sin(t), cross(a.normal, perp(a.normal)))));
    return {
      a, b: { center: add(a.center, mul(a.radius, e)), normal: unit(cross(a.normal, e)), radius: a.radius },
      expected: { d: a.radius, source: 'tight Hopf link: each ring through the other\'s centre (references.md)' },
    };
  }
  return { a, b: { center: add(a.center, mul(a.radius / 2, c)), normal: n, radius: a.radius } };
});

/** Near-degenerate: a degenerate case with its second ring's centre and normal moved by 1e-6 .. 1e-12 of the size. */
const nearDegenerate = fc.tuple(
  fc.oneof(coaxial, uprightThroughCentre, meridian, parallelPlanes, equalRings, throughCentre),
  fc.constantFrom(1e-6, 1e-9, 1e-12), point, point,
).map(([c, eps, dc, dn]): KernelCase => {
  const size = c.a.radius + c.b.radius;
  return { a: c.a, b: { center: add(c.b.center, mul(eps * size, dc)), normal: unit(add(c.b.normal, mul(eps, dn))), radius: c.b.radius } };
});

// ---- transforms: scaled by 1e-6 and 1e6, moved 1e4 away (the answer scales / stays the same) --------------------
type Transform = { name: string; scale: number; shift: V3 };
const TRANSFORMS: Transform[] = [
  { name: '', scale: 1, shift: [0, 0, 0] },
  { name: ' x1e-6', scale: 1e-6, shift: [0, 0, 0] },
  { name: ' x1e6', scale: 1e6, shift: [0, 0, 0] },
  { name: ' moved 1e4', scale: 1, shift: [1e4, -0.6e4, 0.8e4] },
];
function transformed(c: KernelCase, t: Transform): KernelCase {
  const m = (r: Ring): Ring => ({ center: add(mul(t.scale, r.center), t.shift), normal: r.normal, radius: t.scale * r.radius });
  const out: KernelCase = { a: m(c.a), b: m(c.b) };
  if (c.expected) out.expected = { d: t.scale * c.expected.d, source: c.expected.source };
  return out;
}

// ---- the check ---------------------------------------------------------------------------------------------------
/** Distance of p from ring r: | |p - c|_in-plane - R | and height, combined (plain geometry). */
function offRing(p: ArrayLike<number>, r: Ring): number {
  const d = sub([p[0]!, p[1]!, p[2]!], r.center);
  const z = dot(d, r.normal);
  const inPlane = norm(sub(d, mul(z, r.normal)));
  return Math.hypot(z, inPlane - r.radius);
}

function fail(msg: string, c: KernelCase): never {
  throw new Error(`${msg}\n  case: ${JSON.stringify(c)}`);
}

/** Pairs of a result after merging repeats (the sampled regime may list one flat minimum more than once). */
function distinct(r: RingDistance, tol: number): { onA: number[]; onB: number[]; distance: number }[] {
  const out: { onA: number[]; onB: number[]; distance: number }[] = [];
  for (const c of r.contacts) {
    if (!out.some((k) => dist(k.onA, c.onA) <= tol && dist(k.onB, c.onB) <= tol)) out.push({ onA: c.onA, onB: c.onB, distance: c.distance });
  }
  return out;
}

/** Whether the points a result lists on one ring are spread round it (a continuum along that ring) or one point. */
function spread(points: ArrayLike<number>[], size: number): boolean {
  return points.some((p) => dist(p, points[0]!) > 1e-6 * size);
}

export function checkCase(c: KernelCase): void {
  const { a, b } = c;
  const L = a.radius + b.radius + dist(a.center, b.center);
  // Coordinates far from the origin carry an absolute rounding floor: both the kernel's points and the reference
  // work in absolute coordinates.
  const floor = 64 * EPS * Math.max(...a.center.map(Math.abs), ...b.center.map(Math.abs));
  const tolD = 1e-10 * L + floor;
  // Squared distances carry rounding of a few eps L^2 in any double-precision method (the reference's included),
  // so near touching, lengths agree only to ~sqrt(eps) L: compare those as squares.
  const sqTol = 256 * EPS * (L + floor) * (L + floor);
  const near = (d: number, e: number, tol: number): boolean => Math.abs(d - e) <= tol || Math.abs(d * d - e * e) <= sqTol;
  // The public entry point: bit for bit the same answer in either order (points exchanged).
  const p1 = ringDistance(a, b), p2 = ringDistance(b, a);
  if (p1.distance !== p2.distance || p1.degenerate !== p2.degenerate || p1.contacts.length !== p2.contacts.length
    || p1.contacts.some((k, i) => dist(k.onA, p2.contacts[i]!.onB) !== 0 || dist(k.onB, p2.contacts[i]!.onA) !== 0)) {
    fail('ringDistance(A, B) and ringDistance(B, A) differ', c);
  }
  // Each side of the method on its own (the kernel parametrising A, then B), reported in the order (A, B).
  const r1 = ringDistanceOneSided(a, b);
  const r2 = ringDistanceOneSided(b, a, true);

  // Every contact is a genuine pair: its points lie on their rings and its length is their distance, so the
  // reported distance is attained (an upper bound on the true one that needs no reference).
  for (const [r, x, y, name] of [[r1, a, b, 'A,B'], [r2, a, b, 'B,A']] as const) {
    if (r.contacts.length === 0) fail(`ringDistance(${name}) lists no contact`, c);
    let best = Infinity;
    for (const k of r.contacts) {
      if (offRing(k.onA, x) > 1e-12 * L + floor) fail(`ringDistance(${name}): contact point ${k.onA} is ${offRing(k.onA, x)} off its ring`, c);
      if (offRing(k.onB, y) > 1e-12 * L + floor) fail(`ringDistance(${name}): contact point ${k.onB} is ${offRing(k.onB, y)} off its ring`, c);
      if (Math.abs(dist(k.onA, k.onB) - k.distance) > 1e-12 * L + floor) fail(`ringDistance(${name}): contact length ${k.distance} but its points are ${dist(k.onA, k.onB)} apart`, c);
      best = Math.min(best, k.distance);
    }
    if (best !== r.distance) fail(`ringDistance(${name}): distance ${r.distance} is not its nearest contact ${best}`, c);
  }

  // Brute force from both sides (its cusp refinement follows each ring's passage by the other's axis): the
  // kernel's distance may not exceed it (no missed minimum).
  const refAB = refMinima(a, b, 2048), refBA = refMinima(b, a, 2048);
  const ref = Math.min(...refAB.map((m) => m.d), ...refBA.map((m) => m.d));
  for (const [r, name] of [[r1, 'A,B'], [r2, 'B,A']] as const) {
    if (r.distance > ref && !near(r.distance, ref, tolD)) fail(`ringDistance(${name}) = ${r.distance}, above the brute force ${ref}`, c);
  }
  if (c.expected && !near(r1.distance, c.expected.d, tolD)) fail(`distance ${r1.distance}, expected ${c.expected.d} (${c.expected.source})`, c);

  // Order independence: same distance, same degeneracy, same closest pairs (swapped).
  if (!near(r1.distance, r2.distance, 1e-12 * L + floor)) fail(`distance depends on argument order: ${r1.distance} vs ${r2.distance}`, c);
  if (r1.degenerate !== r2.degenerate) {
    // The two sides' continuum tests are different computations with the same tolerance: they may disagree only
    // on a pair within rounding of it, where the other side's minima are all at the common distance.
    const other = r1.degenerate ? r2 : r1;
    if (other.contacts.some((k) => !near(k.distance, other.distance, 1e-9 * L + floor))) {
      fail(`degenerate depends on argument order: ${r1.degenerate} vs ${r2.degenerate}`, c);
    }
    return;
  }
  if ((r1.continuum?.kind ?? null) !== (r2.continuum?.kind ?? null)) fail(`continuum kind depends on argument order: ${r1.continuum?.kind} vs ${r2.continuum?.kind}`, c);
  if (r1.degenerate) {
    // A continuum's representatives are samples of one set of closest pairs: every one is at the common
    // distance, and the same rings carry the continuum whichever ring comes first.
    for (const [r, name] of [[r1, 'A,B'], [r2, 'B,A']] as const) {
      for (const k of r.contacts) if (!near(k.distance, r.distance, tolD)) fail(`ringDistance(${name}): continuum representative at ${k.distance}, distance ${r.distance}`, c);
    }
    const s1 = [spread(r1.contacts.map((k) => k.onA), L), spread(r1.contacts.map((k) => k.onB), L)];
    const s2 = [spread(r2.contacts.map((k) => k.onA), L), spread(r2.contacts.map((k) => k.onB), L)];
    if (s1[0] !== s2[0] || s1[1] !== s2[1]) fail(`continuum runs along different rings by argument order: A,B ${s1} vs B,A ${s2}`, c);
    return;
  }
  const posTol = 1e-4 * L + floor;
  const certified = r1.certified && r2.certified;
  if (certified) {
    // Certified isolation lists every local minimum from either side: the two lists are the same pairs.
    const k1 = distinct(r1, posTol), k2 = distinct(r2, posTol);
    const match = (p: { onA: number[]; onB: number[]; distance: number }, q: { onA: number[]; onB: number[]; distance: number }[]) =>
      q.some((k) => near(k.distance, p.distance, tolD) && (dist(k.onA, p.onA) <= posTol || dist(k.onB, p.onB) <= posTol));
    for (const p of k1) if (!match(p, k2)) fail(`contact ${JSON.stringify(p)} of (A,B) missing from (B,A)`, c);
    for (const p of k2) if (!match(p, k1)) fail(`contact ${JSON.stringify(p)} of (B,A) missing from (A,B)`, c);
  }
  // Every brute-force local minimum deep enough to be resolved is a contact of both orders: the certified
  // regime promises those deeper than 1e-12 of L^2, the sampled (near-continuum) one those deeper than 1e-8.
  // Far from the origin the reference's own f jitters by ~floor L, which makes fake shallow minima at cusps.
  const minDepth = Math.max((certified ? 1e-12 : 1e-8) * L * L, 64 * floor * L);
  for (const [refs, swapped] of [[refAB, false], [refBA, true]] as const) {
    for (const m of refs) {
      if (m.depth < minDepth) continue;
      for (const [r, name] of [[r1, 'A,B'], [r2, 'B,A']] as const) {
        if (!r.contacts.some((k) => near(k.distance, m.d, tolD))) fail(`brute-force local minimum at ${m.d} (${swapped ? 'B,A' : 'A,B'} s = ${m.s}, depth ${m.depth}) missing from (${name})`, c);
      }
    }
  }
}

// ---- the families ------------------------------------------------------------------------------------------------
const BASE: Array<{ name: string; arbitrary: fc.Arbitrary<KernelCase> }> = [
  { name: 'random', arbitrary: randomFamily },
  { name: 'through the centre', arbitrary: throughCentre },
  { name: 'upright through the centre', arbitrary: uprightThroughCentre },
  { name: 'meridian', arbitrary: meridian },
  { name: 'coaxial', arbitrary: coaxial },
  { name: 'coplanar', arbitrary: coplanar },
  { name: 'touching', arbitrary: touching },
  { name: 'nested', arbitrary: nested },
  { name: 'equal rings', arbitrary: equalRings },
  { name: 'parallel planes', arbitrary: parallelPlanes },
  { name: 'near-degenerate', arbitrary: nearDegenerate },
];

export const families: Array<{ name: string; arbitrary: fc.Arbitrary<any>; check: (x: any) => void }> = BASE.flatMap((f) =>
  TRANSFORMS.map((t) => ({
    name: `kernel: ${f.name}${t.name}`,
    arbitrary: f.arbitrary.map((c) => transformed(c, t)),
    check: (x: KernelCase) => checkCase(x),
  })));
