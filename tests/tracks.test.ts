// Contact tracks and relative motions. Sources: the tight Hopf link (Cantarella, Kusner, Sullivan,
// Invent. Math. 150, 2002: every point of one core at distance 2r from the other core); point-circle
// distance (Eberly, "Distance to Circles in 3D": d^2 = (N.D)^2 + (|D - (N.D)N| - R)^2); the
// Aronhold-Kennedy theorem (the instant centre of two parallel-axis rotations lies on the line of
// centres, dividing it inversely to the angular speeds: Litvin & Fuentes, "Gear Geometry and Applied
// Theory", 2004, ch. 3); the cylindroid (Ball, "A Treatise on the Theory of Screws", 1900; Hunt,
// "Kinematic Geometry of Mechanisms", 1978): two zero-pitch screws on perpendicular axes a distance d
// apart with amplitudes w1, w2 combine into a screw of pitch d sin(2 theta) / 2, tan theta = w2 / w1
// (from memory, and checked here also against finite differences of the composed rotations); the
// inverse of a screw motion has the same pitch (Chasles).
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import { bodyFrame, relativeMotion, relativePoint, toWorld, type Spin } from '../src/fabricate/motion.js';
import { buildTracks, type TracksDocument } from '../src/fabricate/tracks.js';
import type { SolveResult } from '../src/model/result.js';
import type { Vec3 } from '../src/model/types.js';
import { rotate } from '../src/model/vec.js';
import { captureIo, makeResult, pointCircleDistance, tempDir, threeChain, tightHopf, writeResult } from './fabricateFixtures.js';

const schema = JSON.parse(readFileSync(new URL('../schemas/tracks.schema.json', import.meta.url), 'utf8')) as object;
const validate = new Ajv2020({ allErrors: true }).compile(schema);

/** Rigid motion plus scale of a whole result: rotate about unit k by angle, scale by s, translate by t. */
function transformResult(r: SolveResult, k: Vec3, angle: number, s: number, t: Vec3): SolveResult {
  const P = (p: Vec3): Vec3 => {
    const q = rotate(p, k, angle);
    return [q[0] * s + t[0], q[1] * s + t[1], q[2] * s + t[2]];
  };
  return {
    ...r,
    tube: r.tube * s,
    rings: r.rings.map((g) => ({ ...g, center: P(g.center), normal: rotate(g.normal, k, angle), radius: g.radius * s, tube: g.tube * s })),
    contacts: r.contacts.map((c) => ({ ...c, onA: P(c.onA), onB: P(c.onB), distance: c.distance * s })),
  };
}

const unitK: Vec3 = (() => {
  const l = Math.hypot(1, 2, 2);
  return [1 / l, 2 / l, 2 / l];
})();

function coaxialPair(): SolveResult {
  // Coaxial circles of equal radius 1 at heights 0 and 2: distance sqrt(h^2 + (R1 - R0)^2) = 2 along
  // the whole circle (Eberly, coaxial case), so tubes of 1 touch along a circle.
  return makeResult(
    'stack',
    [
      { name: 'P', center: [0, 0, 0], normal: [0, 0, 1], radius: 1, tube: 1 },
      { name: 'Q', center: [0, 0, 2], normal: [0, 0, 1], radius: 1, tube: 1 },
    ],
    [{ a: 0, b: 1, onA: [1, 0, 0], onB: [1, 0, 2], distance: 2, force: 1, continuum: true }],
    [[0, 0], [0, 0]],
  );
}

