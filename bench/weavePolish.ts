// Weave polish benchmark: the exact Lagrangian Hessian (lagrangianHessian.ts) against the differenced one
// (central differences of the envelope gradients, the baseline), measured in the same run.
//  1. Newton on the KKT system (certify/polish.ts, the periodic settings) of each catalogue weave's optimum, from the optimum's
//     active struts re-tracked at a seeded nearby arrangement (every pose and lattice coordinate moved by up
//     to 1e-3 R, --nearby): Newton steps, KKT residual, time, and the tube both reach; and the time of one
//     KKT Jacobian (the Hessian block is the only difference) at the first start.
//  2. Whole single-start solves (solvePeriodic, in this process so the switch reaches the polish): time,
//     outer iterations, status, tube, and the last polish's message.
// Seeded; warm-up; median of repeats.
// Run: npm run build && node dist/bench/weavePolish.js [--repeats N] [--json]
import { latticeOffset, periodicLinks } from '../src/model/periodic.js';
import { ringPairs } from '../src/model/ringPairs.js';
import type { Lattice, Ring } from '../src/model/types.js';
import { weaveEntries, weaveLayout } from '../src/model/weaves.js';
import { certify } from '../src/optimize/certify/certificate.js';
import { useExactHessian } from '../src/optimize/constraints/lagrangianHessian.js';
import { seededRandom } from '../src/optimize/chart/perturb.js';
import {
  angleOf, evaluatePeriodic, newPeriodicConstraint, pointOn, type PeriodicConstraint,
} from '../src/optimize/constraints/constraints.js';
import { scanPeriodic } from '../src/optimize/constraints/scan.js';
import { buildPeriodicChart, latticeVectors, periodicPosedAt, stateOf, type PeriodicPosed } from '../src/optimize/chart/periodicChart.js';
import { kktJacobianOf } from '../src/optimize/certify/kktNewton.js';
import { periodicKktModel, polishPeriodic, type PeriodicPolishResult } from '../src/optimize/certify/polish.js';
import type { PeriodicOutcome, PeriodicProblem } from '../src/optimize/run/problem.js';
import { solvePeriodic } from '../src/optimize/run/periodicSolve.js';
import { benchArgs, median } from './stats.js';

const SEED = 20261201;
const TOL = 1e-9;
const MAX_ITERATIONS = 400;
/** Start of the polish case: every chart coordinate moved by up to this times the smallest radius (--nearby). */
const nearbyAt = process.argv.indexOf('--nearby');
const NEARBY_REL = nearbyAt >= 0 ? Number(process.argv[nearbyAt + 1]) : 1e-3;
/** Struts within this fraction of the tube of touching count as active at the optimum. */
const ACTIVE_REL = 1e-7;
/** Seeded nearby starts per weave for the polish case. */
const POLISH_STARTS = 5;

const { repeats: REPEATS, json } = benchArgs(process.argv.slice(2), 3);
type Method = 'exact' | 'differenced';
const METHODS: readonly Method[] = ['exact', 'differenced'];

/** newtonSteps: per start, -1 where the polish did not converge; residual: the largest of the converged. */
interface PolishRow { jacobianUs: number; weave: string; method: Method; struts: number; newtonSteps: number[]; residual: number; totalMs: number; tube: number }
interface SolveRow { weave: string; method: Method; medianSeconds: number; iterations: number; status: string; tube: number; message: string }

function problemOf(spec: string): PeriodicProblem {
  const layout = weaveLayout(spec);
  return { rings: layout.rings, lattice: layout.lattice!, tubeRatios: layout.rings.map(() => 1), links: periodicLinks(layout.rings, layout.lattice!) };
}

async function solveOnce(problem: PeriodicProblem, method: Method, seed: number): Promise<{ seconds: number; out: PeriodicOutcome }> {
  useExactHessian(method === 'exact');
  const t0 = performance.now();
  const out = await solvePeriodic(problem, { tol: TOL, maxIterations: MAX_ITERATIONS, seed, perturbation: 0.05 });
  return { seconds: (performance.now() - t0) / 1000, out };
}

