// Fuzz families of the command line: any file or option value gives exit 0 (a result) or 2 (bad input,
// one line) and nothing else: no stack trace, at most 3 lines on stderr, no raw control bytes, one JSON
// object with --json; a run that fails leaves a file already at the output path byte for byte as it was.
// Commands run in-process through main() (fast); one family spawns the real binary.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { main } from '../../cli/main.js';
import { threeChain, tightHopf } from '../fabricateFixtures.js';
import { checkOutcome, mutate, mutation, nastyString, nastyValue, toText, type Outcome } from './jsonFuzz.js';
import { projectRoot } from './schemaCheck.js';

interface Family {
  name: string;
  arbitrary: fc.Arbitrary<any>;
  check: (x: any) => void | Promise<void>;
  runs?: number;
}

let dir: string | null = null;
/** One scratch folder per process, made on first use. */
function scratch(): string {
  dir ??= mkdtempSync(join(tmpdir(), 'thickring-fuzz-'));
  return dir;
}

let counter = 0;
function fresh(name: string): string {
  return join(scratch(), `${counter++}-${name}`);
}

/** `thickring ARGS` in-process with captured output. */
export async function runCli(args: string[]): Promise<Outcome> {
  const out: string[] = [], err: string[] = [];
  const code = await main(args, { out: (t) => out.push(t), err: (t) => err.push(t), interactive: false });
  return { code, stdout: out.join('\n'), stderr: err.join('\n') };
}

const SENTINEL = 'existing file: must survive a failed run\n';

/** Text of a layout file: hostile JSON, a mutated valid layout, or not JSON at all. */
const layoutText: fc.Arbitrary<string> = fc.oneof(
  nastyValue.map(toText),
  fc.tuple(
    fc.constantFrom(
      { format: 'thickring-layout/1', rings: [{ name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 1 }, { name: 'B', center: [1, 0, 0], normal: [0, 1, 0], radius: 1 }] },
      { format: 'thickring-layout/1', units: 'mm', rings: [{ name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: 5, tube: 1 }, { name: 'B', center: [20, 0, 0], normal: [1, 1, 0], radius: 5 }] },
    ),
    fc.array(mutation, { minLength: 1, maxLength: 3 }),
  ).map(([d, m]) => toText(mutate(d, m))),
  fc.string({ maxLength: 40 }),
  fc.constantFrom('', '{', '{"format": "thickring-layout/1", "rings": [', '\u001b[2J', 'null'),
);

const resultText: fc.Arbitrary<string> = fc.tuple(
  fc.constantFrom(tightHopf(), threeChain()),
  fc.array(mutation, { minLength: 0, maxLength: 3 }),
).map(([d, m]) => toText(mutate(d, m)));

type ResultCommand = 'fabricate' | 'fabricate-stl' | 'tracks' | 'report' | 'play';

function resultArgs(cmd: ResultCommand, file: string, out: string): string[] {
  switch (cmd) {
    case 'fabricate': return ['fabricate', file, '--core-radius', '10', '--process', 'fdm', '--json'];
    case 'fabricate-stl': return ['fabricate', file, '--core-radius', '10', '--process', 'fdm', '--chord', '0.05', '--stl', out];
    case 'tracks': return ['tracks', file, '-o', out];
    case 'report': return ['report', file, '--no-play', '-o', out];
    case 'play': return ['play', file, '--json'];
  }
}

/** An option value as a person or a script might type it. */
const optionValue: fc.Arbitrary<string> = fc.oneof(
  nastyString,
  fc.constantFrom('0', '-1', '1', '3', '0.5', '1e-300', '1e300', 'NaN', 'Infinity', '64', '65', '999999999999', 'cyclic:3', 'dihedral:1000000000', 'fdm', 'wire', '1,2', ''),
);

