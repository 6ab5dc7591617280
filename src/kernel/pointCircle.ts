// Distance from a point to a circle (Eberly, "Distance to Circles in 3D": d^2 = (n.Δ)^2 + (|Δ - (n.Δ)n| - R)^2).
import { basisInto } from './frame.js';

const FR = new Float64Array(6);

/** Distance from point p to the circle (c, unit n, R), and the closest point written to out (if given). */
export function closestPointOnCircle(
  p: ArrayLike<number>, c: ArrayLike<number>, n: ArrayLike<number>, R: number, out?: Float64Array | number[],
): number {
  const dx = p[0]! - c[0]!, dy = p[1]! - c[1]!, dz = p[2]! - c[2]!;
  const z = dx * n[0]! + dy * n[1]! + dz * n[2]!;
  let qx = dx - z * n[0]!, qy = dy - z * n[1]!, qz = dz - z * n[2]!;
  const rho = Math.hypot(qx, qy, qz);
  if (rho > 0) {
    qx /= rho; qy /= rho; qz /= rho;
  } else {
    // On the axis every point of the circle is closest; pick the frame's angle-0 point.
    basisInto(n[0]!, n[1]!, n[2]!, FR);
    qx = FR[0]!; qy = FR[1]!; qz = FR[2]!;
  }
  if (out) {
    out[0] = c[0]! + R * qx;
    out[1] = c[1]! + R * qy;
    out[2] = c[2]! + R * qz;
  }
  return Math.hypot(z, rho - R);
}

/** Eberly's point–circle distance d^2 = (n.Δ)^2 + (|Δ - (n.Δ)n| - R)^2. */
export function pointCircleDistance(p: ArrayLike<number>, c: ArrayLike<number>, n: ArrayLike<number>, R: number): number {
  return closestPointOnCircle(p, c, n, R);
}
