// The weave catalogue and the periodic model, without solving: start poses carry the pattern each weave
// is named for, checked with the independent Gauss linking integral (Gauss 1833, src/check/verify.ts)
// on a block of cells; the periodic helpers; the layout-file route; wire densities and weights.
// Pattern facts are the weavers' definitions (common practice, no source): "N-in-1" means N rings pass
// through each ring (European 4-in-1: 4; the flat ring of Japanese 6-in-1: 6, its connectors 2;
// 2-in-1 chain: 2); a box chain is a 2-2 chain, each ring through both rings of the pairs before and after.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { gaussLinkingMatrix } from '../src/check/verify.js';
import { InputError } from '../src/model/errors.js';
import {
  blockLinking, canonicalPair, cellMeasure, expandCells, latticeOffset, pairKey, periodicLinks,
} from '../src/model/periodic.js';
import { MATERIALS, parseDensity, parseWireDiameter, weaveWeight } from '../src/model/periodicMaterials.js';
import { isPeriodicArg, resolvePeriodicSpec } from '../src/model/periodicSpec.js';
import type { Ring } from '../src/model/types.js';
import { parseWeaveSpec, weaveEntries, weaveLayout } from '../src/model/weaves.js';

const dir = mkdtempSync(join(tmpdir(), 'thickring-weaves-'));

function file(name: string, data: unknown): string {
  const path = join(dir, name);
  writeFileSync(path, JSON.stringify(data));
  return path;
}

describe('weave catalogue: start poses carry the named pattern', () => {
  for (const entry of weaveEntries()) {
    it(`${entry.spec}: rings through each ring = ${entry.through.join(', ')}; Gauss integral on a block agrees`, () => {
      const layout = weaveLayout(entry.spec);
      expect(layout.lattice!.vectors).toHaveLength(entry.kind === 'chain' ? 1 : 2);
      const links = periodicLinks(layout.rings, layout.lattice!);
      // Rings through ring i: each link (i, j, s) puts one copy of j through i, and one copy of i through j.
      const through = layout.rings.map(() => 0);
      for (const l of links) {
        through[l.i]!++;
        through[l.j]!++;
      }
      expect(through).toEqual(entry.through);
      // Independent: the Gauss linking integral of every pair in a block of cells equals the pattern.
      const counts = layout.lattice!.vectors.map(() => 3);
      const block = expandCells(layout.rings, layout.lattice!, counts);
      const gauss = gaussLinkingMatrix(block);
      const want = blockLinking(layout.rings.length, links, counts);
      for (let a = 0; a < block.length; a++) {
        for (let b = 0; b < block.length; b++) {
          if (a !== b) expect(Math.abs(gauss[a]![b] ?? NaN)).toBe(Math.abs(want[a]![b]!));
        }
      }
    });
  }

  it('trade figures are marked as rules of thumb and known minima name their source', () => {
    for (const e of weaveEntries()) {
      if (e.trade) expect(e.trade.source).toMatch(/rule of thumb/);
      if (e.knownOptimum) expect(e.knownOptimum.source).toMatch(/Graham et al/);
    }
  });

  it('one --radii value scales the whole pattern; per-ring radii must match the cell', () => {
    const one = weaveLayout('weave:2-in-1');
    const big = weaveLayout('weave:2-in-1', [2.5]);
    expect(big.rings[1]!.center[0]).toBeCloseTo(2.5 * one.rings[1]!.center[0], 12);
    expect(big.lattice!.vectors[0]![0]).toBeCloseTo(2.5 * one.lattice!.vectors[0]![0], 12);
    expect(() => weaveLayout('weave:box', [1, 1])).toThrow(/--radii: got 2 values but weave:box has 4 rings/);
    expect(() => weaveLayout('weave:2-in-1', [-1])).toThrow(InputError);
  });

  it('bad weave names are bad input that lists the catalogue', () => {
    expect(() => parseWeaveSpec('weave:persian-7')).toThrow(/is not a weave in the catalogue: use one of weave:2-in-1, weave:euro-4-in-1/);
    expect(parseWeaveSpec(' WEAVE:Box ').name).toBe('box');
  });
});