describe('contact points', () => {
  for (const [label, result] of [
    ['tight Hopf', tightHopf()],
    ['tight Hopf rotated, scaled 1e3 and moved', transformResult(tightHopf(), unitK, 0.7, 1e3, [5, -3, 2])],
    ['tight Hopf scaled 1e-3', transformResult(tightHopf(), unitK, -2.1, 1e-3, [0, 1, 0])],
    ['three-chain at the packing bound', threeChain()],
  ] as const) {
    it(`${label}: every contact lies on both tube surfaces (to 1e-9 relative)`, () => {
      const doc = buildTracks(result, { ratio: [1, 1], samples: 8 });
      const scale = result.rings[0]!.radius;
      let count = 0;
      for (const ring of doc.rings) {
        const self = result.rings[ring.index]!;
        for (const n of ring.neighbours) {
          const other = result.rings[n.index]!;
          for (const c of n.contacts) {
            const w = toWorld(ring.frame, c.point);
            for (let d = 0; d < 3; d++) expect(Math.abs(w[d]! - c.world[d]!)).toBeLessThan(1e-12 * scale);
            expect(Math.abs(pointCircleDistance(c.world, self.center, self.normal, self.radius) - self.tube)).toBeLessThan(1e-9 * scale);
            expect(Math.abs(pointCircleDistance(c.world, other.center, other.normal, other.radius) - other.tube)).toBeLessThan(1e-9 * scale);
            expect(Math.abs(c.gap)).toBeLessThan(1e-9 * scale);
            count++;
          }
        }
      }
      expect(count).toBe(2 * result.contacts.length);
    });
  }

  it('tight Hopf: tube angles are frame-free and survive rotation and scaling', () => {
    const a = buildTracks(tightHopf(), { ratio: [1, 1], samples: 8 });
    const b = buildTracks(transformResult(tightHopf(), unitK, 0.7, 1e3, [5, -3, 2]), { ratio: [1, 1], samples: 8 });
    const wrap = (v: number) => ((v % (2 * Math.PI)) + 2 * Math.PI) % (2 * Math.PI);
    const angles = (d: TracksDocument) =>
      d.rings.flatMap((r) => r.neighbours.flatMap((n) => n.contacts.map((c) => wrap(c.tubeAngle)))).sort((p, q) => p - q);
    const x = angles(a), y = angles(b);
    x.forEach((v, i) => expect(Math.abs(Math.atan2(Math.sin(v - y[i]!), Math.cos(v - y[i]!)))).toBeLessThan(1e-9));
  });

  it('each contact lies on its track circle, and the track lies on the ring tube', () => {
    const doc = buildTracks(tightHopf(), { ratio: [1, 1], samples: 12 });
    for (const ring of doc.rings) {
      for (const n of ring.neighbours) {
        for (const c of n.contacts) {
          const t = n.tracks[c.track]!;
          expect(Math.hypot(c.point[0], c.point[1])).toBeCloseTo(t.radius, 12);
          expect(c.point[2]).toBeCloseTo(t.center[2], 12);
        }
        for (const t of n.tracks) {
          expect(t.samples.length).toBe(12);
          for (const p of t.samples) expect(pointCircleDistance(p, [0, 0, 0], [0, 0, 1], ring.radius)).toBeCloseTo(ring.tube, 12);
        }
      }
    }
  });
});

