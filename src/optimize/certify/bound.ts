// Upper bound on the common tube from circle packing in a circle.
//
// If k rings pass through ring i (linking number ±1: a round circle then crosses i's flat disk exactly
// once), their cores pierce the disk at points p_j with |p_j - p_l| >= r_j + r_l (the tubes are disjoint)
// and at distance >= r_i + r_j from i's core, i.e. |p_j - c_i| <= R_i - r_i - r_j. With r = t·w_min
// (the thinnest of the k tubes) the disks of radius r about the p_j are disjoint and lie in the disk of
// radius R_i - r_i about c_i, so r / (R_i - r_i) <= r_k, the best radius of k equal circles packed in a unit
// circle. Solving t·w_min <= r_k (R_i - t·w_i) for t:
//     t <= r_k R_i / (w_min + r_k w_i).
// k = 1 gives R/2 for equal rings (Cantarella–Kusner–Sullivan 2002: a linked component has length >= 4π at
// unit thickness), k = 2 gives R/3. A ring no ring passes through still needs t·w_i <= R_i.
import type { Bound, Certificate } from '../../model/result.js';
import { CERT_VIOLATION_TOL } from './certificate.js';
import type { Ring } from '../../model/types.js';

/**
 * r_k for k = 1..8 (Graham, Lubachevsky, Nurmela, Östergård, Discrete Math. 181, 1998; Kravitz, Math. Mag.
 * 40, 1967). Beyond 8 the area bound 1/√k, capped by r_8 (dropping rings from a packing keeps it valid).
 */
export function packingRadius(k: number): number {
  switch (k) {
    case 0:
    case 1:
      return 1;
    case 2:
      return 1 / 2;
    case 3:
      return 2 * Math.sqrt(3) - 3;
    case 4:
      return Math.SQRT2 - 1;
    case 5:
      return 1 / (1 + 1 / Math.sin(Math.PI / 5));
    case 6:
    case 7:
      return 1 / 3;
    case 8:
      return 1 / (1 + 1 / Math.sin(Math.PI / 7));
    default:
      return Math.min(1 / Math.sqrt(k), packingRadius(8));
  }
}

/**
 * Smallest bound over rings; `gap` is left 0 (fill it with withGap once the tube is known).
 * Null when there are no rings.
 */
export function packingBound(rings: Ring[], tubeRatios: number[], linking: number[][]): Bound | null {
  let best: Bound | null = null;
  for (let i = 0; i < rings.length; i++) {
    const R = rings[i]!.radius;
    const wi = tubeRatios[i] ?? 1;
    let k = 0;
    let wMin = Infinity;
    for (let j = 0; j < rings.length; j++) {
      if (j === i || (linking[i]?.[j] ?? 0) === 0) continue;
      k++;
      wMin = Math.min(wMin, tubeRatios[j] ?? 1);
    }
    const tube = ringPackingBound(R, wi, k, wMin);
    if (best === null || tube < best.tube) best = { tube, ring: i, through: k, gap: 0 };
  }
  return best;
}

/**
 * The bound of one ring (core radius R, tube ratio wi) with k rings through it, the thinnest of tube ratio
 * wMin: t <= r_k R / (wMin + r_k wi), or t <= R / wi when none passes through.
 */
export function ringPackingBound(R: number, wi: number, k: number, wMin: number): number {
  if (k === 0) return R / wi;
  const rk = packingRadius(k);
  return (rk * R) / (wMin + rk * wi);
}

/** The bound with its gap (bound - tube) / bound filled in. */
export function withGap(bound: Bound | null, tube: number): Bound | null {
  if (bound === null) return null;
  return { ...bound, gap: bound.tube > 0 ? (bound.tube - tube) / bound.tube : 0 };
}

/** Certificate method of a tube certified by equalling the packing bound. */
export const BOUND_METHOD = 'packing-bound';

/** The tube equals the bound to the relative tolerance (rounding may leave it a hair above). */
export function boundAttained(t: number, bound: number, tol: number): boolean {
  return bound > 0 && t > 0 && (bound - t) / bound <= tol;
}

/**
 * The certificate of a tube that equals the packing bound: a global maximum, whatever the forces say. The
 * Kuhn–Tucker figures of `kkt` are kept (a degenerate maximiser may balance poorly, or its second-order test
 * may fail: with several sets of forces, the one found need not show the curvature is negative), and the
 * note says which proof holds. Certified only without a violation beyond CERT_VIOLATION_TOL.
 */
export function boundCertificate(kkt: Certificate, t: number, bound: number): Certificate {
  const gap = Math.max(0, (bound - t) / bound);
  return {
    ...kkt,
    method: BOUND_METHOD,
    certified: kkt.maxViolation <= CERT_VIOLATION_TOL,
    note:
      `The tube equals the packing bound to ${gap.toExponential(1)} (relative): no arrangement with this linking ` +
      `has a thicker tube (circle packing in the hole of the bounding ring), so this is a global maximum. The ` +
      `Kuhn-Tucker test alone did not certify it (forces on ${kkt.activeStruts} near contacts balance to ` +
      `${kkt.balanceResidual.toExponential(1)}, relative), as is common where a whole family of arrangements ` +
      `reaches the bound (a degenerate maximiser).`,
  };
}
