// Wire rings: gauges, the wire a maker owns, mandrels and spring-back, and weave cells made of wire.
// Sources are named beside each check. Aspect ratio AR = inner diameter / wire diameter (common jewellery
// usage); the three-ring chain at the packing bound has AR exactly 2 (two rings through one: Graham et al.,
// Discrete Math. 181, 1998, r_2 = 1/2, so tube <= R/3 and AR = (R - R/3) / (R/3) = 2).
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { main } from '../cli/main.js';
import { awgDiameter, gaugeAtMost, parseWire, swgDiameter } from '../src/fabricate/gauge.js';
import { resolveSpringBack } from '../src/fabricate/materials.js';
import { captureIo, tempDir, threeChain, writeResult } from './fabricateFixtures.js';

interface Json { [k: string]: unknown }

async function runJson(args: string[]): Promise<{ code: number; json: Json; stderr: string }> {
  const io = captureIo();
  const code = await main([...args, '--json'], io);
  return { code, json: JSON.parse(io.stdout.join('')) as Json, stderr: io.stderr.join('\n') };
}

describe('wire gauges against the published tables', () => {
  it('AWG from the ASTM B258 formula matches the table (mm, ASTM B258 Table 1 as printed in wire handbooks)', () => {
    // ASTM B258 tabulates inches: 10 AWG 0.1019 in, 12 AWG 0.0808 in, 16 AWG 0.0508 in, 18 AWG 0.0403 in,
    // 20 AWG 0.0320 in, 4/0 AWG 0.4600 in (the formula's defining end point).
    for (const [n, inch] of [[10, 0.1019], [12, 0.0808], [16, 0.0508], [18, 0.0403], [20, 0.0320], [-3, 0.46]] as const) {
      expect(awgDiameter(n) / 25.4).toBeCloseTo(inch, 4);
    }
    expect(parseWire('18awg').diameter).toBeCloseTo(1.024, 3);
    expect(parseWire('4/0 AWG').diameter).toBeCloseTo(11.684, 3);
  });

  it('SWG matches the Imperial Standard Wire Gauge (Board of Trade, 1883; BS 3737) in inches', () => {
    // Table values: 7/0 0.500 in, 0 (1/0) 0.324 in, 10 0.128 in, 14 0.080 in, 16 0.064 in, 18 0.048 in,
    // 20 0.036 in, 27 0.0164 in, 36 0.0076 in, 50 0.0010 in.
    const table: [string, number][] = [['7/0swg', 0.5], ['1/0swg', 0.324], ['10swg', 0.128], ['14swg', 0.08], ['16swg', 0.064],
      ['18swg', 0.048], ['20swg', 0.036], ['27swg', 0.0164], ['36swg', 0.0076], ['50swg', 0.001]];
    for (const [g, inch] of table) expect(parseWire(g).diameter / 25.4).toBeCloseTo(inch, 6);
    // 16 SWG is the 1.6 mm wire of ring makers (1.626 mm; common practice, no source).
    expect(swgDiameter(16)).toBeCloseTo(1.6256, 6);
    expect(swgDiameter(51)).toBeNull();
  });

  it('thickest gauge not over a wire, in both systems', () => {
    // 1.6 mm lies between 16 SWG (1.626 mm) and 17 SWG (1.422 mm), and between 14 AWG (1.628) and 15 AWG (1.450).
    expect(gaugeAtMost(1.6, 'SWG')!.label).toBe('17 SWG');
    expect(gaugeAtMost(1.6, 'AWG')!.label).toBe('15 AWG');
    expect(gaugeAtMost(swgDiameter(16)!, 'SWG')!.label).toBe('16 SWG');
    expect(gaugeAtMost(20, 'SWG')).toBeNull();
  });

  it('bad wire text is refused with the flag, what was expected and an example', () => {
    expect(() => parseWire('16xyz')).toThrow(/--wire '16xyz' must be a wire diameter in mm > 0 or a gauge such as 16swg/);
    expect(() => parseWire('60awg')).toThrow(/AWG runs from 4\/0 to 40/);
    expect(() => parseWire('-1')).toThrow(/--wire/);
    expect(parseWire('1.6mm').diameter).toBe(1.6);
  });

  it('spring-back: materials are rules of thumb, --spring-back overrides, bad values refused', () => {
    const c = resolveSpringBack('copper', undefined);
    expect(c.source).toMatch(/common practice, no source/);
    expect(resolveSpringBack('stainless-steel', '2.5').percent).toBe(2.5);
    expect(() => resolveSpringBack('unobtainium', undefined)).toThrow(/--material 'unobtainium' is not known/);
    expect(() => resolveSpringBack(undefined, '-3')).toThrow(/--spring-back '-3' must be a percentage/);
  });
});

