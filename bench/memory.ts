// Peak memory (maximum resident set size) and time of `thickring measure` on layouts up to the largest a
// layout file may hold (MAX_LAYOUT_RINGS), and optionally of `inflate` on a chain at the solve limit.
// Each figure is a fresh process (so RSS is that run's own), after one warm-up, median of the repeats; the
// baseline is measure on a 2-ring layout in the same run.
//   node dist/bench/memory.js [--repeats 3] [--inflate 64]
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main } from '../cli/main.js';
import { MAX_LAYOUT_RINGS, MAX_SOLVE_RINGS } from '../src/model/layout.js';
import { median } from './stats.js';

interface Sample {
  code: number;
  seconds: number;
  maxRssMb: number;
}

/** Child mode: run one command with output discarded, then print its exit code, time and peak RSS. */
async function child(args: string[]): Promise<void> {
  const t0 = performance.now();
  const code = await main(args, { out: () => undefined, err: () => undefined, interactive: false });
  const seconds = (performance.now() - t0) / 1000;
  // resourceUsage().maxRSS is in kilobytes (Node docs, process.resourceUsage).
  process.stdout.write(JSON.stringify({ code, seconds, maxRssMb: process.resourceUsage().maxRSS / 1024 }) + '\n');
  process.exit(0);
}

/** Unit rings on a cubic grid of spacing 3 (nothing linked; deterministic, so the bench is seeded by construction). */
function grid(n: number): object {
  const side = Math.ceil(Math.cbrt(n));
  const rings = Array.from({ length: n }, (_, i) => ({
    name: `R${i}`,
    center: [3 * (i % side), 3 * (Math.floor(i / side) % side), 3 * Math.floor(i / side / side)],
    normal: [Math.sin(i), Math.cos(1.3 * i), 0.5],
    radius: 1,
  }));
  return { format: 'thickring-layout/1', rings };
}

/** A linked chain: ring k at (1.5 k, 0, 0), normals alternating z and y. */
function chain(n: number): object {
  const rings = Array.from({ length: n }, (_, k) => ({ name: `C${k}`, center: [1.5 * k, 0, 0], normal: k % 2 ? [0, 1, 0] : [0, 0, 1], radius: 1 }));
  return { format: 'thickring-layout/1', rings };
}

function once(args: string[]): Sample {
  const self = fileURLToPath(import.meta.url);
  const p = spawnSync(process.execPath, [self, '--child', ...args], { encoding: 'utf8', maxBuffer: 1 << 20 });
  const line = p.stdout.trim().split('\n').pop() ?? '';
  try {
    return JSON.parse(line) as Sample;
  } catch {
    throw new Error(`child failed (${p.status}): ${p.stderr.slice(0, 400)}`);
  }
}

function bench(label: string, args: string[], repeats: number): void {
  once(args); // warm-up (file cache, compiled code cache)
  const runs = Array.from({ length: repeats }, () => once(args));
  const code = runs[0]!.code;
  process.stdout.write(
    `${label.padEnd(34)} exit ${code}  time ${median(runs.map((r) => r.seconds)).toFixed(2).padStart(7)} s  ` +
      `peak RSS ${median(runs.map((r) => r.maxRssMb)).toFixed(0).padStart(5)} MB  (median of ${repeats})\n`,
  );
}

async function run(argv: string[]): Promise<void> {
  const arg = (name: string): string | undefined => {
    const k = argv.indexOf(name);
    return k >= 0 ? argv[k + 1] : undefined;
  };
  const repeats = Number(arg('--repeats') ?? 3);
  const dir = mkdtempSync(join(tmpdir(), 'thickring-bench-memory-'));
  const write = (name: string, data: object): string => {
    const p = join(dir, name);
    writeFileSync(p, JSON.stringify(data));
    return p;
  };
  process.stdout.write(`measure, fresh process per run (node ${process.version})\n`);
  bench('baseline: measure, 2 rings', ['measure', write('g2.json', grid(2)), '--json'], repeats);
  for (const n of [1000, 3000, MAX_LAYOUT_RINGS]) {
    bench(`measure --json, ${n} rings`, ['measure', write(`g${n}.json`, grid(n)), '--json'], repeats);
  }
  bench(`measure (text), ${MAX_LAYOUT_RINGS} rings`, ['measure', join(dir, `g${MAX_LAYOUT_RINGS}.json`)], repeats);
  const inflate = arg('--inflate');
  if (inflate !== undefined) {
    const n = Math.min(Number(inflate), MAX_SOLVE_RINGS);
    // One run only: a solve at the limit takes minutes.
    const s = once(['inflate', write(`c${n}.json`, chain(n)), '--json', '--starts', '1', '--workers', '1']);
    process.stdout.write(`inflate --starts 1, chain of ${n} rings   exit ${s.code}  time ${s.seconds.toFixed(0)} s  peak RSS ${s.maxRssMb.toFixed(0)} MB (one run)\n`);
  }
}

if (process.argv[2] === '--child') await child(process.argv.slice(3));
else await run(process.argv.slice(2));
