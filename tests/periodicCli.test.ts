// `thickring inflate` and `thickring compare` on weaves through main() with a capturing Io; the result
// file is checked against the published JSON Schema and re-read by the result reader. References: the
// 2-in-1 chain's minimum aspect ratio 2 (circle-packing bound k = 2, Graham et al., Discrete Math. 181,
// 1998: tube <= R/3), its period 8R/3 (docs/weaves.md), and Pappus's torus volume 2π²Rr² for the weight;
// steel 7.85 g/cm3 (typical data-sheet value, from memory).
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import { run } from './cliHarness.js';
import { readResultFile } from '../src/model/resultFile.js';
import type { PeriodicCompareResult } from '../src/optimize/run/weave.js';
import type { PeriodicSolveResult } from '../src/optimize/run/multistart.js';


const dir = mkdtempSync(join(tmpdir(), 'thickring-weave-cli-'));
const schema = JSON.parse(readFileSync(new URL('../schemas/result.schema.json', import.meta.url), 'utf8')) as object;
const validate = new Ajv2020({ allErrors: true }).compile(schema);

describe('thickring inflate on weaves', () => {
  it('weave:2-in-1 --json --density steel: aspectRatio 2, lattice, rings per length, grams per metre', async () => {
    const { code, io } = await run(['inflate', 'weave:2-in-1', '--json', '--starts', '1', '--density', 'steel']);
    expect(code).toBe(0);
    expect(io.stdout).toHaveLength(1);
    const r = JSON.parse(io.stdout[0]!) as PeriodicSolveResult;
    expect(validate(r)).toBe(true);
    expect(Math.abs(r.aspectRatio - 2)).toBeLessThanOrEqual(1e-9);
    expect(r.lattice.vectors).toHaveLength(1);
    expect(r.periodic.ringsPerUnitLength!).toBeCloseTo(0.75, 8);
    // At a 1 mm wire: R = 1.5 mm, r = 0.5 mm, 500 rings per metre (period 4 mm per 2 rings).
    const w = r.periodic.weight!;
    expect(w.rings).toBeCloseTo(500, 6);
    expect(w.grams).toBeCloseTo((500 * 7.85 * 2 * Math.PI ** 2 * 1.5 * 0.25) / 1000, 6);
    expect(w.density.source).toMatch(/from memory/);
  });

  it('a custom chain layout in mm, --repeats 3 -o: a block file that the reader accepts; text carries units', async () => {
    const layout = join(dir, 'chain.json');
    writeFileSync(layout, JSON.stringify({
      format: 'thickring-layout/1', units: 'mm',
      rings: [
        { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 3 },
        { name: 'B', center: [4.5, 0, 0], normal: [0, 1, 0], radius: 3 },
      ],
      lattice: { vectors: [[9, 0, 0]] },
    }));
    const out = join(dir, 'block.json');
    const { code, io } = await run(['inflate', layout, '--starts', '1', '--repeats', '3', '--density', '8.96', '-o', out]);
    expect(code).toBe(0);
    const text = io.stdout.join('\n');
    expect(text).toMatch(/minimum aspect ratio \(inner diameter \/ wire diameter\) 2 \(dimensionless\)/);
    expect(text).toMatch(/Period 8 mm; 0\.25 rings per mm of length/);
    expect(text).toMatch(/Weight: [\d.]+ g\/m and .* at wire diameter 2 mm/);
    expect(text).toMatch(/Rings listed: a block of 3 cells/);
    const block = readResultFile(out);
    expect(block.rings).toHaveLength(6);
    expect(block.verification.ok).toBe(true);
    expect(validate(JSON.parse(readFileSync(out, 'utf8')))).toBe(true);
  });

  it('bad input exits 2 with a message naming the option or the spec', async () => {
    const cases: [string[], RegExp][] = [
      [['inflate', 'weave:persian-9'], /is not a weave in the catalogue/],
      [['inflate', 'weave:2-in-1', '--density', 'unobtainium'], /--density: 'unobtainium'/],
      [['inflate', 'weave:2-in-1', '--wire-diameter', '1'], /--wire-diameter: only sets the scale/],
      [['inflate', 'weave:2-in-1', '--symmetry', 'cyclic:2'], /point symmetries of weaves are not imposed/],
      [['inflate', 'weave:2-in-1', '--repeats', '0'], /--repeats: 0 must be a whole number from 1/],
      [['inflate', 'hopf', '--density', 'steel'], /--density: applies to weaves only/],
      [['compare', 'weave:2-in-1', '--density', '-3'], /--density: '-3'/],
      [['compare', 'weave:2-in-1', '--sweep-points', '3'], /--sweep-points: weaves have no symmetry-breaking curve/],
      [['compare', 'weave:2-in-1', '--symmetry', 'dihedral:2'], /point symmetries of weaves are not imposed/],
    ];
    for (const [args, message] of cases) {
      const { code, io } = await run(args);
      expect(code).toBe(2);
      expect(io.stderr.join('\n')).toMatch(message);
    }
  });
});

describe('thickring compare on weaves', () => {
  it('weave:2-in-1: one cell vs a 2-cell supercell, no gain (the bound R/3 holds for both)', async () => {
    const { code, io } = await run(['compare', 'weave:2-in-1', '--json', '--starts', '1']);
    expect(code).toBe(0);
    const r = JSON.parse(io.stdout[0]!) as PeriodicCompareResult;
    expect(validate(r)).toBe(true);
    expect(r.supercell).toEqual([2]);
    expect(r.broken.rings).toHaveLength(4);
    expect(Math.abs(r.symmetric.aspectRatio - 2)).toBeLessThanOrEqual(1e-9);
    expect(Math.abs(r.gain)).toBeLessThan(1e-9);
    expect(r.verification.ok).toBe(true);
  });
});
