// `thickring fabricate`: sizing, clearance, walls, presets, gauges, meshes on disk and bad input.
// Sources: aspect ratio AR = inner diameter / wire diameter (common jewellery usage); round-ring
// 2-in-1 chain geometric minimum AR 2, from the circle-packing bound r <= R/3 for two rings through
// one (Graham et al., Discrete Math. 181, 1998); tight Hopf tube = R/2 (Cantarella, Kusner, Sullivan
// 2002); process clearances and walls (common practice, no source; ranges as in docs/references.md);
// AWG diameters (ASTM B258 formula; table values from memory).
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import { awgDiameter, gaugeAtMost } from '../src/fabricate/gauge.js';
import { planFabrication } from '../src/fabricate/plan.js';
import { PRESETS } from '../src/fabricate/presets.js';
import type { SolveResult } from '../src/model/result.js';
import type { Vec3 } from '../src/model/types.js';
import { rotate } from '../src/model/vec.js';
import { captureIo, tempDir, threeChain, tightHopf, writeResult } from './fabricateFixtures.js';

interface Json {
  [k: string]: unknown;
}

async function runJson(args: string[]): Promise<{ code: number; json: Json; stderr: string }> {
  const io = captureIo();
  const code = await main([...args, '--json'], io);
  expect(io.stdout.length).toBe(1);
  return { code, json: JSON.parse(io.stdout[0]!) as Json, stderr: io.stderr.join('\n') };
}

function moved(r: SolveResult, s: number): SolveResult {
  const k: Vec3 = [0, 0.6, 0.8];
  const P = (p: Vec3): Vec3 => {
    const q = rotate(p, k, 1.3);
    return [q[0] * s + 7, q[1] * s - 2, q[2] * s + 1];
  };
  return {
    ...r,
    tube: r.tube * s,
    rings: [...r.rings].reverse().map((g) => ({ ...g, center: P(g.center), normal: rotate(g.normal, k, 1.3), radius: g.radius * s, tube: g.tube * s })),
    contacts: [],
  };
}

describe('sizing and printed dimensions', () => {
  it('tight Hopf at core radius 10 mm, FDM: wire R = 10 mm, printed 10 - 0.3, AR from the definition', () => {
    const p = planFabrication(tightHopf(), { size: { kind: 'coreRadius', value: 10 }, process: 'fdm' });
    expect(p.scale).toBeCloseTo(10, 12);
    // Tight Hopf tube = R/2, so the wire diameter equals the core radius.
    expect(p.largestWireDiameter).toBeCloseTo(10, 12);
    expect(p.clearance).toBe(PRESETS.fdm.clearance);
    expect(p.largestPrintedWireDiameter).toBeCloseTo(10 - 0.3, 12);
    const id = 2 * (10 - (5 - 0.15));
    expect(p.rings[0]!.innerDiameter).toBeCloseTo(id, 12);
    expect(p.aspectRatio).toBeCloseTo(id / 9.7, 12);
    expect(p.tube).toBeCloseTo(5, 12);
    expect(p.minWallMet).toBe(true);
  });

  it('three-chain at the packing bound made of wire has AR exactly 2 (round-ring 2-in-1 minimum)', () => {
    // Packing bound k = 2 (Graham et al., Discrete Math. 181, 1998): tube R/3, so AR = (R - R/3) / (R/3) = 2
    // (references.md, round-ring 2-in-1 minimum); ID 6 mm then needs wire 6 / 2 = 3 mm.
    const p = planFabrication(threeChain(), { size: { kind: 'innerDiameter', value: 6 }, process: 'wire' });
    expect(p.clearance).toBe(0);
    expect(p.aspectRatio).toBeCloseTo(2, 12);
    expect(p.rings[0]!.innerDiameter).toBeCloseTo(6, 12);
    expect(p.largestWireDiameter).toBeCloseTo(3, 12);
  });

  it('inner and outer diameter options give exactly that printed size, for every process', () => {
    for (const process of ['fdm', 'sla', 'sls', 'wire'] as const) {
      const id = planFabrication(threeChain(), { size: { kind: 'innerDiameter', value: 20 }, process });
      expect(id.rings[id.sizedRing]!.innerDiameter).toBeCloseTo(20, 12);
      const od = planFabrication(threeChain(), { size: { kind: 'outerDiameter', value: 20 }, process });
      expect(od.rings[od.sizedRing]!.outerDiameter).toBeCloseTo(20, 12);
      // Facing surfaces that touched at the optimum end up clearance apart: each tube loses c/2.
      for (const r of od.rings) expect(r.tube - r.printedTube).toBeCloseTo(PRESETS[process].clearance / 2, 12);
    }
  });

  it('the size applies to the largest ring and the others scale with it', () => {
    const r = threeChain();
    r.rings[1] = { ...r.rings[1]!, radius: 2, tube: 2 / 3 };
    const p = planFabrication(r, { size: { kind: 'coreRadius', value: 12 }, process: 'sla' });
    expect(p.sizedRing).toBe(1);
    expect(p.rings[1]!.radius).toBeCloseTo(12, 12);
    expect(p.rings[0]!.radius).toBeCloseTo(6, 12);
    expect(p.largestWireDiameter).toBeCloseTo(8, 12);
  });

  it('the printed figures do not depend on the layout pose or scale (rotated, moved, scaled 1e3 and 1e-3, reordered)', () => {
    const base = planFabrication(tightHopf(), { size: { kind: 'outerDiameter', value: 30 }, process: 'sls' });
    for (const s of [1e3, 1e-3]) {
      const p = planFabrication(moved(tightHopf(), s), { size: { kind: 'outerDiameter', value: 30 }, process: 'sls' });
      expect(p.largestPrintedWireDiameter).toBeCloseTo(base.largestPrintedWireDiameter, 9);
      expect(p.aspectRatio).toBeCloseTo(base.aspectRatio, 9);
      expect(p.tube).toBeCloseTo(base.tube, 9);
    }
  });

  it('presets sit inside the common-practice ranges (common practice, no source)', () => {
    expect(PRESETS.fdm.clearance).toBe(0.3);
    expect(PRESETS.fdm.minWallRange).toEqual([0.8, 1.2]);
    expect(PRESETS.sla.clearanceRange).toEqual([0.125, 0.25]);
    expect(PRESETS.sla.minWallRange).toEqual([0.5, 0.8]);
    expect(PRESETS.sls.clearanceRange).toEqual([0.5, 0.6]);
    expect(PRESETS.sls.minWallRange).toEqual([0.7, 1.0]);
    expect(PRESETS.wire.clearance).toBe(0);
    for (const p of Object.values(PRESETS)) {
      expect(p.clearance).toBeGreaterThanOrEqual(p.clearanceRange[0]);
      expect(p.clearance).toBeLessThanOrEqual(p.clearanceRange[1]);
      expect(p.minWall).toBeGreaterThanOrEqual(p.minWallRange[0]);
      expect(p.minWall).toBeLessThanOrEqual(p.minWallRange[1]);
    }
  });
});

