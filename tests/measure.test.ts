// `thickring measure`: figures checked against closed forms and a brute-force reference, and the
// command run through cli/main with a capturing Io (no process spawned).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import type { Io } from '../cli/io.js';
import { measureLayout } from '../src/analyze/measure.js';
import { LAYOUT_FORMAT, parseLayout } from '../src/model/layout.js';
import type { Vec3 } from '../src/model/types.js';
import { seededRandom as mulberry32 } from '../src/model/random.js';

type Json = Record<string, unknown>;
const ring = (name: string, center: Vec3, normal: Vec3, radius: number, tube?: number): Json =>
  tube === undefined ? { name, center, normal, radius } : { name, center, normal, radius, tube };
const layoutOf = (rings: Json[], extra: Json = {}): Json => ({ format: LAYOUT_FORMAT, ...extra, rings });
const measure = (data: Json) => measureLayout(parseLayout(data, 'test.json'));

describe('measureLayout against closed forms', () => {
  it('coaxial circles at height h: d = sqrt(h^2 + (R1 - R0)^2), tube d/2 (Eberly, "Distance to Circles in 3D")', () => {
    const h = 1.5, R0 = 2, R1 = 3;
    const m = measure(layoutOf([ring('A', [0, 0, 0], [0, 0, 1], R0), ring('B', [0, 0, h], [0, 0, 1], R1)], { units: 'mm' }));
    const d = Math.sqrt(h * h + (R1 - R0) ** 2);
    expect(m.pairs[0]!.distance).toBeCloseTo(d, 10);
    expect(m.pairs[0]!.continuum?.kind).toBe('coaxial');
    expect(m.tube).toBeCloseTo(d / 2, 10);
    expect(m.limitedBy).toEqual({ rings: [], pairs: [{ a: 'A', b: 'B' }] });
    // The headline is the smallest aspect ratio over the rings (design contract): the smaller ring, (R0 - t) / t.
    expect(m.aspectRatio).toBeCloseTo((R0 - d / 2) / (d / 2), 9);
    expect(m.aspectRatioRing).toBe('A');
    expect(m.units).toBe('mm');
    expect(m.linking).toEqual([[0, 0], [0, 0]]);
    expect(m.unheld).toEqual(['A', 'B']);
  });

  it('tight Hopf link (each circle through the other\'s centre, perpendicular planes) allows tube R/2 (Cantarella–Kusner–Sullivan 2002)', () => {
    const R = 10;
    const m = measure(layoutOf([ring('A', [0, 0, 0], [0, 0, 1], R), ring('B', [R, 0, 0], [0, 1, 0], R)]));
    expect(m.tube).toBeCloseTo(R / 2, 9);
    expect(m.tubeOverCore).toBeCloseTo(0.5, 9);
    // Every point of B is at distance R from A (point–circle formula), so the closest pairs form a continuum.
    expect(m.pairs[0]!.continuum?.kind).toBe('on-tube');
    expect(Math.abs(m.pairs[0]!.linking)).toBe(1);
    expect(m.limitedBy.pairs).toEqual([{ a: 'A', b: 'B' }]);
    // (R - R/2) / (R/2) = 1.
    expect(m.aspectRatio).toBeCloseTo(1, 9);
    expect(m.components).toEqual([['A', 'B']]);
    expect(m.unheld).toEqual([]);
    expect(m.units).toBeNull();
  });

  it('a ring can be the limit: r <= R (Gonzalez–Maddocks 1999 thickness)', () => {
    const m = measure(layoutOf([ring('A', [0, 0, 0], [0, 0, 1], 10), ring('B', [10, 0, 0], [0, 1, 0], 10), ring('C', [40, 0, 0], [0, 1, 0], 3)]));
    expect(m.tube).toBe(3);
    expect(m.limitedBy).toEqual({ rings: ['C'], pairs: [] });
    expect(m.rings.find((r) => r.name === 'C')!.aspectRatio).toBe(0);
    expect(m.unheld).toEqual(['C']);
    expect(m.notes.join(' ')).toMatch(/Not held by any link: C/);
  });

  it('different per-ring tubes are ratios: t = min(R_i/ρ_i, d/(ρ_a+ρ_b)) on the coaxial closed form', () => {
    const h = 1.5, R0 = 2, R1 = 3;
    const d = Math.sqrt(h * h + (R1 - R0) ** 2);
    const m = measure(layoutOf([ring('A', [0, 0, 0], [0, 0, 1], R0, 1), ring('B', [0, 0, h], [0, 0, 1], R1, 0.5)]));
    expect(m.ratiosFromLayout).toBe(true);
    expect(m.tubeRatios).toEqual([1, 0.5]);
    expect(m.tube).toBeCloseTo(Math.min(R0, R1 / 0.5, d / 1.5), 10);
    expect(m.rings[1]!.tube).toBeCloseTo(m.tube / 2, 12);
    expect(m.given).toEqual({ tube: 1, fits: m.tube >= 1 });
    expect(m.notes.join(' ')).toMatch(/read as ratios/);
  });

  it('lattice chain with spacing s in (1, 2) for unit rings: link distance 2 - s, same-plane neighbours 2s - 2 (point–circle formula)', () => {
    const s = 1.5;
    // A in z=0 at 0, B in y=0 at s; cell length 2s. B's point (s-1, 0, 0) is 2 - s from A's core; nothing is closer.
    const m = measure(layoutOf([ring('A', [0, 0, 0], [0, 0, 1], 1), ring('B', [s, 0, 0], [0, 1, 0], 1)], { lattice: { vectors: [[2 * s, 0, 0]] } }));
    expect(m.tube).toBeCloseTo((2 - s) / 2, 9);
    const self = m.pairs.find((p) => p.a === 0 && p.b === 0 && p.shift?.[0] === 1)!;
    expect(self.distance).toBeCloseTo(2 * s - 2, 9);
    const across = m.pairs.find((p) => p.a === 0 && p.b === 1 && p.shift?.[0] === -1)!;
    expect(across.distance).toBeCloseTo(2 - s, 9);
    expect(Math.abs(across.linking)).toBe(1);
    // Both the in-cell pair and the pair across the cell boundary limit the tube.
    expect(m.limitedBy.pairs).toEqual([{ a: 'A', b: 'B' }, { a: 'A', b: 'B', shift: [-1] }]);
  });

  it('agrees with a brute-force sampled distance on seeded random 3-ring layouts, and is invariant under motion and scale', () => {
    const rnd = mulberry32(7);
    let done = 0;
    while (done < 12) {
      const rings = ['A', 'B', 'C'].map((name) =>
        ring(name, [3 * rnd(), 3 * rnd(), 3 * rnd()], unitV([rnd() - 0.5, rnd() - 0.5, rnd() - 0.5]), 0.8 + rnd()));
      let m;
      try {
        m = measure(layoutOf(rings));
      } catch {
        continue; // intersecting draw
      }
      if (m.tube < 0.05) continue; // nearly touching: the sampled reference cannot resolve it
      done++;
      // Independent reference: min over rings of R and over pairs of half the sampled core distance
      // (720 x 720 grid; sampling over-estimates the distance by O(h^2 R)).
      let ref = Math.min(...rings.map((r) => r.radius as number));
      for (let i = 0; i < 3; i++) for (let j = i + 1; j < 3; j++) ref = Math.min(ref, sampledDistance(rings[i]!, rings[j]!) / 2);
      expect(m.tube).toBeLessThanOrEqual(ref * (1 + 1e-12));
      expect(m.tube).toBeGreaterThan(ref * (1 - 1e-3));
      // Rotate, translate, scale by 1e3 and reverse the ring order: tube scales, limits keep their names.
      const k = 1e3;
      const moved = rings.slice().reverse().map((r) => ({
        ...r,
        center: move(r.center as Vec3, k),
        normal: turn(r.normal as Vec3),
        radius: (r.radius as number) * k,
      }));
      const m2 = measure(layoutOf(moved));
      expect(m2.tube / k).toBeCloseTo(m.tube, 9);
      expect(m2.limitedBy.rings.slice().sort()).toEqual(m.limitedBy.rings.slice().sort());
      expect(m2.aspectRatio).toBeCloseTo(m.aspectRatio, 6);
      const lk = (mm: typeof m, a: string, b: string): number => {
        const i = mm.rings.findIndex((r) => r.name === a), j = mm.rings.findIndex((r) => r.name === b);
        return mm.linking![i]![j]!;
      };
      // A proper rotation keeps every linking number.
      for (const [a, b] of [['A', 'B'], ['A', 'C'], ['B', 'C']] as const) expect(lk(m2, a, b)).toBe(lk(m, a, b));
    }
  });
});

