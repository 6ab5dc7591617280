// Result files (format thickring-result/1): the published JSON Schema (schemas/result.schema.json,
// draft 2020-12, checked with ajv 8) and readResultFile agree on hand-built results from closed forms
// (tight Hopf: Cantarella, Kusner, Sullivan 2002; three-chain at the packing bound r = R/3) and on
// broken ones.
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import { InputError } from '../src/model/errors.js';
import { RESULT_FORMAT } from '../src/model/result.js';
import { parseResult, readResultFile } from '../src/model/resultFile.js';
import { tempDir, threeChain, tightHopf, writeResult } from './fabricateFixtures.js';

const schema = JSON.parse(readFileSync(new URL('../schemas/result.schema.json', import.meta.url), 'utf8')) as object;
const validate = new Ajv2020({ allErrors: true }).compile(schema);

type Json = Record<string, unknown>;
const clone = (x: unknown): Json => JSON.parse(JSON.stringify(x)) as Json;

function errorOf(data: unknown): string {
  try {
    parseResult(data, 'r.json');
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return (e as Error).message;
  }
  throw new Error('expected an InputError');
}

describe('result schema and reader accept hand-built results', () => {
  for (const [label, r] of [['tight Hopf', tightHopf()], ['three-chain', threeChain()]] as const) {
    it(label, () => {
      const data = clone(r);
      expect(validate(data)).toBe(true);
      expect(validate.errors ?? []).toEqual([]);
      const dir = tempDir('result');
      const read = readResultFile(writeResult(dir, 'r.json', data));
      expect(read.format).toBe(RESULT_FORMAT);
      expect(read.rings.map((x) => x.name)).toEqual(r.rings.map((x) => x.name));
      expect(read.contacts.length).toBe(r.contacts.length);
    });
  }

  it('a compare result (extra top-level keys) is still a result', () => {
    const data = { ...clone(tightHopf()), command: 'compare', gain: 0, gainPercent: 0, changes: [], sweep: [] };
    expect(validate(data)).toBe(true);
    expect(() => parseResult(data, 'c.json')).not.toThrow();
  });

  it('normals are returned at unit length', () => {
    const data = clone(tightHopf());
    (data['rings'] as Json[])[1]!['normal'] = [0, 5, 0];
    expect(parseResult(data, 'r.json').rings[1]!.normal).toEqual([0, 1, 0]);
  });
});

describe('broken results: the reader names the file, the field and the fix; the schema rejects them too', () => {
  const cases: [string, (d: Json) => void, RegExp, boolean][] = [
    ['layout file', (d) => { d['format'] = 'thickring-layout/1'; }, /r\.json' has format "thickring-layout\/1": expected format "thickring-result\/1"/, true],
    ['other version', (d) => { d['format'] = 'thickring-result/2'; }, /format version 'thickring-result\/2'; this thickring reads format "thickring-result\/1"/, true],
    ['no format', (d) => { delete d['format']; }, /no 'format' field \(from another tool\?\): expected format "thickring-result\/1"/, true],
    ['negative radius', (d) => { (d['rings'] as Json[])[0]!['radius'] = -2; }, /ring A: radius -2 must be > 0/, true],
    ['missing tube', (d) => { delete (d['rings'] as Json[])[1]!['tube']; }, /ring B: tube missing must be a finite number/, true],
    ['centre of two numbers', (d) => { (d['rings'] as Json[])[0]!['center'] = [0, 0]; }, /ring A: center \[0,0\] must be an array of 3 finite numbers/, true],
    ['unknown status', (d) => { d['status'] = 'great'; }, /status "great" must be one of optimal, stalled, infeasible, failed/, true],
    ['no rings', (d) => { d['rings'] = []; }, /rings must be a non-empty array/, true],
    ['contacts missing', (d) => { delete d['contacts']; }, /contacts must be an array/, true],
    ['negative contact distance', (d) => { (d['contacts'] as Json[])[0]!['distance'] = -1; }, /contacts\[0\]: distance -1 must be >= 0/, true],
    // Rules JSON Schema cannot state (they depend on the number of rings or on lengths): reader only.
    ['contact ring out of range', (d) => { (d['contacts'] as Json[])[0]!['b'] = 7; }, /contacts\[0\]: b 7 must be a ring index 0\.\.1/, false],
    ['zero normal', (d) => { (d['rings'] as Json[])[0]!['normal'] = [0, 0, 0]; }, /ring A: normal \[0, 0, 0\] must be non-zero/, false],
    ['linking of the wrong size', (d) => { d['linking'] = [[0]]; }, /linking must be a 2 x 2 matrix/, false],
  ];
  for (const [label, breakIt, message, schemaRejects] of cases) {
    it(label, () => {
      const data = clone(tightHopf());
      breakIt(data);
      expect(errorOf(data)).toMatch(message);
      expect(validate(data)).toBe(!schemaRejects);
    });
  }

  it('not JSON at all, and a missing file', () => {
    const dir = tempDir('result-bad');
    const p = join(dir, 'half.json');
    writeFileSync(p, '{"format": "thickring-result/1", "rings": [');
    expect(() => readResultFile(p)).toThrow(/half\.json' is not valid JSON .*expected format "thickring-result\/1"/);
    expect(() => readResultFile(join(dir, 'none.json'))).toThrow(/none\.json' cannot be read/);
  });
});
