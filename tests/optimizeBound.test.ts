// Circle-packing bound and the non-negative least squares used by the certificate.
import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { packingBound, packingRadius, withGap } from '../src/optimize/certify/bound.js';
import { nnls } from '../src/optimize/certify/nnls.js';
import type { Ring } from '../src/model/types.js';
import { rng } from './reference/rng.js';

const ring = (name: string, radius = 1): Ring => ({ name, center: [0, 0, 0], normal: [0, 0, 1], radius });

describe('packingRadius: best radius of k equal circles in a unit circle', () => {
  it('matches the published table', () => {
    // Graham, Lubachevsky, Nurmela, Östergård, Discrete Math. 181 (1998); Kravitz, Math. Mag. 40 (1967);
    // values as listed in references.md.
    const table: [number, number][] = [
      [2, 0.5], [3, 2 * Math.sqrt(3) - 3], [4, Math.SQRT2 - 1], [5, 1 / (1 + 1 / Math.sin(Math.PI / 5))],
      [6, 1 / 3], [7, 1 / 3], [8, 1 / (1 + 1 / Math.sin(Math.PI / 7))],
    ];
    for (const [k, r] of table) expect(Math.abs(packingRadius(k) - r)).toBeLessThan(1e-15);
    // Numerical values from memory: r_3 = 0.4641, r_5 = 0.3702, r_8 = 0.3026.
    expect(packingRadius(3)).toBeCloseTo(0.4641, 4);
    expect(packingRadius(5)).toBeCloseTo(0.3702, 4);
    expect(packingRadius(8)).toBeCloseTo(0.3026, 4);
  });

  it('beyond k = 8 stays a valid bound: no larger than r_8 nor the area bound 1/√k', () => {
    // Area: k disks of radius r inside a disk of radius 1 need k r² <= 1. Dropping circles keeps a packing
    // valid, so r_k is non-increasing in k.
    for (let k = 9; k <= 40; k++) {
      expect(packingRadius(k)).toBeLessThanOrEqual(1 / Math.sqrt(k) + 1e-15);
      expect(packingRadius(k)).toBeLessThanOrEqual(packingRadius(8));
      expect(packingRadius(k)).toBeLessThanOrEqual(packingRadius(k - 1));
    }
  });
});

describe('packingBound', () => {
  it('gives R/2 for a Hopf link, R/3 for a chain and R/w for unlinked rings', () => {
    // Cantarella–Kusner–Sullivan 2002 (linked component: length >= 4π at unit tube) gives R/2;
    // references.md: k = 2 gives tube <= R/3.
    const hopf = packingBound([ring('A', 2), ring('B', 1)], [1, 1], [[0, 1], [1, 0]])!;
    expect(hopf.tube).toBeCloseTo(0.5, 15);
    expect(hopf.ring).toBe(1);
    expect(hopf.through).toBe(1);
    const chain = packingBound([ring('A'), ring('B'), ring('C')], [1, 1, 1], [[0, 1, 0], [1, 0, 1], [0, 1, 0]])!;
    expect(Math.abs(chain.tube - 1 / 3)).toBeLessThan(1e-15);
    expect(chain.ring).toBe(1);
    expect(chain.through).toBe(2);
    const free = packingBound([ring('A', 3), ring('B', 2)], [1, 4], [[0, 0], [0, 0]])!;
    expect(free.tube).toBe(0.5);
    expect(free.through).toBe(0);
  });

  it('in inner diameter / wire diameter, k rings through one need ID/WD >= 1/r_k', () => {
    // references.md (same rule as the derivation in bound.ts): with r = t, ID/WD = (R - r)/r.
    for (let k = 1; k <= 8; k++) {
      const rings = Array.from({ length: k + 1 }, (_, i) => ring(String(i)));
      const L = rings.map((_, i) => rings.map((__, j) => (i !== j && (i === 0 || j === 0) ? 1 : 0)));
      const b = packingBound(rings, rings.map(() => 1), L)!;
      expect(Math.abs((1 - b.tube) / b.tube - 1 / packingRadius(k))).toBeLessThan(1e-12);
    }
  });

  it('uses the thinnest tube through the ring for unequal tube ratios', () => {
    // t w_min <= r_k (R - t w_i)  =>  t <= r_k R / (w_min + r_k w_i), derived in bound.ts.
    const rings = [ring('A'), ring('B'), ring('C')];
    const b = packingBound(rings, [2, 1, 3], [[0, 1, 0], [1, 0, 1], [0, 1, 0]])!;
    const viaB = (0.5 * 1) / (2 + 0.5 * 1);
    const viaA = (1 * 1) / (1 + 2);
    const viaC = (1 * 1) / (1 + 3);
    expect(b.tube).toBeCloseTo(Math.min(viaA, viaB, viaC), 15);
    // The gap is the relative shortfall below the bound by its definition: internal consistency, no outside source.
    expect(withGap(b, b.tube * 0.9)!.gap).toBeCloseTo(0.1, 12);
    expect(packingBound([], [], [])).toBeNull();
  });
});