describe('thickring measure (through cli/main with a capturing Io)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'thickring-measure-'));
  const file = (name: string, text: string): string => {
    const p = join(dir, name);
    writeFileSync(p, text);
    return p;
  };
  const run = async (args: string[]): Promise<{ code: number; out: string; err: string }> => {
    let out = '', err = '';
    const io: Io = { out: (t) => { out += t.endsWith('\n') ? t : t + '\n'; }, err: (t) => { err += t.endsWith('\n') ? t : t + '\n'; }, interactive: false };
    const code = await main(args, io);
    return { code, out, err };
  };
  const hopfText = JSON.stringify(layoutOf([ring('A', [0, 0, 0], [0, 0, 1], 10), ring('B', [10, 0, 0], [0, 1, 0], 10)], { units: 'mm' }));

  it('--json prints exactly one JSON object with the Contract keys, exit 0', async () => {
    const r = await run(['measure', file('hopf.json', hopfText), '--json']);
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    expect(r.out.trim().split('\n')).toHaveLength(1);
    const o = JSON.parse(r.out) as Json;
    for (const key of ['tube', 'rings', 'status', 'aspectRatio', 'pairs', 'limitedBy', 'linking', 'units']) expect(o).toHaveProperty(key);
    expect(o.status).toBe('ok');
    // Tight Hopf: R/2 (Cantarella–Kusner–Sullivan 2002).
    expect(o.tube as number).toBeCloseTo(5, 9);
    expect((o.rings as Json[])[0]).toMatchObject({ name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 10 });
  });

  it('text output carries units on every length and the cautions', async () => {
    const r = await run(['measure', file('hopf2.json', hopfText)]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Largest common tube radius: 5 mm/);
    expect(r.out).toMatch(/Limited by: pair A-B/);
    expect(r.out).toMatch(/\(dimensionless\)/);
    expect(r.out).toMatch(/Caution: .*load-bearing/);
    const noUnits = JSON.stringify(layoutOf([ring('A', [0, 0, 0], [0, 0, 1], 2)]));
    expect((await run(['measure', file('one.json', noUnits)])).out).toMatch(/Largest common tube radius: 2 layout units/);
  });

  const bad: [string, string, RegExp][] = [
    ['malformed JSON', '{ "format": "thickring-layout/1", ', /layout file '.*bad-0\.json' is not valid JSON .*fix the syntax/],
    ['NaN literal (not JSON)', '{"format":"thickring-layout/1","rings":[{"name":"A","center":[0,0,0],"normal":[0,0,1],"radius":NaN}]}', /is not valid JSON/],
    ['NaN as a string', '{"format":"thickring-layout/1","rings":[{"name":"A","center":[0,0,0],"normal":[0,0,1],"radius":"NaN"}]}', /ring A: radius must be a finite number \(got string "NaN"\) \(in bad-2\.json\)/],
    ['missing field', JSON.stringify(layoutOf([{ name: 'A', center: [0, 0, 0], normal: [0, 0, 1] }])), /ring A: radius must be a finite number \(got nothing\)/],
    ['zero radius', JSON.stringify(layoutOf([ring('B', [0, 0, 0], [0, 0, 1], 0)])), /ring B: radius 0 must be > 0 \(in bad-4\.json\); give the core radius/],
    ['zero normal', JSON.stringify(layoutOf([ring('A', [0, 0, 0], [0, 0, 0], 1)])), /ring A: normal \[0,0,0\] is the zero vector/],
    ['duplicate names', JSON.stringify(layoutOf([ring('A', [0, 0, 0], [0, 0, 1], 1), ring('A', [5, 0, 0], [0, 0, 1], 1)])), /ring A: name "A" is used by rings #1 and #2/],
    // B (plane y=0, centre (1,0,0.5), R=0.5) passes through (1,0,0), a point of A.
    ['intersecting circles', JSON.stringify(layoutOf([ring('A', [0, 0, 0], [0, 0, 1], 1), ring('B', [1, 0, 0.5], [0, 1, 0], 0.5)])), /ring A and ring B: core circles intersect/],
  ];
  bad.forEach(([what, text, message], k) => {
    it(`bad input, ${what}: exit 2, one-line message on stderr; with --json one error object on stdout`, async () => {
      const r = await run(['measure', file(`bad-${k}.json`, text)]);
      expect(r.code).toBe(2);
      expect(r.out).toBe('');
      expect(r.err).toMatch(message);
      expect(r.err.trim().split('\n')).toHaveLength(1);
      const j = await run(['measure', file(`bad-${k}.json`, text), '--json']);
      expect(j.code).toBe(2);
      const o = JSON.parse(j.out) as { error: { message: string; exitCode: number } };
      expect(o.error.message).toMatch(message);
      expect(o.error.exitCode).toBe(2);
    });
  });

  it('missing file and missing argument are bad input (exit 2)', async () => {
    const r = await run(['measure', join(dir, 'nope.json')]);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/cannot be read: check the path/);
    expect((await run(['measure'])).code).toBe(2);
  });
});

