// Independent brute-force reference for circle–circle distance: dense sampling of A, the exact nearest point on B
// from the plain parametrisation (min over t of |A(s) - cB - RB(u cos t + v sin t)|^2 = |Δ|^2 + RB^2 - 2 RB |(Δ.u, Δ.v)|),
// then golden-section refinement of every sampled local minimum. No polynomial, no subdivision: shares nothing
// with the kernel's method but the definition of a circle.

export interface RefCircle { center: ArrayLike<number>; normal: ArrayLike<number>; radius: number }
export interface RefMin { s: number; d: number; depth: number }

function frame(n: ArrayLike<number>): [number[], number[]] {
  const l = Math.hypot(n[0]!, n[1]!, n[2]!);
  const z = [n[0]! / l, n[1]! / l, n[2]! / l];
  // Any perpendicular vector: cross with the axis least aligned with n (Gram–Schmidt style, not the kernel's basis).
  const a = Math.abs(z[0]!) < 0.6 ? [1, 0, 0] : [0, 1, 0];
  const d = a[0]! * z[0]! + a[1]! * z[1]! + a[2]! * z[2]!;
  let u = [a[0]! - d * z[0]!, a[1]! - d * z[1]!, a[2]! - d * z[2]!];
  const lu = Math.hypot(u[0]!, u[1]!, u[2]!);
  u = u.map((x) => x / lu);
  const v = [z[1]! * u[2]! - z[2]! * u[1]!, z[2]! * u[0]! - z[0]! * u[2]!, z[0]! * u[1]! - z[1]! * u[0]!];
  return [u, v];
}

export function refPoint(c: RefCircle, s: number): number[] {
  const [u, v] = frame(c.normal);
  return [0, 1, 2].map((i) => c.center[i]! + c.radius * (u[i]! * Math.cos(s) + v[i]! * Math.sin(s)));
}

/** Squared distance from point p to circle B by minimising over the plain parametrisation in closed form. */
export function refPointCircle2(p: number[], b: RefCircle): number {
  const [u, v] = frame(b.normal);
  const dx = p[0]! - b.center[0]!, dy = p[1]! - b.center[1]!, dz = p[2]! - b.center[2]!;
  const du = dx * u[0]! + dy * u[1]! + dz * u[2]!;
  const dv = dx * v[0]! + dy * v[1]! + dz * v[2]!;
  const dd = dx * dx + dy * dy + dz * dz;
  return Math.max(0, dd + b.radius * b.radius - 2 * b.radius * Math.hypot(du, dv));
}

export function refMinima(a: RefCircle, b: RefCircle, samples = 2048): RefMin[] {
  const [ua, va] = frame(a.normal);
  const [ub, vb] = frame(b.normal);
  const bn = Array.from(b.normal).map((x) => x / Math.hypot(b.normal[0]!, b.normal[1]!, b.normal[2]!));
  const delta = (s: number): number[] => {
    const c = Math.cos(s), sn = Math.sin(s);
    return [0, 1, 2].map((i) => a.center[i]! + a.radius * (ua[i]! * c + va[i]! * sn) - b.center[i]!);
  };
  const f = (s: number): number => {
    const [dx, dy, dz] = delta(s) as [number, number, number];
    const du = dx * ub[0]! + dy * ub[1]! + dz * ub[2]!;
    const dv = dx * vb[0]! + dy * vb[1]! + dz * vb[2]!;
    return Math.max(0, dx * dx + dy * dy + dz * dz + b.radius * b.radius - 2 * b.radius * Math.hypot(du, dv));
  };
  const axisDist = (s: number): number => {
    const d = delta(s);
    const z = d[0]! * bn[0]! + d[1]! * bn[1]! + d[2]! * bn[2]!;
    return Math.hypot(d[0]! - z * bn[0]!, d[1]! - z * bn[1]!, d[2]! - z * bn[2]!);
  };
  const h = (2 * Math.PI) / samples;
  const ss: number[] = [];
  let bestRho = Infinity, bestS = 0;
  for (let i = 0; i < samples; i++) {
    ss.push(i * h);
    const rho = axisDist(i * h);
    if (rho < bestRho) { bestRho = rho; bestS = i * h; }
  }
  // Where A passes near B's axis the distance has a cusp of width ~ rho/RA with minima beside it: pack
  // extra samples there, uniformly at several zoom levels (plain brute force, just more of it).
  for (let zoom = 1; zoom <= 12; zoom++) {
    const w = 2 * h / 4 ** (zoom - 1);
    for (let k = -200; k <= 200; k++) ss.push(bestS + (k * w) / 200);
  }
  const sorted = ss.map((x) => ((x % (2 * Math.PI)) + 2 * Math.PI) % (2 * Math.PI)).sort((x, y) => x - y);
  const uniq: number[] = [];
  for (const x of sorted) if (uniq.length === 0 || x - uniq[uniq.length - 1]! > 1e-15) uniq.push(x);
  const n = uniq.length;
  const vals = uniq.map(f);
  const out: RefMin[] = [];
  for (let i = 0; i < n; i++) {
    const fm = vals[(i - 1 + n) % n]!, f0 = vals[i]!, fp = vals[(i + 1) % n]!;
    if (f0 <= fm && f0 < fp) {
      // Golden-section search between the neighbouring samples.
      let lo = i > 0 ? uniq[i - 1]! : uniq[n - 1]! - 2 * Math.PI;
      let hi = i < n - 1 ? uniq[i + 1]! : uniq[0]! + 2 * Math.PI;
      const gr = (Math.sqrt(5) - 1) / 2;
      let x1 = hi - gr * (hi - lo), x2 = lo + gr * (hi - lo);
      let f1 = f(x1), f2 = f(x2);
      for (let it = 0; it < 80; it++) {
        if (f1 < f2) { hi = x2; x2 = x1; f2 = f1; x1 = hi - gr * (hi - lo); f1 = f(x1); }
        else { lo = x1; x1 = x2; f1 = f2; x2 = lo + gr * (hi - lo); f2 = f(x2); }
      }
      const s = 0.5 * (lo + hi);
      const depth = Math.min(fm, fp) - f0;
      out.push({ s: ((s % (2 * Math.PI)) + 2 * Math.PI) % (2 * Math.PI), d: Math.sqrt(f(s)), depth });
    }
  }
  return out;
}

/** Squared distance from A(s) to B, for checking that a reported contact is a local minimum. */
export function refF(a: RefCircle, b: RefCircle, s: number): number {
  return refPointCircle2(refPoint(a, s), b);
}

/** Angle s of a point p on circle A in the reference frame. */
export function refAngle(a: RefCircle, p: number[]): number {
  const [u, v] = frame(a.normal);
  const d = [p[0]! - a.center[0]!, p[1]! - a.center[1]!, p[2]! - a.center[2]!];
  return Math.atan2(d[0]! * v[0]! + d[1]! * v[1]! + d[2]! * v[2]!, d[0]! * u[0]! + d[1]! * u[1]! + d[2]! * u[2]!);
}