describe('relative motion', () => {
  it('a ring relative to itself is the identity, at every time', () => {
    const f = bodyFrame([1, 2, 3], [0.2, -0.5, 0.7]);
    const spin: Spin = { center: [1, 2, 3], axis: f.axis, omega: 1.7 };
    const m = relativeMotion(spin, f, spin, 1);
    expect(m.kind).toBe('identity');
    expect(m.angularSpeed).toBe(0);
    const p: Vec3 = [2, -1, 0.5];
    const p0 = relativePoint(spin, f, spin, p, 0);
    for (const t of [0.3, 1.1, 4]) {
      const q = relativePoint(spin, f, spin, p, t);
      for (let d = 0; d < 3; d++) expect(q[d]).toBeCloseTo(p0[d]!, 12);
    }
  });

  it('two rings with parallel axes turning about a common axis: plain rotation, pitch 0', () => {
    const doc = buildTracks(coaxialPair(), { ratio: [1, 3], samples: 8 });
    const m = doc.rings[0]!.neighbours[0]!.motion;
    expect(m.kind).toBe('rotation');
    expect(m.pitch).toBe(0);
    expect(m.plainRotation).toBe(true);
    expect(m.axisFixed).toBe(true);
    expect(m.angularSpeed).toBeCloseTo(2, 12);
    expect(Math.abs(m.axisDirection![2])).toBeCloseTo(1, 12);
    expect(Math.hypot(m.axisPoint![0], m.axisPoint![1])).toBeLessThan(1e-12);
    // Swept core circle of Q in P's frame at time t: the t = 0 curve turned by (3 - 1) t about z.
    const sw = doc.rings[0]!.neighbours[0]!.swept;
    sw.times.forEach((t, s) => {
      sw.coreCurve[s]!.forEach((q, k) => {
        const expected = rotate(sw.coreCurve[0]![k]!, [0, 0, 1], 2 * t);
        for (let d = 0; d < 3; d++) expect(q[d]).toBeCloseTo(expected[d], 12);
      });
    });
  });

  it('parallel, non-coaxial axes: equal speeds translate, unequal speeds turn about the Aronhold-Kennedy instant centre', () => {
    const chain = threeChain();
    const same = buildTracks(chain, { ratio: [1, 1], samples: 8 }).rings[0]!.neighbours.find((n) => n.name === 'C')!.motion;
    expect(same.kind).toBe('translation');
    const m = buildTracks(chain, { ratio: [1, 2], samples: 8 }).rings[0]!.neighbours.find((n) => n.name === 'C')!.motion;
    expect(m.kind).toBe('rotation');
    expect(m.pitch).toBe(0);
    expect(m.plainRotation).toBe(false);
    // Instant centre p with 1 (p - cA) = 2 (p - cC): p = 2 cC - cA = (4, 0, 0); A's frame is the world frame shifted by cA.
    expect(m.axisPoint![0]).toBeCloseTo(4 + 4 / 3, 12);
    expect(m.axisPoint![1]).toBeCloseTo(0, 12);
    expect(m.angularSpeed).toBeCloseTo(1, 12);
    expect(m.shaftAngle).toBeCloseTo(0, 12);
    expect(m.axisOffset).toBeCloseTo(8 / 3, 12);
  });

  for (const [w1, w2, label, result, i, j, d] of [
    [1, 1, 'tight Hopf 1:1', tightHopf(), 0, 1, 1],
    [1, 2, 'three-chain A-B 1:2', threeChain(), 0, 1, 4 / 3],
    [3, -2, 'tight Hopf 3:-2', tightHopf(), 0, 1, 1],
  ] as const) {
    it(`perpendicular axes (${label}): pitch from the cylindroid, velocities match finite differences`, () => {
      const doc = buildTracks(result, { ratio: [w1, w2], samples: 8 });
      const ring = doc.rings[i]!;
      const n = ring.neighbours.find((x) => x.index === j)!;
      const m = n.motion;
      expect(m.kind).toBe('screw');
      expect(m.shaftAngle).toBeCloseTo(Math.PI / 2, 12);
      expect(m.axisOffset).toBeCloseTo(d, 12);
      const theta = Math.atan2(Math.abs(w2), Math.abs(w1));
      expect(Math.abs(m.pitch!)).toBeCloseTo((d * Math.sin(2 * theta)) / 2, 12);
      expect(m.angularSpeed).toBeCloseTo(Math.hypot(w1, w2), 12);
      // Central differences of the composed finite rotations at t = 0 against v(x) = W x (x - p) + h W.
      const self: Spin = { center: result.rings[i]!.center, axis: ring.frame.axis, omega: w1 };
      const other: Spin = { center: result.rings[j]!.center, axis: doc.rings[j]!.frame.axis, omega: w2 };
      const W = m.axisDirection!.map((x) => x * m.angularSpeed) as Vec3;
      const dt = 1e-5;
      for (const p of [[0.3, 0.1, -0.2], [2, -1, 0.5], [0, 0, 1]] as Vec3[]) {
        const world = toWorld(doc.rings[i]!.frame, p);
        const a = relativePoint(self, ring.frame, other, world, dt), b = relativePoint(self, ring.frame, other, world, -dt);
        const fd = [0, 1, 2].map((k) => (a[k]! - b[k]!) / (2 * dt));
        const r = [p[0] - m.axisPoint![0], p[1] - m.axisPoint![1], p[2] - m.axisPoint![2]];
        const v = [
          W[1] * r[2]! - W[2] * r[1]! + m.pitch! * W[0],
          W[2] * r[0]! - W[0] * r[2]! + m.pitch! * W[1],
          W[0] * r[1]! - W[1] * r[0]! + m.pitch! * W[2],
        ];
        for (let k = 0; k < 3; k++) expect(Math.abs(fd[k]! - v[k]!)).toBeLessThan(1e-7);
      }
      // Seen from the other ring the motion is the inverse screw: same pitch and speed.
      const back = doc.rings[j]!.neighbours.find((x) => x.index === i)!.motion;
      expect(back.pitch!).toBeCloseTo(m.pitch!, 12);
      expect(back.angularSpeed).toBeCloseTo(m.angularSpeed, 12);
    });
  }

  it('the swept motion is periodic: after one period the neighbour is back where it started', () => {
    const r = threeChain();
    const doc = buildTracks(r, { ratio: [2, 3], samples: 8 });
    const ring = doc.rings[1]!, n = ring.neighbours[0]!;
    const self: Spin = { center: r.rings[1]!.center, axis: ring.frame.axis, omega: n.motion.omegaSelf };
    const other: Spin = { center: r.rings[0]!.center, axis: doc.rings[0]!.frame.axis, omega: n.motion.omegaNeighbour };
    const p: Vec3 = [0.2, 0.4, -0.1];
    const a = relativePoint(self, ring.frame, other, p, 0), b = relativePoint(self, ring.frame, other, p, n.motion.period);
    for (let k = 0; k < 3; k++) expect(b[k]).toBeCloseTo(a[k]!, 10);
  });

  it('closest-approach curves lie on the neighbour tube and are nearest this ring among brute-force meridian samples', () => {
    for (const [r, i, j] of [[threeChain(), 1, 0], [tightHopf(), 0, 1]] as const) {
      const doc = buildTracks(r, { ratio: [2, 3], samples: 6 });
      const ring = doc.rings[i]!, n = ring.neighbours.find((x) => x.index === j)!;
      const self: Spin = { center: r.rings[i]!.center, axis: ring.frame.axis, omega: n.motion.omegaSelf };
      const o = r.rings[j]!;
      n.swept.closestApproach.forEach((curve, s) => {
        const t = n.swept.times[s]!;
        curve.forEach((q, k) => {
          // Back to world at time t; the neighbour's tube is the same set at every time (it spins about its own axis).
          const wq = toWorld(ring.frame, q);
          const back = rotate([wq[0] - self.center[0], wq[1] - self.center[1], wq[2] - self.center[2]], self.axis, self.omega * t);
          const pt: Vec3 = [back[0] + self.center[0], back[1] + self.center[1], back[2] + self.center[2]];
          expect(pointCircleDistance(pt, o.center, o.normal, o.radius)).toBeCloseTo(o.tube, 12);
          // Brute force over the meridian circle through the core point (centre c, spanned by radial and axial units).
          const c = n.swept.coreCurve[s]![k]!;
          const u = [q[0] - c[0], q[1] - c[1], q[2] - c[2]];
          const dist = (p: ArrayLike<number>) => pointCircleDistance(p, [0, 0, 0], [0, 0, 1], ring.radius);
          const found = dist(q);
          // The meridian plane is normal to the core tangent; rotate u within it by sampled angles.
          const tangent = (() => {
            const next = n.swept.coreCurve[s]![(k + 1) % curve.length]!, prev = n.swept.coreCurve[s]![(k + curve.length - 1) % curve.length]!;
            const d = [next[0] - prev[0], next[1] - prev[1], next[2] - prev[2]];
            const l = Math.hypot(d[0]!, d[1]!, d[2]!);
            return [d[0]! / l, d[1]! / l, d[2]! / l] as Vec3;
          })();
          let brute = Infinity;
          for (let m = 0; m < 3600; m++) {
            const w = rotate(u, tangent, (2 * Math.PI * m) / 3600);
            brute = Math.min(brute, dist([c[0] + w[0], c[1] + w[1], c[2] + w[2]]));
          }
          expect(found).toBeLessThanOrEqual(brute + 1e-9);
          expect(brute - found).toBeLessThan(1e-5);
        });
      });
      if (i === 0) {
        // Tight Hopf: every meridian of B comes within exactly r of A's core (the tubes touch all round).
        for (const q of n.swept.closestApproach.flat()) expect(pointCircleDistance(q, [0, 0, 0], [0, 0, 1], 1)).toBeCloseTo(0.5, 9);
      }
    }
  });
});

