// measure on layouts of many rings (was: "Maximum call stack size exceeded" at 1,000 rings, over a minute
// at 3,000): the broad phase lists only pairs whose bounding spheres come near, checked here against the
// all-pairs test done by brute force; linking goes sparse above 256 rings; the ring-count limits refuse
// larger layouts with exit 2. Geometry facts used: two circles of radius R whose centres are more than 2R
// apart cannot meet or link (each lies in its centre's ball of radius R; elementary).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { MEASURE_ALL_PAIRS_MAX, MEASURE_DENSE_LINKING_MAX, type MeasureResult } from '../src/analyze/measure.js';
import { MAX_CELL_RINGS, MAX_LAYOUT_RINGS, MAX_SOLVE_RINGS } from '../src/model/layout.js';
import { coreDistance } from '../src/check/verify.js';
import { run } from './cliHarness.js';

const dir = mkdtempSync(join(tmpdir(), 'thickring-many-'));

type R = { name: string; center: [number, number, number]; normal: [number, number, number]; radius: number };

/** n unit rings on a cubic grid of spacing 3 with assorted normals: neighbours 1 apart, nothing linked. */
function grid(n: number): R[] {
  const side = Math.ceil(Math.cbrt(n));
  return Array.from({ length: n }, (_, i) => ({
    name: `R${i}`,
    center: [3 * (i % side), 3 * (Math.floor(i / side) % side), 3 * Math.floor(i / side / side)],
    normal: [Math.sin(i), Math.cos(1.3 * i), 0.5],
    radius: 1,
  }));
}

/** A chain: ring k at (1.5 k, 0, 0), normals alternating z and y, so consecutive rings are Hopf-like linked. */
function chain(n: number): R[] {
  return Array.from({ length: n }, (_, k) => ({ name: `C${k}`, center: [1.5 * k, 0, 0], normal: k % 2 ? [0, 1, 0] : [0, 0, 1], radius: 1 }));
}

function file(name: string, rings: R[]): string {
  const p = join(dir, name);
  writeFileSync(p, JSON.stringify({ format: 'thickring-layout/1', rings }));
  return p;
}

async function measure(path: string): Promise<MeasureResult> {
  const { code, io } = await run(['measure', path, '--json']);
  expect(io.stderr).toEqual([]);
  expect(code).toBe(0);
  return JSON.parse(io.stdout[0]!) as MeasureResult;
}

describe('measure on many rings', () => {
  it('1,000 separate rings: exit 0; the listed pairs are exactly those within 2 max R (brute force); tube from brute-force distances', async () => {
    const rings = grid(1000);
    const m = await measure(file('grid1000.json', rings));
    expect(m.rings).toHaveLength(1000);
    // Brute force over all 499,500 pairs: bounding spheres within 2 max R = 2 of each other.
    const want: string[] = [];
    for (let i = 0; i < rings.length; i++) {
      for (let j = i + 1; j < rings.length; j++) {
        const d = Math.hypot(...([0, 1, 2].map((k) => rings[i]!.center[k]! - rings[j]!.center[k]!)) as [number, number, number]);
        if (d <= 4) want.push(`${i}-${j}`);
      }
    }
    expect(m.pairs.map((p) => `${p.a}-${p.b}`).sort()).toEqual(want.sort());
    // The common tube is half the least core distance (equal rings, r <= R). The checker's brute force on the
    // limiting pair gives it; on every 25th listed pair it is no larger than half the distance.
    const limiting = m.pairs.reduce((b, p) => (p.tubeLimit < b.tubeLimit ? p : b));
    expect(m.tube).toBeCloseTo(Math.min(1, coreDistance(rings[limiting.a]!, rings[limiting.b]!).distance / 2), 6);
    for (let k = 0; k < m.pairs.length; k += 25) {
      const p = m.pairs[k]!;
      expect(m.tube).toBeLessThanOrEqual(coreDistance(rings[p.a]!, rings[p.b]!).distance / 2 + 1e-7);
    }
    expect(m.linking).toBeNull();
    expect(m.links).toEqual([]);
    expect(m.unheld).toHaveLength(1000);
    expect(m.notes.join(' ')).toMatch(/pairs lists only the pairs whose bounding spheres come within 2/);
    expect(m.notes.join(' ')).toMatch(/linking is null: links lists the linked pairs/);
  });

  it(`a chain of 300 (above ${MEASURE_DENSE_LINKING_MAX}): links hold the 299 consecutive pairs, one linked piece`, async () => {
    const m = await measure(file('chain300.json', chain(300)));
    expect(m.linking).toBeNull();
    // Hand geometry: ring k+1 crosses ring k's plane once inside its disk (0.5 from the core) and once outside, so
    // each consecutive pair links once; rings two apart have centres 3 = 3R apart, more than 2R, so cannot link (header).
    expect(m.links.map((l) => `${l.a}-${l.b}`)).toEqual(Array.from({ length: 299 }, (_, k) => `${k}-${k + 1}`));
    expect(m.components).toHaveLength(1);
    expect(m.unheld).toEqual([]);
  });

  it(`up to ${MEASURE_ALL_PAIRS_MAX} rings every pair is listed and linking is the full matrix, matching links`, async () => {
    const m = await measure(file('chain10.json', chain(10)));
    // 45 = C(10, 2) pairs and 9 consecutive links (hand count, geometry as above); the matrix agreeing with the
    // sparse list is internal consistency, no outside source.
    expect(m.pairs).toHaveLength(45);
    expect(m.linking).toHaveLength(10);
    for (const l of m.links) expect(m.linking![l.a]![l.b]).toBe(l.linking);
    expect(m.links).toHaveLength(9);
  });

  it(`more than ${MAX_LAYOUT_RINGS} rings: exit 2, one line`, async () => {
    const { code, io } = await run(['measure', file('toomany.json', grid(MAX_LAYOUT_RINGS + 1))]);
    expect(code).toBe(2);
    expect(io.stderr).toHaveLength(1);
    expect(io.stderr[0]).toMatch(/rings has 10001 entries, more than the 10000 a layout may hold/);
  });

  it(`a weave cell (layout with a lattice) holds at most ${MAX_CELL_RINGS} rings: its pair search grows with the square of the cell`, async () => {
    const p = join(dir, 'bigcell.json');
    writeFileSync(p, JSON.stringify({ format: 'thickring-layout/1', rings: grid(65), lattice: { vectors: [[100, 0, 0]] } }));
    const { code, io } = await run(['measure', p]);
    expect(code).toBe(2);
    expect(io.stderr.join('\n')).toMatch(/a layout with a lattice has 65 rings in its cell, more than 64/);
  });

  it(`inflate and compare take at most ${MAX_SOLVE_RINGS} rings from a file: exit 2 naming the limit`, async () => {
    const path = file('chain257.json', chain(MAX_SOLVE_RINGS + 1));
    for (const cmd of ['inflate', 'compare']) {
      const { code, io } = await run([cmd, path, '--starts', '1']);
      expect(code).toBe(2);
      expect(io.stderr.join('\n')).toMatch(/has 257 rings; inflate and compare solve at most 256/);
    }
  });
});
