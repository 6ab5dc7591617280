// Real trigonometric polynomials stored as [c0, a1, b1, a2, b2, ...] meaning
// c0 + sum_k (a_k cos ks + b_k sin ks). Fixed small degrees; no allocation in the hot path.

/** out = x * y (product-to-sum). out must hold 2*(degX+degY)+1 entries and must not alias x or y. */
export function mulTrig(
  x: ArrayLike<number>, degX: number,
  y: ArrayLike<number>, degY: number,
  out: Float64Array,
): void {
  const degOut = degX + degY;
  for (let i = 0; i <= 2 * degOut; i++) out[i] = 0;
  const x0 = x[0]!, y0 = y[0]!;
  out[0] = x0 * y0;
  for (let n = 1; n <= degY; n++) {
    out[2 * n - 1]! += x0 * y[2 * n - 1]!;
    out[2 * n]! += x0 * y[2 * n]!;
  }
  for (let m = 1; m <= degX; m++) {
    const xa = x[2 * m - 1]!, xb = x[2 * m]!;
    out[2 * m - 1]! += y0 * xa;
    out[2 * m]! += y0 * xb;
    for (let n = 1; n <= degY; n++) {
      const ya = y[2 * n - 1]!, yb = y[2 * n]!;
      // cos m cos n = (cos(m-n) + cos(m+n))/2 ; sin m sin n = (cos(m-n) - cos(m+n))/2
      // cos m sin n = (sin(m+n) - sin(m-n))/2 ; sin m cos n = (sin(m+n) + sin(m-n))/2
      const cosDiff = 0.5 * (xa * ya + xb * yb);
      const cosSum = 0.5 * (xa * ya - xb * yb);
      const sinSum = 0.5 * (xa * yb + xb * ya);
      const sinDiff = 0.5 * (xb * ya - xa * yb); // coefficient of sin((m-n)s)
      addTerm(out, m + n, cosSum, sinSum);
      addTerm(out, m - n, cosDiff, sinDiff);
    }
  }
}

/** out += c cos(ks) + s sin(ks) for any integer k (cos is even, sin odd). */
function addTerm(out: Float64Array, k: number, c: number, s: number): void {
  if (k === 0) {
    out[0]! += c;
  } else if (k > 0) {
    out[2 * k - 1]! += c;
    out[2 * k]! += s;
  } else {
    out[-2 * k - 1]! += c;
    out[-2 * k]! -= s;
  }
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
