// Rotation vectors: the exponential map and its left Jacobian, so that ring orientations are updated
// without frame singularities (only the tangent part of ω is ever used: spin about the ring's own axis
// does not move a round ring).
import { identity, rotationMatrix, type Mat3 } from '../../model/symmetry.js';

/** Below this angle (radians) the series forms are used (their truncation error is far below rounding). */
const SMALL_ANGLE = 1e-4;

/** exp([ω]×): rotation by |ω| about ω/|ω|. */
export function expMap(wx: number, wy: number, wz: number): Mat3 {
  const th = Math.hypot(wx, wy, wz);
  if (th === 0) return identity();
  return rotationMatrix([wx / th, wy / th, wz / th], th);
}

/**
 * Left Jacobian J(ω) of SO(3): d/dε exp(ω + ε δ) = [J(ω) δ]× exp(ω) at ε = 0.
 * J = I + (1 - cos θ)/θ² [ω]× + (θ - sin θ)/θ³ [ω]×².
 */
export function leftJacobian(wx: number, wy: number, wz: number): Mat3 {
  const th2 = wx * wx + wy * wy + wz * wz;
  const th = Math.sqrt(th2);
  let a: number, b: number;
  if (th < SMALL_ANGLE) {
    a = 0.5 - th2 / 24;
    b = 1 / 6 - th2 / 120;
  } else {
    a = (1 - Math.cos(th)) / th2;
    b = (th - Math.sin(th)) / (th2 * th);
  }
  // [ω]× and [ω]×² = ω ωᵀ - θ² I
  return [
    1 + b * (wx * wx - th2), -a * wz + b * wx * wy, a * wy + b * wx * wz,
    a * wz + b * wy * wx, 1 + b * (wy * wy - th2), -a * wx + b * wy * wz,
    -a * wy + b * wz * wx, a * wx + b * wz * wy, 1 + b * (wz * wz - th2),
  ];
}