describe('fabricate from the wire or the mandrel', () => {
  const dir = tempDir('wire');
  const chain = writeResult(dir, 'chain.json', threeChain());

  it('--wire 16swg: smallest inner diameter AR x wire, mandrel with and without spring-back; --process wire implied', async () => {
    const { code, json } = await runJson(['fabricate', chain, '--wire', '16swg', '--spring-back', '5']);
    expect(code).toBe(0);
    expect(json['process']).toBe('wire');
    const w = json['wire'] as { given: { gauge: string }; sizes: { rings: string[]; wireDiameter: number; innerDiameter: number; mandrel: number; mandrelWithSpringBack: number }[] };
    expect(w.given.gauge).toBe('16 SWG');
    expect(w.sizes.length).toBe(1);
    expect(w.sizes[0]!.rings).toEqual(['A', 'B', 'C']);
    const d = 0.064 * 25.4; // 16 SWG (Imperial Standard Wire Gauge, 1883)
    expect(w.sizes[0]!.wireDiameter).toBeCloseTo(d, 12);
    expect(w.sizes[0]!.innerDiameter).toBeCloseTo(2 * d, 12);
    expect(w.sizes[0]!.mandrel).toBeCloseTo(2 * d, 12);
    expect(w.sizes[0]!.mandrelWithSpringBack).toBeCloseTo((2 * d) / 1.05, 12);
    expect(json['aspectRatio']).toBeCloseTo(2, 12);
  });

  it('--mandrel answers the reverse question: the thickest wire for that mandrel, after spring-back', async () => {
    // Copper springs back 2 % (rule of thumb, common practice, no source): ID = 5 x 1.02, wire = ID / 2.
    const { code, json } = await runJson(['fabricate', chain, '--mandrel', '5', '--material', 'copper']);
    expect(code).toBe(0);
    const w = json['wire'] as { mandrel: number; sizes: { wireDiameter: number; swg: { label: string } }[] };
    expect(w.mandrel).toBe(5);
    expect(w.sizes[0]!.wireDiameter).toBeCloseTo((5 * 1.02) / 2, 12);
    // 2.55 mm: 12 SWG is 2.642 mm (too thick), 13 SWG 2.337 mm (Imperial Standard Wire Gauge, 1883).
    expect(w.sizes[0]!.swg.label).toBe('13 SWG');
    const io = captureIo();
    expect(await main(['fabricate', chain, '--mandrel', '5', '--spring-back', '0'], io)).toBe(0);
    expect(io.stdout.join('\n')).toMatch(/thickest wire for a 5 mm mandrel: 2\.5 mm/);
  });

  it('a wire option with a print process is refused; so is --material without wire', async () => {
    const io = captureIo();
    expect(await main(['fabricate', chain, '--wire', '1.6', '--process', 'fdm'], io)).toBe(2);
    expect(io.stderr.join('\n')).toMatch(/--wire sizes wire rings/);
    const io2 = captureIo();
    expect(await main(['fabricate', chain, '--core-radius', '5', '--process', 'fdm', '--material', 'copper'], io2)).toBe(2);
    expect(io2.stderr.join('\n')).toMatch(/--material applies to wire rings/);
  });

  it('rings of two sizes give two gauge lines, not one per ring', async () => {
    const r = threeChain();
    // Middle ring twice as large with a tube twice as thick: the same AR 2 with another wire.
    r.rings[1] = { ...r.rings[1]!, radius: 2, tube: 2 / 3 };
    const p = writeResult(dir, 'two.json', r);
    const io = captureIo();
    expect(await main(['fabricate', p, '--wire', '2', '--spring-back', '0'], io)).toBe(0);
    const text = io.stdout.join('\n');
    // Hand derivation: the wire scales with the tube, and B's tube is twice A's and C's, so --wire 2 sets B's
    // wire to 2 mm and A's and C's to 1 mm.
    expect(text.match(/thickest gauges not over it/g)!.length).toBe(2);
    expect(text).toMatch(/rings A, C \(2\): wire 1 mm/);
    expect(text).toMatch(/ring B: wire 2 mm/);
  });
});

describe('a weave cell result made of wire', () => {
  let euro = '';
  const dir = tempDir('wire-weave');
  beforeAll(async () => {
    euro = join(dir, 'euro.json');
    const io = captureIo();
    expect(await main(['inflate', 'weave:euro-4-in-1', '--starts', '1', '--workers', '1', '-o', euro], io)).toBe(0);
  }, 120_000);

  it('sizes wire for European 4-in-1 without --repeats; AR inside the trade range', async () => {
    expect(existsSync(euro)).toBe(true);
    const { code, json } = await runJson(['fabricate', euro, '--wire', '16swg', '--material', 'sterling-silver']);
    expect(code).toBe(0);
    const weave = json['weave'] as { kind: string; cellRings: number };
    expect(weave.cellRings).toBe(2);
    const sizes = (json['wire'] as { sizes: { aspectRatio: number; rings: string[] }[] }).sizes;
    expect(sizes.length).toBe(1);
    expect(sizes[0]!.rings).toEqual(['A', 'B']);
    // European 4-in-1 minimum AR about 3 to 3.3 in trade charts (weavers' guild articles; coarse check).
    expect(sizes[0]!.aspectRatio).toBeGreaterThan(2.7);
    expect(sizes[0]!.aspectRatio).toBeLessThan(3.6);
  });
});
