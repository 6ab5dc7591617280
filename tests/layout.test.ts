// Layout file parsing: every bad input gives one line naming the ring, the field and the fix; the
// JSON Schema in schemas/ and the parser agree. Geometric facts used for the intersection checks are
// derived by hand in comments (distance from a point on a circle's axis: Eberly, "Distance to
// Circles in 3D", point-circle formula d^2 = (N.D)^2 + (|D - (N.D)N| - r)^2).
import { readFileSync } from 'node:fs';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import { InputError } from '../src/model/errors.js';
import { LAYOUT_FORMAT, layoutFromRings, parseLayout } from '../src/model/layout.js';
import type { Ring } from '../src/model/types.js';

const schema = JSON.parse(readFileSync(new URL('../schemas/layout.schema.json', import.meta.url), 'utf8')) as object;
const validate = new Ajv2020({ allErrors: true }).compile(schema);

type Json = Record<string, unknown>;
const ringA = (): Json => ({ name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 });
const ringB = (): Json => ({ name: 'B', center: [1, 0, 0], normal: [0, 1, 0], radius: 1 });
const hopf = (): Json => ({ format: LAYOUT_FORMAT, units: 'mm', rings: [ringA(), ringB()] });

function errorOf(data: unknown, source = 'layout.json'): string {
  try {
    parseLayout(data, source);
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    const msg = (e as Error).message;
    expect(msg).not.toContain('\n');
    return msg;
  }
  throw new Error('parseLayout accepted bad input');
}

/** Hopf layout with one ring field replaced (undefined deletes it). */
function withRingField(ring: 0 | 1, field: string, value: unknown): Json {
  const h = hopf();
  const r = (h.rings as Json[])[ring]!;
  if (value === undefined) delete r[field];
  else r[field] = value;
  return h;
}

describe('parseLayout: valid input', () => {
  it('parses the Hopf layout, normalises normals and keeps units', () => {
    const data = withRingField(1, 'normal', [0, 5, 0]);
    const layout = parseLayout(data, 'hopf.json');
    expect(layout.units).toBe('mm');
    expect(layout.rings.map((r) => r.name)).toEqual(['A', 'B']);
    expect(layout.rings[1]!.normal).toEqual([0, 1, 0]);
    expect('symmetry' in layout).toBe(false);
    const n = parseLayout(withRingField(0, 'normal', [1, 2, 2]), 'x').rings[0]!.normal;
    // |(1,2,2)| = 3 exactly.
    expect(n[0]).toBeCloseTo(1 / 3, 15);
    expect(n[2]).toBeCloseTo(2 / 3, 15);
  });

  it('reads symmetry (axis normalised, defaults) and lattice', () => {
    const layout = parseLayout({ ...hopf(), symmetry: { type: 'cyclic', order: 3, axis: [0, 0, 2] } }, 'x');
    expect(layout.symmetry).toEqual({ type: 'cyclic', order: 3, axis: [0, 0, 1], origin: [0, 0, 0] });
    expect(parseLayout({ ...hopf(), symmetry: { type: 'none' } }, 'x').symmetry?.order).toBe(1);
    const chain = parseLayout({ ...hopf(), lattice: { vectors: [[5, 0, 0]] } }, 'x');
    expect(chain.lattice?.vectors).toEqual([[5, 0, 0]]);
    // With cell length 3, B's copy shifted by -3 (centre (-2,0,0), plane y=0, R=1) passes through (-1,0,0) on A.
    expect(errorOf({ ...hopf(), lattice: { vectors: [[3, 0, 0]] } })).toMatch(/^ring A and ring B shifted by lattice \[-1\]: core circles intersect/);
  });

  it('layoutFromRings validates rings built in code', () => {
    const rings: Ring[] = [{ name: 'A', center: [0, 0, 0], normal: [0, 0, 3], radius: 2, tube: 0.5 }];
    expect(layoutFromRings(rings, { units: 'mm' }).rings[0]!.normal).toEqual([0, 0, 1]);
    expect(() => layoutFromRings([{ name: 'A', center: [0, 0, 0], normal: [0, 0, 0], radius: 2 }])).toThrow(/normal/);
  });
});

