// `thickring inflate` and `thickring catalog` through main() with a capturing Io. Every solved result is
// re-checked by the independent checker. References: tight Hopf link tube R/2 (Cantarella, Kusner,
// Sullivan 2002); 3-ring chain R/3 (circle-packing bound k = 2, r_2 = 1/2, Graham et al. 1998);
// Freedman & Skora 1987 for the rejected all-unlinked layouts.
import { mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { run } from './cliHarness.js';
import { verifyRings } from '../src/check/verify.js';
import type { SolveResult } from '../src/model/result.js';
import { readResultFile } from '../src/model/resultFile.js';


const dir = mkdtempSync(join(tmpdir(), 'thickring-inflate-'));
const h = Math.SQRT1_2;

describe('thickring inflate', () => {
  it('hopf --json: one JSON object, tube R/2 (CKS 2002), independently re-verified', async () => {
    const { code, io } = await run(['inflate', 'hopf', '--json', '--starts', '2', '--workers', '2']);
    expect(code).toBe(0);
    expect(io.stdout).toHaveLength(1);
    const r = JSON.parse(io.stdout[0]!) as SolveResult;
    for (const key of ['tube', 'rings', 'status', 'aspectRatio']) expect(r).toHaveProperty(key);
    expect(r.format).toBe('thickring-result/1');
    expect(['optimal', 'stalled']).toContain(r.status);
    expect(Math.abs(r.tube - 0.5)).toBeLessThan(1e-8);
    expect(verifyRings(r.rings, r.tube, r.linking).ok).toBe(true);
    // One progress line per finished start on stderr when not interactive.
    expect(io.stderr.filter((l) => /^start \d/.test(l))).toHaveLength(2);
  });

  it('chain:8 --json: each start keeps its last gains, the last positive steps of its history (text prints them too)', async () => {
    const { code, io } = await run(['inflate', 'chain:8', '--json', '--starts', '2', '--workers', '1', '--all-starts']);
    expect(code).toBe(0);
    const r = JSON.parse(io.stdout[0]!) as SolveResult;
    // Chain of rings: R/3 (circle-packing bound k = 2, Graham et al. 1998), attained.
    expect(Math.abs(r.tube - 1 / 3)).toBeLessThan(1e-9);
    for (const s of r.starts) {
      // Recomputed here from the history: the increases between outer iterations, rejected steps (no gain) left out.
      const steps = s.history.slice(1).map((t, k) => t - s.history[k]!).filter((g) => g > 0);
      expect(s.lastGains).toEqual(steps.slice(-5));
      expect(s.lastGains!.length).toBeGreaterThan(0);
    }
    const text = await run(['inflate', 'chain:8', '--starts', '1']);
    const line = text.io.stdout.join('\n').split('\n').find((l) => l.startsWith('Last gains of start 0'));
    expect(line).toMatch(/^Last gains of start 0 \(layout units, oldest first\): (\d\.\de[-+]\d+, ){0,4}\d\.\de[-+]\d+$/);
  });

  it('chain:3 --radii 2 -o: text with units, result file written atomically and readable; tube R/3 = 2/3', async () => {
    const out = join(dir, 'chain.json');
    const { code, io } = await run(['inflate', 'chain:3', '--radii', '2', '--starts', '1', '-o', out]);
    expect(code).toBe(0);
    const text = io.stdout.join('\n');
    expect(text).toContain('Tube radius: 0.6666666667 layout units');
    expect(text).toContain('(dimensionless)');
    expect(text).toMatch(/Known optimum R\/3/);
    expect(text).toMatch(/Cautions:/);
    const r = readResultFile(out);
    expect(Math.abs(r.tube - 2 / 3)).toBeLessThan(1e-8);
    // (R - r)/r with r = R/3 is 2: the geometric minimum aspect ratio of 2-in-1 chain (references.md).
    expect(r.aspectRatio).toBeCloseTo(2, 7);
    expect(verifyRings(r.rings, r.tube, r.linking ?? []).ok).toBe(true);
    expect(readdirSync(dir).filter((f) => f.startsWith('.thickring-tmp'))).toEqual([]);
  });

  it('a layout file in mm keeps its units; tight Hopf again R/2', async () => {
    const file = join(dir, 'hopf.json');
    writeFileSync(file, JSON.stringify({
      format: 'thickring-layout/1', units: 'mm',
      rings: [
        { name: 'outer', center: [0, 0, 0], normal: [0, 0, 1], radius: 10 },
        { name: 'inner', center: [8, 0, 0], normal: [0, 1, 0], radius: 10 },
      ],
    }));
    const { code, io } = await run(['inflate', file, '--json', '--starts', '1']);
    expect(code).toBe(0);
    const r = JSON.parse(io.stdout[0]!) as SolveResult;
    expect(r.units).toBe('mm');
    expect(Math.abs(r.tube - 5)).toBeLessThan(1e-7);
    expect(verifyRings(r.rings, r.tube, r.linking).ok).toBe(true);
    // Progress lines carry the layout's unit too.
    const progress = io.stderr.join('\n');
    expect(progress).toMatch(/best [\d.]+ \(mm\)/);
    expect(progress).not.toMatch(/layout units/);
  });

  it('bad options exit 2 with a message naming the option', async () => {
    const cases: [string[], RegExp][] = [
      [['inflate', 'hopf', '--starts', '0'], /--starts: '0' must be a whole number from 1/],
      [['inflate', 'hopf', '--workers', 'two'], /--workers: 'two'/],
      [['inflate', 'hopf', '--seed', '-1'], /--seed: '-1'/],
      [['inflate', 'hopf', '--tol', 'abc'], /--tol: 'abc' must be a number/],
      [['inflate', 'hopf', '--radii', '1,-2'], /--radii: '-2' is not a number > 0/],
      [['inflate', 'chain:3', '--radii', '1,2'], /--radii: got 2 values but chain:3 has 3 rings/],
      [['inflate', 'chain:3', '--symmetry', 'cyclic:5'], /--symmetry cyclic:5/],
      [['inflate', 'chain:3', '--symmetry', 'spiral'], /--symmetry: 'spiral'/],
      [['inflate', 'knot:3'], /spec 'knot:3' is not in the catalogue: use one of hopf, chain:N/],
      [['inflate', 'necklace:2'], /necklace:2.*from 3/],
      [['inflate', join(dir, 'missing.json')], /layout file '.*missing.json' does not exist/],
    ];
    for (const [args, pattern] of cases) {
      const { code, io } = await run(args);
      expect(code, args.join(' ')).toBe(2);
      expect(io.stderr.join('\n'), args.join(' ')).toMatch(pattern);
      expect(io.stdout).toEqual([]);
    }
  });

  it('a start that attains the packing bound ends the run; --all-starts runs every start (bound R/2: CKS 2002)', async () => {
    // The tight Hopf link attains the packing bound R/2 (Cantarella, Kusner, Sullivan 2002), a proven global
    // maximum: on one worker the starts after the first that attains it are not run.
    const first = await run(['inflate', 'hopf', '--json', '--starts', '4', '--workers', '1']);
    expect(first.code).toBe(0);
    const r = JSON.parse(first.io.stdout[0]!) as SolveResult;
    expect(Math.abs(r.tube - 0.5)).toBeLessThan(1e-9);
    expect(verifyRings(r.rings, r.tube, r.linking).ok).toBe(true);
    expect(r.starts.length).toBeLessThan(4);
    expect(r.starts.at(-1)!.status).toBe('optimal');
    const text = await run(['inflate', 'hopf', '--starts', '4', '--workers', '1']);
    expect(text.io.stdout.join('\n')).toMatch(/attained the packing bound, a proven global maximum, so the other \d starts? could not do better/);
    const all = await run(['inflate', 'hopf', '--json', '--starts', '4', '--workers', '1', '--all-starts']);
    expect(all.code).toBe(0);
    const every = JSON.parse(all.io.stdout[0]!) as SolveResult;
    expect(every.starts).toHaveLength(4);
    expect(Math.abs(every.tube - 0.5)).toBeLessThan(1e-9);
    // A weave has no packing bound to stop at: the flag is refused, naming itself.
    const weave = await run(['inflate', 'weave:2-in-1', '--all-starts']);
    expect(weave.code).toBe(2);
    expect(weave.io.stderr.join('\n')).toMatch(/--all-starts: applies to ring links only/);
  });

  it('layouts that nothing holds together are refused (Freedman & Skora 1987)', async () => {
    const unlinked = join(dir, 'unlinked.json');
    writeFileSync(unlinked, JSON.stringify({
      format: 'thickring-layout/1',
      rings: [
        { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 },
        { name: 'B', center: [3, 0, 0], normal: [0, 1, 0], radius: 1 },
      ],
    }));
    let res = await run(['inflate', unlinked]);
    expect(res.code).toBe(2);
    expect(res.io.stderr.join('\n')).toMatch(/no two rings are linked.*Freedman & Skora 1987/);

    const loose = join(dir, 'loose.json');
    writeFileSync(loose, JSON.stringify({
      format: 'thickring-layout/1',
      rings: [
        { name: 'A', center: [0.5, 0, 0], normal: [0, h, h], radius: 1 },
        { name: 'B', center: [-0.5, 0, 0], normal: [0, -h, h], radius: 1 },
        { name: 'C', center: [0, 0, 9], normal: [0, 0, 1], radius: 1 },
      ],
    }));
    res = await run(['inflate', loose]);
    expect(res.code).toBe(2);
    expect(res.io.stderr.join('\n')).toMatch(/ring C is linked to no other ring/);
  });
});

describe('thickring catalog', () => {
  it('--json prints one object listing the five families; text names them with their symmetry', async () => {
    let { code, io } = await run(['catalog', '--json']);
    expect(code).toBe(0);
    expect(io.stdout).toHaveLength(1);
    const listing = JSON.parse(io.stdout[0]!) as { entries: { spec: string; knownOptimum: { tubeOverCore: number } | null }[] };
    expect(listing.entries.map((e) => e.spec)).toEqual(['hopf', 'chain:N', 'necklace:N', 'star:K', 'torus:N']);
    expect(listing.entries[0]!.knownOptimum?.tubeOverCore).toBe(0.5);
    ({ code, io } = await run(['catalog']));
    expect(code).toBe(0);
    const text = io.stdout.join('\n');
    for (const s of ['hopf', 'chain:N', 'necklace:N', 'star:K', 'torus:N', 'dihedral:2', 'Freedman & Skora']) expect(text).toContain(s);
  });
});
