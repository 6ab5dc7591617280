// Fuzz families of the two input parsers: layout files (src/model/layout.ts) and result files
// (src/model/resultFile.ts). Whatever the JSON, a parser returns a usable value or throws InputError with
// one line and no raw control characters; and it agrees with the published schema (schemas/*.json):
// what the parser accepts the schema accepts, and what the schema accepts the parser accepts unless one
// of the rules the schema's description lists as checked by the program alone says no.
import fc from 'fast-check';
import { measureLayout } from '../../src/analyze/measure.js';
import { isInputError } from '../../src/model/errors.js';
import { parseLayout } from '../../src/model/layout.js';
import { parseResult } from '../../src/model/resultFile.js';
import type { Layout } from '../../src/model/types.js';
import { threeChain, tightHopf } from '../fabricateFixtures.js';
import { mutate, mutation, nastyValue, toText } from './jsonFuzz.js';
import { schemaValidator } from './schemaCheck.js';

export interface Family {
  name: string;
  arbitrary: fc.Arbitrary<any>;
  check: (x: any) => void | Promise<void>;
  /** Cases per family in the CI run (tests/fuzz.test.ts); 0 leaves the family to the long run. */
  runs?: number;
}

/** Rules the layout schema's description lists as the program's alone (src/model/layout.ts). */
const LAYOUT_PROGRAM_ONLY = [
  /tube \S+ must be <= radius/, /is used by rings/, /core circles intersect/, /are parallel/,
  /does not go with type "none"/, /times the farthest centre coordinate/, /overlaps \d+ cells/, /is the zero vector/,
];
/** Rules the result schema's description lists as the program's alone (src/model/resultFile.ts). */
const RESULT_PROGRAM_ONLY = [
  /must be a ring index/, /must be non-zero/, /linking must be a \d+ x \d+ matrix/, /times its centre coordinate/,
  /a and b are both/,
];
// eslint-disable-next-line no-control-regex
const RAW_CONTROL = /[\x00-\x1f\x7f-\x9f\u2028\u2029\u202a-\u202e\u2066-\u2069]/;

const h = Math.SQRT1_2;
/** Valid layouts to start mutations from: Hopf pair, 3-chain, far-apart rings, with the optional keys. */
const validLayout: fc.Arbitrary<Record<string, unknown>> = fc.record({
  rings: fc.constantFrom(
    [
      { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 },
      { name: 'B', center: [1, 0, 0], normal: [0, 1, 0], radius: 1, tube: 0.4 },
    ],
    [
      { name: 'A', center: [-1.2, 0, 0], normal: [0, 0, 1], radius: 1 },
      { name: 'B', center: [0, 0, 0], normal: [0, 1, 0], radius: 1 },
      { name: 'C', center: [1.2, 0, 0], normal: [h, 0, h], radius: 1 },
    ],
    [
      { name: 'ring 1', center: [0, 0, 0], normal: [1, 2, 3], radius: 2 },
      { name: 'ring 2', center: [10, 0, 0], normal: [0, 0, 1], radius: 1, tube: 1 },
    ],
  ),
  units: fc.constantFrom(undefined, 'mm', 'in'),
  symmetry: fc.constantFrom(undefined, { type: 'none' }, { type: 'cyclic', order: 2, axis: [0, 0, 1], origin: [0, 0, 0] }),
  description: fc.constantFrom(undefined, 'a test layout'),
  $schema: fc.constantFrom(undefined, 'https://thickring.invalid/schemas/layout.schema.json'),
}).map((r) => {
  const out: Record<string, unknown> = { format: 'thickring-layout/1' };
  for (const [k, v] of Object.entries(r)) if (v !== undefined) out[k] = v;
  return out;
});