describe('tracks file (schemas/tracks.schema.json, ajv draft 2020-12)', () => {
  it('CLI writes a file the schema accepts; --json prints one summary object', async () => {
    const dir = tempDir('tracks');
    for (const [name, result] of [['hopf.json', tightHopf()], ['chain.json', threeChain()], ['stack.json', coaxialPair()]] as const) {
      const path = writeResult(dir, name, result);
      const out = join(dir, `tracks-${name}`);
      const io = captureIo();
      expect(await main(['tracks', path, '-o', out, '--samples', '6', '--ratio', '2:4', '--json'], io)).toBe(0);
      expect(io.stdout.length).toBe(1);
      const summary = JSON.parse(io.stdout[0]!) as { ratio: number[]; tube: number; status: string; rings: unknown[] };
      expect(summary.ratio).toEqual([1, 2]);
      expect(summary.status).toBe('optimal');
      const doc = JSON.parse(readFileSync(out, 'utf8')) as unknown;
      const ok = validate(doc);
      expect(validate.errors ?? []).toEqual([]);
      expect(ok).toBe(true);
    }
  });

  it('the schema rejects a document with a missing motion', () => {
    const doc = JSON.parse(JSON.stringify(buildTracks(tightHopf(), { ratio: [1, 1], samples: 4 }))) as { rings: { neighbours: Record<string, unknown>[] }[] };
    expect(validate(doc)).toBe(true);
    delete doc.rings[0]!.neighbours[0]!['motion'];
    expect(validate(doc)).toBe(false);
  });

  it('text mode names units and angles', async () => {
    const dir = tempDir('tracks-text');
    const path = writeResult(dir, 'hopf.json', tightHopf());
    const io = captureIo();
    expect(await main(['tracks', path, '-o', join(dir, 't.json'), '--samples', '4'], io)).toBe(0);
    const text = io.stdout.join('\n');
    expect(text).toMatch(/tube angle -?\d+\.\d+ deg/);
    expect(text).toMatch(/pitch -?[\d.]+ layout units per radian/);
  });
});

