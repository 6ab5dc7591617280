// Catalogue starts: intended linking (checked twice, by the topology module's disk-crossing count and
// by the checker's Gauss integral), no intersections, centred on the origin, and the symmetry claimed
// in catalogEntries() (checked with rotation matrices written out here, and with src/model/symmetry).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { coreDistance, gaussLinking } from '../src/check/verify.js';
import {
  catalogEntries, catalogLayout, knownOptimum, linkingPattern, naturalSymmetry, parseCatalogSpec,
} from '../src/model/catalog.js';
import { InputError } from '../src/model/errors.js';
import { resolveSpec } from '../src/model/spec.js';
import { ringOrbits, symmetryDeparture } from '../src/model/symmetry.js';
import type { Layout, Ring, Vec3 } from '../src/model/types.js';
import { linkingMatrix } from '../src/topology/index.js';

const SPECS = [
  'hopf', 'chain:2', 'chain:3', 'chain:4', 'chain:5', 'chain:8',
  'necklace:3', 'necklace:4', 'necklace:5', 'necklace:6', 'necklace:7', 'necklace:8', 'necklace:9', 'necklace:12',
  'star:2', 'star:3', 'star:4', 'star:6',
  'torus:2', 'torus:3', 'torus:4', 'torus:5', 'torus:6',
];

/** Which pairs the family definitions (design notes) link, written out independently of the generator. */
function intended(spec: string, n: number, i: number, j: number): number {
  const [family] = spec.split(':');
  switch (family) {
    case 'hopf':
    case 'chain':
      return Math.abs(i - j) === 1 ? 1 : 0;
    case 'necklace':
      return Math.abs(i - j) === 1 || Math.abs(i - j) === n - 1 ? 1 : 0;
    case 'star':
      return (i === 0) !== (j === 0) ? 1 : 0;
    case 'torus':
      return 1;
    default:
      throw new Error(spec);
  }
}

