// Locked or rattling: the tight Hopf link (Cantarella, Kusner, Sullivan, "On the minimum ropelength of knots
// and links", Invent. Math. 150, 2002: two round rings of core radius R, each through the other's centre,
// thickest tube R/2). Expected values below are derived in the comments from that geometry, or computed by an
// independent brute-force reference (tests/reference/bruteCircle.ts: dense sampling plus golden section,
// nothing shared with the kernel).
import { describe, expect, it } from 'vitest';
import { analyzePlay, type PlayReport } from '../src/analyze/play.js';
import { ringPlay } from '../src/analyze/finitePlay.js';
import { secondOrderAlong } from '../src/analyze/mobilitySecondOrder.js';
import type { RingPose } from '../src/analyze/mobilityMotion.js';
import type { Vec3 } from '../src/model/types.js';
import { planeBasis, rotate } from '../src/model/vec.js';
import { hopfRings, resultOf, transformRings, type RingSpec } from './playFixtures.js';
import { refMinima } from './reference/bruteCircle.js';
import { applyRotation, randomRotation, randomUnit, rng } from './reference/rng.js';

const poses = (rings: RingSpec[], tube: number): RingPose[] => rings.map((r) => ({ ...r, tube }));

describe('tight Hopf link at tube R/2 (Cantarella–Kusner–Sullivan 2002)', () => {
  // Contacts, derived: B(φ) = (1 + cos φ, 0, sin φ) is at distance 1 from A's core, its nearest point on A
  // being (1,0,0) (B's centre), normal u = (cos φ, 0, sin φ): every direction of the xz-plane. Symmetrically
  // A(θ) pairs with B's point (0,0,0) (A's centre), normal (cos θ, sin θ, 0): every direction of the xy-plane.
  // First order, B moved relative to A (translation v, rotation ω = (ωx, 0, ωz) in B's plane):
  //   family 1 changes by v.(cos φ, 0, sin φ): some φ closes unless vx = vz = 0;
  //   family 2 changes by -(cos θ vx + sin θ vy) - sin θ ωz ... : some θ closes unless vx = vy = ωz = 0;
  //   the twist ωx (about the line of centres) moves B(φ) along y, perpendicular to every normal: first-order free.
  // Second order, B turned by α about the x-axis: B(φ) = (1 + c, -s sin α, s cos α) with c = cos φ, s = sin φ,
  //   so ρ² = (1 + c)² + s² sin² α and the squared distance to A's core is 3 + 2c - 2ρ < 1 whenever s sin α != 0,
  //   since ρ > 1 + c: the twist closes a contact. Hence locked except for spins, by a second-order argument.
  it('is locked except for spins, with exactly one first-order flex (the twist) blocked at second order', async () => {
    const report = await analyzePlay(resultOf(hopfRings(1), 0.5, 'hopf'));
    expect(report.locked).toBe(true);
    expect(report.lockedBy).toBe('second-order');
    expect(report.freeDimension).toBe(1);
    expect(report.reversibleDimension).toBe(1);
    expect(report.secondOrder.outcome).toBe('prestress-stable');
    expect(report.secondOrder.escape).toBe(false);
    // Both rings lie on each other's tube: two sampled families.
    expect(report.mobility.continua.map((c) => c.sampledRing).sort()).toEqual(['A', 'B']);
    const twist = report.freeMotions[0]!;
    expect(twist.secondOrder).toBe('closes');
    const b = twist.rings.find((r) => r.name === 'B')!;
    expect(Math.hypot(...b.translation)).toBeLessThan(1e-6);
    expect(Math.abs(b.rotationAxis[0])).toBeCloseTo(1, 6);
  });

  it('closes a contact at first order for every translation of B and its tilt across the line of centres', () => {
    const rings = poses(hopfRings(1), 0.5);
    const r = rng(7);
    const still = { v: [0, 0, 0] as Vec3, omega: [0, 0, 0] as Vec3 };
    for (let k = 0; k < 12; k++) {
      const along = secondOrderAlong(rings, [still, { v: randomUnit(r), omega: [0, 0, 0] }], { activeTol: 1e-9 });
      expect(along.pairs[0]!.verdict).toBe('closes-first-order');
    }
    const tilt = secondOrderAlong(rings, [still, { v: [0, 0, 0], omega: [0, 0, 1] }], { activeTol: 1e-9 });
    expect(tilt.pairs[0]!.verdict).toBe('closes-first-order');
  });

  it('the twist keeps contact to first order and closes at second order with coefficient -1 per rad²', () => {
    // From the formula above: min over φ of the distance is 1 - sin² α + O(α³), so c1 = 0, c2 = -1.
    const rings = poses(hopfRings(1), 0.5);
    const still = { v: [0, 0, 0] as Vec3, omega: [0, 0, 0] as Vec3 };
    const along = secondOrderAlong(rings, [still, { v: [0, 0, 0], omega: [1, 0, 0] }], { activeTol: 1e-9 });
    const p = along.pairs[0]!;
    expect(Math.abs(p.c1)).toBeLessThan(1e-6);
    expect(p.c2).toBeCloseTo(-1, 3);
    expect(p.verdict).toBe('closes-second-order');
    expect(along.blocked).toBe(true);
  });

  it('has no finite play at R/2 (every ring, every direction)', async () => {
    const report = await analyzePlay(resultOf(hopfRings(1), 0.5, 'hopf'));
    for (const ring of report.play.rings) {
      for (const e of ring.entries) {
        expect(e.capped).toBe(false);
        // Translations close at first order; the twist closes at second order, so its play is the square root
        // of the rounding allowance (1e-11): about 3e-6 rad.
        expect(e.amount).toBeLessThan(e.kind === 'translate' ? 1e-6 : 2e-3);
      }
    }
  });
});