describe('wire gauge (AWG, ASTM B258 formula)', () => {
  it('matches table diameters (from memory)', () => {
    for (const [n, d] of [[10, 2.588], [12, 2.053], [14, 1.628], [18, 1.024], [20, 0.812], [0, 8.251]] as const) {
      expect(awgDiameter(n)).toBeCloseTo(d, 3);
    }
  });

  it('picks the thickest gauge not thicker than the wire', () => {
    expect(gaugeAtMost(2.0)!.number).toBe(13);
    expect(gaugeAtMost(awgDiameter(16))!.number).toBe(16);
    expect(gaugeAtMost(0.01)).toBeNull();
    expect(gaugeAtMost(20)).toBeNull();
  });
});

describe('fabricate command', () => {
  it('JSON keeps tube, rings, status, aspectRatio in mm and reports the wall check', async () => {
    const dir = tempDir('fab-json');
    const path = writeResult(dir, 'hopf.json', tightHopf());
    const { code, json } = await runJson(['fabricate', path, '--core-radius', '10', '--process', 'fdm']);
    expect(code).toBe(0);
    expect(json['units']).toBe('mm');
    expect(json['status']).toBe('optimal');
    expect(json['tube']).toBeCloseTo(5, 12);
    expect(json['aspectRatio']).toBeCloseTo(10.3 / 9.7, 12);
    expect((json['rings'] as Json[]).map((r) => r['name'])).toEqual(['A', 'B']);
    expect((json['rings'] as Json[])[0]!['radius']).toBeCloseTo(10, 12);
    expect(json['largestWireDiameter']).toBeCloseTo(10, 12);
    expect(json['largestPrintedWireDiameter']).toBeCloseTo(9.7, 12);
    expect(json['minWallMet']).toBe(true);
    expect(json['presetNote']).toMatch(/rules of thumb/);
  });

  it('a wall below the minimum is bad input naming the smallest size that meets it; --allow-thin makes it with a WARNING', async () => {
    const dir = tempDir('fab-wall');
    const path = writeResult(dir, 'chain.json', threeChain());
    const stl = join(dir, 'thin.stl');
    // Outer diameter 3 mm for SLS: s = (3 + 0.5) / (2 * 4/3), wire 2 s / 3 = 0.875 mm, printed 0.375 < 0.7 mm.
    // The wall is met from s = (0.7 + 0.5) / (2/3) = 1.8, i.e. OD = 2 (4/3) 1.8 - 0.5 = 4.3 mm (closed form).
    const io = captureIo();
    expect(await main(['fabricate', path, '--outer-diameter', '3', '--process', 'sls', '--stl', stl], io)).toBe(2);
    expect(io.stderr.join('\n')).toMatch(/below the minimum wall 0\.7 mm.*--outer-diameter 4\.3 \(mm\)/);
    expect(existsSync(stl)).toBe(false);
    // The size the message names really meets the wall.
    const ok = await runJson(['fabricate', path, '--outer-diameter', '4.3', '--process', 'sls']);
    expect(ok.code).toBe(0);
    expect(ok.json['minWallMet']).toBe(true);
    const { code, json, stderr } = await runJson(['fabricate', path, '--outer-diameter', '3', '--process', 'sls', '--allow-thin']);
    expect(code).toBe(0);
    expect(json['minWallMet']).toBe(false);
    expect(json['thinnestPrintedWireDiameter']).toBeCloseTo(0.375, 12);
    expect((json['warnings'] as string[]).some((w) => /^WARNING: .*below the minimum wall 0\.7 mm/.test(w))).toBe(true);
    expect(stderr).toMatch(/WARNING/);
  });

  it('--min-wall overrides the preset (refused without --allow-thin)', async () => {
    const dir = tempDir('fab-minwall');
    const path = writeResult(dir, 'hopf.json', tightHopf());
    const io = captureIo();
    // Tight Hopf wire = R (Cantarella, Kusner, Sullivan 2002): printed 10 - 0.3 = 9.7 mm < 12 mm; the wall
    // is met from R = 12 + 0.3 = 12.3 mm.
    expect(await main(['fabricate', path, '--core-radius', '10', '--process', 'fdm', '--min-wall', '12'], io)).toBe(2);
    expect(io.stderr.join('\n')).toMatch(/--core-radius 12\.3 \(mm\)/);
    const { json } = await runJson(['fabricate', path, '--core-radius', '10', '--process', 'fdm', '--min-wall', '12', '--allow-thin']);
    expect(json['minWall']).toBe(12);
    expect(json['minWallMet']).toBe(false);
  });

  it('wire process prints each ring size once with its SWG and AWG gauges and every number with its unit', async () => {
    const dir = tempDir('fab-wire');
    const path = writeResult(dir, 'chain.json', threeChain());
    const io = captureIo();
    expect(await main(['fabricate', path, '--inner-diameter', '6', '--process', 'wire'], io)).toBe(0);
    const text = io.stdout.join('\n');
    // 9 AWG = 2.906 mm (ASTM B258 table); 11 SWG = 0.116 in = 2.946 mm (Imperial Standard Wire Gauge, 1883).
    expect(text).toMatch(/rings A, B, C \(3\): wire 3 mm \(thickest gauges not over it: 11 SWG 2\.9464 mm, 9 AWG 2\.9064 mm\)/);
    expect(text.match(/wire 3 mm/g)!.length).toBe(1);
    expect(text).toMatch(/aspect ratio .*: 2 \(dimensionless\)/);
    expect(text).toMatch(/rules of thumb/);
    expect(text).not.toMatch(/printed/);
  });

  it('writes STL, OBJ and 3MF that agree with the checked meshes', async () => {
    const dir = tempDir('fab-mesh');
    const path = writeResult(dir, 'chain.json', threeChain());
    const stl = join(dir, 'chain.stl'), obj = join(dir, 'chain.obj'), tmf = join(dir, 'chain.3mf');
    const { code, json } = await runJson(['fabricate', path, '--core-radius', '6', '--process', 'fdm', '--chord', '0.05', '--stl', stl, '--obj', obj, '--3mf', tmf]);
    expect(code).toBe(0);
    const mesh = json['mesh'] as { triangles: number; check: { ok: boolean; minGap: number } };
    expect(mesh.check.ok).toBe(true);
    expect(mesh.check.minGap).toBeGreaterThanOrEqual(0.3 - 0.05);
    const bytes = readFileSync(stl);
    expect(bytes.readUInt32LE(80)).toBe(mesh.triangles);
    expect(bytes.length).toBe(84 + 50 * mesh.triangles);
    expect(readFileSync(obj, 'utf8').split('\n').filter((l) => l.startsWith('o ')).length).toBe(3);
    expect(readFileSync(tmf).subarray(0, 2).toString('latin1')).toBe('PK');
    expect((json['files'] as Json[]).map((f) => f['format'])).toEqual(['stl', 'obj', '3mf']);
  });
});

