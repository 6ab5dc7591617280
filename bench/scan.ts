// Cost of the many-ring passes: one pair-scan pass of the optimiser (kernel struts of the pairs whose bounding
// spheres come near, src/optimize/constraints/scan.ts) against the all-pairs scan it replaced, and one independent check
// (src/check/verify.ts) of a result, for 2-in-1 chains of N = 64, 256, 1024 rings. The all-pairs scan is the
// baseline, measured in the same run. Seeded (the chain is built, not drawn), warm-up, median of repeats.
// Run: npm run build && node dist/bench/scan.js [--repeats N] [--json]
import { availableParallelism, loadavg } from 'node:os';
import { verifyConfiguration } from '../src/check/verify.js';
import { buildChart, posedAt } from '../src/optimize/chart/chart.js';
import { pairPlan, scanPairs } from '../src/optimize/constraints/scan.js';
import { trivialOrbits } from '../src/model/symmetry.js';
import type { Ring } from '../src/model/types.js';
import { linkingMatrix } from '../src/topology/index.js';
import { median } from './stats.js';

const SIZES = [64, 256, 1024];
/** The all-pairs baseline is O(N²) kernel calls: above this N it is left out (minutes per pass). */
const BASELINE_MAX_N = 1024;
const VERIFY_SIZES = [64, 256];
const args = process.argv.slice(2);
const repeatsArg = args.indexOf('--repeats');
const REPEATS = repeatsArg >= 0 ? Math.max(1, Number(args[repeatsArg + 1])) : 5;
const json = args.includes('--json');


/** 2-in-1 chain of unit rings 1.5 apart along x, planes alternating xy / xz: ring i passes through ring i ± 1. */
function chain(n: number): Ring[] {
  return Array.from({ length: n }, (_, i) => ({
    name: `R${i}`, center: [1.5 * i, 0, 0], normal: i % 2 === 0 ? [0, 0, 1] : [0, 1, 0], radius: 1,
  }));
}

function time(run: () => unknown): number[] {
  run();
  const out: number[] = [];
  for (let k = 0; k < REPEATS; k++) {
    const t0 = performance.now();
    run();
    out.push((performance.now() - t0) / 1000);
  }
  return out;
}

interface Row { case: string; n: number; medianSeconds: number; minSeconds: number; pairs: number; note: string }
const rows: Row[] = [];

for (const n of SIZES) {
  const rings = chain(n);
  const orbits = trivialOrbits(n);
  const chart = buildChart(rings, orbits, false);
  const posed = posedAt(chart, new Float64Array(chart.nFree));
  const w = rings.map(() => 1);
  const plan = pairPlan(orbits, n);
  let scanned = 0;
  const near = time(() => { scanned = scanPairs(posed, plan, w).length; });
  rows.push({ case: 'pair scan, broad phase', n, medianSeconds: median(near), minSeconds: Math.min(...near), pairs: scanned, note: '' });
  if (n <= BASELINE_MAX_N) {
    const all: [number, number][] = [];
    for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) all.push([i, j]);
    const t = time(() => scanPairs(posed, all, w));
    rows.push({ case: 'pair scan, all pairs (baseline)', n, medianSeconds: median(t), minSeconds: Math.min(...t), pairs: all.length, note: `broad phase ${(median(t) / median(near)).toFixed(1)}x faster` });
  }
  if (!json) console.error(`done: scan N = ${n}`);
}

for (const n of VERIFY_SIZES) {
  const rings = chain(n);
  const linking = linkingMatrix(rings);
  // Tube 0.2: consecutive cores are 0.5 apart where one pierces the other's disk, so the check passes.
  let ok = false;
  const t = time(() => { ok = verifyConfiguration({ rings, tube: 0.2, linking }).ok; });
  rows.push({ case: 'independent check (verify.ts)', n, medianSeconds: median(t), minSeconds: Math.min(...t), pairs: n - 1, note: ok ? 'verified' : 'NOT VERIFIED' });
  if (!json) console.error(`done: verify N = ${n}`);
}

if (json) {
  console.log(JSON.stringify({ repeats: REPEATS, rows }));
} else {
  const head = ['case', 'N (rings)', 'median (s)', 'min (s)', 'pairs', 'note'];
  const body = rows.map((r) => [r.case, String(r.n), r.medianSeconds.toFixed(4), r.minSeconds.toFixed(4), String(r.pairs), r.note]);
  const wd = head.map((h, k) => Math.max(h.length, ...body.map((b) => b[k]!.length)));
  const line = (cells: string[]): string => cells.map((c, k) => c.padEnd(wd[k]!)).join('  ');
  console.log(`thickring pair-scan and check benchmark (2-in-1 chains, median of ${REPEATS} after a warm-up; times in seconds)`);
  console.log(line(head));
  for (const b of body) console.log(line(b));
  console.log(`load average (1, 5, 15 min): ${loadavg().map((x) => x.toFixed(2)).join(', ')} on ${availableParallelism()} cores`);
}
