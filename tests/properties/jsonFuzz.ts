// Building blocks of the input fuzz families: hostile JSON values, mutations of valid documents, and
// the checks every command's output must pass whatever the input. No test-runner imports: the families
// run under vitest (tests/fuzz.test.ts) and in the long runner (bench/fuzz.ts).
import fc from 'fast-check';

/** Marker for an array nested `depth` deep around 1, written as text only (building it as a value and
 * serialising it would overflow the stack of the fuzzer itself). */
export interface Deep {
  readonly deep: number;
}

const deepMarkers = new WeakSet<object>();
const isDeep = (v: unknown): v is Deep => typeof v === 'object' && v !== null && deepMarkers.has(v);

function deep(depth: number): Deep {
  const d = { deep: depth };
  deepMarkers.add(d);
  return d;
}

/** JSON text of `v`; Deep markers become nested arrays. */
export function toText(v: unknown): string {
  if (isDeep(v)) return '['.repeat(v.deep) + '1' + ']'.repeat(v.deep);
  if (Array.isArray(v)) return `[${v.map(toText).join(',')}]`;
  if (typeof v === 'object' && v !== null) {
    return `{${Object.entries(v).map(([k, x]) => `${JSON.stringify(k)}:${toText(x)}`).join(',')}}`;
  }
  return JSON.stringify(v) ?? 'null';
}

/** Strings a careless or hostile file holds: terminal escapes, newlines, bidi overrides, separators, long text. */
export const nastyString: fc.Arbitrary<string> = fc.oneof(
  fc.constantFrom(
    '', ' ', 'A', '\u001b[2J\u001b[H', 'A\nB', 'ring\r\nX', '\u0007bell', '\u009b31m', '\u007f', 'x\u202eevil',
    '\u2028', 'A\u0000B', '"quoted"', 'back\\slash', 'mm', '\ud800', 'thickring-layout/1', 'thickring-result/1',
  ),
  fc.string({ maxLength: 12 }),
  fc.string({ unit: 'binary', maxLength: 12 }),
  fc.integer({ min: 1000, max: 100_000 }).map((n) => 'x'.repeat(n)),
);

/** Numbers at and beyond every edge the parsers draw. */
export const nastyNumber: fc.Arbitrary<number> = fc.oneof(
  fc.constantFrom(0, -0, 1, -1, 0.5, 1e308, -1e308, 1e16, -1e16, 1e15, 1e-15, 1e-16, 5e-324, 1e-300, 2 ** 53, 64, 65, 1e9, 3.5, -7),
  fc.double({ noNaN: true, noDefaultInfinity: true }),
  fc.integer({ min: -1000, max: 1000 }),
);

/** Any JSON value, with hostile strings, edge numbers and deep nesting mixed in. */
export const nastyValue: fc.Arbitrary<unknown> = fc.oneof(
  { weight: 3, arbitrary: fc.jsonValue({ maxDepth: 3 }) },
  { weight: 3, arbitrary: nastyNumber },
  { weight: 3, arbitrary: nastyString },
  { weight: 1, arbitrary: fc.integer({ min: 1, max: 100_000 }).map(deep) },
  { weight: 1, arbitrary: fc.array(nastyNumber, { minLength: 0, maxLength: 5 }) },
  { weight: 1, arbitrary: fc.constant(null) },
);

export interface Mutation {
  path: number[];
  kind: 'replace' | 'delete' | 'add';
  key: string;
  value: unknown;
}

export const mutation: fc.Arbitrary<Mutation> = fc.record({
  path: fc.array(fc.nat({ max: 50 }), { maxLength: 5 }),
  kind: fc.constantFrom('replace', 'replace', 'replace', 'delete', 'add') as fc.Arbitrary<Mutation['kind']>,
  key: fc.oneof(fc.constantFrom('name', 'tube', 'extra', '$schema', 'symmetry', 'order', 'lattice', 'units'), fc.string({ maxLength: 6 })),
  value: nastyValue,
});

/** Apply mutations to a deep copy of `doc`: each walks `path` (one child per step) and replaces, deletes or adds there. */
export function mutate(doc: unknown, mutations: readonly Mutation[]): unknown {
  const root = { doc: structuredClone(doc) as unknown };
  for (const m of mutations) {
    let parent: Record<string, unknown> | unknown[] = root;
    let key: string | number = 'doc';
    for (const step of m.path) {
      const here: unknown = (parent as Record<string, unknown>)[key as string];
      if (isDeep(here) || typeof here !== 'object' || here === null) break;
      const keys: (string | number)[] = Array.isArray(here) ? here.map((_, i) => i) : Object.keys(here);
      if (keys.length === 0) break;
      parent = here as Record<string, unknown>;
      key = keys[step % keys.length]!;
    }
    const target = (parent as Record<string, unknown>)[key as string];
    if (m.kind === 'add' && typeof target === 'object' && target !== null && !isDeep(target)) {
      if (Array.isArray(target)) target.push(m.value);
      else (target as Record<string, unknown>)[m.key] = m.value;
    } else if (m.kind === 'delete' && parent !== root) {
      if (Array.isArray(parent)) parent.splice(key as number, 1);
      else delete (parent as Record<string, unknown>)[key as string];
    } else {
      (parent as Record<string, unknown>)[key as string] = m.value;
    }
  }
  return root.doc;
}

/** Raw control bytes a terminal acts on (tab and newline are the program's own layout). */
// eslint-disable-next-line no-control-regex
const RAW_CONTROL = /[\x00-\x08\x0b-\x1f\x7f-\x9f\u2028\u2029\u202a-\u202e\u2066-\u2069]/;

export interface Outcome {
  code: number;
  stdout: string;
  stderr: string;
}

/**
 * What every command run on any input must show: exit 0 or 2 (or one of `alsoAllowed`), no stack trace,
 * at most 3 lines on stderr, no raw control bytes, and with --json exactly one JSON object on stdout.
 */
export function checkOutcome(o: Outcome, json: boolean, what: string, alsoAllowed: readonly number[] = []): void {
  const fail = (why: string): never => {
    throw new Error(`${what}: ${why}\nexit ${o.code}\nstdout: ${o.stdout.slice(0, 400)}\nstderr: ${o.stderr.slice(0, 800)}`);
  };
  if (o.code !== 0 && o.code !== 2 && !alsoAllowed.includes(o.code)) fail(`exit code ${o.code}, expected 0 or 2`);
  if (/\n\s+at .+[:(]/.test(o.stderr) || /\n\s+at .+[:(]/.test(o.stdout)) fail('a stack trace was printed');
  const errLines = o.stderr.split('\n').filter((l) => l.trim() !== '');
  if (errLines.length > 3) fail(`${errLines.length} lines on stderr, at most 3 expected`);
  if (RAW_CONTROL.test(o.stdout)) fail('raw control character on stdout');
  if (RAW_CONTROL.test(o.stderr)) fail('raw control character on stderr');
  if (o.code === 2 && !/^thickring: |^error: |^\(run with --help/m.test(o.stderr) && !json) fail('exit 2 without a message on stderr');
  if (json && o.code === 0) {
    try {
      const v = JSON.parse(o.stdout) as unknown;
      if (typeof v !== 'object' || v === null || Array.isArray(v)) fail('--json printed something other than one object');
    } catch {
      fail('--json printed something that is not one JSON object');
    }
  }
}