describe('catalogue layouts', () => {
  for (const spec of SPECS) {
    it(`${spec}: intended link, rings apart, centred, symmetric as claimed`, () => {
      const layout = catalogLayout(spec);
      const rings = layout.rings;
      const n = rings.length;
      const lk = linkingMatrix(rings);
      for (let i = 0; i < n; i++) {
        for (let j = i + 1; j < n; j++) {
          const want = intended(spec, n, i, j);
          // Disk-crossing count (topology module) against the family's definition.
          expect(Math.abs(lk[i]![j]!), `${spec} ${i}-${j}`).toBe(want);
          // Gauss linking integral (independent method) agrees in sign and size.
          const d = coreDistance(rings[i]!, rings[j]!).distance;
          expect(gaussLinking(rings[i]!, rings[j]!, d).linking).toBe(lk[i]![j]);
          // Rings apart with room to spare: a start where cores nearly touch is a poor start
          // (0.15 R: common practice, no source).
          expect(d, `${spec} ${i}-${j} distance`).toBeGreaterThan(0.15);
        }
      }
      expect(linkingPattern(parseCatalogSpec(spec))).toEqual(lk.map((row) => row.map(Math.abs)));
      const centroid = rings.reduce<Vec3>((s, r) => [s[0] + r.center[0], s[1] + r.center[1], s[2] + r.center[2]], [0, 0, 0]);
      expect(Math.hypot(...centroid) / n).toBeLessThan(1e-12);
      const sym = naturalSymmetry(parseCatalogSpec(spec));
      expectSymmetric(layout, sym.type, sym.order);
      // The optimiser's own symmetry module reads the same group off the layout.
      expect(() => ringOrbits(rings, sym)).not.toThrow();
      expect(symmetryDeparture(rings, sym)).toBeLessThan(1e-12);
    });
  }

  it('necklace:3 and torus:3 are the same link (three pairwise-linked rings)', () => {
    const a = linkingMatrix(catalogLayout('necklace:3').rings);
    const b = linkingMatrix(catalogLayout('torus:3').rings);
    // The product of the three linking numbers tells the (3,3) torus link from its mirror (references.md).
    expect(a[0]![1]! * a[1]![2]! * a[0]![2]!).toBe(b[0]![1]! * b[1]![2]! * b[0]![2]!);
  });

  it('scaling the radii scales the layout (1e-3 and 1e3)', () => {
    for (const s of [1e-3, 1e3]) {
      for (const spec of ['chain:4', 'necklace:5', 'star:3', 'torus:3']) {
        const one = catalogLayout(spec).rings;
        const big = catalogLayout(spec, [s]).rings;
        big.forEach((r, i) => {
          expect(r.radius).toBe(s);
          for (let k = 0; k < 3; k++) {
            expect(Math.abs(r.center[k]! - s * one[i]!.center[k]!)).toBeLessThanOrEqual(1e-12 * s);
            expect(r.normal[k]).toBeCloseTo(one[i]!.normal[k]!, 12);
          }
        });
      }
    }
  });

  it('per-ring radii are used and keep the intended link', () => {
    const layout = catalogLayout('chain:3', [1, 1.5, 1]);
    expect(layout.rings.map((r) => r.radius)).toEqual([1, 1.5, 1]);
    expect(linkingMatrix(layout.rings).map((r) => r.map(Math.abs))).toEqual([[0, 1, 0], [1, 0, 1], [0, 1, 0]]);
    const star = catalogLayout('star:3', [2, 1, 1, 1]);
    expect(star.rings.map((r) => r.radius)).toEqual([2, 1, 1, 1]);
  });

  it('radii so unequal that the start breaks are rejected naming --radii', () => {
    expect(() => catalogLayout('chain:3', [1, 0.2, 1])).toThrow(/--radii 1,0.2,1/);
    expect(() => catalogLayout('star:3', [1, 0.1, 1, 1])).toThrow(/--radii/);
    expect(() => catalogLayout('chain:3', [1, 2])).toThrow(/--radii: got 2 values but chain:3 has 3 rings/);
    expect(() => catalogLayout('hopf', [-1])).toThrow(InputError);
  });

  it('unknown specs and bad counts name the spec and list the valid ones', () => {
    for (const bad of ['knot', 'chain', 'chain:1', 'chain:x', 'necklace:2', 'star:1', 'torus:1', 'hopf:3', 'chain:1000']) {
      let msg = '';
      try {
        catalogLayout(bad);
      } catch (e) {
        expect(e).toBeInstanceOf(InputError);
        msg = (e as Error).message;
      }
      expect(msg).toContain(`'${bad}'`);
      expect(msg).toMatch(/hopf, chain:N \(N >= 2\), necklace:N \(N >= 3\), star:K \(K >= 2\), torus:N \(N >= 2\)/);
    }
    // Freedman & Skora 1987: no round Borromean rings.
    expect(() => parseCatalogSpec('borromean')).toThrow(/Freedman & Skora/);
  });
});

describe('catalogue entries', () => {
  it('list every family with its symmetry and the published optima', () => {
    const entries = catalogEntries();
    expect(entries.map((e) => e.family)).toEqual(['hopf', 'chain', 'necklace', 'star', 'torus']);
    for (const e of entries) {
      expect(e.symmetry).toMatch(/cyclic|dihedral/);
      expect(e.description.length).toBeGreaterThan(10);
    }
    // Tight Hopf link: tube R/2 (Cantarella, Kusner, Sullivan 2002).
    expect(knownOptimum(parseCatalogSpec('hopf'))?.tubeOverCore).toBe(0.5);
    expect(knownOptimum(parseCatalogSpec('chain:2'))?.tubeOverCore).toBe(0.5);
    // k = 2 rings through one: r/(R - r) <= r_2 = 1/2 (Graham et al. 1998) gives r <= R/3.
    const r2 = 1 / 2;
    expect(knownOptimum(parseCatalogSpec('chain:5'))?.tubeOverCore).toBeCloseTo(r2 / (1 + r2), 15);
    expect(knownOptimum(parseCatalogSpec('star:2'))?.tubeOverCore).toBeCloseTo(r2 / (1 + r2), 15);
    expect(knownOptimum(parseCatalogSpec('torus:3'))).toBeNull();
  });
});

