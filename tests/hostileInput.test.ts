// Hostile and careless input found by fuzzing, each kept as a regression check: names that drive the
// terminal, huge symmetry orders, coordinates near the double range, nesting deep enough to exhaust a
// recursive formatter, meshes of hundreds of millions of triangles, result files out of range, and the
// parser/schema disagreement on "$schema". Expected behaviour is the contract in the design notes: bad
// input gets exit code 2 and one line naming the field (common practice for command-line tools, no source).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { displayName, safeJson, safeLine } from '../src/model/displayName.js';
import { InputError } from '../src/model/errors.js';
import { parseLayout } from '../src/model/layout.js';
import { parseResult } from '../src/model/resultFile.js';
import { show } from '../src/model/validate.js';
import { estimateTriangles } from '../src/fabricate/torusMesh.js';
import { run } from './cliHarness.js';
import { tightHopf } from './fabricateFixtures.js';
import { schemaValidator } from './properties/schemaCheck.js';

const dir = mkdtempSync(join(tmpdir(), 'thickring-hostile-'));
// eslint-disable-next-line no-control-regex
const RAW_CONTROL = /[\x00-\x08\x0b-\x1f\x7f-\x9f]/;

const hopfRings = (): Record<string, unknown>[] => [
  { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 },
  { name: 'B', center: [1, 0, 0], normal: [0, 1, 0], radius: 1 },
];

function layoutFile(name: string, data: unknown): string {
  const p = join(dir, name);
  writeFileSync(p, typeof data === 'string' ? data : JSON.stringify(data));
  return p;
}

/** Exit 2 with exactly one stderr line, no raw control bytes, matching `field`. */
async function expectBadInput(args: string[], field: RegExp): Promise<string> {
  const { code, io } = await run(args);
  // With --json the error is one JSON object on stdout (design contract); otherwise one line on stderr.
  const err = args.includes('--json')
    ? (JSON.parse(io.stdout.join('\n')) as { error: { message: string } }).error.message
    : io.stderr.join('\n');
  expect(code).toBe(2);
  expect(err.split('\n').filter((l) => l.trim() !== '')).toHaveLength(1);
  expect(err).not.toMatch(RAW_CONTROL);
  expect(err).toMatch(field);
  return err;
}