describe('tracks: bad input exits 2 and writes nothing', () => {
  const dir = tempDir('tracks-bad');
  const good = writeResult(dir, 'hopf.json', tightHopf());
  const layout = writeResult(dir, 'layout.json', { format: 'thickring-layout/1', rings: [] });
  const cases: [string, string[], RegExp][] = [
    ['foreign file', ['tracks', layout, '-o', join(dir, 'a.json')], /expected format "thickring-result\/1"/],
    ['newer version', ['tracks', writeResult(dir, 'v2.json', { ...tightHopf(), format: 'thickring-result/2' }), '-o', join(dir, 'b.json')], /thickring-result\/2.*"thickring-result\/1"/],
    ['unreadable file', ['tracks', join(dir, 'missing.json'), '-o', join(dir, 'c.json')], /cannot be read/],
    ['zero in the ratio', ['tracks', good, '-o', join(dir, 'd.json'), '--ratio', '1:0'], /--ratio/],
    ['ratio not a:b', ['tracks', good, '-o', join(dir, 'e.json'), '--ratio', 'fast'], /--ratio/],
    ['too few samples', ['tracks', good, '-o', join(dir, 'f.json'), '--samples', '2'], /--samples/],
    ['samples not a number', ['tracks', good, '-o', join(dir, 'g.json'), '--samples', 'many'], /--samples/],
  ];
  for (const [label, args, message] of cases) {
    it(label, async () => {
      const io = captureIo();
      expect(await main(args, io)).toBe(2);
      expect(io.stderr.join('\n')).toMatch(message);
      expect(io.stdout).toEqual([]);
      expect(existsSync(args[args.indexOf('-o') + 1]!)).toBe(false);
    });
  }

  it('missing -o', async () => {
    const io = captureIo();
    expect(await main(['tracks', good], io)).toBe(2);
    expect(io.stderr.join('\n')).toMatch(/-o\/--output FILE is required/);
  });
});

describe('tracks text: no rounding noise', () => {
  it('angles to 0.1 degree (no -0.0), gaps below 1e-9 of the tube shown as 0', async () => {
    const { deg, g } = await import('../cli/tracks.js');
    // pi/6 rad = 30 degrees exactly (definition of the radian).
    expect(deg(Math.PI / 6)).toBe('30.0');
    expect(deg(-1e-12)).toBe('0.0');
    expect(deg((168.5649 * Math.PI) / 180)).toBe('168.6');
    expect(g(3.3307e-16, 0.32)).toBe('0');
    expect(g(0.0123456, 0.32)).toBe('0.012346');
  });
});