describe('fabricate: bad input exits 2 with a clear message and creates no file', () => {
  const dir = tempDir('fab-bad');
  const good = writeResult(dir, 'hopf.json', tightHopf());
  const outs = (tag: string) => ['--stl', join(dir, `${tag}.stl`), '--obj', join(dir, `${tag}.obj`), '--3mf', join(dir, `${tag}.3mf`)];
  const cases: [string, string[], RegExp][] = [
    ['negative size', ['fabricate', good, '--core-radius', '-5', '--process', 'fdm'], /--core-radius -5 must be > 0/],
    ['zero size', ['fabricate', good, '--inner-diameter', '0', '--process', 'fdm'], /--inner-diameter 0 must be > 0/],
    ['size not a number', ['fabricate', good, '--outer-diameter', 'big', '--process', 'fdm'], /--outer-diameter 'big' must be a number/],
    ['two size options', ['fabricate', good, '--core-radius', '5', '--outer-diameter', '20', '--process', 'fdm'], /exactly one size option/],
    ['no size option', ['fabricate', good, '--process', 'fdm'], /give exactly one size/],
    ['clearance larger than the wire', ['fabricate', good, '--core-radius', '1', '--process', 'fdm', '--clearance', '1.5'], /--clearance 1\.5 mm is not smaller than ring A's wire diameter 1 mm/],
    ['negative clearance', ['fabricate', good, '--core-radius', '10', '--process', 'fdm', '--clearance', '-0.1'], /--clearance -0\.1 must be >= 0/],
    ['inner diameter below the clearance', ['fabricate', good, '--inner-diameter', '0.2', '--process', 'fdm'], /must exceed the clearance 0\.3 mm/],
    ['unknown process', ['fabricate', good, '--core-radius', '10', '--process', 'cnc'], /--process 'cnc' is not known: use one of fdm, sla, sls, wire/],
    ['missing process', ['fabricate', good, '--core-radius', '10'], /--process is required/],
    ['zero chord', ['fabricate', good, '--core-radius', '10', '--process', 'fdm', '--chord', '0'], /--chord 0 must be > 0/],
    ['chord too fine for the budget', ['fabricate', good, '--core-radius', '10', '--process', 'fdm', '--chord', '1e-7'], /use a larger chord tolerance/],
    ['unreadable result', ['fabricate', join(dir, 'nope.json'), '--core-radius', '10', '--process', 'fdm'], /result file '.*nope\.json' cannot be read/],
    ['foreign result (a layout)', ['fabricate', writeResult(dir, 'layout.json', { format: 'thickring-layout/1', rings: [] }), '--core-radius', '10', '--process', 'fdm'], /has format "thickring-layout\/1": expected format "thickring-result\/1"/],
    ['file from another tool', ['fabricate', writeResult(dir, 'other.json', { vertices: [] }), '--core-radius', '10', '--process', 'fdm'], /other\.json' has no 'format' field.*"thickring-result\/1"/],
    ['another version', ['fabricate', writeResult(dir, 'v9.json', { ...tightHopf(), format: 'thickring-result/9' }), '--core-radius', '10', '--process', 'fdm'], /'thickring-result\/9'.*"thickring-result\/1"/],
    ['not JSON (a half-written file)', ['fabricate', writeText(dir, 'broken.json', '{"format": '), '--core-radius', '10', '--process', 'fdm'], /broken\.json' is not valid JSON/],
    ['output folder missing', ['fabricate', good, '--core-radius', '10', '--process', 'fdm', '--obj', join(dir, 'no-such-dir', 'x.obj')], /folder .* does not exist/],
  ];
  cases.forEach(([label, args, message], n) => {
    it(label, async () => {
      const tag = `case${n}`;
      const io = captureIo();
      const full = args.includes('--obj') ? args : [...args, ...outs(tag)];
      expect(await main(full, io)).toBe(2);
      expect(io.stderr.join('\n')).toMatch(message);
      expect(io.stdout).toEqual([]);
      for (const ext of ['stl', 'obj', '3mf']) expect(existsSync(join(dir, `${tag}.${ext}`))).toBe(false);
      if (args.includes('--obj')) expect(existsSync(args[args.indexOf('--obj') + 1]!)).toBe(false);
    });
  });
});

function writeText(dir: string, name: string, text: string): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}
