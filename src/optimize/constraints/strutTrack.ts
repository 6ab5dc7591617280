// Tracking a strut (a local closest pair of two core circles) through a small change of pose: Newton in
// the pair's two material angles on ½|pA(θ) - pB(φ)|². Shared by the ring chart and
// the periodic one (both in constraints.ts), where ring b is an image of a cell ring displaced by a
// lattice offset; both pass the stacked material frames and the (possibly displaced) centres separately.

/** Newton on the pair angles stops when the step is below this (radians). */
const ANGLE_STEP_TOL = 1e-15;
const STRUT_NEWTON_MAX = 40;
/** Largest Newton step in the two angles (radians): keeps the iteration in the basin of this minimum. */
const MAX_ANGLE_STEP = 0.25;
/** A tracked strut that wanders further than this (radians) has vanished or jumped to another minimum. */
export const STRUT_LOST_ANGLE = 0.5;

/**
 * Local minimum of |pA(θ) - pB(φ)|² near (θ0, φ0) by damped Newton in the two angles (the Hessian when
 * positive definite, a scaled gradient step otherwise). Ring a has centre ca[oca..oca+2], frame
 * e1[oa..], e2[oa..] and radius Ra; ring b likewise with ocb, ob, Rb (its centre may be a displaced image,
 * its frame is its ring's). Null when the minimum is lost. Plain numbers, no allocation but the result.
 */
export function trackStrut(
  e1: ArrayLike<number>, e2: ArrayLike<number>,
  ca: ArrayLike<number>, oca: number, oa: number, Ra: number,
  cb: ArrayLike<number>, ocb: number, ob: number, Rb: number,
  th0: number, ph0: number,
): [number, number] | null {
  let th = th0, ph = ph0;
  for (let it = 0; it < STRUT_NEWTON_MAX; it++) {
    const cA = Math.cos(th), sA = Math.sin(th), cB = Math.cos(ph), sB = Math.sin(ph);
    let gA = 0, gB = 0, aa = 0, bb = 0, ab = 0, dA2 = 0, dB2 = 0;
    for (let k = 0; k < 3; k++) {
      const ea = cA * e1[oa + k]! + sA * e2[oa + k]!, ta = -sA * e1[oa + k]! + cA * e2[oa + k]!;
      const eb = cB * e1[ob + k]! + sB * e2[ob + k]!, tb = -sB * e1[ob + k]! + cB * e2[ob + k]!;
      const D = ca[oca + k]! + Ra * ea - cb[ocb + k]! - Rb * eb;
      gA += D * Ra * ta;
      gB -= D * Rb * tb;
      aa += Ra * Ra * ta * ta;
      bb += Rb * Rb * tb * tb;
      ab -= Ra * Rb * ta * tb;
      dA2 += D * Ra * ea;
      dB2 += D * Rb * eb;
    }
    // Hessian of ½|D|²: pA'' = -(pA - cA), pB'' = -(pB - cB).
    const h11 = aa - dA2, h22 = bb + dB2, h12 = ab;
    const det = h11 * h22 - h12 * h12;
    let dth: number, dph: number;
    if (h11 > 0 && det > 0) {
      dth = -(h22 * gA - h12 * gB) / det;
      dph = -(h11 * gB - h12 * gA) / det;
    } else {
      dth = -gA / Math.max(aa, 1e-300);
      dph = -gB / Math.max(bb, 1e-300);
    }
    const step = Math.hypot(dth, dph);
    if (step > MAX_ANGLE_STEP) {
      dth *= MAX_ANGLE_STEP / step;
      dph *= MAX_ANGLE_STEP / step;
    }
    th += dth;
    ph += dph;
    if (step <= ANGLE_STEP_TOL) break;
  }
  if (Math.abs(th - th0) > STRUT_LOST_ANGLE || Math.abs(ph - ph0) > STRUT_LOST_ANGLE) return null;
  return [th, ph];
}