describe('periodic helpers', () => {
  it('a pair and its mirror are one pair', () => {
    expect(canonicalPair(1, 0, [2, -1])).toEqual({ i: 0, j: 1, shift: [-2, 1] });
    expect(canonicalPair(0, 0, [0, -1])).toEqual({ i: 0, j: 0, shift: [0, 1] });
    expect(pairKey(1, 0, [1])).toBe(pairKey(0, 1, [-1]));
  });

  it('block linking is symmetric and follows the shifts', () => {
    const links = [{ i: 0, j: 1, shift: [0], linking: 1 as const }, { i: 0, j: 1, shift: [-1], linking: -1 as const }];
    const L = blockLinking(2, links, [3]);
    // Ring order: A0 B0 A1 B1 A2 B2. A1 links B1 (shift 0) and B0 (shift -1); A0 and A2 are unlinked.
    expect(L[2]![3]).toBe(1);
    expect(L[2]![1]).toBe(-1);
    expect(L[0]![4]).toBe(0);
    for (let a = 0; a < 6; a++) for (let b = 0; b < 6; b++) expect(L[a]![b]).toBe(L[b]![a]);
  });

  it('offsets, the period and the cell area (parallelogram |a x b|)', () => {
    expect(latticeOffset([[1, 2, 3], [0, 1, 0]], [2, -1])).toEqual([2, 3, 6]);
    expect(cellMeasure({ vectors: [[3, 4, 0]] })).toBeCloseTo(5, 14);
    expect(cellMeasure({ vectors: [[2, 0, 0], [1, 3, 0]] })).toBeCloseTo(6, 14);
  });
});

describe('periodic layout files', () => {
  const A: Ring = { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 5 };
  const B: Ring = { name: 'B', center: [7.5, 0, 0], normal: [0, 1, 0], radius: 5 };

  it('a custom 2-in-1 chain in mm is read as a weave', () => {
    const path = file('chain.json', { format: 'thickring-layout/1', units: 'mm', rings: [A, B], lattice: { vectors: [[15, 0, 0]] } });
    expect(isPeriodicArg(path)).toBe(true);
    expect(isPeriodicArg('weave:box')).toBe(true);
    expect(isPeriodicArg('chain:3')).toBe(false);
    const r = resolvePeriodicSpec(path);
    expect(r.kind).toBe('chain');
    expect(r.links.map((l) => pairKey(l.i, l.j, l.shift)).sort()).toEqual(['0:1:-1', '0:1:0']);
  });

  it('a ring nothing passes through, or cells not linked to each other, are bad input', () => {
    const loose = { ...B, name: 'C', center: [0, 30, 0] as [number, number, number] };
    expect(() => resolvePeriodicSpec(file('loose.json', { format: 'thickring-layout/1', rings: [A, B, loose], lattice: { vectors: [[15, 0, 0]] } })))
      .toThrow(/ring C is linked to no ring or copy of a ring/);
    // B passes through A, but the next cell's A is too far for B to reach: a row of separate Hopf links.
    expect(() => resolvePeriodicSpec(file('apart.json', { format: 'thickring-layout/1', rings: [A, B], lattice: { vectors: [[40, 0, 0]] } })))
      .toThrow(/do not join each cell to its neighbours/);
  });
});

describe('wire density and weight', () => {
  it('densities by name and number; bad values name the option and the materials', () => {
    // CRC Handbook of Chemistry and Physics, room temperature (from memory): copper 8.96, aluminium 2.70 g/cm3.
    expect(parseDensity('copper').gramsPerCm3).toBe(8.96);
    expect(parseDensity('Aluminum').gramsPerCm3).toBe(2.7);
    expect(parseDensity('7.9')).toMatchObject({ gramsPerCm3: 7.9, material: null });
    expect(() => parseDensity('unobtainium')).toThrow(/--density: 'unobtainium' must be a density in g\/cm3 .* or a material name/);
    expect(() => parseDensity('7850')).toThrow(InputError);
    expect(() => parseWireDiameter('0')).toThrow(/--wire-diameter/);
    for (const m of Object.values(MATERIALS)) expect(m.source).toMatch(/from memory/);
  });

  it('2-in-1 at AR 2 with 1 mm wire: Pappus torus volume 2π²Rr² per ring, 2 rings per 8R/3', () => {
    // Closed form: R = 1.5 mm, r = 0.5 mm; volume 2π² · 1.5 · 0.25 mm³; period 8R/3 = 4 mm for 2 rings.
    const R = 1, t = 1 / 3;
    const w = weaveWeight({ rings: [{ radius: R, tube: t }, { radius: R, tube: t }], lattice: { vectors: [[8 / 3, 0, 0]] }, units: null }, parseDensity('steel'));
    const grams = (7.85 * 2 * Math.PI ** 2 * 1.5 * 0.25) / 1000;
    expect(w.wireDiameterMm).toBeCloseTo(1, 12);
    expect(w.innerDiameterMm).toBeCloseTo(2, 12);
    expect(w.rings).toBeCloseTo(500, 9);
    expect(w.grams).toBeCloseTo(500 * grams, 9);
    expect(w.per).toBe('metre');
    // Per metre of chain the weight goes with the square of the wire diameter.
    const w2 = weaveWeight({ rings: [{ radius: R, tube: t }, { radius: R, tube: t }], lattice: { vectors: [[8 / 3, 0, 0]] }, units: null }, parseDensity('steel'), 2);
    expect(w2.grams / w.grams).toBeCloseTo(4, 9);
  });
});