describe('resolveSpec', () => {
  const dir = mkdtempSync(join(tmpdir(), 'thickring-spec-'));
  const file = (name: string, rings: object[]): string => {
    const path = join(dir, name);
    writeFileSync(path, JSON.stringify({ format: 'thickring-layout/1', rings }));
    return path;
  };
  const A = { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 };
  const B = { name: 'B', center: [1, 0, 0], normal: [0, 1, 0], radius: 1 };

  it('reads catalogue specs and layout files, keeping the layout\'s signed linking matrix', () => {
    const cat = resolveSpec('chain:3');
    expect(cat.source).toBe('catalog');
    expect(cat.spec).toBe('chain:3');
    const path = file('hopf.json', [A, B]);
    const f = resolveSpec(path);
    expect(f.source).toBe('file');
    // B crosses A's disk at the origin moving along +z = n_A: lk = +1 (disk-crossing definition, Rolfsen 5D).
    expect(f.linking).toEqual([[0, 1], [1, 0]]);
    expect(f.tubeRatios).toEqual([1, 1]);
  });

  it('different tube values in a layout are read as ratios to the thickest', () => {
    const f = resolveSpec(file('ratios.json', [{ ...A, tube: 0.2 }, { ...B, tube: 0.1 }]));
    expect(f.tubeRatios).toEqual([1, 0.5]);
    expect(f.notes.join(' ')).toMatch(/ratios/);
  });

  it('--radii on a layout file must keep its link', () => {
    const path = file('hopf2.json', [A, B]);
    expect(resolveSpec(path, { radii: [1.2] }).layout.rings.map((r) => r.radius)).toEqual([1.2, 1.2]);
    // With A's radius 3, B (crossing z = 0 at x = 0 and x = 2) passes through A's disk twice: unlinked.
    expect(() => resolveSpec(path, { radii: [3, 1] })).toThrow(/--radii 3,1: .*no longer linked/);
  });

  it('refuses the unlink and rings that nothing holds (Freedman & Skora 1987)', () => {
    expect(() => resolveSpec(file('apart.json', [A, { ...B, center: [5, 0, 0] }]))).toThrow(/no two rings are linked/);
    expect(() => resolveSpec(file('one.json', [A]))).toThrow(/at least two linked rings/);
  });
});

// ---- helpers -------------------------------------------------------------------------------------

/** Every group generator maps the set of rings onto itself (centres to 1e-12, planes up to normal sign). */
function expectSymmetric(layout: Layout, type: 'none' | 'cyclic' | 'dihedral', order: number): void {
  const gens: ((v: Vec3) => Vec3)[] = [];
  const a = (2 * Math.PI) / order;
  gens.push((v) => [Math.cos(a) * v[0] - Math.sin(a) * v[1], Math.sin(a) * v[0] + Math.cos(a) * v[1], v[2]]);
  // Half-turn about x: (x, y, z) -> (x, -y, -z).
  if (type === 'dihedral') gens.push((v) => [v[0], -v[1], -v[2]]);
  for (const g of gens) {
    for (const r of layout.rings) {
      const img = { center: g(r.center), normal: g(r.normal) };
      const match = layout.rings.find((q) => sameRing(img, q));
      expect(match, `image of ring ${r.name}`).toBeDefined();
    }
  }
}

function sameRing(a: { center: Vec3; normal: Vec3 }, b: Ring): boolean {
  const dc = Math.hypot(a.center[0] - b.center[0], a.center[1] - b.center[1], a.center[2] - b.center[2]);
  const dot = a.normal[0] * b.normal[0] + a.normal[1] * b.normal[1] + a.normal[2] * b.normal[2];
  return dc < 1e-12 && Math.abs(Math.abs(dot) - 1) < 1e-12;
}