describe('nnls (Lawson–Hanson)', () => {
  it('solves small problems with known answers', () => {
    // By hand: min (x1-2)² + (x2+1)² + (x1+x2-1)² over x >= 0 has x2 = 0, x1 = 3/2.
    const a = nnls(new Matrix([[1, 0], [0, 1], [1, 1]]), [2, -1, 1]);
    expect(a.x[0]).toBeCloseTo(1.5, 14);
    expect(a.x[1]).toBe(0);
    // Consistent with a non-negative solution: residual 0.
    const b = nnls(new Matrix([[1, 1, 1], [0, 1, 2]]), [1, 0.5]);
    expect(b.residual).toBeLessThan(1e-14);
    expect(Math.min(...b.x)).toBeGreaterThanOrEqual(0);
  });

  it('agrees with brute-force enumeration of supports on random problems', () => {
    // Reference: try every support set of at most m columns, solve the unconstrained least squares on it by normal equations,
    // keep non-negative solutions, take the smallest residual (exponential, exact for tiny sizes).
    const r = rng(11);
    for (let trial = 0; trial < 40; trial++) {
      const m = 3 + Math.floor(r() * 4), n = 2 + Math.floor(r() * 4);
      const A = new Matrix(m, n);
      for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) A.set(i, j, 2 * r() - 1);
      const b = Array.from({ length: m }, () => 2 * r() - 1);
      const got = nnls(A, b);
      let best = Infinity;
      for (let mask = 0; mask < 1 << n; mask++) {
        const cols = [...Array(n).keys()].filter((j) => mask & (1 << j));
        // An optimal support with independent columns exists (Carathéodory), so at most m columns.
        if (cols.length > m) continue;
        const x = new Array<number>(n).fill(0);
        if (cols.length > 0) {
          const sub = new Matrix(m, cols.length);
          cols.forEach((j, k) => { for (let i = 0; i < m; i++) sub.set(i, k, A.get(i, j)); });
          const ata = sub.transpose().mmul(sub);
          const atb = sub.transpose().mmul(Matrix.columnVector(b));
          const sol = solve(ata, atb);
          cols.forEach((j, k) => (x[j] = sol.get(k, 0)));
          if (x.some((v) => v < -1e-12)) continue;
        }
        let res = 0;
        for (let i = 0; i < m; i++) {
          let v = -b[i]!;
          for (let j = 0; j < n; j++) v += A.get(i, j) * Math.max(0, x[j]!);
          res += v * v;
        }
        best = Math.min(best, Math.sqrt(res));
      }
      expect(got.residual).toBeLessThanOrEqual(best + 1e-10);
      expect(got.residual).toBeGreaterThanOrEqual(best - 1e-10);
      expect(Math.min(...got.x)).toBeGreaterThanOrEqual(0);
    }
  });
});