/** Twist play of the Hopf pair at tube t, from the closed form: first α with min over c of 3 + 2c - 2ρ = 4t². */
function twistPlayDegrees(t: number): number {
  const d2 = (alpha: number): number => {
    const S = Math.sin(alpha) ** 2;
    let best = Infinity;
    for (let i = 0; i <= 20000; i++) {
      const c = -1 + i / 10000;
      best = Math.min(best, 3 + 2 * c - 2 * Math.sqrt((1 + c) ** 2 + (1 - c * c) * S));
    }
    return best;
  };
  let lo = 0, hi = Math.PI / 2;
  for (let k = 0; k < 50; k++) {
    const mid = (lo + hi) / 2;
    if (d2(mid) >= 4 * t * t) lo = mid;
    else hi = mid;
  }
  return (lo * 180) / Math.PI;
}

/** First turn (degrees) of ring i about `axis` at which the brute-force distance drops below the tube sum. */
function bruteTurnPlay(rings: RingPose[], i: number, axis: Vec3, t: number): number {
  const j = 1 - i;
  const dist = (deg: number): number => {
    const n = rotate(rings[i]!.normal, axis, (deg * Math.PI) / 180);
    const mins = refMinima({ center: rings[i]!.center, normal: n, radius: rings[i]!.radius }, rings[j]!, 720);
    return Math.min(...mins.map((m) => m.d));
  };
  let lo = 0;
  for (let deg = 0.5; deg <= 180; deg += 0.5) {
    if (dist(deg) < 2 * t) {
      let hi = deg;
      for (let k = 0; k < 30; k++) {
        const mid = (lo + hi) / 2;
        if (dist(mid) >= 2 * t) lo = mid;
        else hi = mid;
      }
      return lo;
    }
    lo = deg;
  }
  return 180;
}

