// The long fuzz run: `npm run fuzz [-- --seconds N]` cycles every family of tests/properties/*.props.ts
// with fresh seeds until the time budget is spent, prints cases per family, failures and time, and writes
// each failing case (seed, path, counterexample) to fuzz-failures/<family>-<seed>.json for replay:
//   fc.assert(property, { seed, path, numRuns: 1 })  (or rerun this runner with --replay FILE).
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { loadFamilies, type LoadedFamily } from '../tests/properties/loadFamilies.js';
import { projectRoot } from '../tests/properties/schemaCheck.js';

/** Default time budget (s). */
const DEFAULT_SECONDS = 600;
/** Longest time slice of one family per round (s); the budget is shared in slices, so fast families run more cases. */
const MAX_SLICE_SECONDS = 30;
/** Cases in a family's first slice; later slices are sized from its measured time per case. */
const FIRST_SLICE_CASES = 5;

interface Tally {
  cases: number;
  /** Cases in the next slice. */
  next: number;
  failures: number;
  seconds: number;
}

async function main(argv: string[]): Promise<number> {
  const arg = (name: string): string | undefined => {
    const k = argv.indexOf(name);
    return k >= 0 ? argv[k + 1] : undefined;
  };
  const seconds = Number(arg('--seconds') ?? DEFAULT_SECONDS);
  if (!(seconds > 0)) {
    process.stderr.write(`fuzz: --seconds '${arg('--seconds')}' must be a positive number of seconds\n`);
    return 2;
  }
  const only = arg('--family');
  const families = (await loadFamilies()).filter((f) => only === undefined || f.name === only);
  if (families.length === 0) {
    process.stderr.write(`fuzz: no family${only ? ` named ${only}` : ''}\n`);
    return 2;
  }
  const replay = arg('--replay');
  if (replay !== undefined) return replayCase(families, replay);

  const outDir = join(projectRoot(), 'fuzz-failures');
  const tally = new Map<string, Tally>(families.map((f) => [f.name, { cases: 0, next: FIRST_SLICE_CASES, failures: 0, seconds: 0 }]));
  const start = Date.now();
  const deadline = start + seconds * 1000;
  const slice = Math.max(2, Math.min(MAX_SLICE_SECONDS, seconds / (3 * families.length))) * 1000;
  let seedSource = (Date.now() ^ (process.pid << 8)) >>> 0;
  process.stderr.write(`fuzz: ${families.length} families (${families.map((f) => f.name).join(', ')}), budget ${seconds} s\n`);
  while (Date.now() < deadline) {
    for (const family of families) {
      if (Date.now() >= deadline) break;
      const t = tally.get(family.name)!;
      seedSource = (Math.imul(seedSource, 1664525) + 1013904223) >>> 0;
      const seed = seedSource | 0;
      const t0 = Date.now();
      // No interruptAfterTimeLimit: it abandons a running case (an inflate would go on in the background).
      // The slice is sized instead from the family's own time per case so far.
      const details = await fc.check(
        fc.asyncProperty(family.arbitrary, async (x) => { await family.check(x); }),
        { seed, numRuns: t.next, endOnFailure: false },
      );
      const dt = (Date.now() - t0) / 1000;
      t.seconds += dt;
      t.cases += details.numRuns;
      const perCase = t.seconds / Math.max(1, t.cases);
      const left = Math.max(0, deadline - Date.now()) / 1000;
      t.next = Math.max(1, Math.floor(Math.min(slice / 1000, left) / Math.max(perCase, 1e-4)));
      if (details.failed) {
        t.failures++;
        mkdirSync(outDir, { recursive: true });
        const file = join(outDir, `${family.name}-${seed}.json`);
        const error = details.errorInstance instanceof Error ? details.errorInstance.message : String(details.errorInstance);
        writeFileSync(file, JSON.stringify({ family: family.name, file: family.file, seed, path: details.counterexamplePath, counterexample: details.counterexample, error }, null, 2) + '\n');
        process.stderr.write(`fuzz: FAILURE in ${family.name} (seed ${seed}), written to ${file}\n  ${error.split('\n')[0]}\n`);
      }
    }
  }
  const total = (Date.now() - start) / 1000;
  process.stdout.write(`fuzz: ${total.toFixed(0)} s in all\n`);
  process.stdout.write('  family                 cases  failures  seconds\n');
  for (const f of families) {
    const t = tally.get(f.name)!;
    process.stdout.write(`  ${f.name.padEnd(22)} ${String(t.cases).padStart(6)}  ${String(t.failures).padStart(8)}  ${t.seconds.toFixed(0).padStart(7)}\n`);
  }
  const failures = [...tally.values()].reduce((s, t) => s + t.failures, 0);
  process.stdout.write(failures === 0 ? 'fuzz: no failures\n' : `fuzz: ${failures} failing round(s); cases in ${outDir}\n`);
  return failures === 0 ? 0 : 1;
}

/** Run the one case a failure file names (family, seed, path) and report it. */
async function replayCase(families: LoadedFamily[], file: string): Promise<number> {
  const saved = JSON.parse(readFileSync(file, 'utf8')) as { family: string; seed: number; path: string };
  const family = families.find((f) => f.name === saved.family);
  if (!family) {
    process.stderr.write(`fuzz: ${file} names family ${saved.family}, which is not loaded\n`);
    return 2;
  }
  const details = await fc.check(fc.asyncProperty(family.arbitrary, async (x) => { await family.check(x); }), { seed: saved.seed, path: saved.path, numRuns: 1, endOnFailure: true });
  process.stdout.write(details.failed ? `still fails: ${String(details.errorInstance)}\n` : 'passes now\n');
  return details.failed ? 1 : 0;
}

process.exitCode = await main(process.argv.slice(2));
// Worker pools of the inflate family may keep the event loop alive: the run is over.
process.exit(process.exitCode);
