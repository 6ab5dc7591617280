// Result files built by hand for the play tests, so they do not depend on the optimizer.
import type { ResultRing, SolveResult } from '../src/model/result.js';
import type { Vec3 } from '../src/model/types.js';

export interface RingSpec {
  name: string;
  center: Vec3;
  normal: Vec3;
  radius: number;
}

/**
 * Tight Hopf link with core radius R: ring A in the xy-plane centred at 0, ring B in the xz-plane centred
 * at (R, 0, 0). Each ring passes through the other's centre, so every point of B is at distance R from A's
 * core and vice versa; the thickest tube is R/2 (Cantarella, Kusner, Sullivan, Invent. Math. 150, 2002).
 */
export function hopfRings(R = 1): RingSpec[] {
  return [
    { name: 'A', center: [0, 0, 0], normal: [0, 0, 1], radius: R },
    { name: 'B', center: [R, 0, 0], normal: [0, 1, 0], radius: R },
  ];
}

/** A SolveResult around the given rings at a common tube (contacts left empty: play recomputes them). */
export function resultOf(rings: RingSpec[], tube: number, spec = 'fixture', units: string | null = 'mm'): SolveResult {
  const rs: ResultRing[] = rings.map((r) => ({ ...r, tube, aspectRatio: (r.radius - tube) / tube }));
  return {
    format: 'thickring-result/1',
    command: 'inflate',
    spec,
    units,
    status: 'optimal',
    tube,
    tubeOverCore: tube / Math.min(...rings.map((r) => r.radius)),
    aspectRatio: Math.min(...rs.map((r) => r.aspectRatio)),
    tubeRatios: rings.map(() => 1),
    rings: rs,
    linking: rings.map((_, i) => rings.map((__, j) => (i === j ? 0 : 1))),
    symmetry: null,
    contacts: [],
    certificate: { method: 'none', balanceResidual: 0, maxViolation: 0, activeStruts: 0, certified: false, note: 'test fixture' },
    bound: null,
    starts: [],
    verification: { ok: true, minClearance: 0, linkingPreserved: true, tubeWithinRadius: true, messages: [] },
    elapsedSeconds: 0,
  };
}

/** Apply x -> Q x + t (Q row-major 3x3) to every ring. */
export function transformRings(rings: RingSpec[], Q: number[], t: Vec3): RingSpec[] {
  const mul = (v: Vec3): Vec3 => [
    Q[0]! * v[0] + Q[1]! * v[1] + Q[2]! * v[2],
    Q[3]! * v[0] + Q[4]! * v[1] + Q[5]! * v[2],
    Q[6]! * v[0] + Q[7]! * v[1] + Q[8]! * v[2],
  ];
  return rings.map((r) => {
    const c = mul(r.center);
    return { ...r, center: [c[0] + t[0], c[1] + t[1], c[2] + t[2]], normal: mul(r.normal) };
  });
}