export const families: Family[] = [
  {
    name: 'cli-layout-files',
    arbitrary: fc.record({ text: layoutText, json: fc.boolean(), command: fc.constantFrom('measure', 'measure', 'measure', 'inflate', 'compare') }),
    check: async ({ text, json, command }: { text: string; json: boolean; command: string }) => {
      const file = fresh('layout.json');
      writeFileSync(file, text);
      // inflate/compare only on what is already bad input, so the family stays fast (valid layouts go to measure).
      let cmd = command;
      if (cmd !== 'measure' && (await runCli(['measure', file, '--json'])).code === 0) cmd = 'measure';
      const args = cmd === 'measure' ? ['measure', file] : [cmd, file, '--starts', '1', '--workers', '1'];
      const o = await runCli(json ? [...args, '--json'] : args);
      checkOutcome(o, json, `${args.join(' ')} on ${JSON.stringify(text.slice(0, 300))}`);
    },
    runs: 60,
  },
  {
    name: 'cli-result-files',
    arbitrary: fc.record({ text: resultText, command: fc.constantFrom<ResultCommand>('fabricate', 'fabricate-stl', 'tracks', 'report', 'play') }),
    check: async ({ text, command }: { text: string; command: ResultCommand }) => {
      const file = fresh('result.json');
      writeFileSync(file, text);
      const out = fresh('out');
      writeFileSync(out, SENTINEL);
      const args = resultArgs(command, file, out);
      const o = await runCli(args);
      const what = `${command} on ${JSON.stringify(text.slice(0, 300))}`;
      checkOutcome(o, args.includes('--json'), what);
      const now = readFileSync(out, 'utf8');
      // A failed run leaves the existing file untouched (common practice, no source: the contract in the design notes).
      if (o.code !== 0 && now !== SENTINEL) throw new Error(`${what}: exit ${o.code} but the existing output file was changed`);
      if (o.code === 0 && command !== 'fabricate' && command !== 'play' && now === SENTINEL) throw new Error(`${what}: exit 0 but no output written`);
      rmSync(out, { force: true });
    },
    runs: 25,
  },
  {
    name: 'cli-options',
    arbitrary: fc.record({
      command: fc.constantFrom('fabricate', 'measure', 'tracks', 'inflate'),
      values: fc.array(fc.tuple(fc.constantFrom('--core-radius', '--inner-diameter', '--process', '--chord', '--max-triangles', '--clearance', '--min-wall', '--samples', '--ratio', '--starts', '--symmetry', '--tol', '--radii', '--workers', '--bogus'), optionValue), { minLength: 1, maxLength: 4 }),
    }),
    check: async ({ command, values }: { command: string; values: [string, string][] }) => {
      const result = fresh('r.json');
      writeFileSync(result, JSON.stringify(tightHopf()));
      const out = fresh('out');
      writeFileSync(out, SENTINEL);
      const layout = fresh('l.json');
      writeFileSync(layout, JSON.stringify({ format: 'thickring-layout/1', rings: tightHopf().rings.map(({ name, center, normal, radius }) => ({ name, center, normal, radius })) }));
      const base = command === 'fabricate' ? ['fabricate', result]
        : command === 'tracks' ? ['tracks', result, '-o', out]
          : command === 'measure' ? ['measure', layout] : ['inflate', 'hopf', '--workers', '1'];
      const args = [...base, ...values.flat()];
      // A valid inflate would run a whole solve: keep this family on options, and give inflate one bad value at least.
      if (command === 'inflate') args.push('--starts', '0');
      const o = await runCli(args);
      const what = `thickring ${JSON.stringify(args)}`;
      checkOutcome(o, false, what);
      if (o.code !== 0 && readFileSync(out, 'utf8') !== SENTINEL) throw new Error(`${what}: exit ${o.code} but the existing output file was changed`);
    },
    runs: 40,
  },
  {
    name: 'cli-spawned',
    arbitrary: fc.record({ text: layoutText, json: fc.boolean() }),
    check: ({ text, json }: { text: string; json: boolean }) => {
      const file = fresh('spawned.json');
      writeFileSync(file, text);
      const root = projectRoot();
      const built = existsSync(join(root, 'dist', 'cli', 'main.js'));
      // The real binary when built; otherwise the same entry point through tsx.
      const argv = built
        ? [join(root, 'bin', 'thickring.js'), 'measure', file]
        : ['--import', 'tsx', '--input-type=module', '-e', "const { main } = await import('./cli/main.ts'); process.exitCode = await main(process.argv.slice(1));", 'measure', file];
      if (json) argv.push('--json');
      const p = spawnSync(process.execPath, argv, { cwd: root, encoding: 'utf8', timeout: 60_000 });
      checkOutcome({ code: p.status ?? -1, stdout: p.stdout, stderr: p.stderr }, json, `spawned measure on ${JSON.stringify(text.slice(0, 300))}`);
    },
    runs: 3,
  },
];
