// A result solved under a symmetry lists every contact: the solver works on one ring per orbit, but every
// image of a touching pair under the group touches just as much. Checked against `measure`'s own kernel-free
// pair distances (an independent computation on the rings as written), on the (3,3) torus link with cyclic:3
// and a star of four rings through one with dihedral:4. The optimality text names the symmetry a local
// certificate is limited to (a symmetric critical point may be a saddle among all poses: Cantarella, Fu,
// Kusner, Sullivan, Wrinkle, Geom. Topol. 10 (2006), criticality is relative to the admissible variations).
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { beforeAll, describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import { measureLayout } from '../src/analyze/measure.js';
import { LAYOUT_FORMAT } from '../src/model/layout.js';
import type { SolveResult } from '../src/model/result.js';
import { captureIo, tempDir } from './fabricateFixtures.js';

/** A pair touches when its core distance is within this of r_a + r_b, relative to the tube. */
const TOUCH_REL = 1e-6;

const cases = [
  // (3,3) torus link (references.md): three pairwise-linked rings; the cyclic group carries one touching pair
  // onto the other two, so all 3 pairs touch (hand derivation).
  { spec: 'torus:3', symmetry: 'cyclic:3', pairs: 3 },
  // At the packing bound for k = 4 (Graham et al., Discrete Math. 181, 1998) the four rings pierce the centre
  // ring's disk at the corners of a square, 2r apart: each touches the centre ring and its two neighbours.
  { spec: 'star:4', symmetry: 'dihedral:4', pairs: 8 },
] as const;

describe.each(cases)('$spec under $symmetry', ({ spec, symmetry, pairs }) => {
  const dir = tempDir('sym');
  const path = join(dir, 'r.json');
  let result: SolveResult;
  let inflateText = '';
  beforeAll(async () => {
    const io = captureIo();
    expect(await main(['inflate', spec, '--symmetry', symmetry, '--starts', '1', '--workers', '1', '-o', path], io)).toBe(0);
    inflateText = io.stdout.join('\n');
    result = JSON.parse(readFileSync(path, 'utf8')) as SolveResult;
  }, 120_000);

  function touchingPairs(): string[] {
    const m = measureLayout({
      format: LAYOUT_FORMAT,
      rings: result.rings.map((r) => ({ name: r.name, center: r.center, normal: r.normal, radius: r.radius, tube: r.tube })),
    } as Parameters<typeof measureLayout>[0]);
    return m.pairs
      .filter((p) => p.distance - (result.rings[p.a]!.tube + result.rings[p.b]!.tube) <= TOUCH_REL * result.tube)
      .map((p) => [p.a, p.b].sort().join('-'))
      .sort();
  }

  it('the result lists contacts on exactly the pairs measure finds touching, forces summing to 1', () => {
    const touching = touchingPairs();
    expect(touching.length).toBe(pairs);
    const listed = [...new Set(result.contacts.map((c) => [c.a, c.b].sort().join('-')))].sort();
    expect(listed).toEqual(touching);
    // Strut forces are normalised to sum 1 (the result's own convention):
    // internal consistency, no outside source.
    expect(result.contacts.reduce((s, c) => s + c.force, 0)).toBeCloseTo(1, 12);
    // Every listed contact really is a touching point: its points lie on the two cores at the touching distance.
    for (const c of result.contacts) {
      const d = Math.hypot(c.onA[0] - c.onB[0], c.onA[1] - c.onB[1], c.onA[2] - c.onB[2]);
      expect(Math.abs(d - (result.rings[c.a]!.tube + result.rings[c.b]!.tube))).toBeLessThan(1e-6 * result.tube);
    }
  });

  it('tracks, report and play see every touching pair', async () => {
    const touching = touchingPairs();
    const tracks = join(dir, 't.json');
    expect(await main(['tracks', path, '-o', tracks], captureIo())).toBe(0);
    const t = JSON.parse(readFileSync(tracks, 'utf8')) as { rings: { index: number; neighbours: { index: number; contacts: unknown[] }[] }[] };
    const withContacts = new Set<string>();
    for (const r of t.rings) for (const n of r.neighbours) if (n.contacts.length > 0) withContacts.add([r.index, n.index].sort().join('-'));
    expect([...withContacts].sort()).toEqual(touching);

    const html = join(dir, 'r.html');
    expect(await main(['report', path, '-o', html], captureIo())).toBe(0);
    const page = readFileSync(html, 'utf8');
    const listed = Number(/(\d+) active contacts \(struts\)/.exec(page)![1]);
    expect(listed).toBe(result.contacts.length);

    const fab = captureIo();
    expect(await main(['fabricate', path, '--outer-diameter', '30', '--process', 'sla', '--json'], fab)).toBe(0);
    const pairsOf = (names: string[]) => names.map((n) => n.split('-').map((x) => result.rings.findIndex((r) => r.name === x)).sort().join('-')).sort();
    expect(pairsOf((JSON.parse(fab.stdout.join('')) as { touchingPairs: string[] }).touchingPairs)).toEqual(touching);

    const play = captureIo();
    expect(await main(['play', path, '--json'], play)).toBe(0);
    const p = JSON.parse(play.stdout.join('')) as { mobility: { activeContacts: number } };
    // play finds the active struts from the geometry itself; the result must list at least as many.
    // Agreement between commands: internal consistency, no outside source.
    expect(result.contacts.length).toBeGreaterThanOrEqual(p.mobility.activeContacts);
  }, 120_000);

  it('the file still matches the result schema, with aspectRatioRing and optimality', () => {
    const schema = JSON.parse(readFileSync(new URL('../schemas/result.schema.json', import.meta.url), 'utf8')) as object;
    const validate = new Ajv2020({ allErrors: true }).compile(schema);
    expect(validate(result), JSON.stringify(validate.errors)).toBe(true);
    // The headline is the smallest aspect ratio over the rings (design contract), and it names that ring.
    const smallest = Math.min(...result.rings.map((r) => (r.radius - r.tube) / r.tube));
    expect(result.aspectRatio).toBeCloseTo(smallest, 12);
    const named = result.rings.find((r) => r.name === result.aspectRatioRing)!;
    expect((named.radius - named.tube) / named.tube).toBeCloseTo(smallest, 12);
  });

  it('a local certificate names the symmetry it holds under, in text and JSON', () => {
    if (result.certificate.certified && !(result.bound && result.bound.gap <= 1e-9)) {
      expect(inflateText).toMatch(new RegExp(`certified among poses with ${symmetry} symmetry`));
      expect(result.optimality).toBe(`certified among poses with ${symmetry} symmetry`);
      expect(inflateText).toMatch(new RegExp(`\\(${result.contacts.length} contacts listed with their images under ${symmetry}\\)`));
    } else {
      expect(result.optimality).not.toMatch(/certified local optimum/);
    }
  });
});