function sampledDistance(a: Json, b: Json): number {
  const n = 720;
  const pa = points(a, n), pb = points(b, n);
  let best = Infinity;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const dx = pa[3 * i]! - pb[3 * j]!, dy = pa[3 * i + 1]! - pb[3 * j + 1]!, dz = pa[3 * i + 2]! - pb[3 * j + 2]!;
      const d2 = dx * dx + dy * dy + dz * dz;
      if (d2 < best) best = d2;
    }
  }
  return Math.sqrt(best);
}

function points(r: Json, n: number): Float64Array {
  const c = r.center as Vec3, nn = unitV(r.normal as Vec3), R = r.radius as number;
  const h: Vec3 = Math.abs(nn[0]) < 0.6 ? [1, 0, 0] : [0, 1, 0];
  const e1 = unitV(cross(h, nn)), e2 = cross(nn, e1);
  const out = new Float64Array(3 * n);
  for (let k = 0; k < n; k++) {
    const t = (2 * Math.PI * k) / n;
    for (let q = 0; q < 3; q++) out[3 * k + q] = c[q]! + R * (Math.cos(t) * e1[q]! + Math.sin(t) * e2[q]!);
  }
  return out;
}

// A fixed proper rotation (about (1,2,3) by 0.7 rad, Rodrigues) plus a translation, scaled by k.
const AXIS = unitV([1, 2, 3]);
function turn(v: Vec3): Vec3 {
  const c = Math.cos(0.7), s = Math.sin(0.7), kv = cross(AXIS, v), kd = (AXIS[0] * v[0] + AXIS[1] * v[1] + AXIS[2] * v[2]) * (1 - c);
  return [v[0] * c + kv[0] * s + AXIS[0] * kd, v[1] * c + kv[1] * s + AXIS[1] * kd, v[2] * c + kv[2] * s + AXIS[2] * kd];
}
function move(p: Vec3, k: number): Vec3 {
  const q = turn(p);
  return [k * q[0] + 123.25, k * q[1] - 40, k * q[2] + 7.5];
}
function cross(a: Vec3, b: Vec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}
function unitV(a: Vec3): Vec3 {
  const l = Math.hypot(...a);
  return [a[0] / l, a[1] / l, a[2] / l];
}
