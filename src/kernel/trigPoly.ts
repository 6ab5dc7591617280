// Real trigonometric polynomials stored as [c0, a1, b1, a2, b2, ...] meaning
// c0 + sum_k (a_k cos ks + b_k sin ks). Fixed small degrees; no allocation in the hot path.

/**
 * out = x * y for two degree-2 polynomials (the kernel's set-up), by the product-to-sum identities
 * cos m cos n = (cos(m-n) + cos(m+n))/2 and the like, unrolled. out must hold 9 entries and must not alias x or y.
 */
export function mulTrig22(x: ArrayLike<number>, y: ArrayLike<number>, out: Float64Array): void {
  const x0 = x[0]!, x1 = x[1]!, x2 = x[2]!, x3 = x[3]!, x4 = x[4]!;
  const y0 = y[0]!, y1 = y[1]!, y2 = y[2]!, y3 = y[3]!, y4 = y[4]!;
  // (1,1) -> cos 0 and 2s; (2,2) -> cos 0 and 4s; (1,2) and (2,1) -> 1s and 3s.
  out[0] = x0 * y0 + 0.5 * (x1 * y1 + x2 * y2 + x3 * y3 + x4 * y4);
  out[1] = x0 * y1 + y0 * x1 + 0.5 * (x1 * y3 + x2 * y4 + x3 * y1 + x4 * y2);
  out[2] = x0 * y2 + y0 * x2 + 0.5 * (x1 * y4 - x2 * y3 + x4 * y1 - x3 * y2);
  out[3] = x0 * y3 + y0 * x3 + 0.5 * (x1 * y1 - x2 * y2);
  out[4] = x0 * y4 + y0 * x4 + 0.5 * (x1 * y2 + x2 * y1);
  out[5] = 0.5 * (x1 * y3 - x2 * y4 + x3 * y1 - x4 * y2);
  out[6] = 0.5 * (x1 * y4 + x2 * y3 + x3 * y2 + x4 * y1);
  out[7] = 0.5 * (x3 * y3 - x4 * y4);
  out[8] = 0.5 * (x3 * y4 + x4 * y3);
}

/** Value and first three derivatives of a degree-4 trig polynomial given cos s, sin s (angle addition). */
export function evalTrig4(g: ArrayLike<number>, c1: number, s1: number, out: Float64Array): void {
  const c2 = c1 * c1 - s1 * s1, s2 = 2 * s1 * c1;
  const c3 = c2 * c1 - s2 * s1, s3 = s2 * c1 + c2 * s1;
  const c4 = c2 * c2 - s2 * s2, s4 = 2 * s2 * c2;
  const a1 = g[1]! * c1 + g[2]! * s1, a2 = g[3]! * c2 + g[4]! * s2;
  const a3 = g[5]! * c3 + g[6]! * s3, a4 = g[7]! * c4 + g[8]! * s4;
  // d/ds of (a cos ks + b sin ks) is k (b cos ks - a sin ks).
  const b1 = g[2]! * c1 - g[1]! * s1, b2 = g[4]! * c2 - g[3]! * s2;
  const b3 = g[6]! * c3 - g[5]! * s3, b4 = g[8]! * c4 - g[7]! * s4;
  out[0] = g[0]! + a1 + a2 + a3 + a4;
  out[1] = b1 + 2 * b2 + 3 * b3 + 4 * b4;
  out[2] = -(a1 + 4 * a2 + 9 * a3 + 16 * a4);
  out[3] = -(b1 + 8 * b2 + 27 * b3 + 64 * b4);
}