describe('the same pair at a thinner tube rattles', () => {
  it('at tube 0.3 R is free, with positive play in every direction, matching closed forms and brute force', async () => {
    const t = 0.3;
    const report = await analyzePlay(resultOf(hopfRings(1), 0.5, 'hopf'), { tube: t });
    expect(report.locked).toBe(false);
    expect(report.mobility.activeContacts).toBe(0);
    // 2 rings x 5 (translation + two tilts; spin dropped) - 6 whole-set motions.
    expect(report.freeDimension).toBe(4);
    const rings = poses(hopfRings(1), t);
    for (const [i, ring] of report.play.rings.entries()) {
      for (const e of ring.entries) {
        expect(e.amount).toBeGreaterThan(0);
        if (e.kind === 'translate') {
          // Derived: A moved by s along any axis keeps B's point (0,0,0) at distance 1 - |s| from A's core and no
          // point of B comes closer (the squared distance 1 + 2u + s² - 2 sqrt(u² + s²), u = 1 + cos φ, grows with
          // u for ±y; similarly for ±x, ±z), so the play is 1 - 2t. B is A's mirror under (x,y,z) -> (1-x, z, y).
          expect(e.amount).toBeCloseTo(1 - 2 * t, 6);
        }
      }
      const twist = twistPlayDegrees(t);
      const u = ring.entries.filter((e) => e.direction.endsWith('u'));
      for (const e of u) expect(e.amount).toBeCloseTo(twist, 2);
      const v = ring.entries.filter((e) => e.direction.endsWith('v'));
      const ref = bruteTurnPlay(rings, i, planeBasis(rings[i]!.normal)[1], t);
      for (const e of v) expect(Math.abs(e.amount - ref)).toBeLessThan(0.05);
    }
  });

  it('play shrinks monotonically to 0 as the tube approaches R/2', async () => {
    const tubes = [0.3, 0.4, 0.45, 0.49, 0.499];
    const reports: PlayReport[] = [];
    for (const t of tubes) reports.push(await analyzePlay(resultOf(hopfRings(1), 0.5, 'hopf'), { tube: t }));
    for (let k = 1; k < reports.length; k++) {
      reports[k]!.play.rings.forEach((ring, i) => ring.entries.forEach((e, j) => {
        expect(e.amount).toBeLessThanOrEqual(reports[k - 1]!.play.rings[i]!.entries[j]!.amount + 1e-9);
      }));
    }
    const last = reports[reports.length - 1]!;
    for (const ring of last.play.rings) {
      for (const e of ring.entries) {
        // Translations: 1 - 2t = 0.002 (derived above); the twist: the closed form, about 2.6 degrees.
        if (e.kind === 'translate') expect(e.amount).toBeCloseTo(0.002, 6);
        else expect(e.amount).toBeLessThan(4);
      }
    }
  });
});

describe('invariance under a rigid motion of the whole layout (house style: every fixture transformed)', () => {
  it('gives the same verdict, dimensions and play along the moved axes', async () => {
    const r = rng(2024);
    const Q = randomRotation(r);
    const shift: Vec3 = [3 * r() - 1.5, 3 * r() - 1.5, 3 * r() - 1.5];
    const base = hopfRings(1);
    const moved = transformRings(base, Q, shift);
    for (const t of [0.5, 0.35]) {
      const a = await analyzePlay(resultOf(base, 0.5), { tube: t });
      const b = await analyzePlay(resultOf(moved, 0.5), { tube: t });
      expect(b.locked).toBe(a.locked);
      expect(b.lockedBy).toBe(a.lockedBy);
      expect(b.freeDimension).toBe(a.freeDimension);
      expect(b.reversibleDimension).toBe(a.reversibleDimension);
      expect(b.secondOrder.outcome).toBe(a.secondOrder.outcome);
      // The table's axes are the layout's, so compare play along the rotated axes directly.
      const pa = poses(base, t), pb = poses(moved, t);
      for (let i = 0; i < 2; i++) {
        for (const axis of [[1, 0, 0], [0, -1, 0], [0, 0, 1]] as Vec3[]) {
          const ea = ringPlay(pa, i, 'translate', axis, 4, 1e-9);
          const eb = ringPlay(pb, i, 'translate', applyRotation(Q, axis), 4, 1e-9);
          expect(eb.amount).toBeCloseTo(ea.amount, 6);
        }
        const [u] = planeBasis(pa[i]!.normal);
        const ta = ringPlay(pa, i, 'rotate', u, 180, 1e-9);
        const tb = ringPlay(pb, i, 'rotate', applyRotation(Q, u), 180, 1e-9);
        expect(Math.abs(tb.amount - ta.amount)).toBeLessThan(t === 0.5 ? 2e-3 : 1e-4);
      }
    }
  });

  it('does not depend on the order of the rings', async () => {
    const base = hopfRings(1);
    for (const t of [0.5, 0.35]) {
      const a = await analyzePlay(resultOf(base, 0.5), { tube: t });
      const b = await analyzePlay(resultOf([base[1]!, base[0]!], 0.5), { tube: t });
      expect(b.locked).toBe(a.locked);
      expect(b.freeDimension).toBe(a.freeDimension);
      for (const ring of a.play.rings) {
        const other = b.play.rings.find((r) => r.name === ring.name)!;
        ring.entries.forEach((e, j) => expect(other.entries[j]!.amount).toBeCloseTo(e.amount, 6));
      }
    }
  });

  it('scales lengths and keeps angles when the layout is scaled by 1e3', async () => {
    const big = hopfRings(1000);
    const a = await analyzePlay(resultOf(hopfRings(1), 0.5), { tube: 0.4 });
    const b = await analyzePlay(resultOf(big, 500), { tube: 400 });
    expect(b.locked).toBe(a.locked);
    expect(b.freeDimension).toBe(a.freeDimension);
    a.play.rings.forEach((ring, i) => ring.entries.forEach((e, j) => {
      const f = b.play.rings[i]!.entries[j]!;
      if (e.kind === 'translate') expect(f.amount / 1000).toBeCloseTo(e.amount, 6);
      else expect(f.amount).toBeCloseTo(e.amount, 3);
    }));
  });
});

