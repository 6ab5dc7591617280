// The first-order certificate with candidate forces (the last SQP step's multipliers): forces are a witness,
// checked by the balance itself — Σ λ_k ∇g_k = 0, Σ λ_k c_k = 1, λ >= 0 (the Kuhn–Tucker condition, the
// balance criterion of Cantarella, Fu, Kusner, Sullivan, Wrinkle, Geom. Topol. 10, 2006) — whoever proposed
// them; without a usable candidate the small problem falls back to non-negative least squares.
import { describe, expect, it } from 'vitest';
import { certify, CERT_BALANCE_TOL, DENSE_NNLS_MAX_FREE, DENSE_SECOND_ORDER_MAX_FREE } from '../src/optimize/certify/certificate.js';
import type { Constraint } from '../src/optimize/constraints/constraints.js';
import { seededRandom } from '../src/model/random.js';
import { solveInflate } from '../src/optimize/run/solve.js';
import { verifyOutcome } from '../src/optimize/run/multistart.js';
import { resolveSpec } from '../src/model/spec.js';

/**
 * m struts in n free coordinates with known balancing forces λ* (the last `idle` of them zero): gradients
 * random, the last binding one chosen so that Σ λ* ∇g = 0, then λ* scaled so that Σ λ* c = 1.
 */
function balancedStruts(n: number, m: number, idle: number, seed: number): { cons: Constraint[]; forces: Float64Array } {
  const rnd = seededRandom(seed);
  const forces = Float64Array.from({ length: m }, (_, k) => (k < m - idle ? 0.5 + rnd() : 0));
  const grads = Array.from({ length: m }, () => Float64Array.from({ length: n }, () => 2 * rnd() - 1));
  const last = m - idle - 1;
  const sum = new Float64Array(n);
  for (let k = 0; k < m; k++) if (k !== last) for (let i = 0; i < n; i++) sum[i] = sum[i]! + forces[k]! * grads[k]![i]!;
  for (let i = 0; i < n; i++) grads[last]![i] = -sum[i]! / forces[last]!;
  const c = Array.from({ length: m }, () => 1 + rnd());
  let lc = 0;
  for (let k = 0; k < m; k++) lc += forces[k]! * c[k]!;
  for (let k = 0; k < m; k++) forces[k] = forces[k]! / lc;
  const cons: Constraint[] = grads.map((grad, k) => ({
    kind: 'strut', a: k, b: k + 1, ta: 0, tb: 0, c: c[k]!, g: c[k]!, grad, pa: [0, 0, 0], pb: [0, 0, 0], continuum: false,
  }));
  return { cons, forces };
}

const base = { maxViolation: 0, activeTol: 1e-9, activeTolLimit: 1e-7, polished: true };

describe('certificate from candidate forces', () => {
  it('a balancing candidate certifies, with the balance its forces leave', () => {
    const { cons, forces } = balancedStruts(12, 20, 3, 7);
    const out = certify({ ...base, active: cons, nFree: 12, hint: forces });
    expect(out.certificate.certified).toBe(true);
    expect(out.certificate.note).toContain('second-order condition was not checked.');
    // Exact forces balance to rounding (the balance is relative to the largest force term).
    expect(out.certificate.balanceResidual).toBeLessThan(1e-13);
    for (let k = 0; k < forces.length; k++) expect(out.lambda[k]).toBeCloseTo(forces[k]!, 14);
  });

  it('a wrong candidate on a small problem falls back to the NNLS, which finds balancing forces', () => {
    const { cons } = balancedStruts(12, 20, 3, 11);
    const wrong = new Float64Array(20).fill(0);
    wrong[0] = 1;
    const out = certify({ ...base, active: cons, nFree: 12, hint: wrong });
    expect(out.certificate.certified).toBe(true);
    expect(out.certificate.balanceResidual).toBeLessThanOrEqual(CERT_BALANCE_TOL);
    // The certificate's forces really balance: recompute Σ λ ∇g and Σ λ c from the constraints.
    const r = new Float64Array(12);
    let lc = 0;
    cons.forEach((k, j) => {
      expect(out.lambda[j]).toBeGreaterThanOrEqual(0);
      for (let i = 0; i < 12; i++) r[i] = r[i]! + out.lambda[j]! * k.grad[i]!;
      lc += out.lambda[j]! * k.c;
    });
    expect(Math.hypot(...r)).toBeLessThan(1e-8);
    expect(Math.abs(lc - 1)).toBeLessThan(1e-8);
  });

  it('negative candidate forces are clipped, never used: an unbalanced point is not certified', () => {
    // Gradients all pointing one way (a half-space): no non-negative combination cancels them.
    const n = 4;
    const cons: Constraint[] = [0, 1, 2].map((k) => ({
      kind: 'strut', a: k, b: k + 1, ta: 0, tb: 0, c: 2, g: 2,
      grad: Float64Array.from({ length: n }, (_, i) => (i === 0 ? 1 : 0.1 * (k - 1) * (i === 1 ? 1 : 0))),
      pa: [0, 0, 0], pb: [0, 0, 0], continuum: false,
    }));
    // Mixed-sign forces would balance the x-components; they are not admissible.
    const out = certify({ ...base, active: cons, nFree: n, hint: Float64Array.from([0.5, -0.25, 0.25]) });
    expect(out.certificate.certified).toBe(false);
    expect(out.lambda.every((l) => l >= 0)).toBe(true);
  });

  it(`above ${DENSE_NNLS_MAX_FREE} variables an unbalanced candidate leaves the point uncertified (no dense NNLS)`, () => {
    const n = DENSE_NNLS_MAX_FREE + 20;
    const { cons, forces } = balancedStruts(n, n + 10, 4, 3);
    const good = certify({ ...base, active: cons, nFree: n, hint: forces });
    expect(good.certificate.certified).toBe(true);
    // Nor is the dense second-order test run there (the assessment passes no curvature), and the note says so.
    expect(n).toBeGreaterThan(DENSE_SECOND_ORDER_MAX_FREE);
    expect(good.certificate.note).toContain(`second-order condition was not checked (with ${n} variables the dense test is not run)`);
    const spoiled = Float64Array.from(forces, (l, k) => (k === 0 ? 3 * l : l));
    const bad = certify({ ...base, active: cons, nFree: n, hint: spoiled });
    expect(bad.certificate.certified).toBe(false);
    expect(bad.certificate.balanceResidual).toBeGreaterThan(CERT_BALANCE_TOL);
    const none = certify({ ...base, active: cons, nFree: n });
    expect(none.certificate.certified).toBe(false);
    expect(none.certificate.note).toMatch(/not certified/i);
  });

  it('chain:64 (over 300 free variables: no dense polish, no dense NNLS) reaches R/3 certified and re-verified (2-in-1 chain: packing radius 1/2, Graham et al., Discrete Math. 181, 1998)', async () => {
    const r = resolveSpec('chain:64');
    const problem = { rings: r.layout.rings, tubeRatios: r.layout.rings.map(() => 1), linking: r.linking, symmetry: null };
    const out = await solveInflate(problem, { tol: 1e-9, maxIterations: 400, seed: 20261201, perturbation: 0.05 });
    const R = r.layout.rings[0]!.radius;
    expect(out.status).toBe('optimal');
    expect(out.certificate.certified).toBe(true);
    expect(Math.abs(out.tube / R - 1 / 3)).toBeLessThan(1e-9);
    expect(verifyOutcome(problem, out).ok).toBe(true);
  }, 240_000);
});
