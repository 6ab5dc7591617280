// Multistart on the worker pool: results independent of the worker count (seeds travel with the
// tasks), worker deaths retried with the next algorithm, and every answer re-checked by the independent
// checker. Reference values: tight Hopf link tube R/2 (Cantarella, Kusner, Sullivan 2002); 3-ring chain
// R/3 (circle-packing bound for k = 2, r_2 = 1/2, Graham et al. 1998, attained by the flat chain).
import { describe, expect, it } from 'vitest';
import { verifyRings } from '../src/check/verify.js';
import { InputError } from '../src/model/errors.js';
import type { SolveResult } from '../src/model/result.js';
import { resolveSpec } from '../src/model/spec.js';
import { runMultistart, startSeed, type MultistartOptions, type StartProgress } from '../src/optimize/run/multistart.js';
import type { InflateProblem } from '../src/optimize/run/problem.js';
import type { StartHeartbeat } from '../src/optimize/run/startLoop.js';

function problemOf(spec: string): InflateProblem {
  const r = resolveSpec(spec);
  return { rings: r.layout.rings, tubeRatios: r.layout.rings.map(() => 1), linking: r.linking, symmetry: null };
}

const base = (spec: string): MultistartOptions => ({
  starts: 3, workers: 1, seed: 7, tol: 1e-9, spec, command: 'inflate', units: null,
});

function withoutTiming(r: SolveResult): Omit<SolveResult, 'elapsedSeconds'> {
  const { elapsedSeconds: _e, ...rest } = r;
  return rest;
}

describe('runMultistart', () => {
  it('reports running starts from the workers: iterations rise, tubes stay below the optimum R/2 (CKS 2002)', async () => {
    const beats: StartHeartbeat[] = [];
    const r = await runMultistart(problemOf('hopf'), { ...base('hopf'), workers: 2, onIteration: (e) => beats.push(e) });
    // The first iteration of every start is always reported (later ones at most four times a second).
    expect(new Set(beats.map((b) => b.start))).toEqual(new Set([0, 1, 2]));
    for (const b of beats) {
      expect(b.iteration).toBeGreaterThanOrEqual(1);
      expect(b.tube).toBeGreaterThan(0);
      expect(b.tube).toBeLessThanOrEqual(r.tube * (1 + 1e-9));
    }
    for (const k of [0, 1, 2]) {
      const its = beats.filter((b) => b.start === k).map((b) => b.iteration);
      expect(its).toEqual([...its].sort((x, y) => x - y));
    }
  });

  it('hopf: same answer on 1 and 2 workers, tube R/2 (CKS 2002), re-verified', async () => {
    const problem = problemOf('hopf');
    const one = await runMultistart(problem, { ...base('hopf'), workers: 1 });
    const two = await runMultistart(problem, { ...base('hopf'), workers: 2 });
    expect(withoutTiming(two)).toEqual(withoutTiming(one));
    expect(one.starts.map((s) => s.seed)).toEqual([0, 1, 2].map((k) => startSeed(7, k)));
    // Certifying the degenerate Hopf optimum (contact along a whole circle) is the solver's business;
    // here the answer must be feasible, checked, and equal to R/2.
    expect(['optimal', 'stalled']).toContain(one.status);
    expect(Math.abs(one.tube - 0.5) / 0.5).toBeLessThan(1e-8);
    // Inner diameter / wire diameter at r = R/2: (R - r) / r = 1.
    expect(one.aspectRatio).toBeCloseTo(1, 7);
    expect(one.tubeOverCore).toBeCloseTo(0.5, 8);
    expect(one.bound?.tube).toBeCloseTo(0.5, 12);
    expect(one.verification.ok).toBe(true);
    expect(verifyRings(one.rings, one.tube, one.linking).ok).toBe(true);
  });

  it('a worker that dies is replaced and the start retried with the next algorithm', async () => {
    const events: StartProgress[] = [];
    const result = await runMultistart(problemOf('chain:3'), {
      ...base('chain:3'),
      starts: 2,
      workers: 1,
      // Start 0 dies under every algorithm; start 1 only under SLSQP (then CCSAQ runs).
      simulateAbort: [{ start: 0, algorithms: ['slsqp', 'ccsaq', 'mma'] }, { start: 1, algorithms: ['slsqp'] }],
      onProgress: (e) => events.push(e),
    });
    expect(result.starts[0]!.status).toBe('failed');
    expect(result.starts[0]!.retries).toBe(3);
    expect(result.starts[1]!.retries).toBe(1);
    expect(result.starts[1]!.status).not.toBe('failed');
    const e1 = events.find((e) => e.start === 1)!;
    expect(e1.errors).toHaveLength(1);
    expect(e1.errors[0]).toMatch(/^slsqp: worker died .*Aborted\(simulated/);
    // The surviving start carries the result; the checker agrees with it.
    expect(result.tube).toBe(result.starts[1]!.tube);
    expect(verifyRings(result.rings, result.tube, result.linking).ok).toBe(result.status !== 'failed');
    expect(result.tube).toBeLessThanOrEqual(1 / 3 + 1e-12);
  });

  it('a symmetry the rings cannot carry is bad input, raised before any worker starts', async () => {
    const problem = { ...problemOf('chain:3'), symmetry: { type: 'cyclic' as const, order: 3, axis: [0, 0, 1] as [number, number, number], origin: [0, 0, 0] as [number, number, number] } };
    await expect(runMultistart(problem, base('chain:3'))).rejects.toBeInstanceOf(InputError);
  });
});