describe('names and strings reach the terminal escaped', () => {
  it('displayName: plain names unchanged; control, separator and bidi characters escaped JSON-style', () => {
    expect(displayName('A')).toBe('A');
    expect(displayName('ring 1')).toBe('ring 1');
    expect(displayName('A\u001b[2J')).toBe('"A\\u001b[2J"');
    expect(displayName('A\nB')).toBe('"A\\nB"');
    expect(displayName('x\u202eevil')).toBe('"x\\u202eevil"');
    expect(displayName('\u009b31m')).toBe('"\\u009b31m"');
    expect(safeLine('one\ntwo')).toBe('one\\u000atwo');
    // Still valid JSON with the same value (ECMA-404: \uXXXX escapes any character).
    const json = safeJson(JSON.stringify({ name: 'a\u0085b\u2028' }));
    expect(json).not.toMatch(/[\u0085\u2028]/);
    expect(JSON.parse(json)).toEqual({ name: 'a\u0085b\u2028' });
  });

  it('a layout ring name with an escape sequence and a newline: exit 2, one line, the name escaped', async () => {
    const file = layoutFile('escape.json', { format: 'thickring-layout/1', rings: [{ ...hopfRings()[0], name: 'A\u001b[2J\nX' }, hopfRings()[1]] });
    const err = await expectBadInput(['measure', file], /name "A\\u001b\[2J\\nX" holds the control character U\+001B/);
    expect(err).not.toContain('\u001b');
  });

  it('units with a bell character are refused; the schema says the same', async () => {
    const data = { format: 'thickring-layout/1', units: 'mm\u0007', rings: hopfRings() };
    await expectBadInput(['measure', layoutFile('units.json', data)], /units "mm\\u0007" holds the control character U\+0007/);
    expect(schemaValidator('layout')(data)).toBe(false);
  });

  it('a result file whose ring name holds a C1 control (CSI) is refused by reader and schema', async () => {
    const r = tightHopf();
    r.rings[0]!.name = 'A\u009b2J';
    const file = layoutFile('c1.json', r);
    await expectBadInput(['play', file], /rings\[0\]: name "A\\u009b2J" holds the control character U\+009B/);
    expect(schemaValidator('result')(JSON.parse(JSON.stringify(r)))).toBe(false);
  });

  it('a missing file whose path holds an escape sequence is named escaped', async () => {
    await expectBadInput(['measure', join(dir, 'no\u001b[2Jsuch.json')], /no\\u001b\[2Jsuch\.json/);
  });
});

describe('values the parsers used to let through or crash on', () => {
  it('symmetry order 10^9 in a layout file: exit 2 naming symmetry order (was: out of memory)', async () => {
    const file = layoutFile('sym.json', { format: 'thickring-layout/1', rings: hopfRings(), symmetry: { type: 'cyclic', order: 1e9 } });
    await expectBadInput(['inflate', file, '--starts', '1'], /symmetry: order 1000000000 is above 64/);
    await expectBadInput(['inflate', 'hopf', '--symmetry', 'cyclic:1000000000'], /--symmetry: order 1000000000 must be a whole number from 1 to 64/);
  });

  it('centres at ±1e308: exit 2 naming the coordinate (was: accepted, nulls printed)', async () => {
    const rings = hopfRings();
    rings[0]!['center'] = [1e308, 0, 0];
    rings[1]!['center'] = [-1e308, 0, 0];
    await expectBadInput(['measure', layoutFile('far.json', { format: 'thickring-layout/1', rings }), '--json'], /ring A: center\[0\] 1e\+308 is beyond ±1e15 layout units/);
  });

  it('a radius far below the rounding of its centre is refused (distances there are noise)', () => {
    const rings = hopfRings();
    rings[0]!['center'] = [1e12, 0, 0];
    rings[0]!['radius'] = 1e-3;
    // 1e-3 < 1e-10 * 1e12 = 100: the centre's last bit (~1e-4) is a tenth of the ring.
    expect(() => parseLayout({ format: 'thickring-layout/1', rings }, 'x.json')).toThrow(/radius 0\.001 is below 1e-10 times the farthest centre coordinate 1000000000000/);
  });

  it('a radius nested 100,000 arrays deep: exit 2 naming radius (was: "Maximum call stack size exceeded", exit 1)', async () => {
    const deep = '['.repeat(100_000) + '1' + ']'.repeat(100_000);
    const text = `{"format":"thickring-layout/1","rings":[{"name":"A","center":[0,0,0],"normal":[0,0,1],"radius":${deep}}]}`;
    await expectBadInput(['measure', layoutFile('deep.json', text)], /ring A: radius must be a finite number \(got \[\[\[\[\[\.\.\.\]\]\]\]\]\)/);
    // The value renderer is bounded in depth and length whatever it is given.
    expect(show(JSON.parse(deep))).toBe('[[[[[...]]]]]');
    expect(show('x'.repeat(10_000)).length).toBeLessThanOrEqual(60);
  });

  it('"$schema": 5 is refused by the parser as by the published schema (which wants a string)', async () => {
    const data = { $schema: 5, format: 'thickring-layout/1', rings: hopfRings() };
    expect(schemaValidator('layout')(data)).toBe(false);
    expect(() => parseLayout(data, 'x.json')).toThrow(InputError);
    await expectBadInput(['measure', layoutFile('schema.json', data)], /\$schema must be a string/);
  });

  it('a result file with a radius of 1e308: play exits 2 naming the radius (was: "Cannot read properties of undefined")', async () => {
    const r = tightHopf();
    r.rings[1]!.radius = 1e308;
    await expectBadInput(['play', layoutFile('r308.json', r)], /ring B: radius 1e\+308 is outside the range 1e-15 to 1e15/);
  });

  it('a result field only the schema checks (certificate.note a number) is refused by the reader too', () => {
    const r = JSON.parse(JSON.stringify(tightHopf())) as Record<string, Record<string, unknown>>;
    r['certificate']!['note'] = 5;
    expect(schemaValidator('result')(r)).toBe(false);
    expect(() => parseResult(r, 'r.json')).toThrow(/certificate\.note must be string/);
  });
});

describe('fabricate refuses meshes it cannot build in reasonable time', () => {
  const result = (): string => layoutFile('hopf-result.json', tightHopf());

  it('--chord 1e-5 mm: the triangle count is estimated first and the run refused at once (was: over a minute)', async () => {
    const t0 = Date.now();
    const err = await expectBadInput(['fabricate', result(), '--outer-diameter', '20', '--process', 'fdm', '--chord', '1e-5', '--stl', join(dir, 'x.stl')],
      /mm would need \d+ triangles, above the limit of 500000/);
    expect(err).toMatch(/at most 5000000 can be allowed/);
    expect(Date.now() - t0).toBeLessThan(30_000);
  });

  it('the estimate is 2 n_core n_tube per torus with n = ceil(pi / acos(1 - chord / rho)) (sagitta of a regular polygon)', () => {
    // Sagitta of a chord of a circle of radius rho subtending 2 pi / n: rho (1 - cos(pi / n)) (elementary geometry).
    const n = (rho: number, c: number): number => Math.ceil(Math.PI / Math.acos(1 - c / rho));
    const t = { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 10, tube: 2 };
    expect(estimateTriangles([t], 0.01)).toBe(2 * n(12, 0.01) * n(2, 0.01));
  });

  it('--max-triangles: the refusal names the count to allow; out of range or not a number is bad input', async () => {
    const args = ['fabricate', result(), '--outer-diameter', '20', '--process', 'fdm', '--chord', '1e-4', '--stl', join(dir, 'y.stl')];
    const first = await expectBadInput(args, /allow it with --max-triangles (\d+)/);
    const need = /--max-triangles (\d+)/.exec(first)![1]!;
    expect(Number(need)).toBeGreaterThan(500_000);
    await expectBadInput([...args, '--max-triangles', '6000000'], /--max-triangles '6000000' must be a whole number from 1 to 5000000/);
    await expectBadInput([...args, '--max-triangles', 'lots'], /--max-triangles 'lots'/);
  });
});
