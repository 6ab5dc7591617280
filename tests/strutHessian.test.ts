// The curvature of a strut (src/optimize/constraints/strutHessian.ts, derived by hand from the envelope and implicit
// function theorems) against second differences of the exact kernel's contact distance under rigid motions.
import { describe, expect, it } from 'vitest';
import { closestPointOnCircle, pointCircleDistance, ringDistance } from '../src/kernel/index.js';
import { expMap } from '../src/optimize/chart/rotation.js';
import { strutHessian } from '../src/optimize/constraints/strutHessian.js';
import { applyRotation, randomUnit, rng } from './reference/rng.js';

type V = [number, number, number];
interface Pair { ca: V; na: V; Ra: number; cb: V; nb: V; Rb: number }

/** The contact distance after moving ring a by x[0..5] and ring b by x[6..11], tracked near `near` (on A). */
function distanceAt(p: Pair, x: ArrayLike<number>, near: V): number {
  const move = (c: V, n: V, o: number): [V, V] => {
    const Q = expMap(x[o + 3]!, x[o + 4]!, x[o + 5]!);
    return [[c[0] + x[o]!, c[1] + x[o + 1]!, c[2] + x[o + 2]!], applyRotation(Q as unknown as number[], n)];
  };
  const [ca, na] = move(p.ca, p.na, 0);
  const [cb, nb] = move(p.cb, p.nb, 6);
  const res = ringDistance({ center: ca, normal: na, radius: p.Ra }, { center: cb, normal: nb, radius: p.Rb });
  let best = NaN, bestGap = Infinity;
  for (const c of res.contacts) {
    const gap = Math.hypot(c.onA[0] - near[0], c.onA[1] - near[1], c.onA[2] - near[2]);
    if (gap < bestGap) {
      bestGap = gap;
      best = c.distance;
    }
  }
  return best;
}

/** Ring a of unit radius at the origin, ring b of radius 0.5 .. 1.5 centred within 1.5 of it; random normals. */
function randomPair(r: () => number): Pair {
  return {
    ca: [0, 0, 0], na: randomUnit(r), Ra: 1,
    cb: [3 * r() - 1.5, 3 * r() - 1.5, 3 * r() - 1.5], nb: randomUnit(r), Rb: 0.5 + r(),
  };
}

/** Largest |central second difference of f (step h) - H| over the 12 x 12 entries, relative to the largest |H|. */
function worstRelative(H: Float64Array, f: (x: Float64Array) => number, h: number): number {
  const at = (i: number, j: number, si: number, sj: number): number => {
    const x = new Float64Array(12);
    x[i] = x[i]! + si * h;
    x[j] = x[j]! + sj * h;
    return f(x);
  };
  let worst = 0, largest = 0;
  for (let i = 0; i < 12; i++) {
    for (let j = 0; j < 12; j++) {
      const fd = (at(i, j, 1, 1) - at(i, j, 1, -1) - at(i, j, -1, 1) + at(i, j, -1, -1)) / (4 * h * h);
      worst = Math.max(worst, Math.abs(fd - H[i * 12 + j]!));
      largest = Math.max(largest, Math.abs(H[i * 12 + j]!));
    }
  }
  return worst / largest;
}

describe('strut Hessian (hand derivation) against second differences of the exact kernel', () => {
  it('random pairs: every entry within 1e-6 of the largest', () => {
    const r = rng(20261204);
    const H = new Float64Array(144);
    let checked = 0;
    for (let trial = 0; trial < 40 && checked < 12; trial++) {
      const p = randomPair(r);
      const res = ringDistance({ center: p.ca, normal: p.na, radius: p.Ra }, { center: p.cb, normal: p.nb, radius: p.Rb });
      if (res.degenerate || !res.certified) continue;
      // Well-separated contacts only: second differences need the tracked minimum to stay isolated.
      const c = res.contacts[0]!;
      if (c.distance < 0.05) continue;
      const d = strutHessian(c.onA, p.ca, p.na, c.onB, p.cb, p.nb, H);
      if (!Number.isFinite(d)) continue;
      expect(d).toBeCloseTo(c.distance, 12);
      const h = 1e-4;
      expect(worstRelative(H, (x) => distanceAt(p, x, c.onA as V), h)).toBeLessThan(1e-6);
      checked++;
    }
    expect(checked).toBeGreaterThanOrEqual(8);
  });

  it('a material point of ring b against ring a (sampled near-contact): within 1e-6 of the largest entry', () => {
    const r = rng(4120);
    const H = new Float64Array(144);
    let checked = 0;
    for (let trial = 0; trial < 30 && checked < 8; trial++) {
      const p = randomPair(r);
      // A point of ring b at a random material angle: its radius vector is any unit vector normal to nb.
      const u = randomUnit(r);
      const k = u[0] * p.nb[0] + u[1] * p.nb[1] + u[2] * p.nb[2];
      const v: V = [u[0] - k * p.nb[0], u[1] - k * p.nb[1], u[2] - k * p.nb[2]];
      const lv = Math.hypot(...v);
      if (lv < 0.2) continue;
      const rb: V = [v[0] / lv * p.Rb, v[1] / lv * p.Rb, v[2] / lv * p.Rb];
      const pb: V = [p.cb[0] + rb[0], p.cb[1] + rb[1], p.cb[2] + rb[2]];
      const pa = new Float64Array(3);
      closestPointOnCircle(pb, p.ca, p.na, p.Ra, pa);
      // Stay away from ring a's axis, where the nearest point jumps.
      const axial = pb[0] * p.na[0] + pb[1] * p.na[1] + pb[2] * p.na[2];
      if (Math.hypot(pb[0] - axial * p.na[0], pb[1] - axial * p.na[1], pb[2] - axial * p.na[2]) < 0.2) continue;
      const d = strutHessian(pa, p.ca, p.na, pb, p.cb, p.nb, H, true);
      if (!Number.isFinite(d) || d < 0.05) continue;
      const h = 1e-4;
      const at = (x: Float64Array): number => {
        const Qa = expMap(x[3]!, x[4]!, x[5]!), Qb = expMap(x[9]!, x[10]!, x[11]!);
        const na = applyRotation(Qa as unknown as number[], p.na);
        const rr = applyRotation(Qb as unknown as number[], rb);
        const q = [p.cb[0] + x[6]! + rr[0], p.cb[1] + x[7]! + rr[1], p.cb[2] + x[8]! + rr[2]];
        return pointCircleDistance(q, [x[0]!, x[1]!, x[2]!], na, p.Ra);
      };
      expect(worstRelative(H, at, h)).toBeLessThan(1e-6);
      checked++;
    }
    expect(checked).toBeGreaterThanOrEqual(5);
  });
});
