// The curvature of a strut (src/optimize/strutHessian.ts, derived by hand from the envelope and implicit
// function theorems) against second differences of the exact kernel's contact distance under rigid motions.
import { describe, expect, it } from 'vitest';
import { ringDistance } from '../src/kernel/index.js';
import { expMap } from '../src/optimize/rotation.js';
import { strutHessian } from '../src/optimize/strutHessian.js';
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

describe('strut Hessian (hand derivation) against second differences of the exact kernel', () => {
  it('random pairs: every entry within 1e-6 of the largest', () => {
    const r = rng(20261204);
    const H = new Float64Array(144);
    let checked = 0;
    for (let trial = 0; trial < 40 && checked < 12; trial++) {
      const p: Pair = {
        ca: [0, 0, 0], na: randomUnit(r), Ra: 1,
        cb: [3 * r() - 1.5, 3 * r() - 1.5, 3 * r() - 1.5], nb: randomUnit(r), Rb: 0.5 + r(),
      };
      const res = ringDistance({ center: p.ca, normal: p.na, radius: p.Ra }, { center: p.cb, normal: p.nb, radius: p.Rb });
      if (res.degenerate || !res.certified) continue;
      // Well-separated contacts only: second differences need the tracked minimum to stay isolated.
      const c = res.contacts[0]!;
      if (c.distance < 0.05) continue;
      const d = strutHessian(c.onA, p.ca, p.na, c.onB, p.cb, p.nb, H);
      if (!Number.isFinite(d)) continue;
      expect(d).toBeCloseTo(c.distance, 12);
      const h = 1e-4;
      let worst = 0, largest = 0;
      for (let i = 0; i < 12; i++) {
        for (let j = 0; j < 12; j++) {
          const f = (si: number, sj: number): number => {
            const x = new Float64Array(12);
            x[i] = x[i]! + si * h;
            x[j] = x[j]! + sj * h;
            return distanceAt(p, x, c.onA as V);
          };
          const fd = (f(1, 1) - f(1, -1) - f(-1, 1) + f(-1, -1)) / (4 * h * h);
          worst = Math.max(worst, Math.abs(fd - H[i * 12 + j]!));
          largest = Math.max(largest, Math.abs(H[i * 12 + j]!));
        }
      }
      expect(worst / largest).toBeLessThan(1e-6);
      checked++;
    }
    expect(checked).toBeGreaterThanOrEqual(8);
  });
});
