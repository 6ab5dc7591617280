// Optimality certificate: non-negative strut forces that balance the objective (the Kuhn–Tucker
// condition; for links this is the balance criterion of Cantarella, Fu, Kusner, Sullivan, Wrinkle,
// Geom. Topol. 10, 2006), found by non-negative least squares as in Ashton, Cantarella, Piatek, Rawdon
// (Experimental Math. 20, 2011). Balance, in the gauge-free chart coordinates z and the tube t:
//   Σ λ_k ∇_z g_k = 0,   Σ λ_k c_k = 1,   λ >= 0.
// Sampled point-to-circle constraints are upper bounds of the true pair distance that equal it where they
// touch, so a balance that uses them still rules out every first-order improving motion.
import { Matrix } from 'ml-matrix';
import type { Certificate, ResultContact } from '../../model/result.js';
import type { Constraint } from '../constraints/constraints.js';
import { nnls } from './nnls.js';

/** Balance residual (relative to the largest force term) below which the point is certified. */
export const CERT_BALANCE_TOL = 1e-6;
/** Worst exact violation (relative to the tube) allowed in a certified result. */
export const CERT_VIOLATION_TOL = 1e-9;

export interface CertifyInput {
  active: readonly Constraint[];
  nFree: number;
  /** Worst exact violation relative to the tube, from the kernel scan (>= 0). */
  maxViolation: number;
  /** Slack (relative to the tube) below which a constraint was taken as active. */
  activeTol: number;
  /** Largest activeTol a certificate may rest on. */
  activeTolLimit: number;
  polished: boolean;
  /**
   * Largest curvature of the Lagrangian on the critical subspace (dimensionless, from secondOrder.ts), or
   * null when it was not computed. Above CURVATURE_TOL the point is a saddle, not a maximum.
   */
  curvature?: number | null;
  /** Certify only with a curvature (a Kuhn–Tucker point whose second-order test failed to run is not certified). */
  requireSecondOrder?: boolean;
  /** Appended to a saddle's note: what to do, for a solver that does not step off saddles itself. */
  saddleAdvice?: string;
  /**
   * Candidate forces, one per active constraint (the last SQP step's multipliers carried here), tried
   * before the NNLS: forces are a witness, and the balance computed here from the constraint gradients is
   * the check, whoever proposed them. Above DENSE_NNLS_MAX_FREE variables the dense NNLS is not run and
   * an unbalanced candidate leaves the point uncertified.
   */
  hint?: Float64Array | null;
}

/**
 * Free variables above which the dense NNLS (Lawson–Hanson with a QR per active-set change, O(n m²) per
 * change) is skipped: on chain:256 (1275 variables, ~1000 contacts) one certificate took 40 s.
 */
export const DENSE_NNLS_MAX_FREE = 300;
/**
 * Free variables above which the dense second-order test (secondOrder.ts: an SVD of the active rows and the
 * Lagrangian's curvature on their null space, O(n³)) is not run when the sparse inertia test does not pass,
 * nor the saddle search that uses it: on necklace:256 (1530 variables) one assessment took 160 s.
 */
export const DENSE_SECOND_ORDER_MAX_FREE = 300;

/** Positive curvature (dimensionless) beyond finite-difference noise: the Kuhn–Tucker point is a saddle. */
export const CURVATURE_TOL = 1e-6;

export interface CertifyOutput {
  certificate: Certificate;
  contacts: ResultContact[];
  /** Raw multipliers (Σ λ c = 1), per active constraint. */
  lambda: Float64Array;
}

