// Settings of the outer trust-region loop (outerLoop.ts), shared by the ring solver (solve.ts) and the weave solver
// (periodicSolve.ts), which run the same method on different charts; and the small pieces of an outcome
// both build. Lengths are relative to the smallest core radius, gains and slacks to the tube.
import type { Certificate } from '../../model/result.js';
import type { Ring } from '../../model/types.js';

/** First proximal radius and its cap, and the cap of the step box, relative to the smallest core radius. */
export const DELTA_START_REL = 0.05;
export const DELTA_MAX_REL = 1e4;
export const BOX_MAX_REL = 0.25;
/**
 * SQP step rejected: the box cap falls to this fraction of the rejected step's largest coordinate and Δ by
 * this factor; a step with ratio >= GROW_RATIO that used at least BOX_REGROW_USE of the cap doubles it.
 * Shrinking to a fraction of the failed step rather than of the old radius is the usual trust-region practice
 * (from memory: Conn, Gould & Toint, Trust-Region Methods, SIAM 2000, ch. 17).
 */
export const REJECT_BOX_FRACTION = 0.5;
export const REJECT_DELTA_FACTOR = 0.5;
export const BOX_REGROW_USE = 0.5;
/** Trust radius below which the outer loop gives up (relative to the smallest core radius). */
export const DELTA_MIN_REL = 1e-13;
/** Constraints within this many step boxes of touching enter the local model. */
export const MARGIN_BOXES = 8;
/** Ratio of actual to predicted gain for acceptance, and for growing the trust radius. */
export const ACCEPT_RATIO = 0.1;
export const GROW_RATIO = 0.75;
/** Predicted relative gain at which a polish is first tried. */
export const POLISH_TRIGGER_START = 1e-4;
/** Slack thresholds (relative to the tube) tried for the active set of the polish and the certificate. */
export const ACTIVE_TOLS: readonly number[] = [1e-9, 1e-7, 1e-5, 1e-3];
/** Polished results may lose at most this much (relative) to the outer loop's best tube. */
export const POLISH_LOSS_REL = 1e-12;
/** Consecutive failed local solves tolerated. */
export const MAX_STEP_FAILURES = 5;
/** Halvings of the start perturbation tried before giving up on a seeded start. */
export const PERTURB_RETRIES = 8;
/** Saddles stepped off at most per solve, and the sizes of that step tried (relative to the smallest core radius). */
export const MAX_ESCAPES = 3;
export const ESCAPE_STEPS_REL: readonly number[] = [1e-2, 3e-2, 1e-1];
/** Balance residual up to which a near-critical point is searched for a way off a saddle. */
export const ESCAPE_BALANCE_TOL = 1e-3;

/** The certificate of a start that could not be solved at all. */
export function noCertificate(why: string): Certificate {
  return {
    method: 'kkt-nnls', balanceResidual: Infinity, maxViolation: Infinity, activeStruts: 0, certified: false,
    note: `No certificate: ${why}.`,
  };
}

/** Copies of the rings with ring i's tube set to t · w[i]. */
export function withTubes(rings: readonly Ring[], t: number, w: readonly number[]): Ring[] {
  return rings.map((r, i) => ({ name: r.name, center: [...r.center], normal: [...r.normal], radius: r.radius, tube: t * w[i]! }));
}

export function copyRing(r: Ring): Ring {
  return { ...r, center: [...r.center], normal: [...r.normal] };
}