/** The optimum's active struts, re-tracked at a seeded nearby arrangement, with the start tube and forces. */
function nearbyPolishCase(o: PeriodicOutcome, seed: number) {
  const rings: Ring[] = o.rings.map(({ tube: _t, ...r }) => r);
  const pc0 = buildPeriodicChart(rings, o.lattice);
  const base = periodicPosedAt(pc0, new Float64Array(pc0.nFree));
  // Pairs whose bounding spheres come within the tube's reach (a ring touches its own images too).
  const pairs = ringPairs({ rings, lattice: o.lattice }, 2 * o.tube * (1 + 10 * ACTIVE_REL)).map((p) => ({ a: p.i, b: p.j, shift: p.shift }));
  const at: { a: number; b: number; shift: number[]; ta: number; tb: number }[] = [];
  for (const s of scanPeriodic(base, pairs, rings.map(() => 1))) {
    for (const c of s.contacts) if (c.d - 2 * o.tube <= ACTIVE_REL * o.tube) at.push({ a: s.a, b: s.b, shift: s.shift, ta: c.ta, tb: c.tb });
  }
  const random = seededRandom(seed);
  const Rmin = Math.min(...rings.map((r) => r.radius));
  const moved: { rings: Ring[]; lattice: Lattice } = stateOf(pc0, periodicPosedAt(pc0, Float64Array.from({ length: pc0.nFree }, () => (2 * random() - 1) * NEARBY_REL * Rmin)));
  const pc = buildPeriodicChart(moved.rings, moved.lattice);
  const pp = periodicPosedAt(pc, new Float64Array(pc.nFree));
  const active: PeriodicConstraint[] = [];
  for (const k of at) {
    // Material angles are in each chart's base frames (which the rebuilt chart may pick afresh): carry the
    // contact points over instead, and let tracking find the pair.
    const off0 = latticeOffset(latticeVectors(base), k.shift), off = latticeOffset(latticeVectors(pp), k.shift);
    const ta = angleOf(pp.posed, k.a, pointAt(base, k.a, k.ta, [0, 0, 0]));
    const tb = angleOf(pp.posed, k.b, pointAt(base, k.b, k.tb, off0), off);
    const con = newPeriodicConstraint('strut', k.a, k.b, k.shift, ta, tb, 2, pc.nFree);
    if (Number.isFinite(evaluatePeriodic(con, pc, pp, true))) active.push(con);
  }
  if (active.length !== at.length) throw new Error(`${active.length} of ${at.length} active struts tracked to the nearby start`);
  const t0 = Math.min(...active.map((k) => k.g / k.c));
  const lambda0 = certify({ active, nFree: pc.nFree, maxViolation: 0, activeTol: 0, activeTolLimit: 1, polished: false }).lambda;
  return { pc, active, t0, lambda0, scale: Rmin };
}

/** Point at material angle th on ring j of `pp`, displaced by `off`. */
function pointAt(pp: PeriodicPosed, j: number, th: number, off: ArrayLike<number>): number[] {
  const p = [0, 0, 0];
  pointOn(pp.posed, j, th, p);
  return p.map((v, i) => v + off[i]!);
}

