// Allocation-free ring frame and angle helpers shared by the kernel files.

/**
 * Orthonormal basis (e1, e2) of the plane perpendicular to unit n, written into out[0..5]: the allocation-free
 * twin of planeBasis in model/vec.ts (Duff et al., "Building an Orthonormal Basis, Revisited", JCGT 6(1), 2017).
 */
export function basisInto(nx: number, ny: number, nz: number, out: Float64Array): void {
  const sign = nz >= 0 ? 1 : -1;
  const a = -1 / (sign + nz);
  const b = nx * ny * a;
  out[0] = 1 + sign * nx * nx * a; out[1] = sign * b; out[2] = -sign * nx;
  out[3] = b; out[4] = sign + ny * ny * a; out[5] = -ny;
}

const TWO_PI = 2 * Math.PI;

/** An angle in [0, 2π). */
export function wrapAngle(s: number): number {
  const r = s % TWO_PI;
  return r < 0 ? r + TWO_PI : r;
}