describe('a periodic chain (lattice): copies in neighbouring cells count', () => {
  // Alternating chain of radius-1 rings: A flat at 0, B upright (xz-plane) at (d, 0, 0), period (2d, 0, 0).
  // With B centred at c on the x-axis (1 < c < 2), its points (c + cos φ, 0, sin φ) have squared distance
  // (c - 1)² + 1 + 2 (c - 1) cos φ to A's core, smallest at cos φ = -1: distance 2 - c. B and its own copy
  // 2d away are coplanar circles, 2d - 2 apart. So with d = 4/3 and tube t, B moving by s along -x meets the
  // next A (2d away) at clearance 2/3 - s - 2t, and along +x meets A and its own copy at the same clearance:
  // play 2/3 - 2t both ways. Without the copies, B could go -x until its centre is 2t from A's: 5/6 at t = 1/4.
  const d = 4 / 3, t = 0.25;
  const cell: RingSpec[] = [
    { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 },
    { name: 'B', center: [d, 0, 0], normal: [0, 1, 0], radius: 1 },
  ];
  const periodic = { ...resultOf(cell, t, 'chain'), lattice: { vectors: [[2 * d, 0, 0] as Vec3] } };

  it('limits the play of B by the next cell, as the closed form says, and matches the unrolled chain', async () => {
    const report = await analyzePlay(periodic);
    const b = report.play.rings[1]!;
    const plusX = b.entries.find((e) => e.direction === '+x')!, minusX = b.entries.find((e) => e.direction === '-x')!;
    expect(plusX.amount).toBeCloseTo(2 / 3 - 2 * t, 6);
    expect(minusX.amount).toBeCloseTo(2 / 3 - 2 * t, 6);
    const alone = await analyzePlay(resultOf(cell, t));
    expect(alone.play.rings[1]!.entries.find((e) => e.direction === '-x')!.amount).toBeCloseTo(5 / 6, 6);
    // The same chain written out: every neighbour of B within reach, no lattice.
    const unrolled: RingSpec[] = [-2, -1, 0, 1, 2].flatMap((k) => cell.map((r) => ({
      ...r, name: `${r.name}${k}`, center: [r.center[0] + 2 * d * k, 0, 0] as Vec3,
    })));
    const flat = await analyzePlay(resultOf(unrolled, t));
    const bFlat = flat.play.rings.find((r) => r.name === 'B0')!;
    b.entries.forEach((e, j) => expect(bFlat.entries[j]!.amount).toBeCloseTo(e.amount, 6));
  });

  it('counts periodic motions modulo translations and the turn about the chain axis', async () => {
    // No contact at t = 1/4; 2 rings x 5 coordinates, minus 3 translations and 1 turn about the period.
    const report = await analyzePlay(periodic);
    expect(report.mobility.activeContacts).toBe(0);
    expect(report.freeDimension).toBe(2 * 5 - 4);
  });
});