const polishRows: PolishRow[] = [];
const solveRows: SolveRow[] = [];
for (const entry of weaveEntries()) {
  const problem = problemOf(entry.spec);
  // Warm-up (JIT, HiGHS and nlopt loading), and the optimum the polish case starts near.
  const { out: optimum } = await solveOnce(problem, 'exact', SEED);
  for (const method of METHODS) await solveOnce(problem, method, SEED);
  const times: Record<Method, number[]> = { exact: [], differenced: [] };
  const last: Partial<Record<Method, PeriodicOutcome>> = {};
  for (let k = 0; k < REPEATS; k++) {
    // Alternate the order so neither method always runs on a warmer machine.
    for (const method of k % 2 === 0 ? METHODS : [...METHODS].reverse()) {
      const r = await solveOnce(problem, method, SEED + k);
      times[method].push(r.seconds);
      last[method] = r.out;
    }
  }
  for (const method of METHODS) {
    const o = last[method]!;
    solveRows.push({ weave: entry.spec, method, medianSeconds: median(times[method]), iterations: o.iterations, status: o.status, tube: o.tube, message: o.message });
  }
  const cases = Array.from({ length: POLISH_STARTS }, (_, k) => nearbyPolishCase(optimum, SEED + k));
  // Warm-up of both routes on this weave's first case.
  for (const method of METHODS) {
    useExactHessian(method === 'exact');
    const c = cases[0]!;
    polishPeriodic(c.pc, c.active.map((con) => ({ ...con, shift: con.shift.slice(), grad: Float64Array.from(con.grad) })), c.t0, c.lambda0, c.scale);
  }
  // Interleaved (both routes on each case and repeat, order alternating) so drift and collection pauses hit both.
  const steps: Record<Method, number[]> = { exact: [], differenced: [] };
  const ms: Record<Method, number[]> = { exact: [], differenced: [] };
  const residual: Record<Method, number> = { exact: 0, differenced: 0 };
  const tube: Record<Method, number> = { exact: NaN, differenced: NaN };
  for (const c of cases) {
    const times: Record<Method, number[]> = { exact: [], differenced: [] };
    const last: Partial<Record<Method, PeriodicPolishResult>> = {};
    for (let k = 0; k < REPEATS; k++) {
      for (const method of k % 2 === 0 ? METHODS : [...METHODS].reverse()) {
        useExactHessian(method === 'exact');
        // The polish is deterministic; it runs on copies (tracking moves the stored angles).
        const active = c.active.map((con) => ({ ...con, shift: con.shift.slice(), grad: Float64Array.from(con.grad) }));
        const t = performance.now();
        last[method] = polishPeriodic(c.pc, active, c.t0, c.lambda0, c.scale);
        times[method].push(performance.now() - t);
      }
    }
    for (const method of METHODS) {
      const r = last[method]!;
      steps[method].push(r.ok ? r.iterations : -1);
      if (r.ok) {
        residual[method] = Math.max(residual[method], r.residual);
        tube[method] = r.t;
      }
      ms[method].push(median(times[method]));
    }
  }
  // One KKT Jacobian (the Hessian block is where the routes differ) at the first nearby start, many times.
  const c0 = cases[0]!;
  const model = periodicKktModel(c0.pc);
  const jac: Record<Method, number[]> = { exact: [], differenced: [] };
  for (let k = 0; k < 20 * REPEATS; k++) {
    for (const method of k % 2 === 0 ? METHODS : [...METHODS].reverse()) {
      useExactHessian(method === 'exact');
      const t = performance.now();
      kktJacobianOf(model, c0.active, new Float64Array(c0.pc.nFree), c0.lambda0, c0.scale);
      jac[method].push(performance.now() - t);
    }
  }
  for (const method of METHODS) {
    polishRows.push({
      jacobianUs: 1000 * median(jac[method]),
      weave: entry.spec, method, struts: cases[0]!.active.length, newtonSteps: steps[method], residual: residual[method],
      totalMs: ms[method].reduce((a, b) => a + b, 0), tube: tube[method],
    });
  }
}
useExactHessian(true);

if (json) {
  console.log(JSON.stringify({ repeats: REPEATS, polish: polishRows, solve: solveRows }, null, 2));
} else {
  console.log(`Newton polish from ${NEARBY_REL} R off each weave optimum, ${POLISH_STARTS} seeded starts (each timed ${REPEATS} times, median)`);
  console.log(['weave', 'Hessian', 'active struts', 'Newton steps per start (-1: stalled)', 'worst KKT residual (dimensionless)', 'total time (ms)', 'one KKT Jacobian (µs)', 'tube (layout units)'].join(' | '));
  for (const r of polishRows) console.log([r.weave, r.method, r.struts, r.newtonSteps.join(' '), r.residual.toExponential(2), r.totalMs.toFixed(1), r.jacobianUs.toFixed(0), r.tube.toPrecision(13)].join(' | '));
  console.log(`\nWhole single-start solves to ${TOL} (median of ${REPEATS}; iterations, status and tube of the last)`);
  console.log(['weave', 'Hessian', 'median (s)', 'outer iterations', 'status', 'tube (layout units)', 'last polish'].join(' | '));
  for (const r of solveRows) console.log([r.weave, r.method, r.medianSeconds.toFixed(3), r.iterations, r.status, r.tube.toPrecision(13), /KKT residual[^)]*/.exec(r.message)?.[0] ?? r.message].join(' | '));
}