/** Parse the layout text; check the outcome, the schema's verdict and, when accepted, a finite measure. */
export function checkLayoutText(text: string): void {
  const data = JSON.parse(text) as unknown;
  let layout: Layout | null = null;
  let message = '';
  try {
    layout = parseLayout(data, 'fuzz.json');
  } catch (e) {
    if (!isInputError(e)) throw new Error(`parseLayout threw ${e instanceof Error ? `${e.name}: ${e.message}` : String(e)}, not an InputError`);
    message = e.message;
    checkMessage(message);
  }
  const schemaOk = schemaValidator('layout')(data);
  if (layout && !schemaOk) {
    throw new Error(`parser accepts a layout the schema rejects: ${JSON.stringify(schemaValidator('layout').errors?.[0])}`);
  }
  if (!layout && schemaOk && !LAYOUT_PROGRAM_ONLY.some((r) => r.test(message))) {
    throw new Error(`schema accepts a layout the parser rejects for a rule the schema could state: ${message}`);
  }
  if (layout) {
    const m = measureLayout(layout);
    // A finite positive tube and finite distances for any accepted layout: a sanity check, no outside source.
    if (!(Number.isFinite(m.tube) && m.tube > 0)) throw new Error(`measure of an accepted layout gave tube ${m.tube}`);
    for (const p of m.pairs) if (!Number.isFinite(p.distance)) throw new Error(`measure gave pair distance ${p.distance}`);
  }
}

/** Parse the result text; check the outcome and the schema's verdict. */
export function checkResultText(text: string): void {
  const data = JSON.parse(text) as unknown;
  let ok = false;
  let message = '';
  try {
    const r = parseResult(data, 'fuzz.json');
    ok = true;
    for (const ring of r.rings) {
      if (![...ring.center, ...ring.normal, ring.radius, ring.tube].every(Number.isFinite)) throw new Error(`accepted ring ${ring.name} has a non-finite value`);
    }
  } catch (e) {
    if (ok) throw e;
    if (!isInputError(e)) throw new Error(`parseResult threw ${e instanceof Error ? `${e.name}: ${e.message}` : String(e)}, not an InputError`);
    message = e.message;
    checkMessage(message);
  }
  const schemaOk = schemaValidator('result')(data);
  if (ok && !schemaOk) throw new Error(`reader accepts a result the schema rejects: ${JSON.stringify(schemaValidator('result').errors?.[0])}`);
  if (!ok && schemaOk && !RESULT_PROGRAM_ONLY.some((r) => r.test(message))) {
    throw new Error(`schema accepts a result the reader rejects for a rule the schema could state: ${message}`);
  }
}

function checkMessage(message: string): void {
  if (RAW_CONTROL.test(message)) throw new Error(`message holds a raw control character: ${JSON.stringify(message)}`);
  if (message.length > 2000) throw new Error(`message of ${message.length} characters`);
}

/** JSON documents that look a little like a layout, for the arbitrary-JSON family. */
const layoutish: fc.Arbitrary<unknown> = fc.oneof(
  nastyValue,
  fc.record({ format: fc.constantFrom('thickring-layout/1', 'thickring-layout/2'), rings: fc.oneof(nastyValue, fc.array(nastyValue, { maxLength: 3 })) }),
  fc.dictionary(fc.constantFrom('format', 'rings', 'units', 'symmetry', 'lattice', '$schema', 'x'), nastyValue),
);

const validResult = fc.constantFrom(tightHopf(), threeChain(), { ...tightHopf(), command: 'compare', gain: 0, gainPercent: 0, changes: [], sweep: [] });

export const families: Family[] = [
  { name: 'layout-json', arbitrary: layoutish.map(toText), check: checkLayoutText, runs: 150 },
  {
    name: 'layout-mutated',
    arbitrary: fc.tuple(validLayout, fc.array(mutation, { minLength: 1, maxLength: 3 })).map(([d, m]) => toText(mutate(d, m))),
    check: checkLayoutText,
    runs: 200,
  },
  {
    name: 'result-mutated',
    arbitrary: fc.tuple(validResult, fc.array(mutation, { minLength: 1, maxLength: 3 })).map(([d, m]) => toText(mutate(d, m))),
    check: checkResultText,
    runs: 200,
  },
];
