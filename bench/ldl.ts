// Sparse LDLᵀ benchmark (src/optimize/step/sparseLdl.ts): analyse (ordering + symbolic), factor and solve
// times on KKT matrices of a chain of rings (banded contact graph) and a chainmail-like 2D grid, at
// n = 500, 2,000 and 5,000 rows. Baselines in the same run: the same factorisation in the natural order
// (rings first, then contact rows, as assembled) and ml-matrix's dense LU solve (n <= --dense-max only:
// it is cubic). Seeded, warm-up calls, median of repeats.
// Run: npm run build && node dist/bench/ldl.js [--repeats 7] [--dense-max 2000] [--json]
import { Matrix, solve } from 'ml-matrix';
import { seededRandom } from '../src/model/random.js';
import { analyseLdl, factorLdl, type SymCsc } from '../src/optimize/step/sparseLdl.js';
import { BLOCK, denseOf, gridEdges, kktFromGraph, pathEdges } from '../tests/reference/kktPatterns.js';
import { benchArgs, median } from './stats.js';

const SEED = 20261204;
const SIZES = [500, 2000, 5000];
const args = process.argv.slice(2);
const { repeats, json } = benchArgs(args, 7);
const denseAt = args.indexOf('--dense-max');
const DENSE_MAX = denseAt >= 0 ? Number(args[denseAt + 1]) : 600;

interface Row {
  pattern: string; n: number; nnzA: number; method: string; nnzL: number | null;
  analyseMs: number | null; factorMs: number | null; solveMs: number;
}

/** Warm-up calls before timing (lets the JIT compile the kernels at the size being timed). */
const WARMUP = 3;

/** A call slower than this is timed once after one warm-up (the natural-order baselines at n = 5,000). */
const SLOW_MS = 500;

/** Median wall time of f over the repeats, after the warm-up calls. */
function timeMs(f: () => void): number {
  const t0 = performance.now();
  f();
  const slow = performance.now() - t0 > SLOW_MS;
  for (let w = 1; w < WARMUP && !slow; w++) f();
  const t: number[] = [];
  for (let r = 0; r < (slow ? 1 : repeats); r++) {
    const t0 = performance.now();
    f();
    t.push(performance.now() - t0);
  }
  return median(t);
}

function chain(n: number): SymCsc {
  const rings = Math.round((n + 1) / (BLOCK + 1)); // 6 variables per ring, one contact row per link
  return kktFromGraph(rings, pathEdges(rings), seededRandom(SEED + n)).toCsc().matrix;
}

function grid(n: number): SymCsc {
  const k = Math.round(Math.sqrt(n / (BLOCK + 2))); // k² rings, about 2k² contacts
  return kktFromGraph(k * k, gridEdges(k, k), seededRandom(SEED + n)).toCsc().matrix;
}

function sparseRow(name: string, A: SymCsc, ordering: 'min-degree' | 'natural'): Row {
  const b = Float64Array.from({ length: A.n }, seededRandom(SEED));
  const out = new Float64Array(A.n);
  const analyseMs = timeMs(() => { analyseLdl(A, ordering); });
  const p = analyseLdl(A, ordering);
  const factorMs = timeMs(() => { factorLdl(p, A); });
  const f = factorLdl(p, A);
  const solveMs = timeMs(() => { f.solve(b, out); });
  return { pattern: name, n: A.n, nnzA: A.values.length, method: ordering, nnzL: p.nnzL, analyseMs, factorMs, solveMs };
}

function denseRow(name: string, A: SymCsc): Row {
  const M = new Matrix(denseOf(A));
  const b = Matrix.columnVector(Array.from({ length: A.n }, seededRandom(SEED)));
  const solveMs = timeMs(() => { solve(M, b); });
  return { pattern: name, n: A.n, nnzA: A.values.length, method: 'dense LU (ml-matrix)', nnzL: null, analyseMs: null, factorMs: null, solveMs };
}

// Warm the JIT on small cases of both patterns first, so the first timed size is not penalised.
for (let w = 0; w < 10; w++) {
  for (const A of [chain(300), grid(300)]) factorLdl(analyseLdl(A), A).solve(new Float64Array(A.n));
}

const rows: Row[] = [];
for (const [name, build] of [['chain', chain], ['grid', grid]] as const) {
  for (const size of SIZES) {
    const A = build(size);
    process.stderr.write(`ldl bench: ${name} n = ${A.n} ...\n`);
    rows.push(sparseRow(name, A, 'min-degree'), sparseRow(name, A, 'natural'));
    if (A.n <= DENSE_MAX) rows.push(denseRow(name, A));
  }
}

if (json) {
  console.log(JSON.stringify({ seed: SEED, repeats, rows }, null, 2));
} else {
  const ms = (v: number | null): string => (v === null ? '–' : `${v.toFixed(v < 10 ? 2 : 1)} ms`);
  console.log(`Sparse LDLᵀ on KKT matrices (median of ${repeats} after ${WARMUP} warm-up calls; a call over ${SLOW_MS} ms timed once; dense solve = factor + solve)`);
  console.log('| pattern | n | nnz(A upper) | method | nnz(L) | analyse | factor | solve |');
  console.log('| --- | --- | --- | --- | --- | --- | --- | --- |');
  for (const r of rows) {
    console.log(`| ${r.pattern} | ${r.n} | ${r.nnzA} | ${r.method} | ${r.nnzL ?? '–'} | ${ms(r.analyseMs)} | ${ms(r.factorMs)} | ${ms(r.solveMs)} |`);
  }
}