export function certify(input: CertifyInput): CertifyOutput {
  const { active, nFree } = input;
  const m = active.length;
  const hinted = input.hint && m > 0 ? balanceOf(active, nFree, input.hint) : null;
  let sol: { x: Float64Array; balance: number };
  if (hinted !== null && (hinted.balance <= CERT_BALANCE_TOL || nFree > DENSE_NNLS_MAX_FREE)) {
    sol = hinted;
  } else if (m > 0 && nFree <= DENSE_NNLS_MAX_FREE) {
    const A = new Matrix(nFree + 1, m);
    const b = new Float64Array(nFree + 1);
    b[nFree] = 1;
    active.forEach((k, j) => {
      for (let i = 0; i < nFree; i++) A.set(i, j, k.grad[i]!);
      A.set(nFree, j, k.c);
    });
    const x = nnls(A, b).x;
    sol = balanceOf(active, nFree, x);
  } else {
    sol = { x: new Float64Array(m), balance: m > 0 ? Infinity : 1 };
  }
  const balanceResidual = sol.balance;
  const usable = input.activeTol <= input.activeTolLimit;
  const firstOrder = m > 0 && usable && balanceResidual <= CERT_BALANCE_TOL && input.maxViolation <= CERT_VIOLATION_TOL;
  const curvature = input.curvature ?? null;
  const saddle = curvature !== null && curvature > CURVATURE_TOL;
  const unchecked = curvature === null && input.requireSecondOrder === true;
  const certified = firstOrder && !saddle && !unchecked;
  const contacts: ResultContact[] = [];
  let contactSum = 0;
  active.forEach((k, j) => {
    if (k.kind === 'strut' || k.kind === 'sample') contactSum += sol.x[j]!;
  });
  active.forEach((k, j) => {
    if (k.kind !== 'strut' && k.kind !== 'sample') return;
    const c: ResultContact = {
      a: k.a, b: k.b, onA: [...k.pa], onB: [...k.pb], distance: k.g,
      force: contactSum > 0 ? sol.x[j]! / contactSum : 0,
    };
    if (k.continuum) c.continuum = true;
    contacts.push(c);
  });
  const struts = active.filter((k) => k.kind === 'strut').length;
  const samples = active.filter((k) => k.kind === 'sample').length;
  const others = active.filter((k) => k.kind === 'radius' || k.kind === 'departure').map((k) => k.kind);
  const parts: string[] = [];
  if (struts > 0 || samples === 0) parts.push(`${struts} strut${struts === 1 ? '' : 's'}`);
  if (samples > 0) parts.push(`${samples} samples of contact arcs`);
  if (others.length > 0) parts.push(`the ${others.join(' and ')} limit`);
  const what = parts.join(', ');
  let note: string;
  /** Why no curvature came, when the problem was too large for the dense test (secondOrder.ts). */
  const tooLarge = nFree > DENSE_SECOND_ORDER_MAX_FREE ? `with ${nFree} variables the dense test is not run` : null;
  const second =
    curvature === null
      ? ` The second-order condition was not checked${tooLarge ? ` (${tooLarge})` : ''}.`
      : ` The Lagrangian curves down (or is flat) along every motion that keeps the binding contacts (largest curvature ${curvature.toExponential(1)}, dimensionless).`;
  if (certified) {
    note =
      `Non-negative forces on ${what} balance the objective to ${balanceResidual.toExponential(1)} (relative): ` +
      `a Kuhn-Tucker point, so no small motion of the rings makes the tube thicker to first order.${second} ` +
      `This is evidence of a local maximum, not a proof of the global one${input.polished ? '' : ' (not polished by Newton)'}.`;
  } else if (firstOrder && saddle) {
    note =
      `A Kuhn-Tucker point (forces on ${what} balance to ${balanceResidual.toExponential(1)}) but a saddle: the ` +
      `Lagrangian curves up (${curvature!.toExponential(1)}, dimensionless) along a motion that keeps the binding ` +
      `contacts, so a nearby arrangement allows a thicker tube.${input.saddleAdvice ? ` ${input.saddleAdvice}` : ''}`;
  } else if (firstOrder && unchecked) {
    note =
      `A Kuhn-Tucker point (forces on ${what} balance to ${balanceResidual.toExponential(1)}), not certified: ` +
      `the second-order condition could not be checked (${tooLarge ?? 'a contact was lost while differencing the Lagrangian'}).`;
  } else if (!usable) {
    note = `Not certified: the contacts are only identified to ${input.activeTol.toExponential(1)} of the tube; the solver stopped before convergence.`;
  } else if (m === 0) {
    note = 'Not certified: no active contacts were found.';
  } else if (!Number.isFinite(balanceResidual)) {
    note = `Not certified: with ${nFree} variables the forces are sought only from the solver's last step, and it gave none to check.`;
  } else {
    const whose = nFree > DENSE_NNLS_MAX_FREE ? `the forces of the solver's last step (with ${nFree} variables no least-squares search is run)` : 'the best non-negative forces';
    note =
      `Not certified: ${whose} on ${what} leave a balance residual of ` +
      `${balanceResidual.toExponential(1)} (needs <= ${CERT_BALANCE_TOL}); the tube may still grow.`;
  }
  return {
    certificate: {
      method: 'kkt-nnls', balanceResidual, maxViolation: input.maxViolation, activeStruts: m, certified, note,
    },
    contacts,
    lambda: sol.x,
  };
}

/**
 * Balance of forces x >= 0 (negative entries clipped): |Σ x_j (∇g_j, c_j) - (0, 1)| relative to the
 * largest force term max_j x_j |(∇g_j, c_j)| (at least 1), from the gradients as stored.
 */
function balanceOf(active: readonly Constraint[], nFree: number, x0: ArrayLike<number>): { x: Float64Array; balance: number } {
  const x = Float64Array.from(x0, (v) => (v > 0 ? v : 0));
  const r = new Float64Array(nFree + 1);
  r[nFree] = -1;
  let largest = 1;
  active.forEach((k, j) => {
    const xj = x[j]!;
    let col = k.c * k.c;
    for (let i = 0; i < nFree; i++) {
      const g = k.grad[i]!;
      if (g === 0) continue;
      col += g * g;
      r[i] = r[i]! + xj * g;
    }
    r[nFree] = r[nFree]! + xj * k.c;
    largest = Math.max(largest, xj * Math.sqrt(col));
  });
  let res = 0;
  for (let i = 0; i <= nFree; i++) res += r[i]! * r[i]!;
  return { x, balance: Math.sqrt(res) / largest };
}
