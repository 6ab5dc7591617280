// Gradient of a strut length d = |pA - pB| at a local-minimum pair, by the envelope theorem: the closest
// points move, but to first order only the rigid motion of the rings changes d, so the gradient needs no frame.
// A rigid motion of ring A (centre velocity v, angular velocity ω about its centre) moves pA by v + ω × (pA - cA);
// a change of core radius moves pA by (pA - cA) / RA per unit.

/** out[0..13] = [dd/dcA(3), dd/dωA(3), dd/dRA, dd/dcB(3), dd/dωB(3), dd/dRB]. */
export function strutGradient(
  pA: ArrayLike<number>, pB: ArrayLike<number>,
  cA: ArrayLike<number>, RA: number,
  cB: ArrayLike<number>, RB: number,
  out: Float64Array | number[],
): void {
  let ux = pA[0]! - pB[0]!, uy = pA[1]! - pB[1]!, uz = pA[2]! - pB[2]!;
  const d = Math.hypot(ux, uy, uz);
  // Touching cores (d = 0) have no direction; callers never ask (intersecting circles are rejected).
  if (d > 0) {
    ux /= d; uy /= d; uz /= d;
  }
  const ax = pA[0]! - cA[0]!, ay = pA[1]! - cA[1]!, az = pA[2]! - cA[2]!;
  const bx = pB[0]! - cB[0]!, by = pB[1]! - cB[1]!, bz = pB[2]! - cB[2]!;
  out[0] = ux; out[1] = uy; out[2] = uz;
  // d(u . (ω × a)) / dω = a × u
  out[3] = ay * uz - az * uy; out[4] = az * ux - ax * uz; out[5] = ax * uy - ay * ux;
  out[6] = (ux * ax + uy * ay + uz * az) / RA;
  out[7] = -ux; out[8] = -uy; out[9] = -uz;
  out[10] = -(by * uz - bz * uy); out[11] = -(bz * ux - bx * uz); out[12] = -(bx * uy - by * ux);
  out[13] = -(ux * bx + uy * by + uz * bz) / RB;
}