describe('parseLayout: bad input, one line each with ring, field and fix', () => {
  it('not an object, wrong or missing format, empty or missing rings', () => {
    expect(errorOf([1, 2])).toMatch(/^layout: must be a JSON object \(got an array\) \(in layout\.json\); write/);
    expect(errorOf(null)).toMatch(/must be a JSON object/);
    expect(errorOf({ rings: [] })).toMatch(/format must be "thickring-layout\/1" \(it is missing\).*add "format"/);
    expect(errorOf({ ...hopf(), format: 'thickring-layout/2' })).toMatch(/got "thickring-layout\/2"/);
    expect(errorOf({ format: LAYOUT_FORMAT })).toMatch(/rings must be an array/);
    expect(errorOf({ format: LAYOUT_FORMAT, rings: [] })).toMatch(/rings is empty.*at least one ring/);
    expect(errorOf({ ...hopf(), units: 3 })).toMatch(/units must be a non-empty string/);
  });

  it('missing fields name the ring and the field', () => {
    expect(errorOf(withRingField(1, 'radius', undefined))).toMatch(/^ring B: radius must be a finite number \(got nothing\) \(in layout\.json\); give radius/);
    expect(errorOf(withRingField(0, 'center', undefined))).toMatch(/^ring A: center must be an array of 3 numbers/);
    expect(errorOf(withRingField(1, 'name', undefined))).toMatch(/^ring #2: name must be a non-empty string/);
    expect(errorOf({ format: LAYOUT_FORMAT, rings: ['A'] })).toMatch(/^ring #1: the ring must be an object/);
  });

  it('non-finite numbers (JSON.parse gives Infinity for 1e999; NaN arrives from code or as a string)', () => {
    const inf = JSON.parse('{"format":"thickring-layout/1","rings":[{"name":"A","center":[0,0,0],"normal":[0,0,1],"radius":1e999}]}');
    expect(errorOf(inf)).toMatch(/^ring A: radius must be a finite number \(got Infinity\)/);
    expect(errorOf(withRingField(1, 'center', [1, Number.NaN, 0]))).toMatch(/^ring B: center\[1\] must be a finite number \(got NaN\)/);
    expect(errorOf(withRingField(1, 'radius', 'NaN'))).toMatch(/^ring B: radius must be a finite number \(got string "NaN"\)/);
  });

  it('wrong array length', () => {
    expect(errorOf(withRingField(0, 'normal', [0, 1]))).toMatch(/^ring A: normal must be an array of 3 numbers \[x, y, z\] \(got 2 entries\)/);
    expect(errorOf(withRingField(0, 'center', [0, 1, 2, 3]))).toMatch(/got 4 entries/);
  });

  it('zero or negative radius, zero normal, tube > radius, bad tube', () => {
    // The message the design notes give as the model for all others.
    expect(errorOf(withRingField(1, 'radius', -2))).toMatch(/^ring B: radius -2 must be > 0 \(in layout\.json\); give the core radius/);
    expect(errorOf(withRingField(1, 'radius', 0))).toMatch(/^ring B: radius 0 must be > 0/);
    expect(errorOf(withRingField(0, 'normal', [0, 0, 0]))).toMatch(/^ring A: normal \[0,0,0\] is the zero vector.*non-zero direction/);
    expect(errorOf(withRingField(0, 'tube', 1.5))).toMatch(/^ring A: tube 1\.5 must be <= radius 1.*no thicker/);
    expect(errorOf(withRingField(0, 'tube', 0))).toMatch(/^ring A: tube 0 must be > 0/);
  });

  it('duplicate names and unknown keys', () => {
    const dup = hopf();
    (dup.rings as Json[])[1]!.name = 'A';
    expect(errorOf(dup)).toMatch(/^ring A: name "A" is used by rings #1 and #2.*different name/);
    expect(errorOf(withRingField(0, 'raduis', 2))).toMatch(/^ring A: unknown key "raduis".*spelling/);
    expect(errorOf({ ...hopf(), ring: [] })).toMatch(/^layout: unknown key "ring"/);
  });

  it('symmetry and lattice fields', () => {
    expect(errorOf({ ...hopf(), symmetry: { type: 'helical', order: 2 } })).toMatch(/^symmetry: type must be one of none, cyclic, dihedral/);
    expect(errorOf({ ...hopf(), symmetry: { type: 'cyclic', order: 2.5 } })).toMatch(/^symmetry: order 2\.5 must be a whole number >= 1/);
    expect(errorOf({ ...hopf(), symmetry: { type: 'cyclic' } })).toMatch(/^symmetry: order must be a finite number \(got nothing\)/);
    expect(errorOf({ ...hopf(), symmetry: { type: 'dihedral', order: 2, axis: [0, 0, 0] } })).toMatch(/^symmetry: axis \[0,0,0\] is the zero vector/);
    expect(errorOf({ ...hopf(), lattice: { vectors: [] } })).toMatch(/^lattice: vectors must hold 1 or 2 vectors \(got 0\)/);
    expect(errorOf({ ...hopf(), lattice: { vectors: [[0, 0, 0]] } })).toMatch(/^lattice: vectors\[0\] \[0,0,0\] is the zero vector/);
    expect(errorOf({ ...hopf(), lattice: { vectors: [[4, 0, 0], [-8, 0, 0]] } })).toMatch(/^lattice: vectors .* are parallel/);
    expect(errorOf({ ...hopf(), lattice: { vectors: [[0.01, 0, 0]] } })).toMatch(/^lattice: vectors\[0\] is so short/);
  });
});

describe('parseLayout: core circles that already intersect', () => {
  it('names both rings: circle through the other rim, tangent coplanar circles, identical rings', () => {
    // A: unit circle in z=0. B in the plane y=0 centred (1,0,0.5) with R=0.5 passes through (1,0,0), a point of A.
    const through = { format: LAYOUT_FORMAT, rings: [ringA(), { name: 'B', center: [1, 0, 0.5], normal: [0, 1, 0], radius: 0.5 }] };
    expect(errorOf(through)).toMatch(/^ring A and ring B: core circles intersect .*\(in layout\.json\); move or tilt one ring/);
    // Coplanar circles with centre distance R1 + R2 touch at one point.
    const tangent = { format: LAYOUT_FORMAT, rings: [ringA(), { name: 'T', center: [3, 0, 0], normal: [0, 0, 1], radius: 2 }] };
    expect(errorOf(tangent)).toMatch(/^ring A and ring T: core circles intersect/);
    // Coplanar unit circles with centres sqrt(2) apart cross at (1,0,0) and (0,1,0); likewise at centre distance 1.237.
    for (const center of [[1, 1, 0], [1.2, 0.3, 0]]) {
      const crossing = { format: LAYOUT_FORMAT, rings: [ringA(), { name: 'X', center, normal: [0, 0, 1], radius: 1 }] };
      expect(errorOf(crossing)).toMatch(/^ring A and ring X: core circles intersect/);
    }
    const same = { format: LAYOUT_FORMAT, rings: [ringA(), { ...ringA(), name: 'C', normal: [0, 0, -1] }] };
    expect(errorOf(same)).toMatch(/^ring A and ring C: core circles intersect/);
  });

  it('accepts near misses, and the decision is the same at every scale (tolerance scales with the radii)', () => {
    // B in the plane y=0 centred (1,0,0.5+δ), R=0.5: its lowest point (1,0,δ) is δ from A's point (1,0,0),
    // and by the point-circle formula nothing is closer, so d = δ.
    for (const s of [1e-3, 1, 1e3]) {
      const near = (delta: number): Json => ({
        format: LAYOUT_FORMAT,
        rings: [
          { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: s },
          { name: 'B', center: [s, 0, s * (0.5 + delta)], normal: [0, 1, 0], radius: s * 0.5 },
        ],
      });
      expect(() => parseLayout(near(1e-4), 'x')).not.toThrow();
      expect(errorOf(near(0))).toMatch(/intersect/);
      expect(errorOf(near(1e-9))).toMatch(/intersect/);
    }
  });

  it('checks lattice copies: a ring that meets its own translate', () => {
    // Unit circle in z=0 shifted by (2,0,0) touches itself at (1,0,0).
    const data = { format: LAYOUT_FORMAT, rings: [ringA()], lattice: { vectors: [[2, 0, 0]] } };
    expect(errorOf(data)).toMatch(/^ring A and ring A shifted by lattice \[1\]: core circles intersect/);
    expect(() => parseLayout({ ...data, lattice: { vectors: [[2.5, 0, 0]] } }, 'x')).not.toThrow();
  });
});

describe('JSON Schema (schemas/layout.schema.json, draft 2020-12, ajv 8) agrees with the parser', () => {
  const valid: Json[] = [
    hopf(),
    { format: LAYOUT_FORMAT, rings: [ringA()] },
    { ...hopf(), symmetry: { type: 'cyclic', order: 2, axis: [0, 0, 1], origin: [0, 0, 0] } },
    { ...hopf(), symmetry: { type: 'none' }, description: 'two rings' },
    { format: LAYOUT_FORMAT, rings: [ringA()], lattice: { vectors: [[3, 0, 0], [0, 3, 0]] } },
    withRingField(0, 'tube', 0.25),
  ];
  it('valid layouts pass both', () => {
    for (const v of valid) {
      expect(validate(v), JSON.stringify(validate.errors)).toBe(true);
      expect(() => parseLayout(v, 'x')).not.toThrow();
    }
  });

  it('every layout the schema rejects, the parser rejects too', () => {
    const invalid: unknown[] = [
      [1], null, 'layout', {}, { format: LAYOUT_FORMAT }, { rings: [ringA()] },
      { ...hopf(), format: 'thickring-layout/2' },
      { format: LAYOUT_FORMAT, rings: [] },
      { ...hopf(), units: '' }, { ...hopf(), units: 5 }, { ...hopf(), extra: 1 },
      withRingField(0, 'name', ''), withRingField(0, 'name', 7), withRingField(0, 'name', undefined),
      withRingField(0, 'center', [0, 0]), withRingField(0, 'center', ['0', 0, 0]), withRingField(0, 'center', undefined),
      withRingField(0, 'normal', [0, 0, 0]), withRingField(0, 'normal', [0, 0]), withRingField(0, 'normal', null),
      withRingField(0, 'radius', 0), withRingField(0, 'radius', -1), withRingField(0, 'radius', '1'), withRingField(0, 'radius', undefined),
      withRingField(0, 'tube', 0), withRingField(0, 'tube', -0.1), withRingField(0, 'colour', 'red'),
      { ...hopf(), symmetry: { type: 'cyclic' } }, { ...hopf(), symmetry: { type: 'twist', order: 2 } },
      { ...hopf(), symmetry: { type: 'cyclic', order: 0 } }, { ...hopf(), symmetry: { type: 'cyclic', order: 1.5 } },
      { ...hopf(), symmetry: { type: 'cyclic', order: 2, axis: [0, 0, 0] } }, { ...hopf(), symmetry: { type: 'cyclic', order: 2, origin: [0] } },
      { ...hopf(), symmetry: 'cyclic' },
      { ...hopf(), lattice: { vectors: [] } }, { ...hopf(), lattice: { vectors: [[1, 0, 0], [0, 1, 0], [0, 0, 1]] } },
      { ...hopf(), lattice: { vectors: [[0, 0, 0]] } }, { ...hopf(), lattice: {} },
      JSON.parse('{"format":"thickring-layout/1","rings":[{"name":"A","center":[0,0,0],"normal":[0,0,1],"radius":1e999}]}'),
    ];
    for (const v of invalid) {
      expect(validate(v), JSON.stringify(v)).toBe(false);
      expect(() => parseLayout(v, 'x'), JSON.stringify(v)).toThrow(InputError);
    }
  });

  it('rules JSON Schema cannot state are the parser\'s alone (documented in the schema description)', () => {
    const dup = hopf();
    (dup.rings as Json[])[1]!.name = 'A';
    const parserOnly: Json[] = [
      withRingField(0, 'tube', 2), // tube > radius
      dup, // duplicate names
      { format: LAYOUT_FORMAT, rings: [ringA(), { ...ringA(), name: 'C' }] }, // identical circles intersect
      { ...hopf(), lattice: { vectors: [[4, 0, 0], [8, 0, 0]] } }, // parallel lattice vectors
      { ...hopf(), symmetry: { type: 'none', order: 3 } },
    ];
    for (const v of parserOnly) {
      expect(validate(v)).toBe(true);
      expect(() => parseLayout(v, 'x')).toThrow(InputError);
    }
  });
});
